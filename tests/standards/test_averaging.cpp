#include <doctest/doctest.h>

#include <cmath>
#include <random>

#include "base/civil_calendar.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/standards/averaging.hpp"

using namespace lidbox;

namespace {

UtcSeconds utc(int y, int m, int d, int h = 0) {
  return civil_calendar::days_from_ymd(y, m, d) * kSecondsPerDay + h * kSecondsPerHour;
}

HourlySeries series(UtcSeconds start, std::vector<double> v, const char* unit = "ppb") {
  HourlySeries s;
  s.first_hour_start_utc = start;
  s.values = std::move(v);
  s.unit = unit;
  return s;
}

// Index of the day `day` in a DailyValues table.
double on_day(const DailyValues& dv, std::int64_t day) {
  const auto i = day - dv.first_day;
  REQUIRE(i >= 0);
  REQUIRE(static_cast<std::size_t>(i) < dv.size());
  return dv.value[static_cast<std::size_t>(i)];
}

std::int64_t day_of(int y, int m, int d) {
  return civil_calendar::days_from_ymd(y, m, d);
}

const double NA = kMissing;  // a missing hour

}  // namespace

TEST_CASE("a CO 8-hour mean with 7 or 6 valid hours divides by the hours present") {
  // 40 CFR 50.8(c) as worded in Illinois 35 IAC 243.123(c): with 6 or 7 hours present the
  // 8-hour average is the sum divided by 6 or 7; with 5 or fewer it is not valid.
  const auto seven = running_means(series(0, {1, 2, 3, NA, 5, 6, 7, 8}), 8, 6);
  CHECK(seven.valid_h[0] == 7);
  CHECK(seven.mean[0] == doctest::Approx(32.0 / 7.0));  // closed form: (1+2+3+5+6+7+8)/7
  const auto six = running_means(series(0, {1, 2, 3, NA, 5, NA, 7, 8}), 8, 6);
  CHECK(six.valid_h[0] == 6);
  CHECK(six.mean[0] == doctest::Approx(26.0 / 6.0));  // closed form
  const auto five = running_means(series(0, {1, NA, 3, NA, 5, NA, 7, 8}), 8, 6);
  CHECK(five.valid_h[0] == 5);
  CHECK(std::isnan(five.mean[0]));
}

TEST_CASE(
    "running means match the pandas rolling(8, min_periods=6) example from the toolchain notes") {
  // toolchain.md section 5: pandas gives [NA x6, 4.0, 4.5714, 5.7143, 6.8571, 7.5, 7.5, 8.8333]
  // for this series, labelled at the window's last row; lidbox labels window i by its first
  // hour, so pandas row j is lidbox window j - 7. Tolerance: pandas printed 4 decimals.
  const auto rm = running_means(series(0, {1, 2, 3, NA, 5, 6, 7, 8, 9, 10, NA, NA, 13}), 8, 6);
  const double pandas_from_row7[] = {4.5714, 5.7143, 6.8571, 7.5, 7.5, 8.8333};
  for (std::size_t j = 0; j < 6; ++j) {
    CHECK(rm.mean[j] == doctest::Approx(pandas_from_row7[j]).epsilon(1e-4));
  }
  // The window labelled by its end: 8 hours after its start (closed form).
  CHECK(rm.label_utc(0, WindowLabel::start) == 0);
  CHECK(rm.label_utc(0, WindowLabel::end) == 8 * kSecondsPerHour);
}

TEST_CASE("running-mean arguments outside their range are input errors naming the parameter") {
  const auto s = series(0, {1, 2, 3});
  CHECK_THROWS_WITH_AS(running_means(s, 0, 1), "window_h: 0; expected at least 1 hour", InputError);
  CHECK_THROWS_WITH_AS(running_means(s, 8, 9), "min_valid_h: 9; expected 1 .. 8 hours", InputError);
}

