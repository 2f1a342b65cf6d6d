// Agreement of modelled with observed values: the statistics of model evaluation and the published
// acceptance criteria printed beside them.
//
// Notation: O observed, P modelled, N pairs, overbar = mean over the pairs.
//   FB    = (Ō − P̄) / (0.5 (Ō + P̄))             positive = under-prediction   Chang & Hanna (2004)
//   NMSE  = mean((O − P)²) / (Ō P̄)                                           Chang & Hanna (2004)
//   MG    = exp(mean ln O − mean ln P)                                        Chang & Hanna (2004)
//   VG    = exp(mean (ln O − ln P)²)                                          Chang & Hanna (2004)
//   FAC2  = fraction of pairs with 0.5 ≤ P/O ≤ 2                              Chang & Hanna (2004)
//   MB    = mean(P − O), ME = mean|P − O|          positive = over-prediction (EPA guidance)
//   NMB   = Σ(P − O)/ΣO, NME = Σ|P − O|/ΣO
//   MFB   = (2/N) Σ (P − O)/(P + O), MFE = (2/N) Σ |P − O|/(P + O)          Boylan & Russell (2006)
//   r     = Pearson correlation; RMSE = √mean(P − O)²;
//   CRMSE = √mean((P − P̄) − (O − Ō))²
//   IOA   = 1 − Σ(P − O)² / Σ(|P − Ō| + |O − Ō|)²                           Willmott (1981)
//
// Zeros, values below detection and negative values (real monitors report small negatives as
// instrument noise): every linear statistic (FB, NMSE, MB, ME, NMB, NME, r, RMSE, CRMSE, IOA)
// uses all pairs as they are. MG, VG and FAC2 take logarithms or ratios and use only the pairs
// with O > 0 and P > 0 (their count is `n_positive`); MFB and MFE use only the pairs with
// O + P > 0 (`n_fractional`). A statistic whose denominator is zero (ΣO = 0, Ō P̄ ≤ 0, a constant
// series for r, no positive pairs) is NaN and reported as "undefined", never as a number.
// Values below detection are substituted before they reach these functions (monitor_pairing.hpp).
#pragma once

#include <string>
#include <vector>

namespace lidbox {

struct AgreementStatistics {
  std::size_t n = 0;
  std::size_t n_positive = 0;    // pairs with O > 0 and P > 0 (MG, VG, FAC2)
  std::size_t n_fractional = 0;  // pairs with O + P > 0 (MFB, MFE)
  double mean_observed = 0.0;
  double mean_modelled = 0.0;
  double fb = 0.0, nmse = 0.0, mg = 0.0, vg = 0.0, fac2 = 0.0;
  double mb = 0.0, me = 0.0, nmb = 0.0, nme = 0.0, mfb = 0.0, mfe = 0.0;
  double r = 0.0, rmse = 0.0, crmse = 0.0, ioa = 0.0;
};

// The statistics of equal-length arrays of finite values (n >= 1); InternalError otherwise (the
// pairing code guarantees both).
AgreementStatistics agreement_statistics(const std::vector<double>& observed,
                                         const std::vector<double>& modelled);

// Names in report order, and the value of a statistic by name ("FB", "NMSE", ...; NaN for an
// unknown name is an InternalError).
const std::vector<std::string>& agreement_statistic_names();
double agreement_value(const AgreementStatistics& s, const std::string& name);

// What a set of pairs is: the judged averaging period and pollutant, which decides which
// published criteria apply.
enum class PairingLevel { hour_means, daily_means, daily_max_8h, daily_max_1h, other_daily };

// One bound of a published criterion: |statistic| or statistic against a bound.
struct CriterionBound {
  std::string statistic;  // "FB", "NMB", ...
  bool absolute = false;  // compare |value|
  bool upper = true;      // value <= bound (upper) or value >= bound (lower)
  bool strict = false;    // < or > instead of <= or >=
  double bound = 0.0;
};

struct Criterion {
  std::string id;          // "chang-hanna-2004"
  std::string level;       // "acceptable", "goal", "criteria"
  std::string citation;    // authors, year, journal, volume and pages
  std::string checked;     // how each number was verified (SRC / from memory)
  std::string applies_to;  // words: "hour and daily means, any pollutant"
  std::vector<CriterionBound> bounds;
};

// The criteria that apply to pairs of `level` for `pollutant` (canonical name, "PM2.5", "O3").
std::vector<Criterion> criteria_for(PairingLevel level, const std::string& pollutant);

struct CriterionResult {
  Criterion criterion;
  std::vector<std::string> bound_text;  // "|FB| <= 0.3"
  std::vector<double> values;           // the statistic of each bound
  std::vector<bool> bound_met;          // false also when the value is undefined
  bool met = false;                     // every bound met
};

CriterionResult check_criterion(const Criterion& c, const AgreementStatistics& s);
// "|FB| <= 0.3", "r > 0.5", "|NMB| < 0.15" (NMB, NME, MFB, MFE are fractions, not percent).
std::string describe_bound(const CriterionBound& b);

}  // namespace lidbox
