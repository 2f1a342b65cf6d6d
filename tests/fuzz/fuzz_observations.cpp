// libFuzzer target: observed hourly concentrations in CSV (standards/observations_csv.hpp), and
// the instant and offset readers of its time column.
#include "fuzz_common.hpp"
#include "lidbox/standards/observations_csv.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string text = lidbox::fuzz::text_of(data, size);
  lidbox::fuzz::expect_input_errors_only("fuzz_observations", [&] {
    (void)lidbox::parse_observations_csv(text, "obs.csv");
  });
  if (size > 256) return 0;  // one cell: the readers below see short texts
  lidbox::fuzz::expect_input_errors_only("fuzz_observations", [&] {
    (void)lidbox::parse_instant_with_offset(text, "obs.csv:2");
  });
  lidbox::fuzz::expect_input_errors_only("fuzz_observations", [&] {
    (void)lidbox::parse_utc_offset_s(text, "obs.csv:2");
  });
  return 0;
}