TEST_CASE("the EU first 8-hour window of a day runs from 17:00 the previous day to 01:00") {
  // Directive 2008/50/EC Annex VII note / Annex XI note (SSI 2003/428 Sch. 1 Pt VI 6.2 wording):
  // "the first calculation period for any one day shall be the period from 17:00 on the previous
  // day to 01:00 on that day; the last ... from 16:00 to 24:00". Hours 17:00-01:00 of
  // 1-2 June are 100, all others 10 (invented values), UTC = LST.
  std::vector<double> v(72, 10.0);
  for (int h = 17; h < 25; ++h) v[static_cast<std::size_t>(h)] = 100.0;
  const auto rm = running_means(series(utc(2024, 6, 1), v), 8, 6);
  const auto eu = daily_max_of_windows(rm, 0, kEuDayWindows);
  // 2 June's first window (17:00 1 June -> 01:00 2 June) holds all eight high hours.
  CHECK(on_day(eu, day_of(2024, 6, 2)) == doctest::Approx(100.0));
  // 1 June's last window 16:00-24:00 holds seven of them: (7*100 + 10)/8 (closed form).
  CHECK(on_day(eu, day_of(2024, 6, 1)) == doctest::Approx(88.75));
  // A full day has 24 windows (Annex VII A.2 counts 18 of them for completeness).
  CHECK(eu.possible_count == 24);
  CHECK(eu.valid_count[static_cast<std::size_t>(day_of(2024, 6, 2) - eu.first_day)] == 24);
}

TEST_CASE("US and EU daily 8-hour maxima of the same series fall on different dates") {
  // Same invented series as above. US: 40 CFR 50 App. U, 17 windows starting 07:00-23:00, so the
  // window starting 17:00 on 1 June belongs to 1 June; EU: the day it ends in, 2 June.
  std::vector<double> v(72, 10.0);
  for (int h = 17; h < 25; ++h) v[static_cast<std::size_t>(h)] = 100.0;
  const auto rm = running_means(series(utc(2024, 6, 1), v), 8, 6);
  const auto us = daily_max_of_windows(rm, 0, kUsOzoneDayWindows);
  const auto eu = daily_max_of_windows(rm, 0, kEuDayWindows);
  CHECK(on_day(us, day_of(2024, 6, 1)) == doctest::Approx(100.0));
  CHECK(on_day(us, day_of(2024, 6, 2)) == doctest::Approx(10.0));  // windows from 07:00 2 June
  CHECK(on_day(eu, day_of(2024, 6, 1)) == doctest::Approx(88.75));
  CHECK(on_day(eu, day_of(2024, 6, 2)) == doctest::Approx(100.0));
}

TEST_CASE("the US ozone day uses windows reaching into the next morning") {
  // App. U (asl-associates summary): the last window of a day runs 23:00 to 07:00 the next day.
  // Invented: only 23:00 on 1 June and 00:00-06:59 on 2 June are high, in LST = UTC-5 (EST).
  const int est = -5 * 3600;
  std::vector<double> v(72, 0.010);
  // LST 23:00 on 1 June is 04:00 UTC on 2 June = index 28 from 00:00 UTC 1 June.
  for (std::size_t i = 28; i < 36; ++i) v[i] = 0.080;
  const auto rm = running_means(series(utc(2024, 6, 1), v, "ppm"), 8, 6);
  const auto us = daily_max_of_windows(rm, est, kUsOzoneDayWindows);
  CHECK(on_day(us, day_of(2024, 6, 1)) == doctest::Approx(0.080));
  // 2 June (LST) only has windows from 07:00 LST, after the high hours (closed form: 0.010).
  CHECK(on_day(us, day_of(2024, 6, 2)) == doctest::Approx(0.010));
  // The EU rule puts that window (ending 07:00) on 2 June.
  const auto eu = daily_max_of_windows(rm, est, kEuDayWindows);
  CHECK(on_day(eu, day_of(2024, 6, 2)) == doctest::Approx(0.080));
  CHECK(on_day(eu, day_of(2024, 6, 1)) < 0.080);
}

