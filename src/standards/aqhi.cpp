#include "lidbox/standards/aqhi.hpp"

#include <algorithm>
#include <array>
#include <cmath>

#include "lidbox/standards/averaging.hpp"

namespace lidbox {

double aqhi_value(double no2_ppb, double o3_ppb, double pm25_ug_m3) {
  return (1000.0 / 10.4) *
         ((std::exp(0.000871 * no2_ppb) - 1.0) + (std::exp(0.000537 * o3_ppb) - 1.0) +
          (std::exp(0.000487 * pm25_ug_m3) - 1.0));
}

int aqhi_rounded(double value) {
  const int r = static_cast<int>(apply_rounding(value, {RoundingMode::round_half_up, 0}));
  return r < 1 ? 1 : r;
}

const char* aqhi_category(int rounded) {
  if (rounded <= 3) return "Low";
  if (rounded <= 6) return "Moderate";
  if (rounded <= 10) return "High";
  return "Very High";
}

std::vector<AqhiHour> hourly_aqhi(const NamedSeries& series) {
  const char* names[] = {"NO2", "O3", "PM2.5"};
  const char* units[] = {"ppb", "ppb", "ug m-3"};
  const HourlySeries* s[3] = {};
  for (std::size_t p = 0; p < 3; ++p) {
    const auto it = series.find(names[p]);
    if (it == series.end() || it->second.size() == 0) return {};
    s[p] = &it->second;
  }
  // A common hour axis over the three series: window ends from the earliest to the latest.
  UtcSeconds first = s[0]->first_hour_start_utc;
  UtcSeconds last = s[0]->hour_start(s[0]->size() - 1);
  for (const HourlySeries* x : s) {
    first = std::min(first, x->first_hour_start_utc);
    last = std::max(last, x->hour_start(x->size() - 1));
  }
  const auto slots = static_cast<std::size_t>((last - first) / kSecondsPerHour + 1);
  std::vector<std::array<double, 3>> c(slots, {kMissing, kMissing, kMissing});
  for (std::size_t p = 0; p < 3; ++p) {
    const double f = unit_factor(s[p]->unit, units[p], names[p], kUsReferenceConditions,
                                 std::string("AQHI input ") + names[p] + " [" + s[p]->unit + "]");
    // Trailing 3-h means: slot k holds the window whose last hour starts at first + k h.
    const RunningMeans rm = running_means(*s[p], 3, 2);
    for (std::size_t i = 0; i + 3 <= rm.size(); ++i) {
      if (std::isnan(rm.mean[i])) continue;
      const auto slot = static_cast<std::size_t>(
          (rm.window_start_utc(i) + 2 * kSecondsPerHour - first) / kSecondsPerHour);
      if (slot < slots) c[slot][p] = rm.mean[i] * f;
    }
  }
  std::vector<AqhiHour> out;
  out.reserve(slots);
  for (std::size_t k = 0; k < slots; ++k) {
    const auto& v = c[k];
    if (std::isnan(v[0]) || std::isnan(v[1]) || std::isnan(v[2])) continue;
    AqhiHour h;
    h.end_utc = first + static_cast<UtcSeconds>(k + 1) * kSecondsPerHour;
    h.no2_ppb = v[0];
    h.o3_ppb = v[1];
    h.pm25_ug_m3 = v[2];
    h.value = aqhi_value(v[0], v[1], v[2]);
    h.rounded = aqhi_rounded(h.value);
    h.category = aqhi_category(h.rounded);
    out.push_back(h);
  }
  return out;
}

}  // namespace lidbox
