#include "lidbox/base/plausibility.hpp"

#include <cmath>

#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"

namespace lidbox {

namespace {

constexpr const char* kPractice = "common practice, no source";

// The shipped ranges. They are wide on purpose (plausibility.hpp): a range is a net for codes,
// unit slips and corrupt numbers, not a judgement on the weather.
std::vector<PlausibleRange> shipped_ranges() {
  return {
      // Deepest convective boundary layers over deserts reach about 5-6 km (from memory); twice
      // that is still a net for 1e300 and for feet read as metres of a very deep layer.
      {"mixing_height", "mixing height", "m", "length", 0.0, 10000.0, kPractice},
      // Above the highest surface gust on record, 113 m/s (Barrow Island 1996, WMO archive, from
      // memory); an hourly mean is far below it.
      {"wind_speed", "wind speed", "m/s", "speed", 0.0, 115.0,
       "above the highest surface gust on record, 113 m/s (WMO extremes archive, from memory)"},
      // WMO-No. 8: direction clockwise from north, 0 to 360 degrees.
      {"wind_from", "wind direction", "degree", "direction", 0.0, 360.0,
       "WMO-No. 8 convention, 0 to 360 degrees clockwise from north"},
      // -100 to +70 degC: outside the WMO archive's extremes (-89.2 degC at Vostok, 1983; the
      // highest about 57 degC).
      {"air_temperature", "air temperature", "K", "temperature", 173.15, 343.15,
       "beyond the WMO extremes archive (-89.2 degC Vostok 1983, highest about 57 degC)"},
      // 300 hPa is above the summit of Everest (about 330 hPa, from memory); 1100 hPa above the
      // highest sea-level pressure on record (1083.8 hPa, Agata 1968, from memory).
      {"surface_pressure", "surface air pressure", "Pa", "pressure", 30000.0, 110000.0, kPractice},
      // One hour's fall: the record one-hour totals are about 0.3 m (from memory). The lower
      // bound allows the tiny negative values that packing leaves in reanalysis totals.
      {"precipitation", "precipitation in one hour", "m", "length", -1.0e-6, 0.4, kPractice},
      // Upper-level jets rarely exceed 100 m/s (from memory).
      {"wind_500hPa", "500 hPa wind speed", "m/s", "speed", 0.0, 150.0, kPractice},
      // A sector's total rate: 1000 kg/s (3600 t/h) is far above any city's total of any
      // pollutant; 1e30 t/h is a typing slip.
      {"emission_rate", "emission rate", "g/s", "mass rate", 0.0, 1.0e6, kPractice},
      // An area flux: grid runs use a unit flux of 1 g m-2 s-1, so the net is ten times that.
      {"emission_flux", "emission flux", "g m-2 s-1", "area flux", 0.0, 10.0, kPractice},
      // Concentrations in the case file (background, free troposphere, initial values), as mass
      // per volume: 0.1 g/m3 is about 87 ppm of CO at 25 degC, beyond any ambient value.
      {"concentration", "concentration", "g/m3", "mass concentration", 0.0, 0.1, kPractice},
      // Monitor data, in ug/m3 (mole fractions through their unit's factor). The lower bound is
      // the instrument-noise tolerance: values from -5 ug/m3 to 0 are kept as measured and
      // counted in the report; -999 is refused unless declared as a missing-value code.
      {"monitor_concentration", "monitor concentration", "ug/m3", "mass concentration", -5.0,
       5000.0, kPractice},
      // CO is measured in mg/m3 ranges: 60 mg/m3 is about 52 ppm at 25 degC, and its noise
      // tolerance is 1 mg/m3 (about 0.9 ppm).
      {"monitor_co", "monitor CO concentration", "ug/m3", "mass concentration", -1000.0, 60000.0,
       kPractice},
  };
}

}  // namespace

PlausibilityLimits::PlausibilityLimits() : ranges_(shipped_ranges()) {}

const PlausibleRange& PlausibilityLimits::range(std::string_view key) const {
  for (const auto& r : ranges_) {
    if (r.key == key) return r;
  }
  throw InternalError("no plausibility range \"" + std::string(key) + "\"");
}

std::vector<std::string> PlausibilityLimits::keys() const {
  std::vector<std::string> out;
  for (const auto& r : ranges_) out.push_back(r.key);
  return out;
}

void PlausibilityLimits::set(std::string_view key, double min, double max,
                             const std::string& source) {
  for (auto& r : ranges_) {
    if (r.key == key) {
      r.min = min;
      r.max = max;
      r.source = source;
      return;
    }
  }
  throw InternalError("no plausibility range \"" + std::string(key) + "\"");
}

std::string PlausibilityLimits::expected(std::string_view key, const std::string& hint) const {
  const PlausibleRange& r = range(key);
  const std::string unit = r.unit == "degree" ? "deg" : r.unit;
  const bool vowel = std::string("aeiou").find(r.label.front()) != std::string::npos;
  return (vowel ? "an " : "a ") + r.label + " from " + format_number(r.min) + " to " + format_number(r.max) + " " +
         unit + " (" + r.source + "; " +
         (hint.empty() ? "change it in [plausibility] " + r.key : hint) + ")";
}

void PlausibilityLimits::check(std::string_view key, double value, const std::string& where,
                               const std::string& shown, const std::string& shown_unit,
                               const std::string& hint) const {
  const PlausibleRange& r = range(key);
  if (r.admits(value)) return;
  const std::string unit = r.unit == "degree" ? "deg" : r.unit;
  std::string text = format_number(value) + " " + unit;
  if (!shown.empty()) {
    const std::string as_written = excerpt(shown) + (shown_unit.empty() ? "" : " " + shown_unit);
    // The value as written, and in the range's unit when that differs.
    const bool same = as_written == text || shown_unit == unit || excerpt(shown) == format_number(value);
    text = same ? as_written : as_written + " (" + text + ")";
  }
  throw InputError(where, r.label + " " + text + " is outside the plausible range",
                   expected(key, hint));
}

}  // namespace lidbox
