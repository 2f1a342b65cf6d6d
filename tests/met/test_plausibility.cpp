// The plausibility table (issue 13, item 10): one range per quantity, the same message shape
// whatever the reader. Range values are the shipped table's own (common practice, no source,
// except where the header names one); messages are asserted whole.
#include <doctest/doctest.h>

#include <cmath>
#include <string>

#include "lidbox/base/error.hpp"
#include "lidbox/base/plausibility.hpp"
#include "lidbox/met/csv_met.hpp"

using namespace lidbox;

namespace {

std::string error_of(const PlausibilityLimits& p, const char* key, double v,
                     const std::string& shown = "", const std::string& unit = "") {
  try {
    p.check(key, v, "here", shown, unit);
  } catch (const InputError& e) {
    return e.what();
  }
  return "no error";
}

}  // namespace

TEST_CASE("every quantity has one range with a source or the common-practice mark") {
  const PlausibilityLimits p;
  for (const auto& key : p.keys()) {
    const PlausibleRange& r = p.range(key);
    CHECK_MESSAGE(r.min < r.max, key);
    CHECK_MESSAGE(!r.source.empty(), key);
  }
  CHECK(p.keys().size() == 12);
}

TEST_CASE("the three values of the report are refused with the quantity and the range") {
  const PlausibilityLimits p;
  // 1e300 m, 99 999 m/s and 1e30 t/h = 2.777778e32 g/s (1 t/h = 1e6 g / 3600 s, closed form).
  CHECK(error_of(p, "mixing_height", 1e300, "1e300", "m") ==
        "here: mixing height 1e300 m is outside the plausible range; expected a mixing height "
        "from 0 to 10000 m (common practice, no source; change it in [plausibility] "
        "mixing_height)");
  CHECK(error_of(p, "wind_speed", 99999.0) ==
        "here: wind speed 99999 m/s is outside the plausible range; expected a wind speed from 0 "
        "to 115 m/s (above the highest surface gust on record, 113 m/s (WMO extremes archive, "
        "from memory); change it in [plausibility] wind_speed)");
  CHECK(error_of(p, "emission_rate", 1e30 * 1e6 / 3600.0, "1e30 t/h") ==
        "here: emission rate 1e30 t/h (2.777778e+32 g/s) is outside the plausible range; "
        "expected an emission rate from 0 to 1000000 g/s (common practice, no source; change it "
        "in [plausibility] emission_rate)");
  CHECK(error_of(p, "wind_from", 360.0) == "no error");
  CHECK(error_of(p, "wind_from", std::nan("")) == "no error");
}

TEST_CASE("a changed range is used by the CSV reader with its line and column") {
  PlausibilityLimits p;
  p.set("mixing_height", 0.0, 250.0, "set in c.toml:3");
  CsvMetOptions o;
  o.limits = &p;
  std::string message = "no error";
  try {
    (void)parse_met_csv(
        "time,mixing_height [m],wind_speed [m/s],wind_from [deg]\n2026-01-05T00:00Z,100,1,0\n"
        "2026-01-05T01:00Z,300,1,0\n",
        o, "m.csv");
  } catch (const InputError& e) {
    message = e.what();
  }
  CHECK(message ==
        "m.csv:3: column \"mixing_height [m]\": mixing height 300 m is outside the plausible "
        "range; expected a mixing height from 0 to 250 m (set in c.toml:3; change it in "
        "[plausibility] mixing_height)");
}
