#include <doctest/doctest.h>

#include <cmath>

#include "lidbox/analysis/emission_cut.hpp"
#include "lidbox/analysis/ensemble_statistics.hpp"
#include "lidbox/analysis/rule_days.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/engine/case_file.hpp"
#include "lidbox/engine/ensemble.hpp"
#include "lidbox/standards/averaging.hpp"

using namespace lidbox;

// Every check here re-runs the box with the cut applied as a [scenario] and compares the rule's
// statistic with its level: concentrations are linear in each sector's emissions (physics note
// section 6), so the re-run must land on the level to rounding (1e-9 relative asked).

namespace {

// An invented airshed with a daily cycle: a lid of 120 m at night and 700 m by day, a wind that
// drops at night, two sectors with their own clocks and a background.
std::string case_text(const std::string& extra, const std::string& background = "5 ug/m3") {
  return R"(
name = "cut"
time_zone = "UTC"
[airshed]
x_side = "10 km"
y_side = "10 km"
[met]
file = "m.csv"
[pollutants.PM25]
unit = "ug/m3"
lifetime = "5 day"
background = ")" +
         background + R"("
free_troposphere = "2 ug/m3"
[sectors.traffic]
emissions = { PM25 = "3 g/s" }
hour_of_day = [0.3, 0.2, 0.2, 0.2, 0.3, 0.7, 1.5, 2.2, 2.0, 1.3, 1.1, 1.1,
               1.2, 1.2, 1.3, 1.6, 2.0, 2.2, 1.6, 1.0, 0.8, 0.6, 0.5, 0.4]
[sectors.home_heating]
emissions = { PM25 = "6 g/s" }
hour_of_day = [0.8, 0.5, 0.4, 0.4, 0.4, 0.6, 1.3, 1.5, 1.0, 0.6, 0.5, 0.5,
               0.5, 0.5, 0.6, 0.8, 1.2, 1.9, 2.4, 2.5, 2.3, 1.9, 1.5, 1.1]
[standards]
rule_sets = ["who-2021"]
)" + extra;
}

MetSeries cycle_met(double lid_factor = 1.0, double wind_factor = 1.0) {
  MetSeries m;
  m.source = "m.csv";
  m.first_stamp_utc = parse_iso8601("2026-01-05T00:00Z", nullptr, "t");
  for (int i = 0; i < 96; ++i) {
    const int h = i % 24;
    const bool day = h >= 9 && h < 18;
    m.mixing_height_m.push_back(lid_factor * (day ? 700.0 : 120.0) * (1.0 + 0.1 * (i / 24)));
    m.wind_u_m_s.push_back(wind_factor * (day ? 2.5 : 0.9));
    m.wind_v_m_s.push_back(0.3);
  }
  m.filled.assign(96, 0);
  m.source_line.assign(96, 0);
  return m;
}

Limit limit(StatisticKind s, double level, Rounding rounding = {}) {
  Limit l;
  l.id = to_string(s);
  l.pollutant = "PM2.5";
  l.statistic = s;
  l.averaging_h = s == StatisticKind::daily_mean ? 24 : 8;
  l.level = level;
  l.unit = "ug/m3";
  l.rounding = rounding;
  l.where = "test";
  return l;
}

RuleSet rules_with(const std::vector<Limit>& limits, const std::vector<AlertRule>& alerts = {}) {
  RuleSet rs;
  rs.id = "test";
  rs.reference = kUsReferenceConditions;
  rs.limits = limits;
  rs.alerts = alerts;
  return rs;
}

// The case re-run with the chosen sectors scaled from the cut's start.
RunResult rerun(const CaseSpec& c, const MetSeries& met, const EmissionCut& cut, double scale) {
  CaseSpec s = c;
  s.cut.reset();
  EmissionScenario sc;
  sc.start_utc = cut.start_utc;
  sc.sector_scale.assign(c.sectors.size(), 1.0);
  for (std::size_t k : cut.request.sectors) sc.sector_scale[k] = scale;
  sc.where = "test";
  s.scenario = sc;
  return run_case(s, met);
}

const CutRow& row_for(const EmissionCut& cut, const std::string& rule, std::int64_t day) {
  for (const CutRow& r : cut.rows) {
    if (r.rule_id == rule && !r.whole_run && r.day == day) return r;
  }
  FAIL("no row for " << rule << " on day " << day);
  return cut.rows.front();
}

