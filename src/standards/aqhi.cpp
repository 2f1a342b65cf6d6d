#include "lidbox/standards/aqhi.hpp"

#include <algorithm>
#include <cmath>

#include "lidbox/base/error.hpp"
#include "lidbox/standards/averaging.hpp"
#include "lidbox/standards/rule_set.hpp"

namespace lidbox {

const AirIndex& aqhi_index() { return shipped_air_index("ca-aqhi"); }

double formula_value(const AirIndex& index, const std::vector<double>& term_means) {
  double sum = 0.0;
  for (std::size_t k = 0; k < index.terms.size(); ++k)
    sum += std::exp(index.terms[k].coefficient * term_means.at(k)) - 1.0;
  return index.numerator / index.denominator * sum;
}

int formula_rounded(const AirIndex& index, double value) {
  const int r = static_cast<int>(apply_rounding(value, {RoundingMode::round_half_up, 0}));
  return std::max(r, index.minimum);
}

double aqhi_value(double no2_ppb, double o3_ppb, double pm25_ug_m3) {
  const AirIndex& ix = aqhi_index();
  std::vector<double> means;
  for (const FormulaTerm& t : ix.terms) {
    means.push_back(t.pollutant == "NO2" ? no2_ppb : t.pollutant == "O3" ? o3_ppb : pm25_ug_m3);
  }
  return formula_value(ix, means);
}

int aqhi_rounded(double value) { return formula_rounded(aqhi_index(), value); }

const char* aqhi_category(int rounded) {
  const IndexCategory* c = aqhi_index().category_of(rounded);
  return c ? c->name.c_str() : "";
}

std::vector<AqhiHour> hourly_formula_index(const NamedSeries& series, const AirIndex& index) {
  const std::size_t n = index.terms.size();
  std::vector<const HourlySeries*> s(n, nullptr);
  for (std::size_t p = 0; p < n; ++p) {
    const auto it = series.find(index.terms[p].pollutant);
    if (it == series.end() || it->second.size() == 0) return {};
    s[p] = &it->second;
  }
  // A common hour axis over the series: window ends from the earliest to the latest.
  UtcSeconds first = s[0]->first_hour_start_utc;
  UtcSeconds last = s[0]->hour_start(s[0]->size() - 1);
  for (const HourlySeries* x : s) {
    first = std::min(first, x->first_hour_start_utc);
    last = std::max(last, x->hour_start(x->size() - 1));
  }
  const auto slots = static_cast<std::size_t>((last - first) / kSecondsPerHour + 1);
  std::vector<std::vector<double>> c(slots, std::vector<double>(n, kMissing));
  const int w = index.window_h;
  for (std::size_t p = 0; p < n; ++p) {
    const FormulaTerm& t = index.terms[p];
    const double f = unit_factor(s[p]->unit, t.unit, t.pollutant, index.reference,
                                 index.id + " input " + t.pollutant + " [" + s[p]->unit + "]");
    // Trailing means: slot k holds the window whose last hour starts at first + k h.
    const RunningMeans rm = running_means(*s[p], w, index.min_valid_h);
    for (std::size_t i = 0; i + static_cast<std::size_t>(w) <= rm.size(); ++i) {
      if (std::isnan(rm.mean[i])) continue;
      const auto slot = static_cast<std::size_t>(
          (rm.window_start_utc(i) + (w - 1) * kSecondsPerHour - first) / kSecondsPerHour);
      if (slot < slots) c[slot][p] = rm.mean[i] * f;
    }
  }
  auto term_of = [&index](const char* pollutant) -> int {
    for (std::size_t k = 0; k < index.terms.size(); ++k)
      if (index.terms[k].pollutant == pollutant) return static_cast<int>(k);
    return -1;
  };
  const int no2 = term_of("NO2"), o3 = term_of("O3"), pm = term_of("PM2.5");
  std::vector<AqhiHour> out;
  out.reserve(slots);
  for (std::size_t k = 0; k < slots; ++k) {
    const auto& v = c[k];
    if (std::any_of(v.begin(), v.end(), [](double x) { return std::isnan(x); })) continue;
    AqhiHour h;
    h.end_utc = first + static_cast<UtcSeconds>(k + 1) * kSecondsPerHour;
    h.no2_ppb = no2 >= 0 ? v[no2] : kMissing;
    h.o3_ppb = o3 >= 0 ? v[o3] : kMissing;
    h.pm25_ug_m3 = pm >= 0 ? v[pm] : kMissing;
    h.value = formula_value(index, v);
    h.rounded = formula_rounded(index, h.value);
    const IndexCategory* cat = index.category_of(h.rounded);
    h.category = cat ? cat->name.c_str() : "";
    out.push_back(h);
  }
  return out;
}

std::vector<AqhiHour> hourly_aqhi(const NamedSeries& series) {
  return hourly_formula_index(series, aqhi_index());
}

}  // namespace lidbox
