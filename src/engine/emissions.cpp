#include "lidbox/engine/emissions.hpp"

#include <cmath>

#include "lidbox/base/error.hpp"

namespace lidbox {

ClockProfile ClockProfile::flat() {
  ClockProfile c;
  c.hour_of_day.fill(1.0);
  c.day_of_week.fill(1.0);
  c.month.fill(1.0);
  return c;
}

namespace {

template <std::size_t N>
double fill_normalised(std::array<double, N>& out, const std::vector<double>& w,
                       const double* day_weights, const std::string& where, const char* what) {
  if (w.empty()) {
    out.fill(1.0);
    return 1.0;
  }
  if (w.size() != N) {
    throw InputError(where, std::string(what) + " has " + std::to_string(w.size()) + " weights",
                     std::to_string(N) + " weights");
  }
  double sum = 0.0, total_weight = 0.0;
  for (std::size_t i = 0; i < N; ++i) {
    if (!(w[i] >= 0.0) || !std::isfinite(w[i])) {
      throw InputError(where, std::string(what) + " weight " + std::to_string(i + 1) + " is " +
                                  std::to_string(w[i]),
                       "weights >= 0");
    }
    const double dw = day_weights ? day_weights[i] : 1.0;
    sum += w[i] * dw;
    total_weight += dw;
  }
  const double mean = sum / total_weight;
  if (!(mean > 0.0)) {
    throw InputError(where, std::string(what) + " weights are all zero",
                     "at least one positive weight");
  }
  for (std::size_t i = 0; i < N; ++i) out[i] = w[i] / mean;
  return mean;
}

}  // namespace

ClockProfile ClockProfile::from_weights(const std::vector<double>& hour_of_day,
                                        const std::vector<double>& day_of_week,
                                        const std::vector<double>& month,
                                        const std::string& where) {
  // Mean month lengths over the 400-year Gregorian cycle (146097 days / 4800 months).
  static constexpr double kMonthDays[12] = {31, 28.2425, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31};
  ClockProfile c;
  c.hour_raw_mean = fill_normalised(c.hour_of_day, hour_of_day, nullptr, where, "hour_of_day");
  c.day_raw_mean = fill_normalised(c.day_of_week, day_of_week, nullptr, where, "day_of_week");
  c.month_raw_mean = fill_normalised(c.month, month, kMonthDays, where, "month");
  c.has_month = !month.empty();
  return c;
}

double ClockProfile::factor(const CivilTime& t) const {
  return hour_of_day[static_cast<std::size_t>(t.hour)] *
         day_of_week[static_cast<std::size_t>(t.day_of_week)] *
         month[static_cast<std::size_t>(t.month - 1)];
}

}  // namespace lidbox
