#include <doctest/doctest.h>

#include <cmath>
#include <cstdio>
#include <fstream>
#include <random>
#include <sstream>
#include <string>

#include "lidbox/analysis/verification.hpp"
#include "lidbox/base/error.hpp"

using namespace lidbox;

TEST_CASE("Finley's tornado forecasts give the published 2x2 scores") {
  // Finley (1884): a = 28, b = 72, c = 23, d = 2680. Published scores (CAWCR forecast
  // verification, "Finley tornado forecasts" page; Murphy 1996, Wea. Forecasting 11:3-20):
  // accuracy 96.6 %, bias "roughly twice", POD "slightly more than half", FAR 72 %, CSI 23 %,
  // Peirce (Hanssen-Kuipers) 52 %, ETS "almost the same as the TS".
  ContingencyTable t{28, 72, 23, 2680};
  const CategoricalScores s = categorical_scores(t);
  CHECK(s.accuracy == doctest::Approx(0.966).epsilon(0.0006));
  CHECK(s.frequency_bias == doctest::Approx(2.0).epsilon(0.03));
  CHECK(s.pod == doctest::Approx(0.55).epsilon(0.01));
  CHECK(s.far == doctest::Approx(0.72).epsilon(1e-12));
  CHECK(s.csi == doctest::Approx(0.23).epsilon(0.02));
  CHECK(s.peirce == doctest::Approx(0.52).epsilon(0.01));
  CHECK(s.ets == doctest::Approx(s.csi).epsilon(0.06));
  // Exact values from the definitions (closed form): POD 28/51, CSI 28/123,
  // ETS with a_r = 100*51/2803, HSS's closed form 2(ad - bc)/((a+c)(c+d) + (a+b)(b+d)).
  CHECK(s.pod == doctest::Approx(28.0 / 51.0).epsilon(1e-14));
  CHECK(s.csi == doctest::Approx(28.0 / 123.0).epsilon(1e-14));
  const double ar = 100.0 * 51.0 / 2803.0;
  CHECK(s.ets == doctest::Approx((28.0 - ar) / (123.0 - ar)).epsilon(1e-14));
  CHECK(s.hss == doctest::Approx(2.0 * (28.0 * 2680 - 72.0 * 23) / (51.0 * 2703 + 100.0 * 2752))
                     .epsilon(1e-12));
  CHECK(s.hss == doctest::Approx(0.3553).epsilon(1e-3));
}

TEST_CASE("2x2 scores are undefined where nothing was forecast or observed") {
  ContingencyTable t;
  for (int i = 0; i < 5; ++i) t.add(false, false);
  CHECK(t.d == 5);
  const CategoricalScores s = categorical_scores(t);
  CHECK(std::isnan(s.pod));
  CHECK(std::isnan(s.far));
  CHECK(std::isnan(s.csi));
  CHECK(s.accuracy == 1.0);
}

TEST_CASE("the Brier score of a small example and its decomposition by hand") {
  // p = 0, .5, .5, 1 and o = 0, 1, 0, 1: BS = 0.125, REL = 0, RES = 0.125, UNC = 0.25, BSS = 0.5
  // (the definitions of Brier 1950 and Murphy 1973 evaluated by hand).
  const BrierDecomposition b = brier_decomposition({0.0, 0.5, 0.5, 1.0}, {0, 1, 0, 1}, "t");
  CHECK(b.brier == doctest::Approx(0.125));
  CHECK(b.reliability == doctest::Approx(0.0));
  CHECK(b.resolution == doctest::Approx(0.125));
  CHECK(b.uncertainty == doctest::Approx(0.25));
  CHECK(b.skill == doctest::Approx(0.5));
  REQUIRE(b.table.size() == 3);
  CHECK(b.table[1].forecast_probability == 0.5);
  CHECK(b.table[1].count == 2);
  CHECK(b.table[1].observed_frequency == 0.5);
}

TEST_CASE("Murphy's decomposition is exact for ensemble probabilities on seeded random cases") {
  // Closed form: with the groups the distinct forecast values, BS = REL - RES + UNC exactly.
  const unsigned seed = 77;
  std::printf("seed %u\n", seed);
  std::mt19937 rng(seed);
  const int M = 10;
  std::vector<double> p;
  std::vector<int> o;
  std::uniform_int_distribution<int> k(0, M);
  std::uniform_real_distribution<double> u(0.0, 1.0);
  for (int i = 0; i < 2000; ++i) {
    const double pk = static_cast<double>(k(rng)) / M;
    p.push_back(pk);
    o.push_back(u(rng) < 0.7 * pk + 0.1 ? 1 : 0);
  }
  const BrierDecomposition b = brier_decomposition(p, o, "t");
  CHECK(b.brier == doctest::Approx(b.reliability - b.resolution + b.uncertainty).epsilon(1e-12));
  CHECK(b.table.size() <= static_cast<std::size_t>(M + 1));
}

