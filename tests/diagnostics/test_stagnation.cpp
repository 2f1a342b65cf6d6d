// Stagnation schemes on hand-made day sequences, streak counting, and the refusal of a scheme
// whose field is missing. Thresholds are the published ones the shipped files carry (named above
// each check); the day values are invented to sit just on either side of them.
#include <doctest/doctest.h>

#include <cmath>
#include <string>
#include <vector>

#include "lidbox/base/error.hpp"
#include "lidbox/diagnostics/daily_diagnostics.hpp"

using namespace lidbox;

namespace {

struct DayValues {
  double mixing_height_m = 400.0;
  double wind_10m = 1.0;
  double wind_500hPa = 5.0;
  double precipitation_m_per_day = 0.0;  // all of it in the hour from 12:00
  double geostrophic = 3.0;
  double mixed_layer_wind = 2.0;
  double transport_wind = 2.0;
};

// One value per field for every hour of each day, UTC days from 2026-01-10.
HourlyDiagnosticsInput days_input(const std::vector<DayValues>& days) {
  HourlyDiagnosticsInput in;
  in.source = "hand-made";
  in.first_hour_start_utc = 1768003200;  // 2026-01-10T00:00:00Z
  for (const auto& d : days) {
    for (int h = 0; h < 24; ++h) {
      in.field[0].push_back(d.mixing_height_m);
      in.field[1].push_back(d.wind_10m);
      in.field[2].push_back(d.wind_500hPa);
      in.field[3].push_back(h == 12 ? d.precipitation_m_per_day : 0.0);
      in.field[4].push_back(d.geostrophic);
      in.field[5].push_back(d.mixed_layer_wind);
      in.field[6].push_back(d.transport_wind);
    }
  }
  return in;
}

std::vector<int> verdicts(const std::string& scheme, const std::vector<DayValues>& days) {
  DiagnosticsSetup setup;
  setup.schemes.push_back(load_stagnation_scheme(scheme));
  const DiagnosticsResult r = diagnose(days_input(days), setup);
  std::vector<int> out;
  for (const auto& d : r.days) out.push_back(d.verdict[0]);
  return out;
}

// Two UTC days from 2026-01-10 of a 300 m lid and a 1 m/s west wind, from "met.csv".
MetSeries calm_shallow_met() {
  MetSeries met;
  met.source = "met.csv";
  met.first_stamp_utc = 1768003200;  // 2026-01-10T00:00:00Z
  met.mixing_height_m.assign(48, 300.0);
  met.wind_u_m_s.assign(48, 1.0);
  met.wind_v_m_s.assign(48, 0.0);
  return met;
}

}  // namespace

TEST_CASE(
    "horton-2014 needs a 10 m wind under 3.2 m/s, a 500 hPa wind under 13 m/s and under 1 mm of "
    "rain") {
  // Horton et al. (2014), Nature Climate Change 4:698, as quoted in decisions-references 1.1:
  // daily-mean 10 m wind < 3.2 m/s, daily-mean 500 hPa wind < 13 m/s, daily precipitation < 1 mm.
  std::vector<DayValues> d(7);
  d[0].wind_10m = 3.19;
  d[1].wind_10m = 3.2;  // not below
  d[2].wind_500hPa = 12.99;
  d[3].wind_500hPa = 13.0;
  d[4].precipitation_m_per_day = 0.00099;
  d[5].precipitation_m_per_day = 0.001;
  d[6].wind_10m = 0.0;
  CHECK(verdicts("horton-2014", d) == std::vector<int>{1, 0, 1, 0, 1, 0, 1});
}

TEST_CASE(
    "wang-angell-1999 needs a geostrophic wind under 8 m/s, a 500 hPa wind under 13 m/s and a dry "
    "day") {
  // NOAA NCEI Air Stagnation Index page (Wang and Angell 1999): sea-level geostrophic wind
  // < 8 m/s, no precipitation, 500 mb wind < 13 m/s; "no precipitation" read as < 0.254 mm
  // (0.01 in, the US measurable amount: from memory, as the scheme file says).
  std::vector<DayValues> d(6);
  d[0].geostrophic = 7.99;
  d[1].geostrophic = 8.0;
  d[2].precipitation_m_per_day = 0.000253;
  d[3].precipitation_m_per_day = 0.000254;
  d[4].wind_500hPa = 13.0;
  d[5].wind_500hPa = 12.9;
  CHECK(verdicts("wang-angell-1999", d) == std::vector<int>{1, 0, 1, 0, 0, 1});
}

TEST_CASE(
    "korshover-angell-1982 judges the geostrophic wind at 8 m/s and its reduced form the 10 m wind "
    "at 4 m/s") {
  // Korshover and Angell (1982), Mon. Wea. Rev. 110:1515, section 2: surface geostrophic wind
  // < 8 m/s, roughly an anemometer wind < 4 m/s.
  std::vector<DayValues> d(2);
  d[0].geostrophic = 7.999;
  d[0].wind_10m = 3.999;
  d[1].geostrophic = 8.0;
  d[1].wind_10m = 4.0;
  CHECK(verdicts("korshover-angell-1982", d) == std::vector<int>{1, 0});
  CHECK(verdicts("korshover-angell-1982-10m", d) == std::vector<int>{1, 0});
}

