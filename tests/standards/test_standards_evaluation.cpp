#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>

#include "base/civil_calendar.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/standards/standards_evaluation.hpp"

using namespace lidbox;

namespace {

const std::filesystem::path kRulesDir =
    std::filesystem::path(LIDBOX_SOURCE_DIR) / "src" / "data" / "rules";

UtcSeconds utc(int y, int m, int d, int h = 0) {
  return civil_calendar::days_from_ymd(y, m, d) * kSecondsPerDay + h * kSecondsPerHour;
}

// By value: callers often pass the temporary that evaluate_limits returned.
LimitYearResult result(const std::vector<LimitYearResult>& rs, const std::string& id, int year) {
  const auto it = std::find_if(rs.begin(), rs.end(), [&](const LimitYearResult& r) {
    return r.limit_id == id && r.year == year;
  });
  REQUIRE(it != rs.end());
  return *it;
}

// A copy of a shipped rule set keeping only one limit (keeps the test about that rule).
RuleSet only(const std::string& set, const std::string& id) {
  RuleSet rs = load_rule_set(set, kRulesDir);
  rs.limits.erase(std::remove_if(rs.limits.begin(), rs.limits.end(),
                                 [&](const Limit& l) { return l.id != id; }),
                  rs.limits.end());
  REQUIRE(rs.limits.size() == 1);
  return rs;
}

}  // namespace

TEST_CASE("EU PM10 daily limit: 36 days above 50 exceed the 35 allowed, 35 do not") {
  // Directive 2008/50/EC Annex XI: 50 ug/m3 daily mean, not to be exceeded more than 35 times
  // a calendar year. Invented year 2024 (8784 h), 20 ug/m3 with N days at 60 ug/m3.
  const RuleSet eu = only("eu-2008-50", "PM10-day");
  for (int n : {35, 36}) {
    std::vector<double> v(8784, 20.0);
    for (std::size_t i = 0; i < static_cast<std::size_t>(n) * 24; ++i) v[i] = 60.0;
    NamedSeries s{{"PM10", HourlySeries{utc(2024, 1, 1), v, "ug m-3"}}};
    const auto rs = evaluate_limits(s, eu, 3600);  // CET standard time, UTC+1
    // 00:00 UTC is 01:00 LST: 1 Jan has 23 values (complete, >= 18) and the last UTC hour
    // falls on 1 Jan 2025. Year 2024 is checked.
    const auto& r = result(rs, "PM10-day", 2024);
    CHECK(r.exceedances == n);
    CHECK(r.allowed_exceedances == 35);
    CHECK(r.complete);
    CHECK(r.verdict == (n > 35 ? Verdict::exceeded : Verdict::within));
  }
}

TEST_CASE("a count within the allowed number on a partial year is reported incomplete") {
  const RuleSet eu = only("eu-2008-50", "PM10-day");
  std::vector<double> v(24 * 100, 60.0);
  NamedSeries s{{"PM10", HourlySeries{utc(2023, 1, 1), v, "ug m-3"}}};
  const auto& r = result(evaluate_limits(s, eu, 0), "PM10-day", 2023);
  CHECK(r.exceedances == 100);
  CHECK(r.verdict == Verdict::exceeded);  // 100 > 35 however the rest of the year went
  std::vector<double> w(24 * 100, 60.0);
  for (std::size_t i = 24 * 10; i < w.size(); ++i) w[i] = 10.0;
  NamedSeries s2{{"PM10", HourlySeries{utc(2023, 1, 1), w, "ug m-3"}}};
  const auto& r2 = result(evaluate_limits(s2, eu, 0), "PM10-day", 2023);
  CHECK(r2.exceedances == 10);
  CHECK(r2.valid_count == 100);
  CHECK(r2.possible_count == 365);
  CHECK(r2.verdict == Verdict::incomplete);
}

