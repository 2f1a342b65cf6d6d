// Hourly meteorological forcing on a regular one-hour time axis, as every reader delivers it.
//
// Wind is kept as components (u towards east, v towards north, as CF eastward_wind and
// northward_wind). Meteorological direction is where the wind comes FROM, clockwise from north:
//   u = -s sin(theta),  v = -s cos(theta)     (WMO-No. 8, wind direction convention)
// Interpolation is done on components, so a veering wind passes through a lower speed rather than
// spinning the wrong way round.
#pragma once

#include <cmath>
#include <cstdint>
#include <string>
#include <vector>

#include "lidbox/base/plausibility.hpp"
#include "lidbox/base/time.hpp"

namespace lidbox {

// How an hourly value is meant (physics note, section 4).
enum class MetReading {
  instantaneous,  // a value at its time stamp (model output): interpolated linearly between stamps
  hour_average,   // the mean over the hour it labels (observations): held through that hour
};
// Which end of its hour an hour-average value is stamped at.
enum class HourLabel { period_start, period_end };

// A column the engine does not interpret itself (a background series, for example), kept with
// the unit its source declared.
struct MetColumn {
  std::string name;
  std::string unit;
  std::vector<double> values;  // NaN where missing before gap filling
};

struct MetSeries {
  std::string source;              // file name, for messages
  UtcSeconds first_stamp_utc = 0;  // stamp of element 0; element i is stamped first + i*3600
  std::vector<double> mixing_height_m;
  std::vector<double> wind_u_m_s;
  std::vector<double> wind_v_m_s;
  std::vector<double> air_temperature_K;    // empty when the source has none
  std::vector<double> surface_pressure_Pa;  // empty when the source has none
  std::vector<MetColumn> extra;
  std::vector<std::uint8_t> filled;  // 1 where the gap rule supplied a value at this stamp
  std::vector<int> source_line;      // line (or record) each stamp came from; 0 for filled stamps

  [[nodiscard]] std::size_t size() const { return mixing_height_m.size(); }
  [[nodiscard]] UtcSeconds stamp(std::size_t i) const {
    return first_stamp_utc + static_cast<UtcSeconds>(i) * kSecondsPerHour;
  }
  [[nodiscard]] const MetColumn* find_extra(const std::string& name) const;
};

// Wind conversions (degrees, metres per second).
void wind_components(double speed_m_s, double from_deg, double& u_m_s, double& v_m_s);
double wind_from_deg(double u_m_s, double v_m_s);  // 0 <= result < 360; 0 for a calm
// The speed of a wind given by its components, sqrt(u^2 + v^2): the one formula of the library
// (engine, diagnostics, readers, writers), within an ulp of std::hypot and several times faster;
// no overflow for any plausible wind (|u|, |v| < 1e150).
inline double wind_speed_m_s(double u_m_s, double v_m_s) {
  return std::sqrt(u_m_s * u_m_s + v_m_s * v_m_s);
}

// Fills gaps in place by linear interpolation in time, separately for each variable, between the
// nearest valid stamps on either side (wind by components); sets `filled` for each supplied stamp.
// A run of missing stamps longer than max_gap_hours, or one at either end of the series, is an
// InputError naming the source and the UTC times of the gap.
// Gap rule: physics note section 5 (linear interpolation, default up to 3 h, always flagged).
void fill_gaps(MetSeries& met, int max_gap_hours);

// Physical checks after filling: mixing height > 0 m and finite; speeds finite; then every value
// within its plausibility range (plausibility.hpp: mixing height, wind speed from the components,
// air temperature, surface pressure), whatever reader made the series. InputError names the
// source, the line (or record) and the value.
void validate_met(const MetSeries& met, const PlausibilityLimits& limits = PlausibilityLimits());

}  // namespace lidbox
