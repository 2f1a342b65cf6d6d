#include "lidbox/aqhi.hpp"

#include <array>
#include <cmath>
#include <map>

#include "lidbox/averaging.hpp"

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
  std::map<UtcSeconds, std::array<double, 3>> by_end;
  std::array<double, 3> none{kMissing, kMissing, kMissing};
  for (std::size_t p = 0; p < 3; ++p) {
    const auto it = series.find(names[p]);
    if (it == series.end() || it->second.size() == 0) return {};
    const double f =
        unit_factor(it->second.unit, units[p], names[p], kUsReferenceConditions,
                    std::string("AQHI input ") + names[p] + " [" + it->second.unit + "]");
    // Trailing 3-h means: the window starting two hours before hour t ends with hour t.
    const RunningMeans rm = running_means(it->second, 3, 2);
    for (std::size_t i = 0; i < rm.size(); ++i) {
      if (std::isnan(rm.mean[i]) || i + 3 > rm.size()) continue;
      auto [slot, fresh] = by_end.try_emplace(rm.window_end_utc(i), none);
      slot->second[p] = rm.mean[i] * f;
    }
  }
  std::vector<AqhiHour> out;
  for (const auto& [end, c] : by_end) {
    if (std::isnan(c[0]) || std::isnan(c[1]) || std::isnan(c[2])) continue;
    AqhiHour h;
    h.end_utc = end;
    h.no2_ppb = c[0];
    h.o3_ppb = c[1];
    h.pm25_ug_m3 = c[2];
    h.value = aqhi_value(c[0], c[1], c[2]);
    h.rounded = aqhi_rounded(h.value);
    h.category = aqhi_category(h.rounded);
    out.push_back(h);
  }
  return out;
}

}  // namespace lidbox