TEST_CASE("US CO 8-hour: one 12-hour episode counts as two non-overlapping exceedances") {
  // 40 CFR 50.8: 9 ppm 8-h, not more than once per year; counting non-overlapping windows is
  // from memory (design/references.md 1.2). Invented: hours 10..21 at 20 ppm, others 0.
  const RuleSet us = only("us-naaqs", "CO-8h");
  std::vector<double> v(48, 0.0);
  for (std::size_t i = 10; i < 22; ++i) v[i] = 20.0;
  NamedSeries s{{"CO", HourlySeries{utc(2025, 1, 10), v, "ppm"}}};
  const auto& r = result(evaluate_limits(s, us, 0), "CO-8h", 2025);
  CHECK(r.exceedances == 2);
  CHECK(r.verdict == Verdict::exceeded);
}

TEST_CASE("US CO 8-hour means are compared as integers, 9.5 ppm counting and 9.4 not") {
  // 40 CFR 50.8(d) (35 IAC 243.123(d)): .5 rounds up before the integer comparison.
  const RuleSet us = only("us-naaqs", "CO-8h");
  for (double level : {9.4, 9.5}) {
    std::vector<double> v(24, 0.0);
    for (std::size_t i = 4; i < 12; ++i) v[i] = level;
    NamedSeries s{{"CO", HourlySeries{utc(2025, 1, 10), v, "ppm"}}};
    const auto& r = result(evaluate_limits(s, us, 0), "CO-8h", 2025);
    CHECK(r.exceedances == (level > 9.45 ? 1 : 0));
  }
}

TEST_CASE("US ozone: the 4th-highest daily 8-hour maximum is truncated before comparison") {
  // 40 CFR 50 App. U: 4th-highest MDA8 vs 0.070 ppm; truncation to 0.001 ppm from memory.
  // Invented year 2023 in ppb (converted to ppm): 30 ppb, with 4 days whose 07:00-15:00 LST
  // hours are X ppb. X = 71.9 -> 0.0719 -> 0.071 > 0.070; X = 70.9 -> 0.070, not above.
  const RuleSet us = only("us-naaqs", "O3-8h");
  for (double x : {71.9, 70.9}) {
    std::vector<double> v(8760, 30.0);
    for (int day : {100, 150, 200, 250}) {
      for (int h = 7; h < 15; ++h) v[static_cast<std::size_t>(day * 24 + h)] = x;
    }
    NamedSeries s{{"O3", HourlySeries{utc(2023, 1, 1), v, "ppb"}}};
    const auto& r = result(evaluate_limits(s, us, 0), "O3-8h", 2023);
    CHECK(r.value == doctest::Approx(x > 71.0 ? 0.071 : 0.070));
    CHECK(r.complete);
    CHECK(r.verdict == (x > 71.0 ? Verdict::exceeded : Verdict::within));
    CHECK(r.statistic == "4th highest daily_max_8h_17_windows");
  }
}

TEST_CASE("a ppb series is converted at the rule set's own reference conditions") {
  // EU O3 target 120 ug/m3 at 293 K, 101.3 kPa: 120 ug/m3 = 120 * 24.049 / 48.00 = 60.12 ppb
  // (ideal gas, design/references.md section 4). 8 hours at 61 ppb exceed, at 60 ppb do not.
  const RuleSet eu = only("eu-2008-50", "O3-8h-target");
  for (double ppb : {60.0, 61.0}) {
    std::vector<double> v(48, 20.0);
    for (std::size_t i = 30; i < 38; ++i) v[i] = ppb;
    NamedSeries s{{"O3", HourlySeries{utc(2025, 6, 1), v, "ppb"}}};
    const auto& r = result(evaluate_limits(s, eu, 0), "O3-8h-target", 2025);
    CHECK(r.exceedances == (ppb > 60.5 ? 1 : 0));
    CHECK(r.unit == "ug/m3");
  }
}

