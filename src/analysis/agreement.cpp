#include "lidbox/analysis/agreement.hpp"

#include <cmath>
#include <limits>

#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"

namespace lidbox {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

double ratio(double num, double den) {
  return den != 0.0 ? num / den : kNaN;
}

}  // namespace

AgreementStatistics agreement_statistics(const std::vector<double>& O,
                                         const std::vector<double>& P) {
  if (O.size() != P.size() || O.empty()) {
    throw InternalError("agreement_statistics: " + std::to_string(O.size()) + " observed and " +
                        std::to_string(P.size()) + " modelled values");
  }
  const std::size_t n = O.size();
  AgreementStatistics s;
  s.n = n;
  // First pass: means (pairwise sums are unnecessary at these sizes; a year of hours loses
  // about 1e-12 relative).
  double sum_o = 0.0, sum_p = 0.0;
  for (std::size_t i = 0; i < n; ++i) {
    if (!std::isfinite(O[i]) || !std::isfinite(P[i])) {
      throw InternalError("agreement_statistics: a non-finite value at pair " + std::to_string(i));
    }
    sum_o += O[i];
    sum_p += P[i];
  }
  const double nd = static_cast<double>(n);
  const double ob = sum_o / nd, pb = sum_p / nd;
  s.mean_observed = ob;
  s.mean_modelled = pb;
  // Second pass: everything else about the means.
  double sse = 0.0, sae = 0.0, soo = 0.0, spp = 0.0, sop = 0.0, ioa_den = 0.0;
  double log_diff = 0.0, log_diff2 = 0.0, fac2 = 0.0, fb_sum = 0.0, fe_sum = 0.0;
  std::size_t n_pos = 0, n_frac = 0;
  for (std::size_t i = 0; i < n; ++i) {
    const double o = O[i], p = P[i], d = p - o;
    sse += d * d;
    sae += std::fabs(d);
    soo += (o - ob) * (o - ob);
    spp += (p - pb) * (p - pb);
    sop += (o - ob) * (p - pb);
    const double w = std::fabs(p - ob) + std::fabs(o - ob);
    ioa_den += w * w;
    if (o > 0.0 && p > 0.0) {
      ++n_pos;
      const double l = std::log(o) - std::log(p);
      log_diff += l;
      log_diff2 += l * l;
      const double q = p / o;
      if (q >= 0.5 && q <= 2.0) fac2 += 1.0;
    }
    if (o + p > 0.0) {
      ++n_frac;
      fb_sum += d / (p + o);
      fe_sum += std::fabs(d) / (p + o);
    }
  }
  s.n_positive = n_pos;
  s.n_fractional = n_frac;
  s.fb = ratio(ob - pb, 0.5 * (ob + pb));
  s.nmse = ob * pb > 0.0 ? sse / nd / (ob * pb) : kNaN;
  s.mg = n_pos ? std::exp(log_diff / static_cast<double>(n_pos)) : kNaN;
  s.vg = n_pos ? std::exp(log_diff2 / static_cast<double>(n_pos)) : kNaN;
  s.fac2 = n_pos ? fac2 / static_cast<double>(n_pos) : kNaN;
  s.mb = (sum_p - sum_o) / nd;
  s.me = sae / nd;
  s.nmb = ratio(sum_p - sum_o, sum_o);
  s.nme = ratio(sae, sum_o);
  s.mfb = n_frac ? 2.0 * fb_sum / static_cast<double>(n_frac) : kNaN;
  s.mfe = n_frac ? 2.0 * fe_sum / static_cast<double>(n_frac) : kNaN;
  s.r = soo > 0.0 && spp > 0.0 ? sop / std::sqrt(soo * spp) : kNaN;
  s.rmse = std::sqrt(sse / nd);
  // CRMSE² = RMSE² − MB² (the bias removed); computed directly to avoid the cancellation.
  double crmse2 = 0.0;
  for (std::size_t i = 0; i < n; ++i) {
    const double e = (P[i] - pb) - (O[i] - ob);
    crmse2 += e * e;
  }
  s.crmse = std::sqrt(crmse2 / nd);
  s.ioa = ioa_den > 0.0 ? 1.0 - sse / ioa_den : kNaN;
  return s;
}

