// Emission sectors and their clocks.
//
// A sector has a long-term mean emission rate per pollutant (a total over the footprint, or an
// area flux times the footprint's area) and a clock: 24 hour-of-day weights, 7 day-of-week
// weights (Monday first, ISO 8601) and optionally 12 month weights, applied in local civil time
// (daylight saving included: traffic follows the wall clock).
//
// Weights are relative (physics note section 9): each set is normalised to a mean of 1 so that
// the stated rate stays the long-term mean rate. The month weights are normalised by their mean
// weighted with the mean length of each month in the 400-year Gregorian cycle (February 28.2425
// days), so that a year of rates integrates to the stated annual total. The factor the tool
// divided by is reported (ClockProfile::*_raw_mean).
#pragma once

#include <array>
#include <string>
#include <vector>

#include "lidbox/base/time.hpp"

namespace lidbox {

struct ClockProfile {
  std::array<double, 24> hour_of_day{};
  std::array<double, 7> day_of_week{};
  std::array<double, 12> month{};
  bool has_month = false;
  double hour_raw_mean = 1.0;  // mean of the weights as given
  double day_raw_mean = 1.0;
  double month_raw_mean = 1.0;

  // Flat clock: every factor 1.
  static ClockProfile flat();
  // From weights as given (empty vector = flat). Sizes must be 24, 7 and 12; weights >= 0 with a
  // positive mean. InputError naming `where` otherwise.
  static ClockProfile from_weights(const std::vector<double>& hour_of_day,
                                   const std::vector<double>& day_of_week,
                                   const std::vector<double>& month, const std::string& where);

  // The product of the normalised weights at a local civil time.
  [[nodiscard]] double factor(const CivilTime& local) const;
};

struct EmissionSector {
  std::string name;
  std::vector<double> rate_g_s;  // [pollutant], long-term mean over the footprint
  ClockProfile clock;
};

}  // namespace lidbox