TEST_CASE("US PM2.5 annual mean: quarterly means, 0.1 rounding and the 3-year average") {
  // 40 CFR 50 App. N 4.4 (mean of quarterly means), level 9.0 (89 FR 16202); rounding to 0.1
  // with .05 up is from memory. Invented years 2021-2023 with constant values.
  const RuleSet us = only("us-naaqs", "PM2.5-annual-primary");
  const double per_year[] = {9.3, 8.9, 8.9};
  std::vector<double> v;
  for (int y = 0; y < 3; ++y) {
    v.insert(v.end(), 365 * 24, per_year[y]);  // 2021-2023 have 365 days
  }
  NamedSeries s{{"PM2.5", HourlySeries{utc(2021, 1, 1), v, "ug m-3"}}};
  const auto rs = evaluate_limits(s, us, -5 * 3600);
  // LST = UTC-5: the last five hours of 2023 (UTC) are missing in LST, the year still complete.
  const auto& r21 = result(rs, "PM2.5-annual-primary", 2021);
  CHECK(r21.value == doctest::Approx(9.3));
  CHECK(r21.verdict == Verdict::exceeded);
  const auto& r23 = result(rs, "PM2.5-annual-primary", 2023);
  CHECK(r23.complete);
  // (9.3 + 8.9 + 8.9) / 3 = 9.0333 -> 9.0 (closed form), not above 9.0.
  CHECK(r23.multi_year_value == doctest::Approx(9.0));
  CHECK(r23.verdict == Verdict::within);
  CHECK(std::isnan(result(rs, "PM2.5-annual-primary", 2022).multi_year_value));
}

TEST_CASE("a series unit that cannot be converted names the limit and the series") {
  const RuleSet us = only("us-naaqs", "PM2.5-24h");
  NamedSeries s{{"PM2.5", HourlySeries{utc(2025, 1, 1), std::vector<double>(24, 5.0), "ppb"}}};
  try {
    (void)evaluate_limits(s, us, 0);
    FAIL("no error");
  } catch (const InputError& e) {
    const std::string msg = e.what();
    CHECK(msg.find("us-naaqs.toml:") != std::string::npos);
    CHECK(msg.find(": limit \"PM2.5-24h\" for series PM2.5 [ppb]: unit \"ppb\" is a mixing "
                   "ratio; expected a molar_mass_g_mol for this pollutant, or a mass unit such "
                   "as ug/m3") != std::string::npos);
  }
}

TEST_CASE("every shipped rule set evaluates a year of invented data for six pollutants") {
  NamedSeries s;
  std::vector<double> v(8760);
  for (std::size_t i = 0; i < v.size(); ++i)
    v[i] = 20.0 + 10.0 * std::sin(static_cast<double>(i) * 0.26);
  s["PM2.5"] = HourlySeries{utc(2023, 1, 1), v, "ug m-3"};
  s["PM10"] = HourlySeries{utc(2023, 1, 1), v, "ug m-3"};
  s["O3"] = HourlySeries{utc(2023, 1, 1), v, "ppb"};
  s["NO2"] = HourlySeries{utc(2023, 1, 1), v, "ppb"};
  s["SO2"] = HourlySeries{utc(2023, 1, 1), v, "ppb"};
  s["CO"] = HourlySeries{utc(2023, 1, 1), std::vector<double>(8760, 0.5), "ppm"};
  for (const auto& id : list_rule_sets(kRulesDir)) {
    const RuleSet rs = load_rule_set(id, kRulesDir);
    const auto results = evaluate_limits(s, rs, 0);
    CAPTURE(id);
    CHECK(results.size() >= rs.limits.size() - 2);  // benzene has no series here
    // EU windows ending on 1 Jan 2024 01:00..07:00 belong to 2024: a stub year, incomplete.
    for (const auto& r : results) {
      CAPTURE(r.limit_id);
      CHECK((r.year == 2023 || (r.year == 2024 && !r.complete)));
    }
  }
}

TEST_CASE("daily statistics carry all four daily values with their counts") {
  NamedSeries s{{"O3", HourlySeries{utc(2025, 6, 1), std::vector<double>(48, 40.0), "ppb"}}};
  const auto rows = daily_statistics(s, 0);
  const auto n = std::count_if(rows.begin(), rows.end(), [](const DailyStatisticsRow& r) {
    return std::string(r.statistic) == "daily_max_8h_24_windows" && r.complete;
  });
  // Day 1 has its 24 windows ending in it; of the 7 that start before the series, those from
  // 22:00 and 23:00 hold 6 and 7 of its hours: 19 valid, complete (>= 18). Day 2 has all 24.
  // Day 3 holds only windows from 17:00 .. 23:00 of day 2 (closed form).
  CHECK(n == 2);
  CHECK(rows.front().unit == "ppb");
}