const std::vector<std::string>& agreement_statistic_names() {
  static const std::vector<std::string> kNames = {"FB",  "NMSE", "MG",   "VG",    "FAC2",
                                                  "MB",  "ME",   "NMB",  "NME",   "MFB",
                                                  "MFE", "r",    "RMSE", "CRMSE", "IOA"};
  return kNames;
}

double agreement_value(const AgreementStatistics& s, const std::string& name) {
  if (name == "FB") return s.fb;
  if (name == "NMSE") return s.nmse;
  if (name == "MG") return s.mg;
  if (name == "VG") return s.vg;
  if (name == "FAC2") return s.fac2;
  if (name == "MB") return s.mb;
  if (name == "ME") return s.me;
  if (name == "NMB") return s.nmb;
  if (name == "NME") return s.nme;
  if (name == "MFB") return s.mfb;
  if (name == "MFE") return s.mfe;
  if (name == "r") return s.r;
  if (name == "RMSE") return s.rmse;
  if (name == "CRMSE") return s.crmse;
  if (name == "IOA") return s.ioa;
  throw InternalError("agreement_value: unknown statistic \"" + name + "\"");
}

namespace {

CriterionBound abs_le(const char* s, double b) {
  return {s, true, true, false, b};
}
CriterionBound abs_lt(const char* s, double b) {
  return {s, true, true, true, b};
}
CriterionBound le(const char* s, double b) {
  return {s, false, true, false, b};
}
CriterionBound lt(const char* s, double b) {
  return {s, false, true, true, b};
}
CriterionBound ge(const char* s, double b) {
  return {s, false, false, false, b};
}
CriterionBound gt(const char* s, double b) {
  return {s, false, false, true, b};
}

const char* kChangHanna =
    "Chang J.C. and Hanna S.R. (2004), Air quality model performance evaluation, Meteorol. "
    "Atmos. Phys. 87:167-196, doi:10.1007/s00703-003-0070-7";
const char* kHannaChang =
    "Hanna S.R. and Chang J.C. (2012), Acceptance criteria for urban dispersion model "
    "evaluation, Meteorol. Atmos. Phys. 116:133-146, doi:10.1007/s00703-011-0177-1";
const char* kEmery =
    "Emery C., Liu Z., Russell A.G., Odman M.T., Yarwood G. and Kumar N. (2017), Recommendations "
    "on statistics and benchmarks to assess photochemical model performance, J. Air Waste "
    "Manage. Assoc. 67:582-598, doi:10.1080/10962247.2016.1265027";
const char* kBoylan =
    "Boylan J.W. and Russell A.G. (2006), PM and light extinction model performance metrics, "
    "goals, and criteria for three-dimensional air quality models, Atmos. Environ. "
    "40:4946-4959, doi:10.1016/j.atmosenv.2005.09.087";

const std::vector<Criterion>& all_criteria() {
  static const std::vector<Criterion> kAll = {
      {"chang-hanna-2004",
       "acceptable",
       kChangHanna,
       "SRC (abstract): relative mean bias under about 30 % (|FB| <= 0.3) and scatter under about "
       "a factor of two; the numeric FAC2 >= 0.5 and NMSE <= 1.5 are from memory, not verified",
       "hour and daily means, any pollutant (derived for rural dispersion models)",
       {abs_le("FB", 0.3), le("NMSE", 1.5), ge("FAC2", 0.5)}},
      {"hanna-chang-2012",
       "acceptable (urban)",
       kHannaChang,
       "SRC (abstract): |FB| < 0.67, NMSE < 6; FAC2 >= 0.30 from memory, not verified",
       "hour and daily means, any pollutant (urban dispersion models)",
       {abs_lt("FB", 0.67), lt("NMSE", 6.0), ge("FAC2", 0.30)}},
      {"emery-2017-ozone",
       "goal",
       kEmery,
       "SRC secondary (citation statements of the paper): ozone MDA8 goal",
       "ozone daily maximum "
       "8-h means",
       {abs_lt("NMB", 0.05), lt("NME", 0.15), gt("r", 0.75)}},
      {"emery-2017-ozone",
       "criteria",
       kEmery,
       "SRC secondary (citation statements quote the +-15 % NMB criterion)",
       "ozone daily maximum 8-h means",
       {abs_lt("NMB", 0.15), lt("NME", 0.25), gt("r", 0.50)}},
      {"emery-2017-pm25",
       "goal",
       kEmery,
       "from memory, not verified",
       "PM2.5 24-h (daily) means",
       {abs_lt("NMB", 0.10), lt("NME", 0.35), gt("r", 0.70)}},
      {"emery-2017-pm25",
       "criteria",
       kEmery,
       "from memory, not verified",
       "PM2.5 24-h (daily) means",
       {abs_lt("NMB", 0.30), lt("NME", 0.50), gt("r", 0.40)}},
      {"boylan-russell-2006",
       "goal",
       kBoylan,
       "SRC (abstract): MFE <= +50 % and MFB within +-30 %",
       "PM daily means",
       {le("MFE", 0.50), abs_le("MFB", 0.30)}},
      {"boylan-russell-2006",
       "criteria",
       kBoylan,
       "SRC (abstract): MFE <= +75 % and MFB within +-60 %",
       "PM daily means",
       {le("MFE", 0.75), abs_le("MFB", 0.60)}},
  };
  return kAll;
}

bool is_pm(const std::string& p) {
  return p == "PM2.5" || p == "PM10";
}

}  // namespace

