// libFuzzer target: met CSV (met/csv_met.hpp), read as a zone-free file and with naive times in
// a daylight-saving zone.
#include "fuzz_common.hpp"
#include "lidbox/met/csv_met.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string text = lidbox::fuzz::text_of(data, size);
  static const lidbox::TimeZone zone =
      lidbox::TimeZone::parse("CET-1CEST,M3.5.0,M10.5.0/3", "fuzz");
  lidbox::fuzz::expect_input_errors_only("fuzz_met_csv", [&] {
    lidbox::CsvMetOptions o;
    (void)lidbox::parse_met_csv(text, o, "met.csv");
  });
  lidbox::fuzz::expect_input_errors_only("fuzz_met_csv", [&] {
    lidbox::CsvMetOptions o;
    o.zone_for_naive_times = &zone;
    (void)lidbox::parse_met_csv(text, o, "met.csv");
  });
  return 0;
}