TEST_CASE("US PM10: a daily mean of 155 counts as an exceedance of 150, 154 does not") {
  // 40 CFR 50 App. K 1.0(b) (ecfr.io copy): exceedance = daily value above 150 ug/m3 after
  // rounding to the nearest 10 ug/m3, values ending in 5 or greater rounded up.
  const RuleSet us = only("us-naaqs", "PM10-24h");
  std::vector<double> v(24 * 3, 40.0);
  for (std::size_t i = 0; i < 24; ++i) v[i] = 154.0;   // day 1
  for (std::size_t i = 24; i < 48; ++i) v[i] = 155.0;  // day 2
  NamedSeries s{{"PM10", HourlySeries{utc(2025, 4, 1), v, "ug m-3"}}};
  const auto r = result(evaluate_limits(s, us, 0), "PM10-24h", 2025);
  CHECK(r.exceedances == 1);
  CHECK(r.allowed_exceedances == 1);
  CHECK(r.verdict == Verdict::incomplete);  // 1 allowed, and the year is far from complete
}

TEST_CASE("the same ppb value can exceed under EU reference conditions and not under US ones") {
  // 200 ug/m3 NO2 is 200 / (46.01 / 24.049) = 104.5 ppb at 293 K, 101.3 kPa and
  // 200 / (46.01 / 24.465) = 106.3 ppb at 298.15 K, 101.325 kPa (ideal gas, references.md 4).
  // One hour at 105 ppb: above the EU 1-h level at EU conditions, below it at US conditions.
  RuleSet eu = only("eu-2008-50", "NO2-1h");
  std::vector<double> v(24, 20.0);
  v[12] = 105.0;
  NamedSeries s{{"NO2", HourlySeries{utc(2025, 7, 1), v, "ppb"}}};
  CHECK(result(evaluate_limits(s, eu, 0), "NO2-1h", 2025).exceedances == 1);
  eu.reference = kUsReferenceConditions;
  CHECK(result(evaluate_limits(s, eu, 0), "NO2-1h", 2025).exceedances == 0);
}

TEST_CASE("EU CO: a ppm series against 10 mg/m3 on the day each 8-hour window ends") {
  // Directive 2008/50/EC Annex XI: 10 mg/m3 maximum daily 8-hour mean, windows assigned to the
  // day they end in. 10 mg/m3 = 10 / (28.01 / 24.049) = 8.59 ppm at 293 K, 101.3 kPa.
  // Invented: 9 ppm during 20:00-03:59 from 1 to 2 July (UTC = LST), 1 ppm otherwise. The
  // window 20:00-04:00 ends on 2 July: one exceedance day, 2 July.
  const RuleSet eu = only("eu-2008-50", "CO-8h");
  std::vector<double> v(72, 1.0);
  for (std::size_t i = 20; i < 28; ++i) v[i] = 9.0;
  NamedSeries s{{"CO", HourlySeries{utc(2025, 7, 1), v, "ppm"}}};
  CHECK(result(evaluate_limits(s, eu, 0), "CO-8h", 2025).exceedances == 1);
  const auto days = daily_statistics(s, 0);
  for (const auto& d : days) {
    if (std::string(d.statistic) != "daily_max_8h_24_windows") continue;
    if (d.day == civil_calendar::days_from_ymd(2025, 7, 2)) CHECK(d.value == doctest::Approx(9.0));
    if (d.day == civil_calendar::days_from_ymd(2025, 7, 1)) CHECK(d.value < 8.59);
  }
}

