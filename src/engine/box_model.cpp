#include "lidbox/engine/box_model.hpp"

#include <algorithm>
#include <cmath>

#include "lidbox/base/error.hpp"

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
  const double speed = std::hypot(u, v);
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
struct Phi {
  double decay, g1, g2;  // e^-x, h phi1(x), h^2 phi2(x)
};
// One expm1 per pollutant and layer per sub-step.
inline Phi phis(double x, double h) {
  const double em1 = std::expm1(-x);
  Phi p{1.0 + em1, 0.0, 0.0};
  if (x < 1e-4) {
    p.g1 = h * (1.0 - x * (0.5 - x * (1.0 / 6.0 - x / 24.0)));
    p.g2 = h * h * (0.5 - x * (1.0 / 6.0 - x * (1.0 / 24.0 - x / 120.0)));
  } else {
    p.g1 = h * (-em1 / x);
    p.g2 = h * h * ((x + em1) / (x * x));
  }
  return p;
}
}  // namespace

void BoxEngine::exact_step(BoxState& s, double dt, double f, double fa, const Forcing& F,
                           std::size_t hour, int half, HourResult& out) const {
  const std::size_t J = parts();
  const std::size_t P = pollutants();
  const double H = s.mixing_height_m;
  const double D = s.cycle_top_m - H;                  // the most recent cycle's slab
  const double Do = s.residual_top_m - s.cycle_top_m;  // older air
  const double inv_area = 1.0 / footprint_.area_m2();
  for (std::size_t p = 0; p < P; ++p) {
    const PollutantProcesses& pr = processes_[p];
    BudgetTerms& b = out.budget[p];
    const double cb = F.background(p, hour);
    const double ca = F.free_troposphere(p, hour);
    // Mixed layer: dC/dt = a_j - lambda C.
    const double lambda = f + pr.loss_rate_per_s + pr.deposition_velocity_m_s / H;
    const Phi ph = phis(lambda * dt, dt);
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
      out.mean_c_g_m3[k] += ic;
      integral += ic;
    }
    b.emitted += q_total * dt;
    b.advected_in += f * H * cb * dt;
    b.advected_out += f * H * integral;
    b.reacted += pr.loss_rate_per_s * H * integral;
    b.deposited += pr.deposition_velocity_m_s * integral;

    // Residual layer: dCr/dt = fa (Ca - Cr) - kr Cr, on its own between lid moves.
    // Both slabs alike; the integral is of the depth-weighted concentration [g m-2 s].
    if (options_.residual_layer && (D > 0.0 || Do > 0.0)) {
      const double lr = pr.residual_loss_rate_per_s + fa;
      if (lr > 0.0) {
        const Phi phr = phis(lr * dt, dt);
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
        b.residual_reacted += pr.residual_loss_rate_per_s * integral_r;
        b.residual_advected_out += fa * integral_r;
        b.residual_advected_in += fa * (D + Do) * ca * dt;
      }
    }
  }
}