TEST_CASE("a day counts as complete with 18 of 24 hours and 13 of 17 ozone windows") {
  // 75 %: 40 CFR 50 App. N/T (18 of 24 hours, from memory), App. U (13 of 17 windows, from
  // memory), Directive 2008/50/EC Annex VII A.2 (18 of 24 running means, SRC).
  CHECK(min_valid_count(24) == 18);
  CHECK(min_valid_count(17) == 13);
  CHECK(min_valid_count(8) == 6);
  CHECK(min_valid_count(3) == 3);  // ceil(2.25), closed form
  CHECK(min_valid_count(1) == 1);
  CHECK(min_valid_count(8784, 0.9) == 7906);  // ceil(7905.6), closed form
  CHECK_THROWS_AS(min_valid_count(24, 0.0), InputError);
  CHECK_THROWS_AS(min_valid_count(24, 1.5), InputError);
  std::vector<double> v(48, 5.0);
  for (std::size_t i = 0; i < 6; ++i) v[i] = NA;    // day 1: 18 hours present
  for (std::size_t i = 24; i < 31; ++i) v[i] = NA;  // day 2: 17 hours present
  const auto dm = daily_means(series(utc(2024, 1, 1), v), 0);
  REQUIRE(dm.size() == 2);
  CHECK(dm.valid_count[0] == 18);
  CHECK(dm.complete(0));
  CHECK(dm.valid_count[1] == 17);
  CHECK_FALSE(dm.complete(1));
  CHECK(dm.value[1] == doctest::Approx(5.0));  // still the mean of the hours present
}

TEST_CASE("local-standard-time days in a daylight-saving zone ignore summer time") {
  // 40 CFR 50 App. N 1(c), App. T 1(c): days run midnight to midnight local STANDARD time. In
  // the US Eastern zone (EST = UTC-5; EDT = UTC-4 in July) a July day runs 05:00-05:00 UTC.
  // Invented series: 1 during [05:00 UTC 1 July, 05:00 UTC 2 July), 3 elsewhere.
  std::vector<double> v(72, 3.0);
  for (std::size_t i = 5; i < 29; ++i) v[i] = 1.0;
  const auto dm = daily_means(series(utc(2024, 7, 1), v), -5 * 3600);
  CHECK(on_day(dm, day_of(2024, 7, 1)) == doctest::Approx(1.0));  // closed form
  // Had daylight time been applied (day from 04:00 UTC) the mean would be (3 + 23)/24.
  CHECK(on_day(dm, day_of(2024, 7, 1)) != doctest::Approx(26.0 / 24.0));
  // Day numbering: 1 July LST starts at 05:00 UTC.
  CHECK(lst_day_start_utc(day_of(2024, 7, 1), -5 * 3600) == utc(2024, 7, 1, 5));
  CHECK(lst_day_of(utc(2024, 7, 1, 4), -5 * 3600) == day_of(2024, 6, 30));
  CHECK(format_day(day_of(2024, 7, 1)) == "2024-07-01");
}

TEST_CASE("daily maximum hour picks the highest hour of the LST day") {
  std::vector<double> v(24, 1.0);
  v[13] = 7.0;
  v[20] = NA;
  const auto dm = daily_max_1h(series(utc(2023, 3, 1), v), 0);
  REQUIRE(dm.size() == 1);
  CHECK(dm.value[0] == 7.0);
  CHECK(dm.valid_count[0] == 23);
}

TEST_CASE("rounding and truncation follow the digit each standard names") {
  // 40 CFR 50.8(d) via 35 IAC 243.123(d): CO compared on integers, .5 rounds up.
  CHECK(apply_rounding(9.5, {RoundingMode::round_half_up, 0}) == 10.0);
  CHECK(apply_rounding(9.4, {RoundingMode::round_half_up, 0}) == 9.0);
  CHECK(apply_rounding(9.44999, {RoundingMode::round_half_up, 0}) == 9.0);
  // Ozone 8-h truncated to 0.001 ppm (App. U, from memory): 0.0719 -> 0.071, and 0.071 stays.
  CHECK(apply_rounding(0.0719, {RoundingMode::truncate, 3}) == doctest::Approx(0.071));
  CHECK(apply_rounding(0.071, {RoundingMode::truncate, 3}) == doctest::Approx(0.071));
  CHECK(apply_rounding(0.070999, {RoundingMode::truncate, 3}) == doctest::Approx(0.070));
  // PM10 to the nearest 10 ug/m3, "values ending in 5 or greater are to be rounded up"
  // (40 CFR 50 App. K 1.0(b), ecfr.io copy): 154 -> 150, 155 -> 160.
  CHECK(apply_rounding(154.0, {RoundingMode::round_half_up, -1}) == 150.0);
  CHECK(apply_rounding(155.0, {RoundingMode::round_half_up, -1}) == 160.0);
  // 9.05 is stored as 9.0499...; the standard's decimal reading rounds it up to 9.1.
  CHECK(apply_rounding(9.05, {RoundingMode::round_half_up, 1}) == doctest::Approx(9.1));
  CHECK(std::isnan(apply_rounding(NA, {RoundingMode::truncate, 1})));
  CHECK(to_string(Rounding{RoundingMode::truncate, 3}) == "truncate:3");
}