TEST_CASE("the daily table counts the first day's 8-hour windows like the last day's") {
  // Issue 13 item 4. EU: Directive 2008/50/EC Annex VII note and A.2 (legislation.gov.uk copy):
  // windows 17:00 the day before .. 16:00, 6 of 8 hours each, 18 of 24 per day. 48 invented
  // hours from 00:00 UTC = LST: day one has the windows from 22:00 and 23:00 the day before
  // (6 and 7 hours present) and the 17 from 00:00 .. 16:00, 19 of 24 (closed form).
  NamedSeries s{{"O3", HourlySeries{utc(2024, 6, 1), std::vector<double>(48, 40.0), "ppb"}}};
  const auto rows = daily_statistics(s, 0);
  auto row = [&](const char* stat, std::int64_t day) {
    const auto it = std::find_if(rows.begin(), rows.end(), [&](const DailyStatisticsRow& r) {
      return std::string(r.statistic) == stat && r.day == day;
    });
    REQUIRE(it != rows.end());
    return *it;
  };
  const auto day1 = civil_calendar::days_from_ymd(2024, 6, 1);
  const auto eu = row("daily_max_8h_24_windows", day1);
  CHECK(eu.valid_count == 19);
  CHECK(eu.possible_count == 24);
  CHECK(eu.complete);
  // US: 40 CFR 50 App. U, windows starting 07:00 .. 23:00 (asl-associates summary), 13 of 17
  // (AirNow "Daily and Hourly AQI - Ozone"). A record from 09:00: the windows from 07:00 and
  // 08:00 hold 6 and 7 of its hours, so day one reads 17 of 17 (closed form).
  NamedSeries late{{"O3", HourlySeries{utc(2024, 6, 1, 9), std::vector<double>(72, 40.0), "ppb"}}};
  const auto late_rows = daily_statistics(late, 0);
  const auto it =
      std::find_if(late_rows.begin(), late_rows.end(), [&](const DailyStatisticsRow& r) {
        return std::string(r.statistic) == "daily_max_8h_17_windows" && r.day == day1;
      });
  REQUIRE(it != late_rows.end());
  CHECK(it->valid_count == 17);
  CHECK(it->complete);
}

TEST_CASE(
    "a monitor record with 292 of 366 days gives one verdict for the daily and annual limit") {
  // Issue 13 item 2. Directive 2008/50/EC: a day is valid with 75 % of its hours (Annex XI A),
  // and the year needs 90 % data capture for fixed measurements (Annex I A, legislation.gov.uk
  // copy; for the annual mean "of the one hour values ... over the year", ECHA annex list note
  // 22). Invented 2024 (366 days, 8784 hours): 292 whole days at 20 ug/m3, the other 74 missing.
  // 292 days = 7008 hours: 79.8 % of the year, below 90 % for both limits (closed form), so the
  // daily count and the annual mean are both "incomplete" (formerly "within" and "incomplete").
  RuleSet eu = load_rule_set("eu-2008-50", kRulesDir);
  eu.limits.erase(std::remove_if(eu.limits.begin(), eu.limits.end(),
                                 [](const Limit& l) { return l.pollutant != "PM10"; }),
                  eu.limits.end());
  REQUIRE(eu.limits.size() == 2);
  std::vector<double> v(8784, kMissing);
  for (std::size_t i = 0; i < 292 * 24; ++i) v[i] = 20.0;
  NamedSeries s{{"PM10", HourlySeries{utc(2024, 1, 1), v, "ug m-3"}}};
  const auto rs = evaluate_limits(s, eu, 0);
  const auto day = result(rs, "PM10-day", 2024);
  const auto year = result(rs, "PM10-year", 2024);
  CHECK(day.valid_count == 292);
  CHECK(day.possible_count == 366);
  CHECK(year.valid_count == 7008);
  CHECK(year.possible_count == 8784);
  CHECK_FALSE(day.complete);
  CHECK_FALSE(year.complete);
  CHECK(day.verdict == Verdict::incomplete);
  CHECK(year.verdict == Verdict::incomplete);
  // With 330 days (90.2 %, >= ceil(0.9 * 366) = 330) both are covered and within.
  for (std::size_t i = 292 * 24; i < 330 * 24; ++i) v[i] = 20.0;
  NamedSeries full{{"PM10", HourlySeries{utc(2024, 1, 1), v, "ug m-3"}}};
  const auto covered = evaluate_limits(full, eu, 0);
  CHECK(result(covered, "PM10-day", 2024).verdict == Verdict::within);
  CHECK(result(covered, "PM10-year", 2024).verdict == Verdict::within);
}