TEST_CASE(
    "holzworth-1972 allows an afternoon mixing height of 1500 m and a mixed-layer wind of 4 m/s") {
  // Boubel, Fox, Turner and Stern (1994) ch. 21, after Holzworth (1972) AP-101: mixing height
  // <= 1500 m, mean wind in the mixed layer <= 4 m/s, no precipitation.
  std::vector<DayValues> d(4);
  d[0].mixing_height_m = 1500.0;
  d[0].mixed_layer_wind = 4.0;
  d[1].mixing_height_m = 1500.5;
  d[2].mixed_layer_wind = 4.01;
  d[3].precipitation_m_per_day = 0.0003;
  CHECK(verdicts("holzworth-1972", d) == std::vector<int>{1, 0, 0, 0});
}

TEST_CASE("nws-advisory converts 1500 ft and 10 kt to metres and metres per second") {
  // decisions-references 1.1: mixing height <= 1500 ft AGL and transport wind <= 10 kt.
  // 1500 ft = 457.2 m (1 ft = 0.3048 m exactly); 10 kt = 5.144444 m/s (1 kt = 1852/3600 m/s).
  std::vector<DayValues> d(3);
  d[0].mixing_height_m = 457.19;
  d[0].transport_wind = 5.1444;
  d[1].mixing_height_m = 457.21;
  d[2].mixing_height_m = 400.0;
  d[2].transport_wind = 5.1445;
  CHECK(verdicts("nws-advisory", d) == std::vector<int>{1, 0, 0});
}

TEST_CASE("the morning and afternoon windows are 06-11 and 12-17 local standard time") {
  // common practice (no source): the windows the scheme files name.
  double v[24];
  for (int h = 0; h < 24; ++h) v[h] = h;
  CHECK(daily_statistic(v, DailyStatistic::morning_max) == 11.0);
  CHECK(daily_statistic(v, DailyStatistic::afternoon_max) == 17.0);
  CHECK(daily_statistic(v, DailyStatistic::sum) == 276.0);  // 0 + 1 + ... + 23 = 23 * 24 / 2
  CHECK(daily_statistic(v, DailyStatistic::mean) == 11.5);
  v[3] = std::nan("");
  CHECK(std::isnan(daily_statistic(v, DailyStatistic::mean)));
  CHECK(daily_statistic(v, DailyStatistic::afternoon_max) == 17.0);  // hour 3 is not needed
}

TEST_CASE("streaks end on a day that is not stagnant or not judged and episodes count once") {
  // Closed form by hand: verdicts 1 1 0 1 1 1 1 1 -1 1 with episodes of >= 4 days give 8
  // stagnation days of 9 judged, a longest streak of 5 and one episode.
  StreakCounter s(4);
  std::vector<int> places;
  for (int v : {1, 1, 0, 1, 1, 1, 1, 1, -1, 1}) places.push_back(s.add(v));
  CHECK(places == std::vector<int>{1, 2, 0, 1, 2, 3, 4, 5, 0, 1});
  CHECK(s.stagnant_days() == 8);
  CHECK(s.judged_days() == 9);
  CHECK(s.longest() == 5);
  CHECK(s.episodes() == 1);
}

TEST_CASE("diagnose lists episodes with their first day and full length") {
  // Hand-made: 10 days, calm on days 1-5 and 7-8 (0-based), 10 m wind scheme, episodes >= 4 d.
  std::vector<DayValues> d(10);
  for (std::size_t k = 0; k < d.size(); ++k)
    d[k].wind_10m = (k >= 1 && k <= 5) || k == 7 || k == 8 ? 1.0 : 6.0;
  DiagnosticsSetup setup;
  setup.schemes.push_back(load_stagnation_scheme("korshover-angell-1982-10m"));
  const DiagnosticsResult r = diagnose(days_input(d), setup);
  REQUIRE(r.episodes.size() == 1);
  CHECK(r.episodes[0].first_day == 1);
  CHECK(r.episodes[0].days == 5);
  CHECK(r.days[1].date == "2026-01-11");
  CHECK(r.summary[0].stagnant_days == 7);
  CHECK(r.summary[0].longest_streak == 5);
}

TEST_CASE("a partial day at the ends of the series is listed but not judged") {
  // Local standard days of UTC-7 (zone offset -25200 s): a series starting 2026-01-10T00Z
  // starts at 17:00 on 2026-01-09 LST, so the first day has 7 hours and is not judged.
  std::vector<DayValues> d(2);
  HourlyDiagnosticsInput in = days_input(d);
  in.standard_offset_s = -25200;
  DiagnosticsSetup setup;
  setup.schemes.push_back(load_stagnation_scheme("korshover-angell-1982-10m"));
  const DiagnosticsResult r = diagnose(in, setup);
  REQUIRE(r.days.size() == 3);
  CHECK(r.days[0].date == "2026-01-09");
  CHECK(r.days[0].hours == 7);
  CHECK(r.days[0].verdict[0] == -1);
  CHECK(r.days[1].verdict[0] == 1);
  CHECK(r.days[2].hours == 17);
  CHECK(r.summary[0].judged_days == 1);
}

