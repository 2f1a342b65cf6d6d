#include <doctest/doctest.h>

#include <cmath>

#include "lidbox/analysis/model_evaluation.hpp"
#include "lidbox/analysis/monitor_pairing.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/engine/case_file.hpp"
#include "lidbox/engine/run.hpp"
#include "lidbox/standards/observations_csv.hpp"

using namespace lidbox;

namespace {

// Steady box: C = Cb + E/(u W H) = 0.1 ppm + 400 g/s / (2 m/s * 10 km * 500 m) (physics note
// section 2, closed form), with CO in ppm at 25 degC.
const char* kCase = R"(
name = "pairing"
time_zone = "UTC"
[airshed]
x_side = "10 km"
y_side = "10 km"
[met]
file = "m.csv"
[model]
spin_up = "none"
[pollutants.CO]
unit = "ppm"
molar_mass = "28.01 g/mol"
background = "0.1 ppm"
free_troposphere = "0.1 ppm"
initial = "0.1 ppm"
[sectors.all]
emissions = { CO = "400 g/s" }
[standards]
rule_sets = ["us-naaqs"]
)";

MetSeries steady(std::size_t n) {
  MetSeries m;
  m.source = "m.csv";
  m.first_stamp_utc = parse_iso8601("2026-01-05T00:00Z", nullptr, "t");
  m.mixing_height_m.assign(n, 500.0);
  m.wind_u_m_s.assign(n, 2.0);
  m.wind_v_m_s.assign(n, 0.0);
  m.filled.assign(n, 0);
  m.source_line.assign(n, 0);
  return m;
}

}  // namespace

TEST_CASE(
    "monitor hours are paired by UTC hour, converted to the case unit and counted by reason") {
  const CaseSpec c = parse_case(kCase, "pairing.toml", ".");
  const RunResult r = run_case(c, steady(48));
  // Starts 2 h before the run (+01:00 stamps), ppb instead of ppm, one gap, one "<L", one
  // negative value.
  const Observations obs = parse_observations_csv(
      "time,CO [ppb],NO2 [ppb]\n"
      "2026-01-04T23:00+01:00,100,5\n"
      "2026-01-05T00:00+01:00,200,5\n"
      "2026-01-05T01:00+01:00,1000,5\n"
      "2026-01-05T02:00+01:00,,5\n"
      "2026-01-05T03:00+01:00,<50,5\n"
      "2026-01-05T04:00+01:00,-20,5\n",
      "mon.csv");
  REQUIRE(obs.below_detection.count("CO") == 1);
  std::vector<std::string> skipped;
  const auto pairs = pair_monitor(c, r, obs, "", BelowDetection::half_limit, &skipped);
  REQUIRE(pairs.size() == 1);
  const MonitorPollutant& m = pairs.front();
  CHECK(skipped == std::vector<std::string>{"mon.csv: NO2 (not in the case)"});
  CHECK(m.to_case_unit == doctest::Approx(1e-3).epsilon(1e-12));  // ppb -> ppm, same conditions
  CHECK(m.monitor_hours == 6);
  CHECK(m.outside_run == 2);
  CHECK(m.missing == 1);
  CHECK(m.below_detection == 1);
  CHECK(m.negative == 1);
  CHECK(m.pairs == 3);
  CHECK(m.observed[0] == doctest::Approx(1.0));
  CHECK(std::isnan(m.observed[1]));
  CHECK(m.observed[2] == doctest::Approx(0.025));  // half of 50 ppb
  CHECK(m.substituted[2] == 1);
  CHECK(m.observed[3] == doctest::Approx(-0.02));
  // drop leaves the "<L" hour out.
  const auto dropped = pair_monitor(c, r, obs, "CO", BelowDetection::drop, nullptr);
  CHECK(dropped.front().pairs == 2);
  CHECK(dropped.front().dropped_below_detection == 1);
}