std::int64_t day_of(const char* iso) {
  return lst_day_of(parse_iso8601(iso, nullptr, "t"), 0);
}

}  // namespace

TEST_CASE("a daily-mean cut of one sector, re-run, lands on the level") {
  const CaseSpec c = parse_case(case_text("[cut]\nsectors = [\"home_heating\"]\n"), "c.toml", ".");
  const MetSeries met = cycle_met();
  // The level below the day's mean so that the day exceeds (the re-run checks the rest).
  const RunResult base = run_case(c, met);
  const RuleDays now =
      rule_days(limit(StatisticKind::daily_mean, 0.0), member_series(c, base, 0), 1.0, 0);
  const double level = 0.8 * now.day_max(2);
  const RuleSet rs = rules_with({limit(StatisticKind::daily_mean, level)});
  const EmissionCut cut = compute_emission_cut(c, met, {}, {rs});
  const CutRow& r = row_for(cut, "daily_mean", day_of("2026-01-07T00:00Z"));
  REQUIRE(r.chosen.feasible);
  CHECK(r.chosen.scale < 1.0);
  CHECK(r.all.scale > r.chosen.scale);  // cutting every sector needs a smaller cut of each
  const RunResult cut_run = rerun(c, met, cut, r.chosen.scale);
  const RuleDays after = rule_days(rs.limits[0], member_series(c, cut_run, 0), 1.0, 0);
  CHECK(after.day_max(2) == doctest::Approx(level).epsilon(1e-9));
}

TEST_CASE("a daily max 8-h cut with rounding, re-run, lands on the rounding boundary") {
  const CaseSpec c =
      parse_case(case_text("[cut]\nsectors = [\"traffic\", \"home_heating\"]\n"), "c.toml", ".");
  const MetSeries met = cycle_met();
  const RunResult base = run_case(c, met);
  const Limit probe = limit(StatisticKind::daily_max_8h_24_windows, 0.0);
  const double top = rule_days(probe, member_series(c, base, 0), 1.0, 0).day_max(1);
  // A whole-number level with rounding to whole numbers (as a rule file says "round_half_up:0").
  const Rounding whole{RoundingMode::round_half_up, 0};
  const RuleSet rs =
      rules_with({limit(StatisticKind::daily_max_8h_24_windows, std::floor(0.7 * top), whole)});
  const EmissionCut cut = compute_emission_cut(c, met, {}, {rs});
  const CutRow& r = row_for(cut, "daily_max_8h_24_windows", day_of("2026-01-06T00:00Z"));
  REQUIRE(r.chosen.feasible);
  // Closed form of the boundary: half a unit above the level (round half up).
  CHECK(r.boundary == doctest::Approx(std::floor(0.7 * top) + 0.5).epsilon(1e-9));
  const RunResult cut_run = rerun(c, met, cut, r.chosen.scale);
  const double after = rule_days(rs.limits[0], member_series(c, cut_run, 0), 1.0, 0).day_max(1);
  CHECK(after == doctest::Approx(r.boundary).epsilon(1e-9));
  CHECK(apply_rounding(after * (1.0 - 1e-12), whole) <= rs.limits[0].level);
}

TEST_CASE(
    "an alert persistence cut, re-run, leaves no episode that day and touches the threshold") {
  const CaseSpec c = parse_case(case_text("[cut]\nsectors = [\"home_heating\"]\n"), "c.toml", ".");
  const MetSeries met = cycle_met();
  const RunResult base = run_case(c, met);
  const HourlySeries s = member_series(c, base, 0);
  AlertRule a;
  a.id = "three-hours";
  a.pollutant = "PM2.5";
  a.statistic = StatisticKind::hourly_value;
  a.unit = "ug/m3";
  a.persistence = 3;
  a.where = "test";
  // A threshold that the night hours of day 3 pass for more than three hours.
  double night = 0.0;
  for (int i = 48 + 18; i < 48 + 24; ++i)
    night = std::max(night, s.values[static_cast<std::size_t>(i)]);
  a.threshold = 0.75 * night;
  const RuleSet rs = rules_with({}, {a});
  const EmissionCut cut = compute_emission_cut(c, met, {}, {rs});
  const CutRow& r = row_for(cut, "three-hours", day_of("2026-01-07T00:00Z"));
  REQUIRE(r.chosen.feasible);
  const RunResult cut_run = rerun(c, met, cut, r.chosen.scale);
  const RuleDays after = rule_days(a, member_series(c, cut_run, 0), 1.0, 0);
  CHECK(days_with_episode(after, a)[2] == 0);
  // At the cut the worst 3-hour run touching the day has its lowest hour on the threshold
  // (max over windows of the window's minimum; closed form of "no run of 3 above").
  double worst = -1.0;
  for (std::size_t j = after.day_begin[2] >= 2 ? after.day_begin[2] - 2 : 0;
       j < after.day_end[2] && j + 3 <= after.element.size(); ++j) {
    worst =
        std::max(worst, std::min({after.element[j], after.element[j + 1], after.element[j + 2]}));
  }
  CHECK(worst == doctest::Approx(a.threshold).epsilon(1e-9));
  // A hair less cut and the episode is back.
  const RunResult less = rerun(c, met, cut, r.chosen.scale * (1.0 + 1e-6));
  CHECK(days_with_episode(rule_days(a, member_series(c, less, 0), 1.0, 0), a)[2] == 1);
}