TEST_CASE("a scheme whose field the met lacks is refused with the field named") {
  MetSeries met = calm_shallow_met();
  met.extra.push_back({"precipitation", "mm", std::vector<double>(48, 0.0)});
  const DiagnosticsSetup setup = load_diagnostics_setup("", {"horton-2014"});
  const TimeZone utc;
  CHECK_THROWS_WITH_AS(
      diagnose_met(met, MetReading::hour_average, HourLabel::period_start, utc, setup),
      "met.csv: no field \"wind_500hPa\" for the chosen stagnation scheme (columns beside the "
      "mixing height and wind: precipitation); expected a column \"wind_500hPa [unit]\" (CSV), a "
      "variable mapped by [diagnostics] fields (NetCDF), or a scheme that does not need it",
      InputError);
}

TEST_CASE("a met column in inches is converted before the threshold is applied") {
  // 1 in = 25.4 mm exactly; 0.03 in a day = 0.762 mm < 1 mm (Horton), 0.04 in = 1.016 mm is not.
  MetSeries met = calm_shallow_met();
  std::vector<double> rain(48, 0.0);
  rain[5] = 0.03;
  rain[30] = 0.04;
  met.extra.push_back({"precipitation", "in", rain});
  met.extra.push_back({"wind_500hPa", "knot", std::vector<double>(48, 20.0)});  // 10.29 m/s
  const DiagnosticsSetup setup = load_diagnostics_setup("", {"horton-2014"});
  const DiagnosticsResult r =
      diagnose_met(met, MetReading::hour_average, HourLabel::period_start, TimeZone(), setup);
  REQUIRE(r.days.size() == 2);
  CHECK(r.days[0].verdict[0] == 1);
  CHECK(r.days[1].verdict[0] == 0);
}

TEST_CASE("every shipped scheme loads and names its fields") {
  for (const auto& id : shipped_stagnation_schemes()) {
    CAPTURE(id);
    const StagnationScheme s = load_stagnation_scheme(id);
    CHECK(s.id == id);
    CHECK_FALSE(s.fields().empty());
    CHECK(s.path == "lidbox data: stagnation/" + id + ".toml");
  }
  CHECK(shipped_stagnation_schemes().size() == 6);
}

TEST_CASE("a misspelt scheme field is reported with the closest name") {
  const std::string text = R"(id = "x"
title = "t"
source = "s"
checked = "PRAC"
episode_min_days = 2
[[criterion]]
field = "wind_10"
statistic = "mean"
below = "3 m/s"
)";
  CHECK_THROWS_WITH_AS(
      parse_stagnation_scheme(text, "x.toml"),
      "x.toml:7: [[criterion]] field: \"wind_10\"; expected one of mixing_height, wind_10m, "
      "wind_500hPa, precipitation, geostrophic_wind, mixed_layer_wind, transport_wind (did you "
      "mean "
      "\"wind_10m\"?)",
      InputError);
}

TEST_CASE("the 500 hPa wind is checked against the setup's limits, so a case's table reaches it") {
  // 160 m/s lies above the shipped 500 hPa range (0 to 150 m/s, plausibility.cpp); a case that
  // widens the range to 200 m/s in [plausibility] must have it taken, and one that narrows it to
  // 100 m/s must have 120 m/s refused at the hour it occurs.
  MetSeries met = calm_shallow_met();
  met.extra.push_back({"precipitation", "mm", std::vector<double>(48, 0.0)});
  std::vector<double> aloft(48, 10.0);
  aloft[7] = 160.0;
  met.extra.push_back({"wind_500hPa", "m/s", aloft});
  DiagnosticsSetup setup = load_diagnostics_setup("", {"horton-2014"});
  CHECK_THROWS_AS(
      diagnose_met(met, MetReading::hour_average, HourLabel::period_start, TimeZone(), setup),
      InputError);
  setup.limits.set("wind_500hPa", 0.0, 200.0, "a case's [plausibility] table");
  CHECK(diagnose_met(met, MetReading::hour_average, HourLabel::period_start, TimeZone(), setup)
            .days.size() == 2);
  met.extra.back().values[7] = 120.0;
  setup.limits.set("wind_500hPa", 0.0, 100.0, "a case's [plausibility] table");
  CHECK_THROWS_WITH_AS(
      diagnose_met(met, MetReading::hour_average, HourLabel::period_start, TimeZone(), setup),
      doctest::Contains("(2026-01-10T07:00:00Z): 500 hPa wind speed 120 m/s"), InputError);
}