TEST_CASE("a monitor that does not overlap the run, or lacks the pollutant asked for, is refused") {
  const CaseSpec c = parse_case(kCase, "pairing.toml", ".");
  const RunResult r = run_case(c, steady(24));
  const Observations late =
      parse_observations_csv("time,CO [ppm]\n2026-02-01T00:00Z,1\n", "late.csv");
  try {
    pair_monitor(c, r, late, "", BelowDetection::half_limit, nullptr);
    FAIL("no error");
  } catch (const InputError& e) {
    CHECK(
        std::string(e.what()) ==
        "late.csv: monitor hours 2026-02-01T00:00:00Z to 2026-02-01T00:00:00Z do not overlap the "
        "run's hours 2026-01-05T00:00:00Z to 2026-01-05T23:00:00Z; expected a monitor period that "
        "overlaps the run by at least one hour");
  }
  const Observations co = parse_observations_csv("time,CO [ppm]\n2026-01-05T00:00Z,1\n", "co.csv");
  try {
    pair_monitor(c, r, co, "NO2", BelowDetection::half_limit, nullptr);
    FAIL("no error");
  } catch (const InputError& e) {
    CHECK(std::string(e.what()) ==
          "--pollutant NO2: a pollutant the case pairing.toml does not have; expected one of the "
          "case's pollutants: CO");
  }
  const Observations no2 =
      parse_observations_csv("time,NO2 [ppb]\n2026-01-05T00:00Z,1\n", "no2.csv");
  CHECK_THROWS_AS(pair_monitor(c, r, no2, "", BelowDetection::half_limit, nullptr), InputError);
}

TEST_CASE("a steady run against a steady monitor gives perfect agreement and daily calls") {
  // Steady state 0.1 ppm + 40 ug/m3 of CO = 0.1 + 40e-6 / (28.01 * 101325 / (8.314462618 * 298.15))
  // ppm; the monitor reads that exactly, so every error statistic is 0 and FAC2, r-free IOA 1.
  const CaseSpec c = parse_case(kCase, "pairing.toml", ".");
  const RunResult r = run_case(c, steady(72));
  const auto model = model_total(c, r, 0);
  std::string text = "time,CO [ppm]\n";
  for (std::size_t i = 0; i < r.hours.size(); ++i)
    text += format_utc(r.hours[i].start_utc) + "," + format_number(model[i], 17) + "\n";
  const auto pairs = pair_monitor(c, r, parse_observations_csv(text, "m.csv"), "",
                                  BelowDetection::half_limit, nullptr);
  const std::vector<RuleSet> rules = load_rule_sets({"us-naaqs"}, rules_directory(std::nullopt));
  const ModelEvaluation ev = evaluate_run(c, r, pairs, rules);
  REQUIRE(!ev.pairs.empty());
  CHECK(ev.pairs.front().averaging == "hour means");
  CHECK(ev.pairs.front().stats.n == 72);
  CHECK(std::fabs(ev.pairs.front().stats.mb) < 1e-12);
  CHECK(ev.pairs.front().stats.fac2 == 1.0);
  CHECK(ev.pairs.front().stats.ioa == doctest::Approx(1.0));
  // Daily means of 3 complete days, then the CO rules' own daily values.
  CHECK(ev.pairs[1].averaging == "daily means");
  CHECK(ev.pairs[1].observed.size() == 3);
  REQUIRE(!ev.verifications.empty());
  for (const auto& v : ev.verifications) {
    CHECK(v.table.b == 0);
    CHECK(v.table.c == 0);
  }
  CHECK(ev.profiles.front().hour_count[5] == 3);
}

TEST_CASE("a detection-limit cell without a number is refused with its line and column") {
  try {
    parse_observations_csv("time,PM2.5 [ug/m3]\n2026-01-05T00:00Z,<abc\n", "lod.csv");
    FAIL("no error");
  } catch (const InputError& e) {
    CHECK(std::string(e.what()) ==
          "lod.csv:2: column \"PM2.5 [ug m-3]\": value \"<abc\"; expected a detection limit \"<L\" "
          "with a number L >= 0");
  }
  const Observations o = parse_observations_csv(
      "time,PM2.5 [ug/m3]\n2026-01-05T00:00Z,<2.5\n2026-01-05T02:00Z,4\n", "lod.csv");
  REQUIRE(o.below_detection.at("PM2.5").size() == 3);  // as long as the series, gap included
  CHECK(o.below_detection.at("PM2.5")[0] == 2.5);
  CHECK(std::isnan(o.below_detection.at("PM2.5")[2]));
  CHECK(std::isnan(o.series.at("PM2.5").values[0]));  // the standards see a missing value
}
