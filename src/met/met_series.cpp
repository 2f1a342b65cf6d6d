#include "lidbox/met/met_series.hpp"

#include <cmath>
#include <numbers>

#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"

namespace lidbox {

const MetColumn* MetSeries::find_extra(const std::string& name) const {
  for (const auto& c : extra) {
    if (c.name == name) return &c;
  }
  return nullptr;
}

void wind_components(double speed_m_s, double from_deg, double& u_m_s, double& v_m_s) {
  const double theta = from_deg * (std::numbers::pi / 180.0);
  u_m_s = -speed_m_s * std::sin(theta);
  v_m_s = -speed_m_s * std::cos(theta);
}

double wind_from_deg(double u_m_s, double v_m_s) {
  if (u_m_s == 0.0 && v_m_s == 0.0) return 0.0;
  double d = std::atan2(-u_m_s, -v_m_s) * (180.0 / std::numbers::pi);
  if (d < 0.0) d += 360.0;
  if (d >= 360.0) d -= 360.0;
  return d;
}

namespace {

bool stamp_missing(const MetSeries& m, std::size_t i) {
  if (std::isnan(m.mixing_height_m[i]) || std::isnan(m.wind_u_m_s[i]) ||
      std::isnan(m.wind_v_m_s[i])) {
    return true;
  }
  if (!m.air_temperature_K.empty() && std::isnan(m.air_temperature_K[i])) return true;
  if (!m.surface_pressure_Pa.empty() && std::isnan(m.surface_pressure_Pa[i])) return true;
  for (const auto& c : m.extra) {
    if (std::isnan(c.values[i])) return true;
  }
  return false;
}

// Interpolates every NaN run of one variable; the caller has already checked run lengths.
void interpolate(std::vector<double>& v) {
  const std::size_t n = v.size();
  std::size_t i = 0;
  while (i < n) {
    if (!std::isnan(v[i])) {
      ++i;
      continue;
    }
    std::size_t j = i;
    while (j < n && std::isnan(v[j])) ++j;
    // i-1 and j are valid (ends were refused before).
    const double a = v[i - 1];
    const double b = v[j];
    const double span = static_cast<double>(j - (i - 1));
    for (std::size_t k = i; k < j; ++k) {
      v[k] = a + (b - a) * static_cast<double>(k - (i - 1)) / span;
    }
    i = j;
  }
}

}  // namespace

void fill_gaps(MetSeries& met, int max_gap_hours) {
  const std::size_t n = met.size();
  met.filled.assign(n, 0);
  if (met.source_line.size() != n) met.source_line.assign(n, 0);
  std::size_t i = 0;
  while (i < n) {
    if (!stamp_missing(met, i)) {
      ++i;
      continue;
    }
    std::size_t j = i;
    while (j < n && stamp_missing(met, j)) ++j;
    const auto len = static_cast<long>(j - i);
    const std::string span = format_utc(met.stamp(i)) +
                             (len > 1 ? " to " + format_utc(met.stamp(j - 1)) : std::string());
    if (i == 0 || j == n) {
      throw InputError(met.source, "missing values at " + span + " at the " +
                                       (i == 0 ? "start" : "end") + " of the series",
                       "values at the first and last hour (gaps are filled only between valid "
                       "hours)");
    }
    if (len > max_gap_hours) {
      throw InputError(met.source,
                       "a gap of " + std::to_string(len) + " hours (" + span + ")",
                       "gaps of at most " + std::to_string(max_gap_hours) +
                           " hours (set [met] max_gap_hours to fill longer gaps, or split the run)");
    }
    for (std::size_t k = i; k < j; ++k) met.filled[k] = 1;
    i = j;
  }
  interpolate(met.mixing_height_m);
  interpolate(met.wind_u_m_s);
  interpolate(met.wind_v_m_s);
  interpolate(met.air_temperature_K);
  interpolate(met.surface_pressure_Pa);
  for (auto& c : met.extra) interpolate(c.values);
}

namespace {

// The place of hour i in messages: "met.csv:14 (2026-01-12T05:00:00Z)". Appended piece by piece:
// g++ 12 at -O3 reports a bogus -Wrestrict overlap for "literal" + std::string&& (GCC bug 105329).
std::string hour_place(const MetSeries& met, std::size_t i) {
  std::string where = met.source;
  if (met.source_line[i] > 0) {
    where += ':';
    where += std::to_string(met.source_line[i]);
  }
  where += " (";
  where += format_utc(met.stamp(i));
  where += ')';
  return where;
}

// Checks `value` against the range of `key` (fetched once by the caller); the message is built
// only for a value outside it.
void check_hour(const PlausibilityLimits& limits, const PlausibleRange& r, double value,
                const MetSeries& met, std::size_t i) {
  if (!r.admits(value)) limits.check(r.key, value, hour_place(met, i));
}

}  // namespace

void validate_met(const MetSeries& met, const PlausibilityLimits& limits) {
  const PlausibleRange& height = limits.range("mixing_height");
  const PlausibleRange& speed = limits.range("wind_speed");
  const PlausibleRange& temperature = limits.range("air_temperature");
  const PlausibleRange& pressure = limits.range("surface_pressure");
  for (std::size_t i = 0; i < met.size(); ++i) {
    const double h = met.mixing_height_m[i];
    if (!std::isfinite(h) || h <= 0.0) {
      throw InputError(hour_place(met, i), "mixing height " + format_number(h) + " m",
                       "a mixing height above 0 m");
    }
    if (!std::isfinite(met.wind_u_m_s[i]) || !std::isfinite(met.wind_v_m_s[i])) {
      throw InputError(hour_place(met, i), "a wind that is not a finite number",
                       "finite wind values");
    }
    check_hour(limits, height, h, met, i);
    check_hour(limits, speed, wind_speed_m_s(met.wind_u_m_s[i], met.wind_v_m_s[i]), met, i);
    if (!met.air_temperature_K.empty()) {
      check_hour(limits, temperature, met.air_temperature_K[i], met, i);
    }
    if (!met.surface_pressure_Pa.empty()) {
      check_hour(limits, pressure, met.surface_pressure_Pa[i], met, i);
    }
  }
}

}  // namespace lidbox