TEST_CASE("monthly, quarterly and annual means report their completeness") {
  // 2024 is a leap year: 8784 hours, February 696 hours, Q1 2184 hours (closed form).
  std::vector<double> v(8784, 2.0);
  for (std::size_t i = 0; i < 744; ++i) v[i] = NA;  // all of January missing
  const auto s = series(utc(2024, 1, 1), v);
  const auto months = period_means_of_hours(s, 0, Period::month, 0.75);
  REQUIRE(months.size() == 12);
  CHECK(months[0].valid_count == 0);
  CHECK_FALSE(months[0].complete);
  CHECK(months[1].possible_count == 696);
  CHECK(months[1].complete);
  const auto quarters = period_means_of_hours(s, 0, Period::quarter, 0.75);
  REQUIRE(quarters.size() == 4);
  CHECK(quarters[0].possible_count == 2184);
  CHECK(quarters[0].valid_count == 2184 - 744);  // 1440 < 1638 = ceil(0.75 * 2184)
  CHECK_FALSE(quarters[0].complete);
  const auto year = period_means_of_hours(s, 0, Period::year, 0.75);
  REQUIRE(year.size() == 1);
  CHECK(year[0].possible_count == 8784);
  CHECK(year[0].mean == doctest::Approx(2.0));
  CHECK(year[0].complete);                                                   // 8040 >= 6588
  CHECK_FALSE(period_means_of_hours(s, 0, Period::year, 0.95)[0].complete);  // 8040 < 8345

  // Appendix N 4.4: the annual mean is the mean of the quarterly means; a missing quarter makes
  // the year incomplete.
  const auto days = daily_means(s, 0);
  const auto q = period_means_of_days(days, Period::quarter, 0.75);
  const auto annual = annual_means_of_quarters(q);
  REQUIRE(annual.size() == 1);
  CHECK(annual[0].complete_quarters == 3);
  CHECK_FALSE(annual[0].complete);
}

TEST_CASE("a series that covers part of a year gives an incomplete year") {
  std::vector<double> v(24 * 100, 1.0);
  const auto year = period_means_of_hours(series(utc(2023, 1, 1), v), 0, Period::year, 0.75);
  REQUIRE(year.size() == 1);
  CHECK(year[0].possible_count == 8760);
  CHECK(year[0].valid_count == 2400);
  CHECK_FALSE(year[0].complete);
}

TEST_CASE("the percentile ranking tables give the published ranks") {
  // 40 CFR 50 App. N Table 1 (98th percentile), ranks per design/references.md 1.4 (from memory).
  CHECK(percentile_rank(RankingTable::us_98th, 1) == 1);
  CHECK(percentile_rank(RankingTable::us_98th, 50) == 1);
  CHECK(percentile_rank(RankingTable::us_98th, 51) == 2);
  CHECK(percentile_rank(RankingTable::us_98th, 300) == 6);
  CHECK(percentile_rank(RankingTable::us_98th, 301) == 7);
  CHECK(percentile_rank(RankingTable::us_98th, 365) == 8);
  CHECK(percentile_rank(RankingTable::us_98th, 366) == 8);
  // App. T 99th percentile ranks (references.md 1.6, from memory).
  CHECK(percentile_rank(RankingTable::us_99th, 100) == 1);
  CHECK(percentile_rank(RankingTable::us_99th, 101) == 2);
  CHECK(percentile_rank(RankingTable::us_99th, 300) == 3);
  CHECK(percentile_rank(RankingTable::us_99th, 365) == 4);
  // Nearest rank (common practice): 99th of 365 -> ceil(361.35) = 362nd lowest = 4th highest.
  CHECK(percentile_rank(RankingTable::nearest_rank, 365, 99.0) == 4);
  CHECK(percentile_rank(RankingTable::nearest_rank, 100, 99.0) == 2);
  CHECK_THROWS_AS(percentile_rank(RankingTable::us_98th, 0), InputError);
}

