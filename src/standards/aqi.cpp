#include "lidbox/standards/aqi.hpp"

#include <cmath>
#include <map>

#include "lidbox/base/error.hpp"
#include "lidbox/standards/averaging.hpp"

namespace lidbox {

const char* aqi_table_name(AqiTable t) {
  return t == AqiTable::epa_2024 ? "EPA-454/B-24-002 (May 2024)" : "EPA-454/B-18-007 (Sept 2018)";
}

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

namespace {

int truncation_decimals(AqiInput p) {
  switch (p) {
    case AqiInput::o3_8h:
    case AqiInput::o3_1h:
      return 3;
    case AqiInput::pm25_24h:
    case AqiInput::co_8h:
      return 1;
    default:
      return 0;
  }
}

}  // namespace

std::vector<AqiBreakpoint> aqi_breakpoints(AqiInput p, AqiTable t) {
  switch (p) {
    case AqiInput::o3_8h:
      return {{0.000, 0.054, 0, 50},
              {0.055, 0.070, 51, 100},
              {0.071, 0.085, 101, 150},
              {0.086, 0.105, 151, 200},
              {0.106, 0.200, 201, 300}};
    case AqiInput::o3_1h:
      return {{0.125, 0.164, 101, 150},
              {0.165, 0.204, 151, 200},
              {0.205, 0.404, 201, 300},
              {0.405, 0.504, 301, 400},
              {0.505, 0.604, 401, 500}};
    case AqiInput::pm25_24h:
      if (t == AqiTable::epa_2024) {
        return {{0.0, 9.0, 0, 50},       {9.1, 35.4, 51, 100},     {35.5, 55.4, 101, 150},
                {55.5, 125.4, 151, 200}, {125.5, 225.4, 201, 300}, {225.5, 325.4, 301, 500}};
      }
      return {{0.0, 12.0, 0, 50},      {12.1, 35.4, 51, 100},    {35.5, 55.4, 101, 150},
              {55.5, 150.4, 151, 200}, {150.5, 250.4, 201, 300}, {250.5, 350.4, 301, 400},
              {350.5, 500.4, 401, 500}};
    case AqiInput::pm10_24h:
      return {{0, 54, 0, 50},       {55, 154, 51, 100},   {155, 254, 101, 150},
              {255, 354, 151, 200}, {355, 424, 201, 300}, {425, 504, 301, 400},
              {505, 604, 401, 500}};
    case AqiInput::co_8h:
      return {{0.0, 4.4, 0, 50},      {4.5, 9.4, 51, 100},    {9.5, 12.4, 101, 150},
              {12.5, 15.4, 151, 200}, {15.5, 30.4, 201, 300}, {30.5, 40.4, 301, 400},
              {40.5, 50.4, 401, 500}};
    case AqiInput::so2_1h:
      return {{0, 35, 0, 50}, {36, 75, 51, 100}, {76, 185, 101, 150}, {186, 304, 151, 200}};
    case AqiInput::so2_24h:
      return {{305, 604, 201, 300}, {605, 804, 301, 400}, {805, 1004, 401, 500}};
    case AqiInput::no2_1h:
      return {{0, 53, 0, 50},        {54, 100, 51, 100},    {101, 360, 101, 150},
              {361, 649, 151, 200},  {650, 1249, 201, 300}, {1250, 1649, 301, 400},
              {1650, 2049, 401, 500}};
  }
  return {};
}

std::optional<SubIndex> aqi_sub_index(AqiInput p, double concentration, AqiTable t) {
  if (std::isnan(concentration) || concentration < 0.0) return std::nullopt;
  const double c = apply_rounding(concentration, {RoundingMode::truncate, truncation_decimals(p)});
  const auto rows = aqi_breakpoints(p, t);
  auto interpolate = [c](const AqiBreakpoint& r) {
    const double i = (r.i_hi - r.i_lo) / (r.bp_hi - r.bp_lo) * (c - r.bp_lo) + r.i_lo;
    return static_cast<int>(apply_rounding(i, {RoundingMode::round_half_up, 0}));
  };
  // Tolerance for comparing decimal breakpoints with truncated values (both hold the same
  // decimal digit, stored in binary).
  constexpr double eps = 1e-9;
  for (const AqiBreakpoint& r : rows) {
    if (c >= r.bp_lo - eps && c <= r.bp_hi + eps) return SubIndex{p, c, interpolate(r), false};
  }
  if (rows.empty() || c < rows.front().bp_lo) return std::nullopt;
  // Above the top row: 8-h O3 and 1-h SO2 hand over to another averaging time.
  if (p == AqiInput::o3_8h || p == AqiInput::so2_1h) return std::nullopt;
  return SubIndex{p, c, interpolate(rows.back()), true};
}

const char* aqi_category(int aqi) {
  if (aqi <= 50) return "Good";
  if (aqi <= 100) return "Moderate";
  if (aqi <= 150) return "Unhealthy for Sensitive Groups";
  if (aqi <= 200) return "Unhealthy";
  if (aqi <= 300) return "Very Unhealthy";
  if (aqi <= 500) return "Hazardous";
  return "Beyond the AQI";
}

namespace {

// The conservative reading of the 1-h SO2 footnote for a 1-h value above the 1-h scale (see
// aqi.hpp): the sub-index is held at the top of the 1-h scale, AQI 200; the 24-h mean, added
// separately, decides any higher value.
std::optional<SubIndex> so2_1h_above_scale(double ppb, AqiTable table) {
  const auto rows = aqi_breakpoints(AqiInput::so2_1h, table);
  const double c =
      apply_rounding(ppb, {RoundingMode::truncate, truncation_decimals(AqiInput::so2_1h)});
  if (rows.empty() || std::isnan(c) || !(c > rows.back().bp_hi)) return std::nullopt;
  SubIndex s{AqiInput::so2_1h, c, rows.back().i_hi, false};
  s.held_at_scale_top = true;
  return s;
}

}  // namespace

std::vector<DailyAqi> daily_aqi(const NamedSeries& series, int lst_offset_s, AqiTable table) {
  std::map<std::int64_t, DailyAqi> days;
  auto add = [&](const DailyValues& dv, double factor, AqiInput input) {
    for (std::size_t d = 0; d < dv.size(); ++d) {
      if (!dv.complete(d)) continue;
      auto sub = aqi_sub_index(input, dv.value[d] * factor, table);
      if (!sub && input == AqiInput::so2_1h) sub = so2_1h_above_scale(dv.value[d] * factor, table);
      if (!sub) continue;
      DailyAqi& day = days[dv.day(d)];
      day.day = dv.day(d);
      day.sub_indices.push_back(*sub);
    }
  };
  auto factor_for = [&](const char* pollutant, AqiInput input) {
    const HourlySeries& s = series.at(pollutant);
    return unit_factor(s.unit, aqi_input_unit(input), pollutant, kUsReferenceConditions,
                       std::string("AQI input ") + pollutant + " [" + s.unit + "]");
  };
  auto has = [&](const char* p) { return series.count(p) && series.at(p).size() > 0; };
  if (has("O3")) {
    const HourlySeries& s = series.at("O3");
    add(daily_max_of_windows(running_means(s, 8, 6, WindowSpan::reaching_into_series), lst_offset_s,
                             kUsOzoneDayWindows),
        factor_for("O3", AqiInput::o3_8h), AqiInput::o3_8h);
    add(daily_max_1h(s, lst_offset_s), factor_for("O3", AqiInput::o3_1h), AqiInput::o3_1h);
  }
  if (has("PM2.5")) {
    add(daily_means(series.at("PM2.5"), lst_offset_s), factor_for("PM2.5", AqiInput::pm25_24h),
        AqiInput::pm25_24h);
  }
  if (has("PM10")) {
    add(daily_means(series.at("PM10"), lst_offset_s), factor_for("PM10", AqiInput::pm10_24h),
        AqiInput::pm10_24h);
  }
  if (has("CO")) {
    add(daily_max_of_windows(running_means(series.at("CO"), 8, 6, WindowSpan::reaching_into_series),
                             lst_offset_s, {0, 24, 18}),
        factor_for("CO", AqiInput::co_8h), AqiInput::co_8h);
  }
  if (has("SO2")) {
    const HourlySeries& s = series.at("SO2");
    add(daily_max_1h(s, lst_offset_s), factor_for("SO2", AqiInput::so2_1h), AqiInput::so2_1h);
    add(daily_means(s, lst_offset_s), factor_for("SO2", AqiInput::so2_24h), AqiInput::so2_24h);
  }
  if (has("NO2")) {
    add(daily_max_1h(series.at("NO2"), lst_offset_s), factor_for("NO2", AqiInput::no2_1h),
        AqiInput::no2_1h);
  }
  std::vector<DailyAqi> out;
  for (auto& [day, d] : days) {
    const SubIndex* best = &d.sub_indices.front();
    for (const SubIndex& s : d.sub_indices) {
      if (s.aqi > best->aqi) best = &s;
    }
    d.aqi = best->aqi;
    d.responsible = to_string(best->input);
    d.category = best->beyond_the_aqi ? "Beyond the AQI" : aqi_category(d.aqi);
    out.push_back(std::move(d));
  }
  return out;
}

}  // namespace lidbox