TEST_CASE("a percentile target over members, re-run member by member, lands on the level") {
  const std::string ens =
      "[ensemble]\nmembers = [\"a.csv\", \"b.csv\", \"c.csv\", \"d.csv\", \"e.csv\"]\n";
  const CaseSpec c = parse_case(
      case_text(ens + "[cut]\nsectors = [\"home_heating\"]\ntarget = { percentile = 75 }\n"),
      "c.toml", ".");
  std::vector<MetSeries> members;
  for (double k : {0.8, 0.9, 1.0, 1.15, 1.3}) members.push_back(cycle_met(k, 2.0 - k));
  const std::vector<RunResult> base = run_ensemble(c, members);
  std::vector<double> now;
  for (const auto& r : base)
    now.push_back(rule_days(limit(StatisticKind::daily_mean, 0.0), member_series(c, r, 0), 1.0, 0)
                      .day_max(2));
  const double level = 0.85 * percentile_linear(now, 75.0);
  const RuleSet rs = rules_with({limit(StatisticKind::daily_mean, level)});
  const EmissionCut cut = compute_emission_cut(c, members.front(), members, {rs});
  const CutRow& r = row_for(cut, "daily_mean", day_of("2026-01-07T00:00Z"));
  REQUIRE(r.chosen.feasible);
  std::vector<double> after;
  for (const MetSeries& m : members) {
    after.push_back(
        rule_days(rs.limits[0], member_series(c, rerun(c, m, cut, r.chosen.scale), 0), 1.0, 0)
            .day_max(2));
  }
  // numpy.percentile's default (linear) method, as percentile_linear (checked against numpy).
  CHECK(percentile_linear(after, 75.0) == doctest::Approx(level).epsilon(1e-9));
}

TEST_CASE("at most k of N members: the (k+1)-th smallest member scale, checked by re-running") {
  const std::string ens =
      "[ensemble]\nmembers = [\"a.csv\", \"b.csv\", \"c.csv\", \"d.csv\", \"e.csv\"]\n";
  const CaseSpec c = parse_case(
      case_text(ens + "[cut]\nsectors = [\"home_heating\"]\ntarget = { at_most_members = 1 }\n"),
      "c.toml", ".");
  std::vector<MetSeries> members;
  for (double k : {0.8, 0.9, 1.0, 1.15, 1.3}) members.push_back(cycle_met(k, 2.0 - k));
  const RunResult mid = run_case(c, members[2]);
  const double level =
      0.8 *
      rule_days(limit(StatisticKind::daily_mean, 0.0), member_series(c, mid, 0), 1.0, 0).day_max(2);
  const RuleSet rs = rules_with({limit(StatisticKind::daily_mean, level)});
  const EmissionCut cut = compute_emission_cut(c, members.front(), members, {rs});
  const CutRow& r = row_for(cut, "daily_mean", day_of("2026-01-07T00:00Z"));
  REQUIRE(r.chosen.feasible);
  int exceeding = 0, on_level = 0;
  for (const MetSeries& m : members) {
    const double v =
        rule_days(rs.limits[0], member_series(c, rerun(c, m, cut, r.chosen.scale), 0), 1.0, 0)
            .day_max(2);
    exceeding += v > level * (1.0 + 1e-9);
    on_level += std::fabs(v - level) <= 1e-9 * level;
  }
  CHECK(exceeding == 1);
  CHECK(on_level == 1);  // the second-highest member sits on the level
}

