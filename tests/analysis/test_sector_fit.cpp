#include <doctest/doctest.h>

#include <cmath>
#include <cstdio>
#include <random>
#include <sstream>

#include "lidbox/analysis/calibrated_case.hpp"
#include "lidbox/analysis/model_evaluation.hpp"
#include "lidbox/analysis/sector_fit.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/engine/case_file.hpp"
#include "lidbox/engine/run.hpp"
#include "lidbox/standards/observations_csv.hpp"

using namespace lidbox;

namespace {

// An invented two-sector case: traffic with two rush hours, heating in the evening, a
// background from the wind direction.
const char* kCase = R"(
name = "fit-test"
time_zone = "UTC"
[airshed]
x_side = "10 km"
y_side = "8 km"
[met]
file = "m.csv"
[model]
spin_up = "none"
[pollutants.PM25]
unit = "ug/m3"
lifetime = "5 day"
background = { by_wind_from = [ { from = "0 deg", to = "180 deg", value = "6 ug/m3" },
                                { from = "180 deg", to = "0 deg", value = "3 ug/m3" } ] }
free_troposphere = "2 ug/m3"
initial = "10 ug/m3"
[sectors.traffic]
emissions = { PM25 = "20 kg/h" }
hour_of_day = [0.3, 0.2, 0.2, 0.2, 0.3, 0.7, 1.5, 2.2, 2.0, 1.3, 1.1, 1.1,
               1.2, 1.2, 1.3, 1.6, 2.0, 2.2, 1.6, 1.0, 0.8, 0.6, 0.5, 0.4]
[sectors.heating]
emissions = { PM25 = "60 kg/h" }
hour_of_day = [0.8, 0.5, 0.4, 0.4, 0.4, 0.6, 1.3, 1.5, 1.0, 0.6, 0.5, 0.5,
               0.5, 0.5, 0.6, 0.8, 1.2, 1.9, 2.4, 2.5, 2.3, 1.9, 1.5, 1.1]
)";

const char* kSameClock = R"(
name = "collinear"
time_zone = "UTC"
[airshed]
x_side = "10 km"
y_side = "8 km"
[met]
file = "m.csv"
[model]
spin_up = "none"
[pollutants.PM25]
unit = "ug/m3"
background = "4 ug/m3"
free_troposphere = "2 ug/m3"
[sectors.a]
emissions = { PM25 = "20 kg/h" }
[sectors.b]
emissions = { PM25 = "60 kg/h" }
)";

MetSeries met(std::size_t n) {
  MetSeries m;
  m.source = "m.csv";
  m.first_stamp_utc = parse_iso8601("2026-01-05T00:00Z", nullptr, "t");
  for (std::size_t i = 0; i < n; ++i) {
    const double h = static_cast<double>(i % 24);
    m.mixing_height_m.push_back(250.0 +
                                500.0 * std::max(0.0, std::sin((h - 7.0) / 12.0 * 3.14159)));
    const double dir = (i / 30) % 2 ? 0.8 : -0.8;
    m.wind_u_m_s.push_back(1.5 + 0.5 * std::cos(0.3 * static_cast<double>(i)));
    m.wind_v_m_s.push_back(dir);
  }
  m.filled.assign(n, 0);
  m.source_line.assign(n, 0);
  return m;
}

// A monitor file made from the run's parts with the given scales (background, traffic,
// heating), written in ppb-free ug/m3 with 17 significant digits.
Observations monitor_from(const CaseSpec& c, const RunResult& r, double sb, double st, double sh,
                          double noise_sd, unsigned seed) {
  std::mt19937 rng(seed);
  std::normal_distribution<double> noise(0.0, noise_sd);
  const auto bg = model_part(c, r, 0, 0), init = model_part(c, r, 0, 1);
  const auto tr = model_part(c, r, 0, 2), he = model_part(c, r, 0, 3);
  std::ostringstream o;
  o.precision(17);
  o << "# invented monitor for a test\ntime,PM2.5 [ug/m3]\n";
  for (std::size_t i = 0; i < r.hours.size(); ++i) {
    const double v =
        sb * bg[i] + init[i] + st * tr[i] + sh * he[i] + (noise_sd > 0 ? noise(rng) : 0.0);
    o << format_utc(r.hours[i].start_utc) << "," << v << "\n";
  }
  return parse_observations_csv(o.str(), "monitor.csv");
}

}  // namespace

