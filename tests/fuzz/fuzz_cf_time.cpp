// libFuzzer target: CF time units and their decoding (base/cf_time.hpp). The input is
// "<units>\n<calendar>\n<8 bytes: a double time value>"; missing parts are empty.
#include <cmath>
#include <cstring>
#include <limits>

#include "fuzz_common.hpp"
#include "lidbox/base/cf_time.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string text = lidbox::fuzz::text_of(data, size);
  const std::size_t nl1 = text.find('\n');
  const std::string units = text.substr(0, nl1);
  std::string calendar, rest;
  if (nl1 != std::string::npos) {
    const std::size_t nl2 = text.find('\n', nl1 + 1);
    calendar = text.substr(nl1 + 1, nl2 == std::string::npos ? std::string::npos : nl2 - nl1 - 1);
    if (nl2 != std::string::npos) rest = text.substr(nl2 + 1);
  }
  double value = 0.0;
  if (rest.size() >= sizeof value) std::memcpy(&value, rest.data(), sizeof value);
  lidbox::fuzz::expect_input_errors_only("fuzz_cf_time", [&] {
    const lidbox::CfTimeUnits u = lidbox::parse_cf_time_units(units, calendar, "t.nc: time");
    const double values[] = {value, 0.0, -1.0, 1e9, -1e9, 1e300, -1e300,
                             std::numeric_limits<double>::quiet_NaN(),
                             std::numeric_limits<double>::infinity()};
    for (double v : values) {
      lidbox::fuzz::expect_input_errors_only("fuzz_cf_time", [&] {
        const lidbox::UtcSeconds t = lidbox::decode_cf_time(u, v, "t.nc: time");
        (void)lidbox::format_utc(t);
      });
    }
  });
  return 0;
}
