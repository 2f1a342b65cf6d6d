#include <doctest/doctest.h>

#include <cmath>
#include <cstdio>
#include <random>

#include "lidbox/analysis/agreement.hpp"
#include "lidbox/base/error.hpp"

using namespace lidbox;

TEST_CASE("agreement statistics of a four-pair example match the definitions worked by hand") {
  // O = 1 2 3 4, P = 2 2 2 6; every value below is the definition of decisions-references §2
  // evaluated by hand (closed form), e.g. IOA = 1 - 6/31.
  const AgreementStatistics s = agreement_statistics({1, 2, 3, 4}, {2, 2, 2, 6});
  CHECK(s.n == 4);
  CHECK(s.fb == doctest::Approx(-0.5 / 2.75).epsilon(1e-12));
  CHECK(s.nmse == doctest::Approx(0.2).epsilon(1e-12));
  CHECK(s.mg == doctest::Approx(std::pow(0.5, 0.25)).epsilon(1e-12));
  const double l1 = std::log(0.5), l3 = std::log(1.5), l4 = std::log(4.0 / 6.0);
  CHECK(s.vg == doctest::Approx(std::exp((l1 * l1 + l3 * l3 + l4 * l4) / 4.0)).epsilon(1e-12));
  CHECK(s.fac2 == doctest::Approx(1.0));
  CHECK(s.mb == doctest::Approx(0.5));
  CHECK(s.me == doctest::Approx(1.0));
  CHECK(s.nmb == doctest::Approx(0.2));
  CHECK(s.nme == doctest::Approx(0.4));
  CHECK(s.mfb == doctest::Approx(0.5 * (1.0 / 3.0 - 0.2 + 0.2)).epsilon(1e-12));
  CHECK(s.mfe == doctest::Approx(0.5 * (1.0 / 3.0 + 0.2 + 0.2)).epsilon(1e-12));
  CHECK(s.r == doctest::Approx(6.0 / std::sqrt(60.0)).epsilon(1e-12));
  CHECK(s.rmse == doctest::Approx(std::sqrt(1.5)).epsilon(1e-12));
  CHECK(s.crmse == doctest::Approx(std::sqrt(1.25)).epsilon(1e-12));
  CHECK(s.ioa == doctest::Approx(1.0 - 6.0 / 31.0).epsilon(1e-12));
}

TEST_CASE(
    "zeros and negative values leave MG VG and FAC2 to the positive pairs and keep them "
    "elsewhere") {
  // O = 0, 2, -0.1 and P = 1, 2, 1: only the second pair is positive on both sides (closed form).
  const AgreementStatistics s = agreement_statistics({0.0, 2.0, -0.1}, {1.0, 2.0, 1.0});
  CHECK(s.n == 3);
  CHECK(s.n_positive == 1);
  CHECK(s.mg == doctest::Approx(1.0));
  CHECK(s.fac2 == doctest::Approx(1.0));
  CHECK(s.n_fractional == 3);                               // O + P = 1, 4, 0.9
  CHECK(s.mb == doctest::Approx((1.0 + 0.0 + 1.1) / 3.0));  // the negative value is kept
  // A series of zeros has no normalised bias: undefined, not a number.
  const AgreementStatistics z = agreement_statistics({0.0, 0.0}, {1.0, 2.0});
  CHECK(std::isnan(z.nmb));
  CHECK(std::isnan(z.mg));
  CHECK(std::isnan(z.r));  // constant observations
}

TEST_CASE("CRMSE squared is RMSE squared minus MB squared on seeded random pairs") {
  // Closed form: mean((d - mean d)^2) = mean(d^2) - (mean d)^2.
  const unsigned seed = 20261202;
  std::printf("seed %u\n", seed);
  std::mt19937 rng(seed);
  std::lognormal_distribution<double> dist(2.0, 0.6);
  std::vector<double> o(500), p(500);
  for (std::size_t i = 0; i < o.size(); ++i) {
    o[i] = dist(rng);
    p[i] = 0.8 * o[i] + dist(rng) * 0.3;
  }
  const AgreementStatistics s = agreement_statistics(o, p);
  CHECK(s.crmse * s.crmse == doctest::Approx(s.rmse * s.rmse - s.mb * s.mb).epsilon(1e-10));
  CHECK(s.ioa <= 1.0);
  CHECK(s.r <= 1.0);
}

TEST_CASE("published criteria are applied by level and pollutant and report each bound") {
  // Boylan & Russell (2006) abstract: goal MFE <= 50 %, |MFB| <= 30 %; criteria MFE <= 75 %,
  // |MFB| <= 60 %.
  const auto pm = criteria_for(PairingLevel::daily_means, "PM2.5");
  std::vector<std::string> ids;
  for (const auto& c : pm) ids.push_back(c.id + "/" + c.level);
  CHECK(ids == std::vector<std::string>{
                   "chang-hanna-2004/acceptable", "hanna-chang-2012/acceptable (urban)",
                   "emery-2017-pm25/goal", "emery-2017-pm25/criteria", "boylan-russell-2006/goal",
                   "boylan-russell-2006/criteria"});
  AgreementStatistics s;
  s.mfe = 0.6;
  s.mfb = -0.31;
  const CriterionResult goal = check_criterion(pm[4], s);
  CHECK_FALSE(goal.met);
  CHECK(goal.bound_text == std::vector<std::string>{"MFE <= 0.5", "|MFB| <= 0.3"});
  CHECK(goal.bound_met == std::vector<bool>{false, false});
  CHECK(check_criterion(pm[5], s).met);
  // Emery et al. (2017) ozone benchmarks apply to the daily maximum 8-h means only.
  CHECK(criteria_for(PairingLevel::hour_means, "O3").size() == 2);
  const auto o3 = criteria_for(PairingLevel::daily_max_8h, "O3");
  REQUIRE(o3.size() == 2);
  CHECK(o3[1].level == "criteria");
  CHECK(describe_bound(o3[1].bounds[0]) == "|NMB| < 0.15");
  // An undefined statistic never meets a bound.
  AgreementStatistics u;
  u.fb = std::nan("");
  CHECK_FALSE(check_criterion(criteria_for(PairingLevel::hour_means, "CO")[0], u).met);
}

TEST_CASE("agreement statistics refuse arrays that the pairing should never produce") {
  CHECK_THROWS_AS(agreement_statistics({1.0}, {}), InternalError);
  CHECK_THROWS_AS(agreement_statistics({1.0, std::nan("")}, {1.0, 2.0}), InternalError);
}