TEST_CASE("Brier input outside a probability is refused with its place") {
  try {
    brier_decomposition({0.2, 1.5}, {0, 1}, "ensemble.nc");
    FAIL("no error");
  } catch (const InputError& e) {
    CHECK(std::string(e.what()) ==
          "ensemble.nc: case 2: probability 1.5; expected a probability from 0 to 1");
  }
}

TEST_CASE("rank histogram puts each observation in the bin of the members below it") {
  // Members 1 2 3: an observation of 2.5 is above two of them (bin 2), 0 in bin 0, 4 in bin 3.
  const std::vector<std::vector<double>> m = {{1, 2, 3}, {3, 1, 2}, {2, 3, 1}};
  const auto h = rank_histogram(m, {2.5, 0.0, 4.0}, 1, "t");
  CHECK(h == std::vector<long long>{1, 0, 1, 1});
  // A tie with one member lands in bin 1 or 2 (random tie-breaking, Hamill 2001).
  long long b1 = 0, b2 = 0;
  std::vector<std::vector<double>> tied(400, std::vector<double>{1, 2, 3});
  const auto t = rank_histogram(tied, std::vector<double>(400, 2.0), 5, "t");
  b1 = t[1];
  b2 = t[2];
  CHECK(t[0] == 0);
  CHECK(t[3] == 0);
  CHECK(b1 + b2 == 400);
  CHECK(b1 > 150);
  CHECK(b2 > 150);
}

namespace {

struct Reference {
  std::vector<double> observation;
  std::vector<std::vector<double>> members;
  double level = 0.0;
  std::vector<double> brier;  // BS, REL, RES, UNC
  std::vector<std::vector<double>> reliability;
  std::vector<long long> histogram;
  std::vector<long long> table;
  std::vector<double> scores;
};

Reference read_reference() {
  std::ifstream in(std::string(LIDBOX_SOURCE_DIR) +
                   "/tests/analysis/data/verification_reference.txt");
  REQUIRE(in.good());
  Reference r;
  std::string line;
  while (std::getline(in, line)) {
    std::istringstream s(line);
    std::string key;
    s >> key;
    std::vector<double> v;
    for (double x; s >> x;) v.push_back(x);
    if (key == "observation") r.observation = v;
    if (key == "members") r.members.push_back(v);
    if (key == "level") r.level = v.at(0);
    if (key == "brier") r.brier = v;
    if (key == "reliability") r.reliability.push_back(v);
    if (key == "rank_histogram") r.histogram.assign(v.begin(), v.end());
    if (key == "table") r.table.assign(v.begin(), v.end());
    if (key == "scores_pod_far_csi_bias_ets_hss_peirce") r.scores = v;
  }
  return r;
}

}  // namespace

TEST_CASE("Brier decomposition, reliability table, rank histogram and 2x2 scores match numpy") {
  // tests/reference/make_verification_reference.py (numpy, seed 20261202): 400 cases of a
  // 10-member ensemble; test_verification_reference.py checks the file is its output.
  const Reference ref = read_reference();
  REQUIRE(ref.members.size() == 400);
  std::vector<double> p;
  std::vector<int> o;
  ContingencyTable t;
  for (std::size_t c = 0; c < ref.members.size(); ++c) {
    int k = 0;
    double sum = 0.0;
    for (double x : ref.members[c]) {
      k += x > ref.level ? 1 : 0;
      sum += x;
    }
    p.push_back(static_cast<double>(k) / 10.0);
    o.push_back(ref.observation[c] > ref.level ? 1 : 0);
    t.add(sum / 10.0 > ref.level, o.back() == 1);
  }
  const BrierDecomposition b = brier_decomposition(p, o, "reference");
  CHECK(b.brier == doctest::Approx(ref.brier[0]).epsilon(1e-12));
  CHECK(b.reliability == doctest::Approx(ref.brier[1]).epsilon(1e-12));
  CHECK(b.resolution == doctest::Approx(ref.brier[2]).epsilon(1e-12));
  CHECK(b.uncertainty == doctest::Approx(ref.brier[3]).epsilon(1e-12));
  REQUIRE(b.table.size() == ref.reliability.size());
  for (std::size_t i = 0; i < b.table.size(); ++i) {
    CHECK(b.table[i].forecast_probability == doctest::Approx(ref.reliability[i][0]));
    CHECK(b.table[i].count == static_cast<long long>(ref.reliability[i][1]));
    CHECK(b.table[i].observed_frequency == doctest::Approx(ref.reliability[i][2]).epsilon(1e-14));
  }
  CHECK(rank_histogram(ref.members, ref.observation, 1, "reference") == ref.histogram);
  CHECK(std::vector<long long>{t.a, t.b, t.c, t.d} == ref.table);
  const CategoricalScores s = categorical_scores(t);
  const double mine[] = {s.pod, s.far, s.csi, s.frequency_bias, s.ets, s.hss, s.peirce};
  for (int i = 0; i < 7; ++i)
    CHECK(mine[i] == doctest::Approx(ref.scores[static_cast<std::size_t>(i)]).epsilon(1e-12));
}