void BoxEngine::step_hour(BoxState& s, const Forcing& F, std::size_t hour,
                          HourResult& out) const {
  std::fill(out.mean_c_g_m3.begin(), out.mean_c_g_m3.end(), 0.0);
  std::fill(out.budget.begin(), out.budget.end(), BudgetTerms{});
  out.mixing_height_mean_m = out.wind_speed_mean_m_s = out.flushing_rate_mean_per_s = 0.0;
  out.wind_u_mean_m_s = out.wind_v_mean_m_s = out.ventilation_mean_m2_s = 0.0;
  out.calm_floor = out.lid_floor = false;
  out.substeps = 0;

  constexpr double T = 3600.0;
  const double split = F.clock_split_s > 0 ? static_cast<double>(F.clock_split_s) : T;
  const double fa_factor = options_.residual_wind_factor;
  // h and speed are the values used (after the floors); the ventilation coefficient is u H of
  // the met as given (h_met, u, v), so that the floors do not hide the poorest hours.
  auto accumulate_met = [&](double dt, double h, double h_met, double u, double v, double speed,
                            double f) {
    out.mixing_height_mean_m += h * dt / T;
    out.wind_u_mean_m_s += u * dt / T;
    out.wind_v_mean_m_s += v * dt / T;
    out.wind_speed_mean_m_s += speed * dt / T;
    out.flushing_rate_mean_per_s += f * dt / T;
    out.ventilation_mean_m2_s += std::hypot(u, v) * h_met * dt / T;
  };

  if (options_.reading == MetReading::hour_average) {
    const double h_met = F.mixing_height_m[hour];
    const double h = floored_height(h_met, out);
    move_lid(s, h, F, hour, out);
    const double u = F.wind_u_m_s[hour];
    const double v = F.wind_v_m_s[hour];
    double f = 0.0;
    const double speed = flushing(u, v, f, out);
    double fa = 0.0;
    if (fa_factor > 0.0) fa = geometry_.flushing_rate(u * fa_factor, v * fa_factor);
    exact_step(s, split, f, fa, F, hour, 0, out);
    if (split < T) exact_step(s, T - split, f, fa, F, hour, 1, out);
    out.substeps = split < T ? 2 : 1;
    accumulate_met(T, h, h_met, u, v, speed, f);
  } else {
    const double h0 = F.mixing_height_m[hour], h1 = F.mixing_height_m[hour + 1];
    const double u0 = F.wind_u_m_s[hour], u1 = F.wind_u_m_s[hour + 1];
    const double v0 = F.wind_v_m_s[hour], v1 = F.wind_v_m_s[hour + 1];
    int n = options_.fixed_substeps_per_hour;
    if (n <= 0) {
      // Stiffest rate at either end of the hour, over all pollutants.
      const double hmin = std::max(std::min(h0, h1), options_.min_mixing_height_m);
      double fmax = std::max(geometry_.flushing_rate(u0, v0), geometry_.flushing_rate(u1, v1));
      fmax = std::max(fmax, options_.min_wind_m_s * geometry_.isotropic_per_m);
      double lmax = fmax;
      for (const auto& pr : processes_) {
        lmax = std::max(lmax, fmax + pr.loss_rate_per_s + pr.deposition_velocity_m_s / hmin);
      }
      const double n_lambda = std::ceil(lmax * T / options_.max_lambda_dt);
      const double n_lid = std::ceil(std::fabs(h1 - h0) / hmin / options_.max_relative_lid_change);
      const double want = std::max({1.0, n_lambda, n_lid});
      n = static_cast<int>(std::min(want, static_cast<double>(options_.max_substeps_per_hour)));
    }
    // Segments of the hour between clock changes, each with its share of the sub-steps.
    const double seg_end[2] = {split, T};
    double t0 = 0.0;
    for (int half = 0; half < 2; ++half) {
      const double t1 = seg_end[half];
      if (t1 <= t0) continue;
      // Rounded up, so that no sub-step is longer than the controls allow (integer arithmetic:
      // the segment lengths are whole seconds).
      const long seg_s = std::lround(t1 - t0);
      const int m = static_cast<int>(std::max(1L, (static_cast<long>(n) * seg_s + 3599) / 3600));
      const double dt = (t1 - t0) / m;
      for (int k = 0; k < m; ++k) {
        const double ta = t0 + k * dt;
        const double tm = (ta + 0.5 * dt) / T;
        const double te = (ta + dt) / T;
        const double hm_met = h0 + (h1 - h0) * tm;
        const double hm = floored_height(hm_met, out);
        const double um = u0 + (u1 - u0) * tm;
        const double vm = v0 + (v1 - v0) * tm;
        move_lid(s, hm, F, hour, out);
        double f = 0.0;
        const double speed = flushing(um, vm, f, out);
        double fa = 0.0;
        if (fa_factor > 0.0) fa = geometry_.flushing_rate(um * fa_factor, vm * fa_factor);
        exact_step(s, dt, f, fa, F, hour, half, out);
        move_lid(s, floored_height(h0 + (h1 - h0) * te, out), F, hour, out);
        accumulate_met(dt, hm, hm_met, um, vm, speed, f);
        ++out.substeps;
      }
      t0 = t1;
    }
  }
  for (double& c : out.mean_c_g_m3) c /= T;
}

}  // namespace lidbox