TEST_CASE("monitors made from the model with known scales and no noise are fitted back to 1e-9") {
  // Closed form: the box is linear in its sources, so y = sum x_j K_j has the solution x.
  const CaseSpec c = parse_case(kCase, "fit.toml", ".");
  const RunResult r = run_case(c, met(24 * 10));
  const Observations obs = monitor_from(c, r, 1.2, 0.6, 1.7, 0.0, 0);
  const auto pairs = pair_monitor(c, r, obs, "", BelowDetection::half_limit, nullptr);
  SectorFitOptions o;
  o.bootstrap = 50;
  const FitDesign d = build_fit_design(c, r, pairs, o);
  const SectorFitReport f = fit_sectors(d, o);
  REQUIRE(f.estimates.size() == 3);
  CHECK(f.estimates[0].name == "background");
  CHECK(f.estimates[0].value == doctest::Approx(1.2).epsilon(1e-9));
  CHECK(f.estimates[1].value == doctest::Approx(0.6).epsilon(1e-9));
  CHECK(f.estimates[2].value == doctest::Approx(1.7).epsilon(1e-9));
  CHECK(f.r2 == doctest::Approx(1.0).epsilon(1e-12));
  CHECK(f.dofs == 3.0);
  // With an offset column the same data give an offset of zero.
  o.offset = true;
  const FitDesign d2 = build_fit_design(c, r, pairs, o);
  const SectorFitReport f2 = fit_sectors(d2, o);
  CHECK(f2.estimates[0].name == "offset");
  CHECK(std::fabs(f2.estimates[0].value) < 1e-9);
  CHECK(f2.estimates[3].value == doctest::Approx(1.7).epsilon(1e-9));
}

TEST_CASE(
    "with noise the fit recovers the scales within three standard errors, Gaussian and bootstrap") {
  const unsigned seed = 4242;
  std::printf("seed %u\n", seed);
  const CaseSpec c = parse_case(kCase, "fit.toml", ".");
  const RunResult r = run_case(c, met(24 * 40));
  const Observations obs = monitor_from(c, r, 1.1, 1.3, 0.7, 1.0, seed);
  const auto pairs = pair_monitor(c, r, obs, "", BelowDetection::half_limit, nullptr);
  SectorFitOptions o;
  o.bootstrap = 300;
  o.seed = 3;
  const SectorFitReport f = fit_sectors(build_fit_design(c, r, pairs, o), o);
  const double truth[] = {1.1, 1.3, 0.7};
  for (int j = 0; j < 3; ++j) {
    const auto& e = f.estimates[static_cast<std::size_t>(j)];
    CHECK(std::fabs(e.value - truth[j]) < 3.0 * e.gaussian_se);
    CHECK(e.bootstrap_se > 0.2 * e.gaussian_se);
    CHECK(e.bootstrap_se < 5.0 * e.gaussian_se);
    CHECK(e.t > 2.0);
  }
  // Bayesian scaling with a tight prior at the truth stays there; with weak priors it is the
  // least-squares answer (Rodgers 2000: the prior's weight goes to zero).
  SectorFitOptions b;
  b.method = FitMethod::bayes;
  b.priors["traffic"] = {1.3, 1e-6};
  const SectorFitReport fb = fit_sectors(build_fit_design(c, r, pairs, b), b);
  CHECK(fb.estimates[1].value == doctest::Approx(1.3).epsilon(1e-6));
  CHECK(fb.dofs < 2.01);  // one scale pinned by its prior
  b.priors.clear();
  for (const char* n : {"background", "traffic", "heating"}) b.priors[n] = {1.0, 1e4};
  const SectorFitReport fw = fit_sectors(build_fit_design(c, r, pairs, b), b);
  for (int j = 0; j < 3; ++j) {
    CHECK(fw.estimates[static_cast<std::size_t>(j)].value ==
          doctest::Approx(f.estimates[static_cast<std::size_t>(j)].value).epsilon(1e-6));
  }
  CHECK(fw.dofs == doctest::Approx(3.0).epsilon(1e-6));
}

TEST_CASE("sectors with proportional responses are refused with the columns named") {
  const CaseSpec c = parse_case(kSameClock, "collinear.toml", ".");
  const RunResult r = run_case(c, met(24 * 5));
  std::ostringstream o;
  o << "time,PM2.5 [ug/m3]\n";
  for (std::size_t i = 0; i < r.hours.size(); ++i)
    o << format_utc(r.hours[i].start_utc) << "," << 10 + i % 7 << "\n";
  const auto pairs = pair_monitor(c, r, parse_observations_csv(o.str(), "m.csv"), "",
                                  BelowDetection::half_limit, nullptr);
  SectorFitOptions opt;
  opt.background = false;
  try {
    fit_sectors(build_fit_design(c, r, pairs, opt), opt);
    FAIL("no error");
  } catch (const InputError& e) {
    const std::string w = e.what();
    CHECK(w.rfind("the fit's columns a, b: hour-by-hour responses at the monitors that are "
                  "linearly dependent",
                  0) == 0);
    CHECK(w.find("expected sectors whose responses differ in time; merge such sectors into one, or "
                 "hold one at its case value with --hold NAME") != std::string::npos);
  }
  // Holding one of them leaves a fit that is meaningful.
  opt.hold = {"b"};
  CHECK(fit_sectors(build_fit_design(c, r, pairs, opt), opt).estimates.size() == 1);
}

