// libFuzzer target: time zones (base/time.hpp: fixed offsets, POSIX TZ strings read by
// base/posix_tz, IANA names from the system's tzdata) and ISO 8601 instants. The first line is a
// zone; the zone is then asked for offsets and conversions across lidbox's years -9999..9999,
// and the rest of the input is read as an ISO 8601 time in that zone.
#include <array>

#include "fuzz_common.hpp"
#include "lidbox/base/time.hpp"

namespace {

void exercise(const lidbox::TimeZone& zone) {
  // Instants: years -9999, 500, 1400, 1970, 2026 (both sides of a March change), 9999.
  const std::array<lidbox::UtcSeconds, 7> instants = {
      -377705203200LL, -46388678400LL, -17987443200LL, 0, 1774746000LL, 1774756800LL,
      253402214400LL};
  for (const lidbox::UtcSeconds t : instants) {
    (void)zone.civil_offset_s(t);
    (void)zone.civil(t);
    (void)zone.standard(t);
  }
  for (const int year : {-9999, 500, 1970, 2026, 9999}) {
    for (const int month : {1, 3, 10}) {
      lidbox::CivilTime c;
      c.year = year;
      c.month = month;
      c.day = 29;
      c.hour = 2;
      c.minute = 30;
      lidbox::fuzz::expect_input_errors_only("fuzz_time_zone",
                                             [&] { (void)zone.from_civil(c, "fuzz"); });
    }
  }
  (void)zone.kind_label();
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string text = lidbox::fuzz::text_of(data, size);
  const std::size_t nl = text.find('\n');
  const std::string spec = text.substr(0, nl);
  const std::string instant = nl == std::string::npos ? std::string() : text.substr(nl + 1);
  lidbox::TimeZone zone;
  lidbox::fuzz::expect_input_errors_only("fuzz_time_zone", [&] {
    zone = lidbox::TimeZone::parse(spec, "case.toml:3: time_zone");
    exercise(zone);
  });
  lidbox::fuzz::expect_input_errors_only("fuzz_time_zone", [&] {
    (void)lidbox::parse_iso8601(instant, &zone, "met.csv:2");
  });
  lidbox::fuzz::expect_input_errors_only("fuzz_time_zone", [&] {
    (void)lidbox::parse_iso8601(instant, nullptr, "met.csv:2");
  });
  return 0;
}
