#include "lidbox/standards/aqi.hpp"

#include <cmath>
#include <map>

#include "lidbox/base/error.hpp"
#include "lidbox/standards/averaging.hpp"
#include "lidbox/standards/rule_set.hpp"

namespace lidbox {

const AirIndex& aqi_table_index(AqiTable t) {
  return shipped_air_index(t == AqiTable::epa_2024 ? "us-aqi-2024" : "us-aqi-2018");
}

const char* aqi_table_name(AqiTable t) { return aqi_table_index(t).version.c_str(); }

AqiTable parse_aqi_table(std::string_view text, std::string_view where) {
  if (text == "2024") return AqiTable::epa_2024;
  if (text == "2018") return AqiTable::epa_2018;
  throw InputError(std::string(where), "AQI table \"" + std::string(text) + "\"",
                   "2024 (EPA-454/B-24-002) or 2018 (EPA-454/B-18-007)");
}

const char* to_string(AqiInput p) {
  switch (p) {
    case AqiInput::o3_8h:
      return "O3 8-h";
    case AqiInput::o3_1h:
      return "O3 1-h";
    case AqiInput::pm25_24h:
      return "PM2.5 24-h";
    case AqiInput::pm10_24h:
      return "PM10 24-h";
    case AqiInput::co_8h:
      return "CO 8-h";
    case AqiInput::so2_1h:
      return "SO2 1-h";
    case AqiInput::so2_24h:
      return "SO2 24-h";
    case AqiInput::no2_1h:
      return "NO2 1-h";
  }
  return "?";
}

const char* aqi_input_unit(AqiInput p) {
  switch (p) {
    case AqiInput::o3_8h:
    case AqiInput::o3_1h:
    case AqiInput::co_8h:
      return "ppm";
    case AqiInput::pm25_24h:
    case AqiInput::pm10_24h:
      return "ug m-3";
    case AqiInput::so2_1h:
    case AqiInput::so2_24h:
    case AqiInput::no2_1h:
      return "ppb";
  }
  return "?";
}

std::vector<AqiBreakpoint> aqi_breakpoints(AqiInput p, AqiTable t) {
  std::vector<AqiBreakpoint> out;
  if (const IndexScale* s = aqi_table_index(t).scale(to_string(p))) {
    for (const IndexRow& r : s->rows) out.push_back({r.c_lo, r.c_hi, r.i_lo, r.i_hi});
  }
  return out;
}

namespace {

double truncated(const IndexScale& s, double c) {
  if (s.truncate_decimals == -99) return c;
  return apply_rounding(c, {RoundingMode::truncate, s.truncate_decimals});
}

}  // namespace

std::optional<SubIndex> index_sub_index(const IndexScale& scale, double concentration) {
  if (std::isnan(concentration) || concentration < 0.0 || scale.rows.empty()) return std::nullopt;
  const double c = truncated(scale, concentration);
  auto interpolate = [c](const IndexRow& r) {
    const double i = (r.i_hi - r.i_lo) / (r.c_hi - r.c_lo) * (c - r.c_lo) + r.i_lo;
    return static_cast<int>(apply_rounding(i, {RoundingMode::round_half_up, 0}));
  };
  // Tolerance for comparing decimal breakpoints with truncated values (both hold the same
  // decimal digit, stored in binary).
  constexpr double eps = 1e-9;
  for (const IndexRow& r : scale.rows) {
    if (c >= r.c_lo - eps && c <= r.c_hi + eps)
      return SubIndex{scale.name, scale.unit, c, interpolate(r), false, false};
  }
  if (c < scale.rows.front().c_lo) return std::nullopt;
  // Above the top row: 8-h O3 and 1-h SO2 hand over to another averaging time.
  if (scale.above_top != AboveTop::extrapolate) return std::nullopt;
  return SubIndex{scale.name, scale.unit, c, interpolate(scale.rows.back()), true, false};
}

std::optional<SubIndex> aqi_sub_index(AqiInput p, double concentration, AqiTable t) {
  const IndexScale* s = aqi_table_index(t).scale(to_string(p));
  if (!s) return std::nullopt;
  return index_sub_index(*s, concentration);
}

std::string aqi_category(int aqi, const AirIndex& index) {
  if (const IndexCategory* c = index.category_of(aqi)) return c->name;
  return aqi > 0 ? index.beyond_name : "";
}

const char* aqi_category(int aqi) {
  const AirIndex& ix = aqi_table_index(AqiTable::epa_2024);
  if (const IndexCategory* c = ix.category_of(aqi)) return c->name.c_str();
  return ix.beyond_name.c_str();
}

namespace {

// The conservative reading of the 1-h SO2 footnote for a 1-h value above the 1-h scale (see
// aqi.hpp): the sub-index is held at the top of the 1-h scale, AQI 200; the 24-h mean, added
// separately, decides any higher value.
std::optional<SubIndex> held_above_scale(const IndexScale& s, double value) {
  if (s.above_top != AboveTop::hold_at_top || s.rows.empty() || std::isnan(value))
    return std::nullopt;
  const double c = truncated(s, value);
  if (!(c > s.rows.back().c_hi)) return std::nullopt;
  return SubIndex{s.name, s.unit, c, s.rows.back().i_hi, false, true};
}

DailyValues daily_values(const HourlySeries& s, const IndexScale& sc, int off) {
  switch (sc.statistic) {
    case IndexStatistic::daily_max_8h_ozone:
      return daily_max_of_windows(running_means(s, 8, 6, WindowSpan::reaching_into_series), off,
                                  kUsOzoneDayWindows);
    case IndexStatistic::daily_max_8h:
      return daily_max_of_windows(running_means(s, 8, 6, WindowSpan::reaching_into_series), off,
                                  {0, 24, 18});
    case IndexStatistic::daily_max_1h:
      return daily_max_1h(s, off);
    case IndexStatistic::daily_mean:
      return daily_means(s, off);
    case IndexStatistic::hourly:
    case IndexStatistic::running_mean:
      break;
  }
  throw InternalError("daily_aqi: scale " + sc.name + " is not a daily statistic");
}

}  // namespace

std::vector<DailyAqi> daily_aqi(const NamedSeries& series, int lst_offset_s, const AirIndex& index) {
  std::map<std::int64_t, DailyAqi> days;
  for (const IndexScale& sc : index.scales) {
    const auto it = series.find(sc.pollutant);
    if (it == series.end() || it->second.size() == 0) continue;
    const HourlySeries& s = it->second;
    const double factor = unit_factor(s.unit, sc.unit, sc.pollutant, index.reference,
                                      "AQI input " + sc.pollutant + " [" + s.unit + "]");
    const DailyValues dv = daily_values(s, sc, lst_offset_s);
    for (std::size_t d = 0; d < dv.size(); ++d) {
      if (!dv.complete(d)) continue;
      auto sub = index_sub_index(sc, dv.value[d] * factor);
      if (!sub) sub = held_above_scale(sc, dv.value[d] * factor);
      if (!sub) continue;
      DailyAqi& day = days[dv.day(d)];
      day.day = dv.day(d);
      day.sub_indices.push_back(*sub);
    }
  }
  std::vector<DailyAqi> out;
  for (auto& [day, d] : days) {
    const SubIndex* best = &d.sub_indices.front();
    for (const SubIndex& s : d.sub_indices) {
      if (s.aqi > best->aqi) best = &s;
    }
    d.aqi = best->aqi;
    d.responsible = best->input;
    d.category = best->beyond_the_aqi ? index.beyond_name : aqi_category(d.aqi, index);
    out.push_back(std::move(d));
  }
  return out;
}

std::vector<DailyAqi> daily_aqi(const NamedSeries& series, int lst_offset_s, AqiTable table) {
  return daily_aqi(series, lst_offset_s, aqi_table_index(table));
}

}  // namespace lidbox