TEST_CASE("a prior with a negative spread is refused with its place") {
  try {
    parse_prior("traffic=1:-0.5", "--prior traffic=1:-0.5");
    FAIL("no error");
  } catch (const InputError& e) {
    CHECK(std::string(e.what()) ==
          "--prior traffic=1:-0.5: prior standard deviation \"-0.5\"; expected a positive number "
          "(the "
          "variance is its square and cannot be negative)");
  }
  const auto [name, p] = parse_prior("background=1.2:0.3", "x");
  CHECK(name == "background");
  CHECK(p.mean == 1.2);
  CHECK(p.sd == 0.3);
}

TEST_CASE(
    "the calibrated case carries the scaled lines with comments and runs to the fitted means") {
  const CaseSpec c = parse_case(kCase, "fit.toml", ".");
  const RunResult r = run_case(c, met(24 * 10));
  const auto pairs = pair_monitor(c, r, monitor_from(c, r, 1.2, 0.6, 1.7, 0.0, 0), "",
                                  BelowDetection::half_limit, nullptr);
  SectorFitOptions o;
  const FitDesign d = build_fit_design(c, r, pairs, o);
  const SectorFitReport f = fit_sectors(d, o);
  const CalibratedCase cal = calibrated_case(c, kCase, f, "NNLS fit of PM2.5 to monitor", ".");
  CHECK(cal.text.find("emissions = { PM25 = \"12 kg/h\" }") != std::string::npos);   // 20 x 0.6
  CHECK(cal.text.find("emissions = { PM25 = \"102 kg/h\" }") != std::string::npos);  // 60 x 1.7
  CHECK(cal.text.find(
            "# lidbox evaluate (NNLS fit of PM2.5 to monitor): [sectors.traffic] emissions PM25 "
            "20 kg/h -> 12 kg/h (x0.6)") != std::string::npos);
  CHECK(cal.text.find("value = \"7.2 ug/m3\"") != std::string::npos);  // 6 x 1.2
  CHECK(cal.text.find("free_troposphere = \"2.4 ug/m3\"") != std::string::npos);
  CHECK(cal.text.find("initial = \"10 ug/m3\"") != std::string::npos);  // not a source: kept
  CHECK(cal.changes.size() == 6);  // name, 2 background values, free troposphere, 2 sectors
  const CaseSpec cc = parse_case(cal.text, "fit-calibrated.toml", ".");
  CHECK(cc.name == "fit-test-calibrated");
  const RunResult rc = run_case(cc, met(24 * 10));
  const auto fitted = fitted_series(d, f);
  const auto rerun = model_total(cc, rc, 0);
  for (std::size_t i = 0; i < rerun.size(); i += 7)
    CHECK(rerun[i] == doctest::Approx(fitted[i]).epsilon(1e-9));
}

TEST_CASE(
    "a sector the monitors do not see is held at bound and several weighted monitors fit "
    "together") {
  const unsigned seed = 99;
  std::printf("seed %u\n", seed);
  const CaseSpec c = parse_case(kCase, "fit.toml", ".");
  const RunResult r = run_case(c, met(24 * 20));
  // Monitor 1 without heating at all (scale 0) and noise; monitor 2 the same with other noise.
  auto a = pair_monitor(c, r, monitor_from(c, r, 1.0, 1.0, 0.0, 0.5, seed), "",
                        BelowDetection::half_limit, nullptr);
  auto b = pair_monitor(c, r, monitor_from(c, r, 1.0, 1.0, 0.0, 2.0, seed + 1), "",
                        BelowDetection::half_limit, nullptr);
  std::vector<MonitorPollutant> both = {a.front(), b.front()};
  SectorFitOptions o;
  o.monitor_weights = {4.0, 0.25};  // 1/variance of each monitor's noise
  const FitDesign d = build_fit_design(c, r, both, o);
  CHECK(d.y.size() == 2 * r.hours.size());
  const SectorFitReport f = fit_sectors(d, o);
  REQUIRE(f.estimates.size() == 3);
  CHECK(f.estimates[2].name == "heating");
  CHECK(f.estimates[2].at_bound);
  CHECK(f.estimates[2].value == 0.0);
  CHECK(std::isnan(f.estimates[2].gaussian_se));
  CHECK(f.dofs == 2.0);
  CHECK(std::fabs(f.estimates[1].value - 1.0) < 3.0 * f.estimates[1].gaussian_se);
  bool warned = false;
  for (const auto& w : f.warnings) {
    warned = warned ||
             w == "heating: at bound (held at 0 by the constraint; no Gaussian standard error)";
  }
  CHECK(warned);
  // Weights that are not one per monitor are refused.
  o.monitor_weights = {1.0};
  CHECK_THROWS_AS(build_fit_design(c, r, both, o), InputError);
}
