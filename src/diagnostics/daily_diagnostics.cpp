#include "lidbox/diagnostics/daily_diagnostics.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>

#include "lidbox/base/error.hpp"
#include "lidbox/base/plausibility.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/base/units.hpp"

namespace lidbox {

namespace {
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
// Morning and afternoon windows, local standard time (common practice, no source).
constexpr int kMorningFirst = 6, kAfternoonFirst = 12, kWindowHours = 6;

double window_max(const double* v, int first) {
  double m = -std::numeric_limits<double>::infinity();
  for (int h = first; h < first + kWindowHours; ++h) {
    if (std::isnan(v[h])) return kNaN;
    m = std::max(m, v[h]);
  }
  return m;
}

UtcSeconds floor_div(UtcSeconds a, UtcSeconds b) {
  return a >= 0 ? a / b : -((-a + b - 1) / b);
}
}  // namespace

double daily_statistic(const double* v, DailyStatistic s) {
  switch (s) {
    case DailyStatistic::morning_max:
      return window_max(v, kMorningFirst);
    case DailyStatistic::afternoon_max:
      return window_max(v, kAfternoonFirst);
    default:
      break;
  }
  double sum = 0.0, lo = std::numeric_limits<double>::infinity(), hi = -lo;
  for (int h = 0; h < 24; ++h) {
    if (std::isnan(v[h])) return kNaN;
    sum += v[h];
    lo = std::min(lo, v[h]);
    hi = std::max(hi, v[h]);
  }
  switch (s) {
    case DailyStatistic::mean:
      return sum / 24.0;
    case DailyStatistic::min:
      return lo;
    case DailyStatistic::max:
      return hi;
    default:
      return sum;
  }
}

double VentilationDay::value(VentilationStatistic s) const {
  switch (s) {
    case VentilationStatistic::min:
      return min_m2_s;
    case VentilationStatistic::mean:
      return mean_m2_s;
    case VentilationStatistic::afternoon_max:
      return afternoon_max_m2_s;
  }
  return kNaN;
}

VentilationDay ventilation_day(const double* mixing_height_m, const double* wind_m_s) {
  double v[24];
  for (int h = 0; h < 24; ++h) v[h] = mixing_height_m[h] * wind_m_s[h];
  VentilationDay d;
  d.min_m2_s = daily_statistic(v, DailyStatistic::min);
  d.mean_m2_s = daily_statistic(v, DailyStatistic::mean);
  d.afternoon_max_m2_s = daily_statistic(v, DailyStatistic::afternoon_max);
  return d;
}

int judge_day(const StagnationScheme& scheme, const DayHours& day) {
  bool all = true;
  for (const auto& c : scheme.criteria) {
    const double* v = day.of(c.field);
    if (!v) throw InternalError("judge_day: field " + std::string(to_string(c.field)) + " absent");
    const double x = daily_statistic(v, c.statistic);
    if (std::isnan(x)) return -1;
    all = all && c.holds(x);
  }
  return all ? 1 : 0;
}

int StreakCounter::add(int verdict) {
  if (verdict >= 0) ++judged_;
  if (verdict != 1) {
    current_ = 0;
    return 0;
  }
  ++stagnant_;
  ++current_;
  longest_ = std::max(longest_, current_);
  if (current_ == min_days_) ++episodes_;
  return current_;
}

std::vector<DiagnosticField> DiagnosticsSetup::needed_fields() const {
  std::vector<DiagnosticField> out = {DiagnosticField::mixing_height, DiagnosticField::wind_10m};
  for (const auto& s : schemes) {
    for (DiagnosticField f : s.fields()) {
      if (std::find(out.begin(), out.end(), f) == out.end()) out.push_back(f);
    }
  }
  std::sort(out.begin(), out.end());
  return out;
}

DiagnosticsSetup load_diagnostics_setup(const std::string& table,
                                        const std::vector<std::string>& schemes) {
  DiagnosticsSetup s;
  if (!table.empty()) s.table = load_ventilation_table(table);
  for (const auto& id : schemes) s.schemes.push_back(load_stagnation_scheme(id));
  return s;
}

HourlyDiagnosticsInput diagnostics_input(const MetSeries& met, MetReading reading, HourLabel label,
                                         const TimeZone& zone,
                                         const std::vector<DiagnosticField>& needed,
                                         const PlausibilityLimits& limits) {
  HourlyDiagnosticsInput in;
  in.source = met.source;
  in.standard_offset_s = zone.standard_offset_s();
  const bool shift = reading == MetReading::hour_average && label == HourLabel::period_end;
  in.first_hour_start_utc = met.first_stamp_utc - (shift ? kSecondsPerHour : 0);
  const std::size_t n = met.size();
  auto& mh = in.field[static_cast<std::size_t>(DiagnosticField::mixing_height)];
  auto& wind = in.field[static_cast<std::size_t>(DiagnosticField::wind_10m)];
  mh = met.mixing_height_m;
  wind.resize(n);
  for (std::size_t i = 0; i < n; ++i) wind[i] = wind_speed_m_s(met.wind_u_m_s[i], met.wind_v_m_s[i]);
  for (DiagnosticField f : needed) {
    if (f == DiagnosticField::mixing_height || f == DiagnosticField::wind_10m) continue;
    const MetColumn* col = met.find_extra(to_string(f));
    if (!col) {
      std::vector<std::string> names;
      for (const auto& e : met.extra) names.push_back(e.name);
      throw InputError(met.source,
                       "no field \"" + std::string(to_string(f)) +
                           "\" for the chosen stagnation scheme (columns beside the " +
                           "mixing height and wind: " + (names.empty() ? "none" : join(names)) +
                           ")",
                       std::string("a column \"") + to_string(f) +
                           " [unit]\" (CSV), a variable mapped by [diagnostics] fields " +
                           "(NetCDF), or a scheme that does not need it");
    }
    const UnitConversion conv = unit_conversion(
        col->unit, si_unit(f), f == DiagnosticField::precipitation ? "length" : "speed",
        met.source + ": column \"" + col->name + " [" + col->unit + "]\"");
    auto& out = in.field[static_cast<std::size_t>(f)];
    out.resize(n);
    // The other winds (geostrophic, mixed-layer, transport) have no range of their own.
    const char* key = f == DiagnosticField::precipitation ? "precipitation"
                      : f == DiagnosticField::wind_500hPa ? "wind_500hPa"
                                                          : nullptr;
    for (std::size_t i = 0; i < n; ++i) {
      out[i] = conv(col->values[i]);
      if (!key) continue;
      const bool inside = limits.range(key).admits(out[i]);
      if (!inside) {
        const std::string line =
            i < met.source_line.size() && met.source_line[i] > 0
                ? ":" + std::to_string(met.source_line[i])
                : std::string();
        limits.check(key, out[i],
                     met.source + line + ": column \"" + col->name + " [" + col->unit + "]\" (" +
                         format_utc(met.stamp(i)) + ")");
      }
    }
  }
  return in;
}

DiagnosticsResult diagnose(const HourlyDiagnosticsInput& in, const DiagnosticsSetup& setup) {
  DiagnosticsResult R;
  const std::size_t n = in.hours();
  const std::size_t S = setup.schemes.size();
  R.summary.assign(S, SchemeSummary{});
  if (setup.table) R.category_days.assign(setup.table->categories.size(), 0);
  if (n == 0) return R;
  for (DiagnosticField f : setup.needed_fields()) {
    if (in.of(f).size() != n)
      throw InternalError("diagnose: field " + std::string(to_string(f)) +
                          " not of the series' length");
  }
  std::vector<StreakCounter> streaks;
  for (const auto& s : setup.schemes) streaks.emplace_back(s.episode_min_days);
  std::vector<std::size_t> streak_start(S, 0);

  const UtcSeconds o = in.standard_offset_s;
  const UtcSeconds t0 = in.first_hour_start_utc;
  const UtcSeconds first_day = floor_div(t0 + o, kSecondsPerDay);
  const UtcSeconds last_day =
      floor_div(t0 + static_cast<UtcSeconds>(n - 1) * kSecondsPerHour + o, kSecondsPerDay);
  std::array<std::vector<double>, kDiagnosticFields> buf;
  DayHours day_hours;
  for (std::size_t f = 0; f < kDiagnosticFields; ++f) {
    if (in.field[f].size() == n) {
      buf[f].assign(24, kNaN);
      day_hours.field[f] = buf[f].data();
    }
  }
  std::size_t i = 0;
  for (UtcSeconds d = first_day; d <= last_day; ++d) {
    for (auto& b : buf) std::fill(b.begin(), b.end(), kNaN);
    DiagnosticDay day;
    day.start_utc = d * kSecondsPerDay - o;
    const CivilTime c = civil_from_utc_seconds(d * kSecondsPerDay);
    char date[16];
    std::snprintf(date, sizeof date, "%04d-%02d-%02d", c.year, c.month, c.day);
    day.date = date;
    for (; i < n; ++i) {
      const UtcSeconds local = t0 + static_cast<UtcSeconds>(i) * kSecondsPerHour + o;
      if (floor_div(local, kSecondsPerDay) != d) break;
      const auto h = static_cast<std::size_t>((local - d * kSecondsPerDay) / kSecondsPerHour);
      for (std::size_t f = 0; f < kDiagnosticFields; ++f) {
        if (!buf[f].empty()) buf[f][h] = in.field[f][i];
      }
      ++day.hours;
    }
    day.ventilation = ventilation_day(day_hours.of(DiagnosticField::mixing_height),
                                      day_hours.of(DiagnosticField::wind_10m));
    if (setup.table) {
      const double v = day.ventilation.value(setup.table->statistic);
      day.category = setup.table->classify(v);
      day.category_value = setup.table->in_table_unit(v);
      if (day.category >= 0) ++R.category_days[static_cast<std::size_t>(day.category)];
    }
    const std::size_t day_index = R.days.size();
    for (std::size_t s = 0; s < S; ++s) {
      const int verdict = judge_day(setup.schemes[s], day_hours);
      const int place = streaks[s].add(verdict);
      if (place == 1) streak_start[s] = day_index;
      if (place == setup.schemes[s].episode_min_days)
        R.episodes.push_back({s, streak_start[s], place});
      if (place > setup.schemes[s].episode_min_days) {
        for (auto e = R.episodes.rbegin(); e != R.episodes.rend(); ++e) {
          if (e->scheme == s) {
            e->days = place;
            break;
          }
        }
      }
      day.verdict.push_back(verdict);
      day.streak_day.push_back(place);
    }
    R.days.push_back(std::move(day));
  }
  for (std::size_t s = 0; s < S; ++s) {
    R.summary[s] = {streaks[s].judged_days(), streaks[s].stagnant_days(), streaks[s].longest(),
                    streaks[s].episodes()};
  }
  return R;
}

DiagnosticsResult diagnose_met(const MetSeries& met, MetReading reading, HourLabel label,
                               const TimeZone& zone, const DiagnosticsSetup& setup) {
  return diagnose(
      diagnostics_input(met, reading, label, zone, setup.needed_fields(), setup.limits), setup);
}

}  // namespace lidbox