std::vector<Criterion> criteria_for(PairingLevel level, const std::string& pollutant) {
  std::vector<Criterion> out;
  const bool daily = level != PairingLevel::hour_means;
  for (const Criterion& c : all_criteria()) {
    const std::string& id = c.id;
    bool applies = false;
    if (id == "chang-hanna-2004" || id == "hanna-chang-2012") {
      applies = level == PairingLevel::hour_means || level == PairingLevel::daily_means;
    } else if (id == "emery-2017-ozone") {
      applies = pollutant == "O3" && level == PairingLevel::daily_max_8h;
    } else if (id == "emery-2017-pm25") {
      applies = pollutant == "PM2.5" && level == PairingLevel::daily_means;
    } else if (id == "boylan-russell-2006") {
      applies = is_pm(pollutant) && daily && level == PairingLevel::daily_means;
    }
    if (applies) out.push_back(c);
  }
  return out;
}

std::string describe_bound(const CriterionBound& b) {
  std::string s = b.absolute ? "|" + b.statistic + "|" : b.statistic;
  s += b.upper ? (b.strict ? " < " : " <= ") : (b.strict ? " > " : " >= ");
  return s + format_number(b.bound, 4);
}

CriterionResult check_criterion(const Criterion& c, const AgreementStatistics& s) {
  CriterionResult r;
  r.criterion = c;
  r.met = true;
  for (const CriterionBound& b : c.bounds) {
    double v = agreement_value(s, b.statistic);
    r.values.push_back(v);
    r.bound_text.push_back(describe_bound(b));
    if (b.absolute) v = std::fabs(v);
    bool ok = false;
    if (!std::isnan(v)) {
      ok = b.upper ? (b.strict ? v < b.bound : v <= b.bound)
                   : (b.strict ? v > b.bound : v >= b.bound);
    }
    r.bound_met.push_back(ok);
    r.met = r.met && ok;
  }
  return r;
}

}  // namespace lidbox
