#include "lidbox/engine/box_model.hpp"

#include <algorithm>
#include <cmath>

#include "lidbox/base/error.hpp"
#include "lidbox/base/exponential.hpp"

namespace lidbox {

BudgetTerms& BudgetTerms::operator+=(const BudgetTerms& o) {
  emitted += o.emitted;
  advected_in += o.advected_in;
  advected_out += o.advected_out;
  reacted += o.reacted;
  deposited += o.deposited;
  entrained_from_residual += o.entrained_from_residual;
  entrained_from_free_troposphere += o.entrained_from_free_troposphere;
  detrained += o.detrained;
  residual_reacted += o.residual_reacted;
  residual_advected_in += o.residual_advected_in;
  residual_advected_out += o.residual_advected_out;
  vented_aloft += o.vented_aloft;
  return *this;
}

double BudgetTerms::mixed_layer_change() const {
  return emitted + advected_in - advected_out - reacted - deposited + entrained_from_residual +
         entrained_from_free_troposphere - detrained;
}

double BudgetTerms::residual_layer_change() const {
  return detrained - entrained_from_residual - residual_reacted + residual_advected_in -
         residual_advected_out - vented_aloft;
}

double BudgetTerms::magnitude() const {
  return emitted + advected_in + advected_out + reacted + deposited + entrained_from_residual +
         entrained_from_free_troposphere + detrained + residual_reacted + residual_advected_in +
         residual_advected_out + vented_aloft;
}

double BoxState::c_total(std::size_t p) const {
  double t = 0.0;
  for (std::size_t j = 0; j < parts; ++j) t += c(p, j);
  return t;
}

double BoxState::cr_total(std::size_t p) const {
  double t = 0.0;
  for (std::size_t j = 0; j < parts; ++j) t += cr(p, j);
  return t;
}

double BoxState::residual_mean_total(std::size_t p) const {
  const double depth = residual_top_m - mixing_height_m;
  if (!(depth > 0.0)) return 0.0;
  double older_total = 0.0;
  for (std::size_t j = 0; j < parts; ++j) older_total += older(p, j);
  return (cr_total(p) * (cycle_top_m - mixing_height_m) +
          older_total * (residual_top_m - cycle_top_m)) /
         depth;
}

void BoxState::set_residual_top(double top_m) {
  cycle_top_m = residual_top_m = std::max(top_m, mixing_height_m);
}

double HourResult::mean_total(std::size_t p) const {
  double t = 0.0;
  for (std::size_t j = 0; j < parts; ++j) t += mean(p, j);
  return t;
}

BoxEngine::BoxEngine(const Footprint& footprint, std::vector<PollutantProcesses> pollutants,
                     std::size_t n_sectors, const EngineOptions& options)
    : footprint_(footprint),
      geometry_(footprint),
      processes_(std::move(pollutants)),
      n_sectors_(n_sectors),
      options_(options) {
  if (!(footprint.x_side_m > 0.0) || !(footprint.y_side_m > 0.0)) {
    throw InternalError("footprint sides must be positive");
  }
  if (!(options.min_wind_m_s > 0.0) || !(options.min_mixing_height_m > 0.0)) {
    throw InternalError("floors must be positive: a calm box never flushes");
  }
}

BoxState BoxEngine::make_state(double mixing_height_m) const {
  BoxState s;
  s.mixing_height_m = std::max(mixing_height_m, options_.min_mixing_height_m);
  s.cycle_top_m = s.residual_top_m = s.cycle_low_m = s.mixing_height_m;
  s.parts = parts();
  s.c_g_m3.assign(pollutants() * parts(), 0.0);
  s.cr_g_m3.assign(pollutants() * parts(), 0.0);
  s.older_g_m3.assign(pollutants() * parts(), 0.0);
  return s;
}

HourResult BoxEngine::make_result() const {
  HourResult r;
  r.parts = parts();
  r.mean_c_g_m3.assign(pollutants() * parts(), 0.0);
  r.budget.assign(pollutants(), BudgetTerms{});
  r.work_state = make_state(options_.min_mixing_height_m);
  r.work_mean.assign(pollutants() * parts(), 0.0);
  r.work_budget.assign(pollutants(), BudgetTerms{});
  return r;
}

double BoxEngine::mixed_mass(const BoxState& s, std::size_t p) const {
  return s.c_total(p) * s.mixing_height_m;
}

double BoxEngine::residual_mass(const BoxState& s, std::size_t p) const {
  return s.residual_mean_total(p) * (s.residual_top_m - s.mixing_height_m);
}

double BoxEngine::floored_height(double h, HourResult& out) const {
  if (h < options_.min_mixing_height_m) {
    out.lid_floor = true;
    return options_.min_mixing_height_m;
  }
  return h;
}

double BoxEngine::flushing(double u, double v, double& f, HourResult& out) const {
  const double speed = wind_speed_m_s(u, v);
  if (speed >= options_.min_wind_m_s) {
    f = geometry_.flushing_rate(u, v);
    return speed;
  }
  out.calm_floor = true;
  if (speed > 0.0) {
    // Keep the direction, raise the speed to the floor.
    const double s = options_.min_wind_m_s / speed;
    f = geometry_.flushing_rate(u * s, v * s);
  } else {
    // No direction at all: average over directions (footprint.hpp).
    f = options_.min_wind_m_s * geometry_.isotropic_per_m;
  }
  return options_.min_wind_m_s;
}

void BoxEngine::move_lid(BoxState& s, double h_new, const Forcing& F, std::size_t hour,
                         HourResult& out) const {
  const double h_old = s.mixing_height_m;
  if (h_new == h_old) return;
  const std::size_t J = parts();
  const std::size_t P = pollutants();
  const bool rl = options_.residual_layer;
  if (h_new > h_old) {
    // Rising lid: entrain the most recent cycle's air first, then older residual air, then
    // free-troposphere air above Hr.
    const double dh = h_new - h_old;
    const double from_cycle = rl ? std::min(dh, std::max(s.cycle_top_m - h_old, 0.0)) : 0.0;
    const double from_older =
        rl ? std::min(dh - from_cycle, std::max(s.residual_top_m - s.cycle_top_m, 0.0)) : 0.0;
    const double from_free = dh - from_cycle - from_older;
    const bool cycle_emptied = h_new >= s.cycle_top_m;
    const bool older_emptied = h_new >= s.residual_top_m;
    for (std::size_t p = 0; p < P; ++p) {
      const double ca = F.free_troposphere(p, hour);
      BudgetTerms& b = out.budget[p];
      for (std::size_t j = 0; j < J; ++j) {
        const std::size_t k = p * J + j;
        const double taken = s.cr_g_m3[k] * from_cycle + s.older_g_m3[k] * from_older;
        double m = s.c_g_m3[k] * h_old + taken;
        b.entrained_from_residual += taken;
        if (j == 0) {
          m += ca * from_free;
          b.entrained_from_free_troposphere += ca * from_free;
        }
        s.c_g_m3[k] = m / h_new;
        if (cycle_emptied) s.cr_g_m3[k] = 0.0;
        if (older_emptied) s.older_g_m3[k] = 0.0;
      }
    }
    s.mixing_height_m = h_new;
    s.cycle_top_m = std::max(s.cycle_top_m, h_new);
    s.residual_top_m = std::max(s.residual_top_m, h_new);
    return;
  }
  // Falling lid: mixed-layer air stays behind above the new lid; C does not change.
  const bool cycles = rl && options_.residual_top == ResidualTop::most_recent_cycle;
  if (cycles && h_old - s.cycle_low_m > options_.cycle_threshold_m) start_cycle(s);
  const double dh = h_old - h_new;
  const double depth_old = std::max(s.cycle_top_m - h_old, 0.0);
  const double depth_new = depth_old + dh;
  for (std::size_t p = 0; p < P; ++p) {
    BudgetTerms& b = out.budget[p];
    for (std::size_t j = 0; j < J; ++j) {
      const std::size_t k = p * J + j;
      b.detrained += s.c_g_m3[k] * dh;
      if (rl) s.cr_g_m3[k] = (s.cr_g_m3[k] * depth_old + s.c_g_m3[k] * dh) / depth_new;
    }
  }
  s.mixing_height_m = h_new;
  s.cycle_low_m = std::min(s.cycle_low_m, h_new);
  if (!rl) {
    // Without a residual layer the detrained air leaves the system.
    s.cycle_top_m = s.residual_top_m = h_new;
    return;
  }
  if (cycles && s.residual_top_m > s.cycle_top_m &&
      s.cycle_top_m - h_new > options_.cycle_threshold_m) {
    vent_older(s, out);
  }
}

// A new cycle begins at the present lid: all residual air above it becomes older air. One of
// the two slabs is empty whenever this happens after a rise above the threshold (the rise took
// back a thinner new slab, or the older air was vented), but the merge below conserves mass in
// any case.
void BoxEngine::start_cycle(BoxState& s) const {
  const double d_cycle = s.cycle_top_m - s.mixing_height_m;
  const double d_older = s.residual_top_m - s.cycle_top_m;
  if (d_cycle > 0.0) {
    for (std::size_t k = 0; k < s.cr_g_m3.size(); ++k) {
      s.older_g_m3[k] = (s.older_g_m3[k] * d_older + s.cr_g_m3[k] * d_cycle) / (d_older + d_cycle);
      s.cr_g_m3[k] = 0.0;
    }
  }
  s.cycle_top_m = s.mixing_height_m;
  s.cycle_low_m = s.mixing_height_m;
}

// The older residual air leaves to the free troposphere.
void BoxEngine::vent_older(BoxState& s, HourResult& out) const {
  const std::size_t J = parts();
  const double depth = s.residual_top_m - s.cycle_top_m;
  for (std::size_t p = 0; p < pollutants(); ++p) {
    for (std::size_t j = 0; j < J; ++j) {
      out.budget[p].vented_aloft += s.older(p, j) * depth;
      s.older(p, j) = 0.0;
    }
  }
  s.residual_top_m = s.cycle_top_m;
}

namespace {
// The exact update is written as C(h) = C0 e^-x + a h phi1(x) and
// int C dt = C0 h phi1(x) + a h^2 phi2(x), x = lambda h, with
//   phi1(x) = (1 - e^-x) / x,   phi2(x) = (x - 1 + e^-x) / x^2,
// instead of through C* = a / lambda, which cancels catastrophically when lambda h is tiny
// (a near-calm, loss-free box). Series below 1e-4: the truncation error is under 1e-17.
// em1 = e^-x - 1 (exponential.hpp: the same function for one box and for a batch of boxes).
inline BoxEngine::Phi phis_from(double em1, double x, double h) {
  BoxEngine::Phi p{1.0 + em1, 0.0, 0.0};
  if (x < 1e-4) {
    p.g1 = h * (1.0 - x * (0.5 - x * (1.0 / 6.0 - x / 24.0)));
    p.g2 = h * h * (0.5 - x * (1.0 / 6.0 - x * (1.0 / 24.0 - x / 120.0)));
  } else {
    p.g1 = h * (-em1 / x);
    p.g2 = h * h * ((x + em1) / (x * x));
  }
  return p;
}
// One exponential per pollutant and layer per sub-step.
inline BoxEngine::Phi phis(double x, double h) {
  return phis_from(expm1_nonpositive(-x), x, h);
}
}  // namespace

double BoxEngine::mixed_rate_per_s(const BoxState& s, double f, std::size_t p) const {
  const PollutantProcesses& pr = processes_[p];
  return f + pr.loss_rate_per_s + pr.deposition_velocity_m_s / s.mixing_height_m;
}

// Mixed layer: dC/dt = a_j - lambda C, a_0 = f Cb, a_1 = 0, a_(2+s) = q_s / H.
void BoxEngine::mixed_update(BoxState& s, const Phi& ph, double dt, double f, double cb,
                             const Forcing& F, std::size_t hour, int half, std::size_t p,
                             double* mean, BudgetTerms* b) const {
  const std::size_t J = parts();
  const PollutantProcesses& pr = processes_[p];
  const double H = s.mixing_height_m;
  const double inv_area = 1.0 / footprint_.area_m2();
  const double decay = ph.decay, g1 = ph.g1, g2 = ph.g2;
  double integral = 0.0;
  double q_total = 0.0;
  for (std::size_t j = 0; j < J; ++j) {
    double a = 0.0;
    if (j == 0) {
      a = f * cb;
    } else if (j >= 2) {
      const std::size_t sec = j - 2;
      const double q =
          F.emission(sec, p) * F.clock(sec, hour, static_cast<std::size_t>(half)) * inv_area;
      q_total += q;
      a = q / H;
    }
    const std::size_t k = p * J + j;
    const double c0 = s.c_g_m3[k];
    const double ic = c0 * g1 + a * g2;
    s.c_g_m3[k] = c0 * decay + a * g1;
    mean[k] += ic;
    integral += ic;
  }
  if (b == nullptr) return;
  b->emitted += q_total * dt;
  b->advected_in += f * H * cb * dt;
  b->advected_out += f * H * integral;
  b->reacted += pr.loss_rate_per_s * H * integral;
  b->deposited += pr.deposition_velocity_m_s * integral;
}

double BoxEngine::residual_rate_per_s(const BoxState& s, double fa, std::size_t p) const {
  const double D = s.cycle_top_m - s.mixing_height_m;
  const double Do = s.residual_top_m - s.cycle_top_m;
  if (!options_.residual_layer || !(D > 0.0 || Do > 0.0)) return 0.0;
  return processes_[p].residual_loss_rate_per_s + fa;
}

// Residual layer: dCr/dt = fa (Ca - Cr) - kr Cr, on its own between lid moves. Both slabs
// alike; the integral is of the depth-weighted concentration [g m-2 s].
void BoxEngine::residual_update(BoxState& s, const Phi& phr, double dt, double fa, double ca,
                                std::size_t p, BudgetTerms* b) const {
  const std::size_t J = parts();
  const double D = s.cycle_top_m - s.mixing_height_m;
  const double Do = s.residual_top_m - s.cycle_top_m;
  const double decay_r = phr.decay, gr1 = phr.g1, gr2 = phr.g2;
  double integral_r = 0.0;
  for (std::size_t j = 0; j < J; ++j) {
    const std::size_t k = p * J + j;
    const double ar = j == 0 ? fa * ca : 0.0;
    if (D > 0.0) {
      const double c0 = s.cr_g_m3[k];
      integral_r += D * (c0 * gr1 + ar * gr2);
      s.cr_g_m3[k] = c0 * decay_r + ar * gr1;
    }
    if (Do > 0.0) {
      const double c0 = s.older_g_m3[k];
      integral_r += Do * (c0 * gr1 + ar * gr2);
      s.older_g_m3[k] = c0 * decay_r + ar * gr1;
    }
  }
  if (b == nullptr) return;
  b->residual_reacted += processes_[p].residual_loss_rate_per_s * integral_r;
  b->residual_advected_out += fa * integral_r;
  b->residual_advected_in += fa * (D + Do) * ca * dt;
}

void BoxEngine::exact_step(BoxState& s, double dt, double f, double fa, const Forcing& F,
                           std::size_t hour, int half, HourResult& out) const {
  for (std::size_t p = 0; p < pollutants(); ++p) {
    BudgetTerms& b = out.budget[p];
    const double lambda = mixed_rate_per_s(s, f, p);
    mixed_update(s, phis(lambda * dt, dt), dt, f, F.background(p, hour), F, hour, half, p,
                 out.mean_c_g_m3.data(), &b);
    const double lr = residual_rate_per_s(s, fa, p);
    if (lr > 0.0) residual_update(s, phis(lr * dt, dt), dt, fa, F.free_troposphere(p, hour), p, &b);
  }
}

namespace {

constexpr double kHour = 3600.0;

void clear(HourResult& out) {
  std::fill(out.mean_c_g_m3.begin(), out.mean_c_g_m3.end(), 0.0);
  std::fill(out.budget.begin(), out.budget.end(), BudgetTerms{});
  out.mixing_height_mean_m = out.wind_speed_mean_m_s = out.flushing_rate_mean_per_s = 0.0;
  out.wind_u_mean_m_s = out.wind_v_mean_m_s = out.ventilation_mean_m2_s = 0.0;
  out.calm_floor = out.lid_floor = false;
  out.substeps = 0;
}

// h and speed are the values used (after the floors); the ventilation coefficient is u H of the
// met as given (h_met, u, v), so that the floors do not hide the poorest hours.
void accumulate_met(HourResult& out, double dt, double h, double h_met, double u, double v,
                    double speed, double f) {
  const double w = dt / kHour;
  out.mixing_height_mean_m += h * w;
  out.wind_u_mean_m_s += u * w;
  out.wind_v_mean_m_s += v * w;
  out.wind_speed_mean_m_s += speed * w;
  out.flushing_rate_mean_per_s += f * w;
  out.ventilation_mean_m2_s += wind_speed_m_s(u, v) * h_met * w;
}

// Linear interpolation that returns the end values exactly at x = 0 and x = 1, so that the
// coarse and the fine solution of an hour end on the same lid.
inline double lerp(double a, double b, double x) {
  return x >= 1.0 ? b : a + (b - a) * x;
}

// Adds t (seconds into the hour) to the break list when it lies strictly inside the hour.
void add_break(double t, double* breaks, int& n) {
  if (t > 1e-6 && t < kHour - 1e-6 && n < BoxEngine::kMaxBreaks) breaks[n++] = t;
}

// Where a linear function a + (b - a) x crosses `level` strictly inside (0, 1).
void add_crossing(double a, double b, double level, double* breaks, int& n) {
  if ((a - level) * (b - level) < 0.0) add_break(kHour * (a - level) / (a - b), breaks, n);
}

}  // namespace

int BoxEngine::hour_breaks(const BoxState& s, const Forcing& F, std::size_t hour,
                           double* breaks) const {
  int n = 0;
  breaks[n++] = 0.0;
  if (F.clock_split_s > 0) add_break(static_cast<double>(F.clock_split_s), breaks, n);
  const double h0 = F.mixing_height_m[hour], h1 = F.mixing_height_m[hour + 1];
  const double u0 = F.wind_u_m_s[hour], u1 = F.wind_u_m_s[hour + 1];
  const double v0 = F.wind_v_m_s[hour], v1 = F.wind_v_m_s[hour + 1];
  // f = |wx|/Lx + |wy|/Ly has a kink where a component along a side changes sign.
  add_crossing(u0 * geometry_.ex_u + v0 * geometry_.ex_v, u1 * geometry_.ex_u + v1 * geometry_.ex_v,
               0.0, breaks, n);
  add_crossing(u0 * geometry_.ey_u + v0 * geometry_.ey_v, u1 * geometry_.ey_u + v1 * geometry_.ey_v,
               0.0, breaks, n);
  // The calm floor: |w(x)|^2 = floor^2 is a quadratic in x.
  {
    const double du = u1 - u0, dv = v1 - v0, w2 = options_.min_wind_m_s * options_.min_wind_m_s;
    const double qa = du * du + dv * dv, qb = 2.0 * (u0 * du + v0 * dv),
                 qc = u0 * u0 + v0 * v0 - w2;
    if (qa > 0.0) {
      const double disc = qb * qb - 4.0 * qa * qc;
      if (disc > 0.0) {
        const double r = std::sqrt(disc);
        add_break(kHour * (-qb - r) / (2.0 * qa), breaks, n);
        add_break(kHour * (-qb + r) / (2.0 * qa), breaks, n);
      }
    }
  }
  // The lid floor, and a rising lid reaching the tops of the residual air (the entrained air
  // changes there).
  add_crossing(h0, h1, options_.min_mixing_height_m, breaks, n);
  if (options_.residual_layer && h1 > h0) {
    add_crossing(h0, h1, s.cycle_top_m, breaks, n);
    if (s.residual_top_m > s.cycle_top_m) add_crossing(h0, h1, s.residual_top_m, breaks, n);
  }
  std::sort(breaks + 1, breaks + n);
  // Drop breaks closer than a millisecond to the one before (a zero-length segment).
  int m = 1;
  for (int i = 1; i < n; ++i) {
    if (breaks[i] - breaks[m - 1] > 1e-3) breaks[m++] = breaks[i];
  }
  if (kHour - breaks[m - 1] <= 1e-3) --m;
  breaks[m] = kHour;
  return m;  // segments [breaks[i], breaks[i + 1]), i < m
}

double BoxEngine::substep_limit_s(const Forcing& F, std::size_t hour) const {
  if (options_.fixed_substeps_per_hour > 0) return kHour / options_.fixed_substeps_per_hour;
  const double h0 = F.mixing_height_m[hour], h1 = F.mixing_height_m[hour + 1];
  const double u0 = F.wind_u_m_s[hour], u1 = F.wind_u_m_s[hour + 1];
  const double v0 = F.wind_v_m_s[hour], v1 = F.wind_v_m_s[hour + 1];
  // Stiffest rate at either end of the hour, over all pollutants.
  const double hmin = std::max(std::min(h0, h1), options_.min_mixing_height_m);
  double f_ends[2];
  HourResult no_flags;  // scalars only, never allocates
  (void)flushing(u0, v0, f_ends[0], no_flags);
  (void)flushing(u1, v1, f_ends[1], no_flags);
  const double fmax = std::max(f_ends[0], f_ends[1]);
  const double fmin = std::min(f_ends[0], f_ends[1]);
  double lmax = fmax;
  for (const auto& pr : processes_) {
    lmax = std::max(lmax, fmax + pr.loss_rate_per_s + pr.deposition_velocity_m_s / hmin);
  }
  const double n_lambda = lmax * kHour / options_.max_lambda_dt;
  const double n_lid = std::fabs(h1 - h0) / hmin / options_.max_relative_lid_change;
  // The flushing rate's change over the hour (the emission flux q/H changes with the lid, the
  // entrainment rate is constant within an hour, and the clock's change is a break).
  const double n_flushing = (fmax - fmin) / fmin / options_.max_relative_flushing_change;
  const double n = std::min(std::max({1.0, n_lambda, n_lid, n_flushing}),
                            static_cast<double>(options_.max_substeps_per_hour));
  return kHour / n;
}

void BoxEngine::interpolate(BoxState& s, const Forcing& F, std::size_t hour, const double* breaks,
                            int segments, double step_s, int refine, HourResult& out) const {
  const double h0 = F.mixing_height_m[hour], h1 = F.mixing_height_m[hour + 1];
  const double u0 = F.wind_u_m_s[hour], u1 = F.wind_u_m_s[hour + 1];
  const double v0 = F.wind_v_m_s[hour], v1 = F.wind_v_m_s[hour + 1];
  const double split = F.clock_split_s > 0 ? static_cast<double>(F.clock_split_s) : kHour;
  const double fa_factor = options_.residual_wind_factor;
  for (int g = 0; g < segments; ++g) {
    const double t0 = breaks[g], t1 = breaks[g + 1];
    const int half = 0.5 * (t0 + t1) >= split ? 1 : 0;
    // Rounded up, so that no sub-step is longer than the controls allow.
    const int m = refine * std::max(1, static_cast<int>(std::ceil((t1 - t0) / step_s - 1e-9)));
    const double dt = (t1 - t0) / m;
    for (int k = 0; k < m; ++k) {
      const double ta = t0 + k * dt;
      const double tb = k + 1 == m ? t1 : t0 + (k + 1) * dt;
      const double xm = 0.5 * (ta + tb) / kHour;
      // Strang splitting: lid to the midpoint height, exact step with midpoint coefficients,
      // lid to the end height.
      const double hm_met = lerp(h0, h1, xm);
      const double hm = floored_height(hm_met, out);
      const double um = lerp(u0, u1, xm);
      const double vm = lerp(v0, v1, xm);
      move_lid(s, hm, F, hour, out);
      double f = 0.0;
      const double speed = flushing(um, vm, f, out);
      double fa = 0.0;
      if (fa_factor > 0.0) fa = geometry_.flushing_rate(um * fa_factor, vm * fa_factor);
      exact_step(s, tb - ta, f, fa, F, hour, half, out);
      move_lid(s, floored_height(lerp(h0, h1, tb / kHour), out), F, hour, out);
      accumulate_met(out, tb - ta, hm, hm_met, um, vm, speed, f);
      ++out.substeps;
    }
  }
}

namespace {

// (4 fine - coarse) / 3: the Richardson combination of two second-order solutions.
inline double extrapolate(double fine, double coarse) {
  return (4.0 * fine - coarse) / 3.0;
}

}  // namespace

// Richardson extrapolation keeps every value non-negative and the state's geometry consistent
// only when both solutions agree on the geometry and nothing turns negative; otherwise the fine
// solution stands. Both solutions close their budgets, and the combination is linear in every
// budget line and every stored mass, so it closes them too.
bool BoxEngine::combine(BoxState& s, const HourResult& coarse_met, HourResult& out) const {
  const BoxState& c = out.work_state;
  auto same = [](double a, double b) {
    return std::fabs(a - b) <= 1e-9 * std::max(1.0, std::fabs(a));
  };
  if (!same(c.mixing_height_m, s.mixing_height_m) || !same(c.cycle_top_m, s.cycle_top_m) ||
      !same(c.residual_top_m, s.residual_top_m) || !same(c.cycle_low_m, s.cycle_low_m)) {
    return false;
  }
  for (std::size_t k = 0; k < s.c_g_m3.size(); ++k) {
    if (extrapolate(s.c_g_m3[k], c.c_g_m3[k]) < 0.0 ||
        extrapolate(s.cr_g_m3[k], c.cr_g_m3[k]) < 0.0 ||
        extrapolate(s.older_g_m3[k], c.older_g_m3[k]) < 0.0 ||
        extrapolate(out.mean_c_g_m3[k], out.work_mean[k]) < 0.0) {
      return false;
    }
  }
  constexpr double BudgetTerms::*kLines[] = {&BudgetTerms::emitted,
                                             &BudgetTerms::advected_in,
                                             &BudgetTerms::advected_out,
                                             &BudgetTerms::reacted,
                                             &BudgetTerms::deposited,
                                             &BudgetTerms::entrained_from_residual,
                                             &BudgetTerms::entrained_from_free_troposphere,
                                             &BudgetTerms::detrained,
                                             &BudgetTerms::residual_reacted,
                                             &BudgetTerms::residual_advected_in,
                                             &BudgetTerms::residual_advected_out,
                                             &BudgetTerms::vented_aloft};
  for (std::size_t p = 0; p < out.budget.size(); ++p) {
    for (auto line : kLines) {
      if (extrapolate(out.budget[p].*line, out.work_budget[p].*line) < 0.0) return false;
    }
  }
  for (std::size_t k = 0; k < s.c_g_m3.size(); ++k) {
    s.c_g_m3[k] = extrapolate(s.c_g_m3[k], c.c_g_m3[k]);
    s.cr_g_m3[k] = extrapolate(s.cr_g_m3[k], c.cr_g_m3[k]);
    s.older_g_m3[k] = extrapolate(s.older_g_m3[k], c.older_g_m3[k]);
    out.mean_c_g_m3[k] = extrapolate(out.mean_c_g_m3[k], out.work_mean[k]);
  }
  for (std::size_t p = 0; p < out.budget.size(); ++p) {
    for (auto line : kLines) {
      out.budget[p].*line = extrapolate(out.budget[p].*line, out.work_budget[p].*line);
    }
  }
  out.mixing_height_mean_m = extrapolate(out.mixing_height_mean_m, coarse_met.mixing_height_mean_m);
  out.wind_u_mean_m_s = extrapolate(out.wind_u_mean_m_s, coarse_met.wind_u_mean_m_s);
  out.wind_v_mean_m_s = extrapolate(out.wind_v_mean_m_s, coarse_met.wind_v_mean_m_s);
  out.wind_speed_mean_m_s = extrapolate(out.wind_speed_mean_m_s, coarse_met.wind_speed_mean_m_s);
  out.flushing_rate_mean_per_s =
      extrapolate(out.flushing_rate_mean_per_s, coarse_met.flushing_rate_mean_per_s);
  out.ventilation_mean_m2_s =
      extrapolate(out.ventilation_mean_m2_s, coarse_met.ventilation_mean_m2_s);
  return true;
}

// step_hour's held branch, pass by pass over the boxes: lids and flushing rates, then per half
// of the hour (clock_split_s) the mixed layer's exponentials together, its updates, the residual
// layer's exponentials together and its updates. Each box sees the operations of step_hour in
// the same order, so the results are the same doubles.
void BoxEngine::step_held_hours(BoxState* const* boxes, std::size_t n, const HeldMet& met,
                                const Forcing& F, std::size_t hour, BatchWork& w,
                                double* mean_c_g_m3) const {
  if (options_.reading != MetReading::hour_average || pollutants() != 1) {
    throw InternalError("step_held_hours: held forcing of one pollutant only");
  }
  if (w.x.size() < n) {
    w.x.resize(n);
    w.em1.resize(n);
    w.f.resize(n);
    w.fa.resize(n);
    w.residual.resize(n);
  }
  if (w.scratch.budget.size() != 1) w.scratch = make_result();
  HourResult& out = w.scratch;
  const std::size_t J = parts();
  std::fill(mean_c_g_m3, mean_c_g_m3 + n * J, 0.0);
  const double fa_factor = options_.residual_wind_factor;
  for (std::size_t i = 0; i < n; ++i) {
    BoxState& s = *boxes[i];
    move_lid(s, floored_height(met.mixing_height_m[i], out), F, hour, out);
    const double u = met.wind_u_m_s[i], v = met.wind_v_m_s[i];
    (void)flushing(u, v, w.f[i], out);
    w.fa[i] = fa_factor > 0.0 ? geometry_.flushing_rate(u * fa_factor, v * fa_factor) : 0.0;
  }
  const double split = F.clock_split_s > 0 ? static_cast<double>(F.clock_split_s) : kHour;
  const double ca = F.free_troposphere(0, hour);
  for (int half = 0; half < (split < kHour ? 2 : 1); ++half) {
    const double dt = half == 0 ? split : kHour - split;
    for (std::size_t i = 0; i < n; ++i) {
      w.x[i] = mixed_rate_per_s(*boxes[i], w.f[i], 0) * dt;
      w.em1[i] = -w.x[i];
    }
    expm1_nonpositive(w.em1.data(), w.em1.data(), n);
    bool any_residual = false;
    for (std::size_t i = 0; i < n; ++i) {
      BoxState& s = *boxes[i];
      const double cb = met.background_g_m3 ? met.background_g_m3[i] : F.background(0, hour);
      mixed_update(s, phis_from(w.em1[i], w.x[i], dt), dt, w.f[i], cb, F, hour, half, 0,
                   mean_c_g_m3 + i * J, nullptr);
      const double lr = residual_rate_per_s(s, w.fa[i], 0);
      w.residual[i] = lr > 0.0 ? 1 : 0;
      any_residual = any_residual || lr > 0.0;
      w.x[i] = lr * dt;
      w.em1[i] = -w.x[i];
    }
    if (!any_residual) continue;
    expm1_nonpositive(w.em1.data(), w.em1.data(), n);
    for (std::size_t i = 0; i < n; ++i) {
      if (w.residual[i]) {
        residual_update(*boxes[i], phis_from(w.em1[i], w.x[i], dt), dt, w.fa[i], ca, 0, nullptr);
      }
    }
  }
  out.budget[0] = BudgetTerms{};  // not kept: move_lid's lines only grow in the scratch result
  for (std::size_t k = 0; k < n * J; ++k) mean_c_g_m3[k] /= kHour;
}

void BoxEngine::step_hour(BoxState& s, const Forcing& F, std::size_t hour, HourResult& out) const {
  clear(out);
  if (options_.reading == MetReading::hour_average) {
    const double split = F.clock_split_s > 0 ? static_cast<double>(F.clock_split_s) : kHour;
    const double h_met = F.mixing_height_m[hour];
    const double h = floored_height(h_met, out);
    move_lid(s, h, F, hour, out);
    const double u = F.wind_u_m_s[hour];
    const double v = F.wind_v_m_s[hour];
    double f = 0.0;
    const double speed = flushing(u, v, f, out);
    double fa = 0.0;
    const double fa_factor = options_.residual_wind_factor;
    if (fa_factor > 0.0) fa = geometry_.flushing_rate(u * fa_factor, v * fa_factor);
    exact_step(s, split, f, fa, F, hour, 0, out);
    if (split < kHour) exact_step(s, kHour - split, f, fa, F, hour, 1, out);
    out.substeps = split < kHour ? 2 : 1;
    accumulate_met(out, kHour, h, h_met, u, v, speed, f);
  } else {
    double breaks[kMaxBreaks + 1];
    const int segments = hour_breaks(s, F, hour, breaks);
    const double step_s = substep_limit_s(F, hour);
    if (options_.fixed_substeps_per_hour > 0) {
      interpolate(s, F, hour, breaks, segments, step_s, 1, out);
    } else {
      // The coarse solution on a copy of the state, then the fine one (half the sub-step) on the
      // state itself; the hour's results are their Richardson combination (fourth order in the
      // sub-step where the forcing is smooth, which the breaks above make it within segments).
      BoxState& w = out.work_state;
      w.mixing_height_m = s.mixing_height_m;
      w.cycle_top_m = s.cycle_top_m;
      w.residual_top_m = s.residual_top_m;
      w.cycle_low_m = s.cycle_low_m;
      std::copy(s.c_g_m3.begin(), s.c_g_m3.end(), w.c_g_m3.begin());
      std::copy(s.cr_g_m3.begin(), s.cr_g_m3.end(), w.cr_g_m3.begin());
      std::copy(s.older_g_m3.begin(), s.older_g_m3.end(), w.older_g_m3.begin());
      interpolate(w, F, hour, breaks, segments, step_s, 1, out);
      std::copy(out.mean_c_g_m3.begin(), out.mean_c_g_m3.end(), out.work_mean.begin());
      std::copy(out.budget.begin(), out.budget.end(), out.work_budget.begin());
      HourResult coarse_met;  // scalars only: its vectors stay empty (no allocation)
      coarse_met.mixing_height_mean_m = out.mixing_height_mean_m;
      coarse_met.wind_u_mean_m_s = out.wind_u_mean_m_s;
      coarse_met.wind_v_mean_m_s = out.wind_v_mean_m_s;
      coarse_met.wind_speed_mean_m_s = out.wind_speed_mean_m_s;
      coarse_met.flushing_rate_mean_per_s = out.flushing_rate_mean_per_s;
      coarse_met.ventilation_mean_m2_s = out.ventilation_mean_m2_s;
      const bool calm = out.calm_floor, lid = out.lid_floor;
      const int coarse_steps = out.substeps;
      clear(out);
      interpolate(s, F, hour, breaks, segments, step_s, 2, out);
      (void)combine(s, coarse_met, out);
      out.calm_floor = out.calm_floor || calm;
      out.lid_floor = out.lid_floor || lid;
      out.substeps += coarse_steps;
    }
  }
  for (double& c : out.mean_c_g_m3) c /= kHour;
}

}  // namespace lidbox
