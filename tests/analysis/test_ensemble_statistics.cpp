#include <doctest/doctest.h>

#include <cmath>
#include <cstdio>

#include "lidbox/analysis/ensemble_statistics.hpp"
#include "lidbox/analysis/rule_days.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/engine/case_file.hpp"
#include "lidbox/engine/ensemble.hpp"
#include "lidbox/standards/averaging.hpp"
#include "lidbox/standards/standards_evaluation.hpp"

using namespace lidbox;

namespace {

// A steady box: wind u from the west along a 10 km x 10 km footprint, lid 500 m, no losses,
// clean inflow. Steady state C = E / (u W H) (physics note section 2, closed form): 400 g/s
// gives 400 / (u * 10000 * 500) g/m3, i.e. 80 / u ug/m3 with u in m/s.
const char* kSteady = R"(
name = "steady"
time_zone = "UTC"
[airshed]
x_side = "10 km"
y_side = "10 km"
[met]
file = "m.csv"
[pollutants.PM25]
unit = "ug/m3"
background = "0 ug/m3"
free_troposphere = "0 ug/m3"
[sectors.all]
emissions = { PM25 = "400 g/s" }
)";

// An invented rule set (no legal source): a daily mean level without rounding, the same level
// rounded to whole numbers, and a three-hour alert.
const char* kRules = R"(
[rule_set]
id = "test-rules"
name = "invented rules for the tests"
legal_source = "invented"
legal_date = "2026-01-01"
reference_temperature_K = 298.15
reference_pressure_Pa = 101325.0

[[limit]]
id = "day-45"
pollutant = "PM2.5"
kind = "test"
averaging = "day"
statistic = "daily_mean"
level = 45.0
unit = "ug/m3"
form = "exceedances"
allowed_exceedances = 0
legal_source = "invented"
checked = "PRAC: invented"

[[limit]]
id = "day-50-rounded"
pollutant = "PM2.5"
kind = "test"
averaging = "day"
statistic = "daily_mean"
level = 50.0
unit = "ug/m3"
form = "exceedances"
allowed_exceedances = 0
rounding = "round_half_up:0"
legal_source = "invented"
checked = "PRAC: invented"

[[alert]]
id = "three-hours-60"
pollutant = "PM2.5"
level_name = "test alert"
averaging = "1-hour"
statistic = "hourly_value"
threshold = 60.0
unit = "ug/m3"
persistence = 3
legal_source = "invented"
checked = "PRAC: invented"
)";

MetSeries steady_met(std::size_t n, double u) {
  MetSeries m;
  m.source = "m.csv";
  m.first_stamp_utc = parse_iso8601("2026-01-05T00:00Z", nullptr, "t");
  m.mixing_height_m.assign(n, 500.0);
  m.wind_u_m_s.assign(n, u);
  m.wind_v_m_s.assign(n, 0.0);
  m.filled.assign(n, 0);
  m.source_line.assign(n, 0);
  return m;
}

}  // namespace

TEST_CASE("percentiles over members follow numpy's default linear method") {
  // Reference: numpy 1.24.2, np.percentile([3.1, 7.4, 0.5, 9.9, 4.2, 4.2, 12.8], q).
  const std::vector<std::pair<double, double>> expected = {{0.0, 0.5},
                                                           {5.0, 1.2800000000000002},
                                                           {25.0, 3.6500000000000004},
                                                           {50.0, 4.2},
                                                           {62.5, 6.6000000000000005},
                                                           {75.0, 8.65},
                                                           {95.0, 11.929999999999998},
                                                           {100.0, 12.8}};
  for (const auto& [q, v] : expected) {
    std::vector<double> x = {3.1, 7.4, 0.5, 9.9, 4.2, 4.2, 12.8};
    CHECK(percentile_linear(x, q) == doctest::Approx(v).epsilon(1e-14));
  }
}

TEST_CASE("kernel dressing matches scipy's Gaussian kernel density with Silverman's bandwidth") {
  // Reference: scipy 1.10.1, k = scipy.stats.gaussian_kde(x, bw_method="silverman");
  // sqrt(k.covariance[0, 0]) = 3.0528437031785494 and k.integrate_box_1d(t, inf) for t = 5, 10, 15.
  const std::vector<double> x = {3.1, 7.4, 0.5, 9.9, 4.2, 4.2, 12.8};
  CHECK(silverman_bandwidth(x) == doctest::Approx(3.0528437031785494).epsilon(1e-13));
  CHECK(kernel_exceedance_probability(x, 5.0) ==
        doctest::Approx(0.5507040906740315).epsilon(1e-12));
  CHECK(kernel_exceedance_probability(x, 10.0) ==
        doctest::Approx(0.224984933883939).epsilon(1e-12));
  CHECK(kernel_exceedance_probability(x, 15.0) ==
        doctest::Approx(0.04140260670589541).epsilon(1e-12));
  // All members equal: the kernels collapse onto member counting (closed form).
  CHECK(kernel_exceedance_probability({2.0, 2.0, 2.0}, 1.0) == 1.0);
  CHECK(kernel_exceedance_probability({2.0, 2.0, 2.0}, 3.0) == 0.0);
}

TEST_CASE("members stepped on threads give exactly the runs of each member alone") {
  const CaseSpec c = parse_case(kSteady, "steady.toml", ".");
  std::vector<MetSeries> mets;
  for (double u : {2.0, 1.6, 1.25, 4.0, 1.0}) mets.push_back(steady_met(72, u));
  mets[2].wind_v_m_s[30] = 0.7;  // members differ within the run too
  const auto together = run_ensemble(c, mets, 2);
  REQUIRE(together.size() == 5);
  for (std::size_t m = 0; m < mets.size(); ++m) {
    const RunResult alone = run_case(c, mets[m]);
    CHECK(together[m].mean_g_m3 == alone.mean_g_m3);  // bitwise: the same arithmetic
  }
}