TEST_CASE("the nth highest skips missing values") {
  CHECK(nth_highest({3, NA, 9, 1, 7}, 1) == 9);
  CHECK(nth_highest({3, NA, 9, 1, 7}, 2) == 7);
  CHECK(nth_highest({3, NA, 9, 1, 7}, 4) == 1);
  CHECK(std::isnan(nth_highest({3, NA, 9, 1, 7}, 5)));
}

TEST_CASE("non-overlapping counting counts one 12-hour episode as two 8-hour exceedances") {
  // Invented: hours 10..21 at 20 ppm, others 0. The 8-h mean starting at s is 20 * overlap / 8,
  // above 9 from an overlap of 4 hours: s = 6 .. 18, thirteen overlapping windows (closed form).
  std::vector<double> v(48, 0.0);
  for (std::size_t i = 10; i < 22; ++i) v[i] = 20.0;
  const auto rm = running_means(series(0, v, "ppm"), 8, 6);
  int overlapping = 0;
  for (double m : rm.mean) overlapping += (!std::isnan(m) && m > 9.0) ? 1 : 0;
  CHECK(overlapping == 13);
  // Earliest first: s = 6, then s = 14 (the next window not overlapping it), then nothing.
  CHECK(count_non_overlapping_exceedances(rm, 0, rm.size(), 9.0, {}) == 2);
  // Highest 20 (s = 10); the windows within 8 h of it are excluded; next highest s = 18 -> 10.
  CHECK(nth_highest_non_overlapping(rm, 0, rm.size(), 1) == doctest::Approx(20.0));
  CHECK(nth_highest_non_overlapping(rm, 0, rm.size(), 2) == doctest::Approx(10.0));
}

TEST_CASE("running means equal a direct sum over each window on random series with gaps") {
  // Property test against the definition (closed form per window), seeded.
  const unsigned seed = 20260102;
  MESSAGE("seed " << seed);
  std::mt19937 rng(seed);
  std::uniform_real_distribution<double> u(0.0, 1.0);
  for (int trial = 0; trial < 20; ++trial) {
    const std::size_t n = 1 + rng() % 300;
    std::vector<double> v(n);
    for (double& x : v) x = u(rng) < 0.2 ? NA : 100.0 * u(rng);
    const int k = 1 + static_cast<int>(rng() % 30);
    const int m = 1 + static_cast<int>(rng() % static_cast<unsigned>(k));
    const auto rm = running_means(series(0, v), k, m);
    for (std::size_t i = 0; i < n; ++i) {
      double sum = 0.0;
      int count = 0;
      for (std::size_t j = i; j < std::min(n, i + static_cast<std::size_t>(k)); ++j) {
        if (!std::isnan(v[j])) {
          sum += v[j];
          ++count;
        }
      }
      CAPTURE(trial);
      CAPTURE(i);
      CHECK(rm.valid_h[i] == count);
      if (count >= m) {
        CHECK(rm.mean[i] == doctest::Approx(sum / count).epsilon(1e-12));
      } else {
        CHECK(std::isnan(rm.mean[i]));
      }
    }
  }
}

