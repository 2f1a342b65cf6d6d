// libFuzzer target: a rule-set file (standards/rule_set.hpp).
#include "fuzz_common.hpp"
#include "lidbox/standards/rule_set.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string text = lidbox::fuzz::text_of(data, size);
  lidbox::fuzz::expect_input_errors_only("fuzz_rule_set", [&] {
    (void)lidbox::parse_rule_set(text, "rules.toml");
  });
  return 0;
}