TEST_CASE("member counting on a hand-countable ensemble of steady boxes") {
  const CaseSpec c = parse_case(kSteady, "steady.toml", ".");
  const RuleSet rules = parse_rule_set(kRules, "test-rules.toml");
  // Steady states 80 / u ug/m3 (closed form above): 40, 50, 64, 20, 80.
  std::vector<MetSeries> mets;
  for (double u : {2.0, 1.6, 1.25, 4.0, 1.0}) mets.push_back(steady_met(72, u));
  const auto runs = run_ensemble(c, mets);
  const EnsembleRules er = ensemble_rules(c, runs, {rules}, true);
  int rows_45 = 0, rows_50 = 0, rows_alert = 0;
  for (const EnsembleDay& d : er.days) {
    CHECK(d.members == 5);
    if (d.rule_id == "day-45") {
      // Above 45: 50, 64, 80 -> 3 of 5 on each of the three days (hand count).
      CHECK(d.exceeding == 3);
      CHECK(d.probability == doctest::Approx(0.6));
      REQUIRE(d.member_values.size() == 5);
      CHECK(d.member_values[4] == doctest::Approx(80.0).epsilon(1e-7));
      ++rows_45;
    } else if (d.rule_id == "day-50-rounded") {
      // 50 rounds to 50, not above: 64 and 80 -> 2 of 5 (hand count).
      CHECK(d.exceeding == 2);
      ++rows_50;
    } else {
      // Above 60 for three hours: the members at 64 and 80, all along (hand count).
      CHECK(d.alert);
      CHECK(d.exceeding == 2);
      ++rows_alert;
    }
  }
  CHECK(rows_45 == 3);
  CHECK(rows_50 == 3);
  CHECK(rows_alert == 3);
  REQUIRE(er.episodes.size() == 1);
  const EnsembleEpisodes& ep = er.episodes.front();
  CHECK(ep.with_episode == 2);
  CHECK(ep.probability == doctest::Approx(0.4));
  CHECK(ep.first_start_earliest == static_cast<double>(mets[0].first_stamp_utc));
  CHECK(ep.length_h_max == 72.0);
  // Kernel dressing of the day-45 rule against scipy: gaussian_kde([40, 50, 64, 20, 80],
  // bw_method="silverman").integrate_box_1d(45, inf) = 0.5829040377539055 (scipy 1.10.1); the
  // members sit at their steady states to 1e-7, hence the tolerance.
  for (const EnsembleDay& d : er.days) {
    if (d.rule_id == "day-45")
      CHECK(d.kernel_probability == doctest::Approx(0.5829040377539055).epsilon(1e-6));
  }
}

TEST_CASE("the rounding boundary is the largest value that rounds to the level") {
  // Closed form from the rounding rules (averaging.hpp): round half up to whole numbers keeps
  // 50.4999... at 50; truncation to 3 decimals keeps 0.0709999... at 0.070.
  const double b = rounding_boundary(50.0, {RoundingMode::round_half_up, 0});
  CHECK(apply_rounding(b, {RoundingMode::round_half_up, 0}) == 50.0);
  CHECK(apply_rounding(std::nextafter(b, 100.0), {RoundingMode::round_half_up, 0}) == 51.0);
  CHECK(b == doctest::Approx(50.5).epsilon(1e-8));
  const double t = rounding_boundary(0.070, {RoundingMode::truncate, 3});
  CHECK(t == doctest::Approx(0.071).epsilon(1e-8));
  CHECK(apply_rounding(t, {RoundingMode::truncate, 3}) == doctest::Approx(0.070));
  CHECK(rounding_boundary(45.0, {}) == 45.0);
}

TEST_CASE("a rule's day elements give the standards' daily values") {
  // The daily maxima of 8-h means from rule_days equal daily_max_of_windows (averaging.hpp) on a
  // seeded random series, for the US 17-window and the EU 24-window days.
  const unsigned seed = 20260209;
  std::printf("seed %u\n", seed);
  std::srand(seed);
  HourlySeries s;
  s.first_hour_start_utc = parse_iso8601("2026-01-05T03:00Z", nullptr, "t");
  s.unit = "ug m-3";
  for (int i = 0; i < 24 * 6 + 5; ++i) s.values.push_back(10.0 + (std::rand() % 1000) / 10.0);
  const int off = -7 * 3600;
  for (const char* stat : {"daily_max_8h_17_windows", "daily_max_8h_24_windows"}) {
    Limit l;
    l.statistic = std::string(stat) == "daily_max_8h_17_windows"
                      ? StatisticKind::daily_max_8h_17_windows
                      : StatisticKind::daily_max_8h_24_windows;
    const RuleDays rd = rule_days(l, s, 1.0, off);
    const DailyWindowRule w =
        l.statistic == StatisticKind::daily_max_8h_17_windows ? kUsOzoneDayWindows : kEuDayWindows;
    const DailyValues dv = daily_max_of_windows(running_means(s, 8, 6), off,
                                                w.requiring(min_valid_count(w.window_count)));
    int compared = 0;
    for (std::size_t k = 0; k < dv.size(); ++k) {
      const auto d = static_cast<std::size_t>(dv.day(k) - rd.first_day);
      if (d >= rd.days()) continue;
      CHECK(static_cast<bool>(rd.day_complete[d]) == dv.complete(k));
      if (dv.complete(k)) {
        CHECK(rd.day_max(d) == dv.value[k]);
        ++compared;
      }
    }
    CHECK(compared >= 5);
  }
}
