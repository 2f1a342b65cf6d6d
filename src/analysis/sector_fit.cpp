#include "lidbox/analysis/sector_fit.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <random>

#include "lidbox/base/error.hpp"
#include "lidbox/base/percentile.hpp"
#include "lidbox/base/text.hpp"

namespace lidbox {

namespace {
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
}  // namespace

std::pair<std::string, ScalePrior> parse_prior(const std::string& text, const std::string& where) {
  const auto eq = text.find('=');
  const auto colon = text.find(':', eq == std::string::npos ? 0 : eq);
  if (eq == std::string::npos || colon == std::string::npos || eq == 0) {
    throw InputError(where, "\"" + text + "\"", "NAME=MEAN:SD, such as traffic=1:0.5");
  }
  const std::string name(trim(text.substr(0, eq)));
  ScalePrior p;
  if (!parse_double(trim(text.substr(eq + 1, colon - eq - 1)), p.mean)) {
    throw InputError(where, "prior mean \"" + text.substr(eq + 1, colon - eq - 1) + "\"",
                     "a number");
  }
  if (!parse_double(trim(text.substr(colon + 1)), p.sd) || !(p.sd > 0.0)) {
    throw InputError(where, "prior standard deviation \"" + text.substr(colon + 1) + "\"",
                     "a positive number (the variance is its square and cannot be negative)");
  }
  return {name, p};
}

namespace {

// Refuses monitors of several pollutants, weights that are not one positive number per
// monitor, and held sectors the case does not have.
void check_fit_inputs(const CaseSpec& c, const std::vector<MonitorPollutant>& monitors,
                      const SectorFitOptions& o) {
  if (monitors.empty()) throw InternalError("build_fit_design: no monitors");
  const std::string& pollutant = monitors.front().pollutant;
  for (const auto& m : monitors) {
    if (m.pollutant != pollutant) {
      throw InputError("--fit", "monitors of " + pollutant + " and " + m.pollutant,
                       "one pollutant to fit (choose it with --pollutant)");
    }
  }
  if (!o.monitor_weights.empty() && o.monitor_weights.size() != monitors.size()) {
    throw InputError("--weights", std::to_string(o.monitor_weights.size()) + " weights",
                     "one per monitor (" + std::to_string(monitors.size()) + ")");
  }
  for (double w : o.monitor_weights) {
    if (!(w > 0.0) || !std::isfinite(w)) {
      throw InputError("--weights", "weight " + format_number(w), "a positive number");
    }
  }
  std::vector<std::string> names;
  for (const auto& sec : c.sectors) names.push_back(sec.name);
  for (const std::string& h : o.hold) {
    if (std::find(names.begin(), names.end(), h) == names.end()) {
      throw InputError("--hold " + h,
                       "\"" + h + "\", not a sector of " + c.file + did_you_mean(h, names),
                       "one of " + join(names));
    }
  }
}

// The columns to fit (offset, background, sectors), and the parts held at their case values.
void add_fit_columns(const CaseSpec& c, const RunResult& r, const std::vector<bool>& paired,
                     const SectorFitOptions& o, FitDesign& d) {
  const std::size_t p = d.case_index, T = d.hours;
  auto all_zero = [&](const std::vector<double>& s) {
    for (std::size_t i = 0; i < T; ++i) {
      if (paired[i] && s[i] != 0.0) return false;
    }
    return true;
  };
  if (o.offset) {
    d.columns.push_back({FitColumn::Kind::offset, "offset", 0});
    d.column_series.emplace_back(T, 1.0);
  }
  std::vector<double> background = model_part(c, r, p, 0);
  if (o.background && !all_zero(background)) {
    d.columns.push_back({FitColumn::Kind::background, "background", 0});
    d.column_series.push_back(std::move(background));
  } else {
    for (std::size_t i = 0; i < T; ++i) d.fixed_total[i] += background[i];
    d.left_out.push_back(o.background ? "background: zero at every paired hour, held at 1"
                                      : "background: held at 1 (--no-background)");
  }
  for (std::size_t s = 0; s < c.sectors.size(); ++s) {
    std::vector<double> part = model_part(c, r, p, 2 + s);
    if (std::find(o.hold.begin(), o.hold.end(), c.sectors[s].name) != o.hold.end()) {
      for (std::size_t i = 0; i < T; ++i) d.fixed_total[i] += part[i];
      d.left_out.push_back(c.sectors[s].name + ": held at 1 (--hold)");
    } else if (all_zero(part)) {
      d.left_out.push_back(c.sectors[s].name + ": no " + d.pollutant +
                           " at any paired hour, not fitted");
    } else {
      d.columns.push_back({FitColumn::Kind::sector, c.sectors[s].name, s});
      d.column_series.push_back(std::move(part));
    }
  }
}

// One row per paired hour and monitor: the columns' values, observed minus fixed, weight.
void add_fit_rows(const std::vector<MonitorPollutant>& monitors, const SectorFitOptions& o,
                  FitDesign& d) {
  std::size_t rows = 0;
  for (const auto& m : monitors) rows += m.pairs;
  d.K = DenseMatrix(rows, d.columns.size());
  std::size_t row = 0;
  for (std::size_t k = 0; k < monitors.size(); ++k) {
    const double w = o.monitor_weights.empty() ? 1.0 : o.monitor_weights[k];
    for (std::size_t i = 0; i < d.hours; ++i) {
      const double obs = monitors[k].observed[i];
      if (std::isnan(obs)) continue;
      for (std::size_t j = 0; j < d.columns.size(); ++j) d.K(row, j) = d.column_series[j][i];
      d.y.push_back(obs - d.fixed_total[i]);
      d.weight.push_back(w);
      d.row_monitor.push_back(k);
      d.row_hour.push_back(i);
      ++row;
    }
  }
}

}  // namespace

FitDesign build_fit_design(const CaseSpec& c, const RunResult& r,
                           const std::vector<MonitorPollutant>& monitors,
                           const SectorFitOptions& o) {
  check_fit_inputs(c, monitors, o);
  FitDesign d;
  d.pollutant = monitors.front().pollutant;
  d.unit = monitors.front().unit;
  d.case_index = monitors.front().case_index;
  d.hours = r.hours.size();
  d.fixed_total = model_part(c, r, d.case_index, 1);
  // Hours paired at any monitor: a column is "zero" when it is zero at all of them.
  std::vector<bool> paired(d.hours, false);
  for (const auto& m : monitors) {
    for (std::size_t i = 0; i < d.hours; ++i) paired[i] = paired[i] || !std::isnan(m.observed[i]);
  }
  add_fit_columns(c, r, paired, o, d);
  add_fit_rows(monitors, o, d);
  return d;
}

namespace {

std::size_t n_free_of(const FitDesign& d) {
  return !d.columns.empty() && d.columns.front().kind == FitColumn::Kind::offset ? 1 : 0;
}

// Gram matrix of the weighted, augmented design [K y]: (p+1)×(p+1).
DenseMatrix gram_of(const FitDesign& d) {
  const std::size_t p = d.columns.size();
  DenseMatrix G(p + 1, p + 1);
  std::vector<double> z(p + 1);
  for (std::size_t r = 0; r < d.y.size(); ++r) {
    for (std::size_t j = 0; j < p; ++j) z[j] = d.K(r, j);
    z[p] = d.y[r];
    const double w = d.weight[r];
    for (std::size_t a = 0; a <= p; ++a) {
      for (std::size_t b = a; b <= p; ++b) G(a, b) += w * z[a] * z[b];
    }
  }
  for (std::size_t a = 0; a <= p; ++a) {
    for (std::size_t b = 0; b < a; ++b) G(a, b) = G(b, a);
  }
  return G;
}

struct Solved {
  std::vector<double> x;
  std::vector<bool> at_bound;
  bool converged = true;
};

// Bayesian posterior mean from the Gram matrix (all columns), σ_o and the priors.
bool bayes_from_gram(const DenseMatrix& G, double sigma2, const std::vector<ScalePrior>& prior,
                     std::vector<double>& x, DenseMatrix* post_cov, double* dofs) {
  const std::size_t p = prior.size();
  DenseMatrix H(p, p);
  for (std::size_t a = 0; a < p; ++a) {
    for (std::size_t b = 0; b < p; ++b) H(a, b) = G(a, b) / sigma2;
    H(a, a) += 1.0 / (prior[a].sd * prior[a].sd);
  }
  DenseMatrix S;
  if (!invert_spd(H, S)) return false;
  std::vector<double> rhs(p);
  for (std::size_t a = 0; a < p; ++a) {
    double v = G(a, p);  // Kᵀ W y
    for (std::size_t b = 0; b < p; ++b) v -= G(a, b) * prior[b].mean;
    rhs[a] = v / sigma2;
  }
  x.assign(p, 0.0);
  for (std::size_t a = 0; a < p; ++a) {
    double v = prior[a].mean;
    for (std::size_t b = 0; b < p; ++b) v += S(a, b) * rhs[b];
    x[a] = v;
  }
  if (dofs) {
    double tr = 0.0;  // tr(Ŝ KᵀS_o⁻¹K)
    for (std::size_t a = 0; a < p; ++a) {
      for (std::size_t b = 0; b < p; ++b) tr += S(a, b) * G(b, a) / sigma2;
    }
    *dofs = tr;
  }
  if (post_cov) *post_cov = S;
  return true;
}

double weighted_rss(const FitDesign& d, const std::vector<double>& x) {
  double rss = 0.0;
  for (std::size_t r = 0; r < d.y.size(); ++r) {
    double e = d.y[r];
    for (std::size_t j = 0; j < x.size(); ++j) e -= d.K(r, j) * x[j];
    rss += d.weight[r] * e * e;
  }
  return rss;
}

// Condition number of the unit-length (uncentred) columns and VIFs of the non-offset columns.
void collinearity(const DenseMatrix& G, std::size_t p, std::size_t n_free, double& cond,
                  std::vector<double>& vif, const FitDesign& d) {
  DenseMatrix C(p, p);
  for (std::size_t a = 0; a < p; ++a) {
    for (std::size_t b = 0; b < p; ++b) C(a, b) = G(a, b) / std::sqrt(G(a, a) * G(b, b));
  }
  const std::vector<double> ev = symmetric_eigenvalues(C);
  cond = ev.front() > 0.0 ? std::sqrt(ev.back() / ev.front())
                          : std::numeric_limits<double>::infinity();
  // Correlation matrix of the weighted, centred columns (offset excluded).
  const std::size_t q = p - n_free;
  vif.assign(p, kNaN);
  if (q == 1) {
    vif[n_free] = 1.0;
    return;
  }
  double sw = 0.0;
  std::vector<double> mean(p, 0.0);
  for (std::size_t r = 0; r < d.y.size(); ++r) {
    sw += d.weight[r];
    for (std::size_t j = n_free; j < p; ++j) mean[j] += d.weight[r] * d.K(r, j);
  }
  for (double& m : mean) m /= sw;
  DenseMatrix V(q, q);
  for (std::size_t r = 0; r < d.y.size(); ++r) {
    for (std::size_t a = 0; a < q; ++a) {
      const double ea = d.K(r, n_free + a) - mean[n_free + a];
      for (std::size_t b = a; b < q; ++b) {
        V(a, b) += d.weight[r] * ea * (d.K(r, n_free + b) - mean[n_free + b]);
      }
    }
  }
  for (std::size_t a = 0; a < q; ++a) {
    for (std::size_t b = 0; b < a; ++b) V(a, b) = V(b, a);
  }
  DenseMatrix R(q, q);
  for (std::size_t a = 0; a < q; ++a) {
    for (std::size_t b = 0; b < q; ++b) R(a, b) = V(a, b) / std::sqrt(V(a, a) * V(b, b));
  }
  DenseMatrix Ri;
  if (!invert_spd(R, Ri)) {
    for (std::size_t a = 0; a < q; ++a) vif[n_free + a] = std::numeric_limits<double>::infinity();
    return;
  }
  for (std::size_t a = 0; a < q; ++a) vif[n_free + a] = Ri(a, a);
}

std::vector<std::string> names_of(const FitDesign& d) {
  std::vector<std::string> n;
  for (const auto& c : d.columns) n.push_back(c.name);
  return n;
}

}  // namespace

namespace {

// Refuses a fit with nothing to fit, fewer rows than unknowns, or a prior on no column.
void check_fit_request(const FitDesign& d, const SectorFitOptions& o, std::size_t rows) {
  const std::size_t p = d.columns.size();
  if (p == n_free_of(d)) {
    throw InputError("--fit",
                     "nothing to fit for " + d.pollutant + " (" + join(d.left_out, "; ") + ")",
                     "a background or a sector with " + d.pollutant + " at the paired hours");
  }
  if (rows <= p) {
    throw InputError("--fit",
                     std::to_string(rows) + " paired hours for " + std::to_string(p) +
                         " unknowns (" + join(names_of(d)) + ")",
                     "more paired hours than unknowns");
  }
  const auto names = names_of(d);
  for (const auto& [name, prior] : o.priors) {
    if (std::find(names.begin(), names.end(), name) == names.end()) {
      throw InputError("--prior " + name,
                       "\"" + name + "\", not a fitted column" + did_you_mean(name, names),
                       "one of " + join(names));
    }
  }
}

// Refuses columns so collinear that no scale is determined (condition number ≥ 1e10).
void refuse_dependent_columns(const FitDesign& d, double condition_number,
                              const std::vector<double>& vif) {
  if (condition_number < 1e10) return;
  std::vector<std::string> dependent;
  for (std::size_t j = n_free_of(d); j < d.columns.size(); ++j) {
    if (!(vif[j] < 1e6)) dependent.push_back(d.columns[j].name);
  }
  if (dependent.empty()) dependent = names_of(d);
  throw InputError(
      "the fit's columns " + join(dependent),
      "hour-by-hour responses at the monitors that are linearly dependent (condition number " +
          format_number(condition_number, 3) + ")",
      "sectors whose responses differ in time; merge such sectors into one, or hold one "
      "at its case value with --hold NAME");
}

// NNLS through the QR of the weighted design (Lawson & Hanson; nnls.hpp).
NnlsSolution nnls_of(const FitDesign& d) {
  const std::size_t p = d.columns.size();
  const std::size_t rows = d.y.size();
  DenseMatrix Aw(rows, p);
  std::vector<double> bw(rows);
  for (std::size_t r = 0; r < rows; ++r) {
    const double s = std::sqrt(d.weight[r]);
    for (std::size_t j = 0; j < p; ++j) Aw(r, j) = s * d.K(r, j);
    bw[r] = s * d.y[r];
  }
  return nnls_from_triangle(qr_triangle(Aw, bw), n_free_of(d));
}

// The priors of every column: the user's, or a flat one for the offset.
std::vector<ScalePrior> priors_of(const FitDesign& d, const SectorFitOptions& o) {
  double ymax = 0.0;
  for (double v : d.y) ymax = std::max(ymax, std::fabs(v));
  std::vector<ScalePrior> prior(d.columns.size());
  for (std::size_t j = 0; j < d.columns.size(); ++j) {
    if (d.columns[j].kind == FitColumn::Kind::offset) prior[j] = {0.0, 1e3 * (ymax + 1.0)};
    const auto it = o.priors.find(d.columns[j].name);
    if (it != o.priors.end()) prior[j] = it->second;
  }
  return prior;
}

struct FitSolution {
  std::vector<double> x;
  std::vector<double> se;
  double rss = 0.0;
};

// Gaussian standard errors of the NNLS scales on the columns away from the bound.
FitSolution nnls_solution(const DenseMatrix& G, const NnlsSolution& sol, SectorFitReport& rep) {
  const std::size_t p = sol.x.size();
  std::vector<std::size_t> F;
  for (std::size_t j = 0; j < p; ++j) {
    if (!sol.at_bound[j]) F.push_back(j);
  }
  FitSolution s{sol.x, std::vector<double>(p, kNaN), sol.residual_norm * sol.residual_norm};
  const double dof = static_cast<double>(rep.rows) - static_cast<double>(F.size());
  const double sigma2 = s.rss / dof;
  DenseMatrix GF(F.size(), F.size()), inv;
  for (std::size_t a = 0; a < F.size(); ++a) {
    for (std::size_t b = 0; b < F.size(); ++b) GF(a, b) = G(F[a], F[b]);
  }
  if (invert_spd(GF, inv)) {
    for (std::size_t a = 0; a < F.size(); ++a) s.se[F[a]] = std::sqrt(sigma2 * inv(a, a));
  }
  rep.dofs = static_cast<double>(F.size());
  rep.residual_dof = dof;
  rep.residual_sd = std::sqrt(sigma2);
  return s;
}

// Bayesian posterior (Rodgers 2000; see sector_fit.hpp), with σ_o given or taken from the NNLS residual.
FitSolution bayes_solution(const FitDesign& d, const DenseMatrix& G, const NnlsSolution& sol,
                           const std::vector<ScalePrior>& prior, const SectorFitOptions& o,
                           SectorFitReport& rep) {
  std::size_t pF = 0;
  for (bool b : sol.at_bound) pF += b ? 0 : 1;
  const double sigma2_nnls = sol.residual_norm * sol.residual_norm /
                             (static_cast<double>(rep.rows) - static_cast<double>(pF));
  rep.observation_error_estimated = !o.observation_error.has_value();
  const double sigma_o = o.observation_error ? *o.observation_error : std::sqrt(sigma2_nnls);
  if (!(sigma_o > 0.0)) {
    throw InputError("--obs-error", "an observation error of " + format_number(sigma_o),
                     "a positive number (a noise-free monitor needs no prior: use --fit nnls)");
  }
  rep.observation_error = sigma_o;
  FitSolution s;
  DenseMatrix S;
  if (!bayes_from_gram(G, sigma_o * sigma_o, prior, s.x, &S, &rep.dofs)) {
    throw InternalError("Bayesian scaling: the posterior precision is not positive definite");
  }
  for (std::size_t j = 0; j < s.x.size(); ++j) s.se.push_back(std::sqrt(S(j, j)));
  s.rss = weighted_rss(d, s.x);
  rep.residual_dof = static_cast<double>(rep.rows) - rep.dofs;
  rep.residual_sd = std::sqrt(s.rss / rep.residual_dof);
  return s;
}

// Weighted R² against the observed values (fixed parts added back).
double weighted_r2(const FitDesign& d, double rss) {
  double sw = 0.0, sy = 0.0;
  for (std::size_t r = 0; r < d.y.size(); ++r) {
    sw += d.weight[r];
    sy += d.weight[r] * (d.y[r] + d.fixed_total[d.row_hour[r]]);
  }
  const double ybar = sy / sw;
  double tss = 0.0;
  for (std::size_t r = 0; r < d.y.size(); ++r) {
    const double e = d.y[r] + d.fixed_total[d.row_hour[r]] - ybar;
    tss += d.weight[r] * e * e;
  }
  return tss > 0.0 ? 1.0 - rss / tss : kNaN;
}

// Running sums over hours of the per-hour Gram contributions: prefix[t] sums hours before t.
std::vector<double> hourly_gram_prefix(const FitDesign& d) {
  const std::size_t p = d.columns.size(), q = p + 1, qq = q * q, T = d.hours;
  std::vector<double> hour_gram(T * qq, 0.0);
  std::vector<double> z(q);
  for (std::size_t row = 0; row < d.y.size(); ++row) {
    for (std::size_t j = 0; j < p; ++j) z[j] = d.K(row, j);
    z[p] = d.y[row];
    double* h = &hour_gram[d.row_hour[row] * qq];
    for (std::size_t a = 0; a < q; ++a) {
      for (std::size_t b = 0; b < q; ++b) h[a * q + b] += d.weight[row] * z[a] * z[b];
    }
  }
  std::vector<double> prefix((T + 1) * qq, 0.0);
  for (std::size_t t = 0; t < T; ++t) {
    for (std::size_t e = 0; e < qq; ++e)
      prefix[(t + 1) * qq + e] = prefix[t * qq + e] + hour_gram[t * qq + e];
  }
  return prefix;
}

// Moving-block bootstrap over hours (Künsch 1989): the scales of each resample, per column.
std::vector<std::vector<double>> bootstrap_scales(const FitDesign& d, const SectorFitOptions& o,
                                                  const std::vector<ScalePrior>& prior,
                                                  double observation_error) {
  const std::size_t p = d.columns.size();
  std::vector<std::vector<double>> boot(p);
  if (o.bootstrap <= 0) return boot;
  if (o.block_hours < 1 || static_cast<std::size_t>(o.block_hours) > d.hours) {
    throw InputError("--block-hours", std::to_string(o.block_hours),
                     "from 1 to the run's " + std::to_string(d.hours) + " hours");
  }
  const std::size_t T = d.hours, L = static_cast<std::size_t>(o.block_hours);
  const std::size_t q = p + 1, qq = q * q;
  const std::vector<double> prefix = hourly_gram_prefix(d);
  const std::size_t blocks = (T + L - 1) / L;
  std::mt19937_64 rng(o.seed);
  std::uniform_int_distribution<std::size_t> start(0, T - L);
  DenseMatrix Gb(q, q);
  std::vector<double> xb;
  for (int b = 0; b < o.bootstrap; ++b) {
    std::fill(Gb.v.begin(), Gb.v.end(), 0.0);
    for (std::size_t k = 0; k < blocks; ++k) {
      const std::size_t s = start(rng);
      const double* hi = &prefix[(s + L) * qq];
      const double* lo = &prefix[s * qq];
      for (std::size_t e = 0; e < qq; ++e) Gb.v[e] += hi[e] - lo[e];
    }
    if (o.method == FitMethod::nnls) {
      xb = nnls_from_triangle(cholesky_triangle(Gb), n_free_of(d)).x;
    } else if (!bayes_from_gram(Gb, observation_error * observation_error, prior, xb, nullptr,
                                nullptr)) {
      continue;
    }
    for (std::size_t j = 0; j < p; ++j) boot[j].push_back(xb[j]);
  }
  return boot;
}

// Standard error and 95 % interval of one column's bootstrap scales.
void add_bootstrap_spread(FitEstimate& e, std::vector<double> boot) {
  e.bootstrap_se = e.bootstrap_low = e.bootstrap_high = kNaN;
  if (boot.size() < 2) return;
  double m = 0.0;
  for (double v : boot) m += v;
  m /= static_cast<double>(boot.size());
  double s2 = 0.0;
  for (double v : boot) s2 += (v - m) * (v - m);
  e.bootstrap_se = std::sqrt(s2 / static_cast<double>(boot.size() - 1));
  e.bootstrap_low = percentile_linear(boot, 2.5);
  e.bootstrap_high = percentile_linear(boot, 97.5);
}

// The warnings a reader of the fit must see.
void add_fit_warnings(const SectorFitOptions& o, SectorFitReport& rep) {
  if (rep.condition_number > 30.0) {
    rep.warnings.push_back("collinear columns: condition number " +
                           format_number(rep.condition_number, 3) +
                           " > 30 (Belsley, Kuh & Welsch 1980); scales of sectors with similar "
                           "hour-by-hour patterns trade off against each other");
  }
  for (const auto& e : rep.estimates) {
    if (e.vif > 10.0) {
      rep.warnings.push_back(e.name + ": variance inflation factor " + format_number(e.vif, 3) +
                             " > 10 (collinear with the other columns)");
    }
    if (e.at_bound) {
      rep.warnings.push_back(e.name +
                             ": at bound (held at 0 by the constraint; no Gaussian "
                             "standard error)");
    } else if (std::fabs(e.t) < 2.0 && e.name != "offset") {
      rep.warnings.push_back(e.name + ": |t| = " + format_number(std::fabs(e.t), 3) +
                             " < 2, not significantly different from zero (EPA-450/4-87-010 §3.3)");
    }
    if (o.method == FitMethod::bayes && e.value < 0.0 && e.name != "offset") {
      rep.warnings.push_back(e.name + ": negative posterior mean " + format_number(e.value, 4) +
                             " (the Gaussian scaling is not constrained)");
    }
  }
  if (rep.r2 < 0.8) {
    rep.warnings.push_back("R² = " + format_number(rep.r2, 3) +
                           " below 0.8, the range receptor-modelling practice expects "
                           "(EPA-450/4-87-010 §3.3)");
  }
}

}  // namespace

SectorFitReport fit_sectors(const FitDesign& d, const SectorFitOptions& o) {
  const std::size_t p = d.columns.size();
  SectorFitReport rep;
  rep.method = o.method;
  rep.pollutant = d.pollutant;
  rep.unit = d.unit;
  rep.rows = d.y.size();
  rep.left_out = d.left_out;
  rep.bootstrap = o.bootstrap;
  rep.block_hours = o.block_hours;
  rep.seed = o.seed;
  check_fit_request(d, o, rep.rows);
  const DenseMatrix G = gram_of(d);
  std::vector<double> vif;
  collinearity(G, p, n_free_of(d), rep.condition_number, vif, d);
  refuse_dependent_columns(d, rep.condition_number, vif);
  const NnlsSolution sol = nnls_of(d);
  if (!sol.converged) rep.warnings.push_back("NNLS stopped at its iteration limit (3 n)");
  const std::vector<ScalePrior> prior = priors_of(d, o);
  const FitSolution fit = o.method == FitMethod::nnls ? nnls_solution(G, sol, rep)
                                                      : bayes_solution(d, G, sol, prior, o, rep);
  rep.r2 = weighted_r2(d, fit.rss);
  std::vector<std::vector<double>> boot = bootstrap_scales(d, o, prior, rep.observation_error);
  for (std::size_t j = 0; j < p; ++j) {
    FitEstimate e;
    e.name = d.columns[j].name;
    e.value = fit.x[j];
    e.at_bound = o.method == FitMethod::nnls && sol.at_bound[j];
    e.gaussian_se = fit.se[j];
    e.t = e.at_bound ? kNaN : fit.x[j] / fit.se[j];
    e.vif = vif[j];
    e.prior_mean = prior[j].mean;
    e.prior_sd = prior[j].sd;
    add_bootstrap_spread(e, std::move(boot[j]));
    rep.estimates.push_back(e);
  }
  add_fit_warnings(o, rep);
  return rep;
}

std::vector<double> fitted_series(const FitDesign& d, const SectorFitReport& fit) {
  std::vector<double> y = d.fixed_total;
  for (std::size_t j = 0; j < d.columns.size(); ++j) {
    const double x = fit.estimates[j].value;
    for (std::size_t i = 0; i < y.size(); ++i) y[i] += x * d.column_series[j][i];
  }
  return y;
}

double fitted_scale(const SectorFitReport& fit, const std::string& column) {
  for (const auto& e : fit.estimates) {
    if (e.name == column) return e.value;
  }
  return 1.0;
}

}  // namespace lidbox
