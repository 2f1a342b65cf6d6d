// libFuzzer target: the case file (engine/case_file.hpp). parse_case reads no other file: paths
// inside are only resolved against the base folder.
#include "fuzz_common.hpp"
#include "lidbox/engine/case_file.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string text = lidbox::fuzz::text_of(data, size);
  lidbox::fuzz::expect_input_errors_only("fuzz_case_file", [&] {
    (void)lidbox::parse_case(text, "case.toml", "/nonexistent-fuzz-base");
  });
  return 0;
}