TEST_CASE("hours before a record's first hour are missing hours like those after its last") {
  // 48 invented hours from 00:00 (UTC = LST). EU: Directive 2008/50/EC Annex VII note (the
  // first window of a day runs 17:00 the previous day to 01:00) and Annex VII A.2 (an 8-h value
  // needs 75 % = 6 hours; a day 18 of 24 running means; legislation.gov.uk copy). Day one's
  // windows start 17:00 the previous day .. 16:00; those starting 22:00 and 23:00 the previous
  // day hold 6 and 7 hours of the record, so 2 + 17 = 19 of 24 are valid (closed form).
  const auto rec = series(utc(2024, 6, 1), std::vector<double>(48, 10.0));
  const auto rm = running_means(rec, 8, 6, WindowSpan::reaching_into_series);
  CHECK(rm.leading_windows == 7);
  CHECK(rm.window_start_utc(0) == utc(2024, 5, 31, 17));
  CHECK(rm.valid_h[5] == 6);  // 22:00 the day before: hours 00:00-05:00 present
  const auto eu = daily_max_of_windows(rm, 0, kEuDayWindows);
  CHECK(eu.first_day == day_of(2024, 6, 1));
  REQUIRE(eu.size() == 3);
  CHECK(eu.valid_count[0] == 19);
  CHECK(eu.complete(0));
  // Day two: its windows all end by 24:00, inside the record: 24 of 24.
  CHECK(eu.valid_count[1] == 24);
  // The day after mirrors day one: of its windows starting 17:00 .. 23:00 on day two, those
  // from 17:00 and 18:00 hold 7 and 6 hours of the record (closed form).
  CHECK(eu.valid_count[2] == 2);

  // US: 40 CFR 50 App. U, 17 windows starting 07:00 .. 23:00 (asl-associates summary), 13 of 17
  // for a valid day (AirNow "Daily and Hourly AQI - Ozone": "75%, or 13/17"). A record starting
  // 09:00: the windows starting 07:00 and 08:00 hold 6 and 7 of its hours, so day one has 17 of
  // 17 (closed form). 72 hours so the windows of the last complete day stay inside the record.
  const auto late = series(utc(2024, 6, 1, 9), std::vector<double>(72, 0.05), "ppm");
  const auto us = daily_max_of_windows(running_means(late, 8, 6, WindowSpan::reaching_into_series),
                                       0, kUsOzoneDayWindows);
  CHECK(us.first_day == day_of(2024, 6, 1));
  CHECK(us.valid_count[0] == 17);
  CHECK(us.possible_count == 17);
}

TEST_CASE("windows reaching into the series equal a direct sum over each window") {
  // The definition (closed form per window) with the k-1 leading windows, seeded.
  const unsigned seed = 20261202;
  MESSAGE("seed " << seed);
  std::mt19937 rng(seed);
  std::uniform_real_distribution<double> u(0.0, 1.0);
  for (int trial = 0; trial < 20; ++trial) {
    const auto n = static_cast<std::int64_t>(1 + rng() % 200);
    std::vector<double> v(static_cast<std::size_t>(n));
    for (double& x : v) x = u(rng) < 0.2 ? NA : 100.0 * u(rng);
    const int k = 1 + static_cast<int>(rng() % 30);
    const int m = 1 + static_cast<int>(rng() % static_cast<unsigned>(k));
    const auto rm = running_means(series(0, v), k, m, WindowSpan::reaching_into_series);
    REQUIRE(rm.size() == static_cast<std::size_t>(n + k - 1));
    for (std::int64_t w = 0; w < n + k - 1; ++w) {
      const std::int64_t start = w - (k - 1);
      double sum = 0.0;
      int count = 0;
      for (std::int64_t j = std::max<std::int64_t>(0, start); j < std::min(n, start + k); ++j) {
        const double x = v[static_cast<std::size_t>(j)];
        if (!std::isnan(x)) {
          sum += x;
          ++count;
        }
      }
      CAPTURE(trial);
      CAPTURE(w);
      const auto i = static_cast<std::size_t>(w);
      CHECK(rm.window_start_utc(i) == start * kSecondsPerHour);
      CHECK(rm.valid_h[i] == count);
      if (count >= m) {
        CHECK(rm.mean[i] == doctest::Approx(sum / count).epsilon(1e-12));
      } else {
        CHECK(std::isnan(rm.mean[i]));
      }
    }
  }
}
