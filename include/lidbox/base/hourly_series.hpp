// An hourly series of hour means on a regular UTC hour axis: the common currency between the box
// engine's output, observed monitor data and the averaging/standards code.
#pragma once

#include <cmath>
#include <limits>
#include <string>
#include <vector>

#include "lidbox/base/time.hpp"

namespace lidbox {

struct HourlySeries {
  // Start of the hour that values[0] covers: values[i] is the mean over
  // [first_hour_start_utc + i*3600, first_hour_start_utc + (i+1)*3600).
  UtcSeconds first_hour_start_utc = 0;
  std::vector<double> values;  // NaN marks a missing hour
  std::string unit;            // canonical unit text ("ppb", "ug m-3", ...)

  [[nodiscard]] std::size_t size() const { return values.size(); }
  [[nodiscard]] UtcSeconds hour_start(std::size_t i) const {
    return first_hour_start_utc + static_cast<UtcSeconds>(i) * kSecondsPerHour;
  }
  [[nodiscard]] static bool missing(double v) { return std::isnan(v); }
};

inline constexpr double kMissing = std::numeric_limits<double>::quiet_NaN();

}  // namespace lidbox