TEST_CASE("a background above the level alone makes the cut infeasible and says by how much") {
  const CaseSpec c =
      parse_case(case_text("[cut]\nsectors = [\"home_heating\"]\n", "60 ug/m3"), "c.toml", ".");
  const RuleSet rs = rules_with({limit(StatisticKind::daily_mean, 45.0)});
  const EmissionCut cut = compute_emission_cut(c, cycle_met(), {}, {rs});
  const CutRow& r = row_for(cut, "daily_mean", day_of("2026-01-07T00:00Z"));
  CHECK_FALSE(r.chosen.feasible);
  CHECK_FALSE(r.all.feasible);
  // The rest alone: at least the 60 ug/m3 background (all sectors cut: the background and the
  // residue of emissions before the start; a lifetime of days keeps the day's mean near 60).
  CHECK(r.all.rest_value > 45.0);
  CHECK(r.chosen.rest_value >= r.all.rest_value);
}

TEST_CASE("a cut from a later start needs more, and cannot change the hours before it") {
  const MetSeries met = cycle_met();
  const CaseSpec early =
      parse_case(case_text("[cut]\nsectors = [\"home_heating\"]\n"), "c.toml", ".");
  const CaseSpec late =
      parse_case(case_text("[cut]\nsectors = [\"home_heating\"]\nstart = \"2026-01-06T00:00Z\"\n"),
                 "c.toml", ".");
  const RunResult base = run_case(early, met);
  const RuleDays now =
      rule_days(limit(StatisticKind::daily_mean, 0.0), member_series(early, base, 0), 1.0, 0);
  const double level = 0.85 * std::min(now.day_max(0), now.day_max(1));
  const RuleSet rs = rules_with({limit(StatisticKind::daily_mean, level)});
  const EmissionCut a = compute_emission_cut(early, met, {}, {rs});
  const EmissionCut b = compute_emission_cut(late, met, {}, {rs});
  const std::int64_t d0 = day_of("2026-01-05T00:00Z"), d1 = day_of("2026-01-06T00:00Z");
  CHECK(row_for(a, "daily_mean", d0).chosen.feasible);
  // Day 1 is over before a start on day 2: what it has is the rest, and no cut reaches it.
  CHECK_FALSE(row_for(b, "daily_mean", d0).chosen.feasible);
  CHECK(row_for(b, "daily_mean", d0).chosen.rest_value ==
        doctest::Approx(row_for(b, "daily_mean", d0).value).epsilon(1e-12));
  // Day 2 carries day 1's unreduced air when the cut starts later: a deeper cut.
  CHECK(row_for(b, "daily_mean", d1).chosen.scale < row_for(a, "daily_mean", d1).chosen.scale);
}

TEST_CASE("cut mistakes name the key") {
  auto message = [](const std::string& extra) {
    try {
      parse_case(case_text(extra), "c.toml", ".");
    } catch (const InputError& e) {
      return std::string(e.what());
    }
    return std::string();
  };
  CHECK(message("[cut]\nsectors = [\"wood\"]\n") ==
        "c.toml:25: [cut] sectors: no sector \"wood\"; expected one of the case's sectors: "
        "traffic, home_heating");
  CHECK(
      message("[cut]\nsectors = [\"traffic\"]\ntarget = { member = 2 }\n") ==
      "c.toml:26: [cut] target: an ensemble target without an [ensemble] table; expected target = "
      "\"deterministic\", or an [ensemble] table naming the members");
  const CaseSpec c = parse_case(
      case_text("[cut]\nsectors = [\"traffic\"]\nstart = \"2026-02-01T00:00Z\"\n"), "c.toml", ".");
  try {
    compute_emission_cut(c, cycle_met(), {}, {rules_with({limit(StatisticKind::daily_mean, 1.0)})});
    FAIL("a start after the run was accepted");
  } catch (const InputError& e) {
    CHECK(std::string(e.what()) ==
          "c.toml:26: [cut] start: 2026-02-01T00:00:00Z, outside the run; expected the start of an "
          "hour from "
          "2026-01-05T00:00:00Z to 2026-01-08T23:00:00Z");
  }
}
