// Verification of yes/no calls ("the limit is exceeded today") and of probability forecasts.
//
// 2×2 table (CAWCR forecast-verification pages, "Methods for dichotomous forecasts"):
//   a hits (forecast yes, observed yes)      b false alarms (yes, no)
//   c misses (no, yes)                       d correct negatives (no, no),   n = a + b + c + d
//   POD = a/(a+c)   FAR = b/(a+b) (a ratio)   POFD = b/(b+d)   frequency bias = (a+b)/(a+c)
//   CSI = a/(a+b+c)   accuracy = (a+d)/n
//   ETS = (a − a_r)/(a + b + c − a_r),  a_r = (a+b)(a+c)/n                (Gilbert skill score)
//   HSS = (a + d − e)/(n − e),  e = ((a+b)(a+c) + (c+d)(b+d))/n         (correct beyond chance)
//       = 2(ad − bc)/((a+c)(c+d) + (a+b)(b+d))                           (the same, closed form)
//   Peirce = POD − POFD (Hanssen–Kuipers discriminant, true skill statistic)
// A score whose denominator is zero (no event observed, none forecast) is NaN: "undefined".
//
// Probability forecasts of a yes/no event, o in {0, 1}:
//   Brier score BS = mean((p − o)²)   (Brier 1950, Mon. Wea. Rev. 78:1–3)
//   Murphy's decomposition over the K distinct forecast values p_k, each used n_k times with
//   observed frequency ō_k, overall frequency ō (Murphy 1973, J. Appl. Meteor. 12:595–600):
//     BS = REL − RES + UNC,  REL = Σ n_k (p_k − ō_k)² / N,  RES = Σ n_k (ō_k − ō)² / N,
//     UNC = ō (1 − ō);  exact because the groups are the distinct values (an M-member ensemble
//     gives at most M + 1 of them: k/M).
//   Brier skill score against the sample climatology: BSS = 1 − BS/UNC.
// Rank histogram (Hamill 2001, Mon. Wea. Rev. 129:550–560): the rank of the observation among M
// members, M + 1 bins; ties between the observation and members are broken at random (seeded),
// as Hamill recommends, so that a tie does not always land in the same bin.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

namespace lidbox {

struct ContingencyTable {
  long long a = 0;  // hits
  long long b = 0;  // false alarms
  long long c = 0;  // misses
  long long d = 0;  // correct negatives

  void add(bool forecast_yes, bool observed_yes);
  [[nodiscard]] long long n() const { return a + b + c + d; }
};

struct CategoricalScores {
  double pod = 0.0, far = 0.0, pofd = 0.0, frequency_bias = 0.0, csi = 0.0, accuracy = 0.0;
  double ets = 0.0, hss = 0.0, peirce = 0.0;
};

CategoricalScores categorical_scores(const ContingencyTable& t);

struct ReliabilityRow {
  double forecast_probability = 0.0;  // p_k
  long long count = 0;                // n_k
  double observed_frequency = 0.0;    // ō_k
};

struct BrierDecomposition {
  std::size_t n = 0;
  double brier = 0.0;
  double reliability = 0.0;
  double resolution = 0.0;
  double uncertainty = 0.0;
  double skill = 0.0;  // BSS = 1 − BS/UNC; NaN when UNC = 0 (the event always or never happened)
  double climatology = 0.0;           // ō
  std::vector<ReliabilityRow> table;  // one row per distinct forecast value, ascending
};

// p in [0, 1], o 0 or 1, equal lengths, n >= 1; InputError naming `where` otherwise.
BrierDecomposition brier_decomposition(const std::vector<double>& probability,
                                       const std::vector<int>& observed, const std::string& where);

// members[c] holds the M members of case c (M >= 1, the same for every case), observation[c]
// its observed value. Returns M + 1 counts: bin k = the observation above exactly k members.
std::vector<long long> rank_histogram(const std::vector<std::vector<double>>& members,
                                      const std::vector<double>& observation, std::uint64_t seed,
                                      const std::string& where);

}  // namespace lidbox
