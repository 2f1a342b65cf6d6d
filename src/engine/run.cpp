#include "lidbox/engine/run.hpp"

#include <algorithm>
#include <cmath>

#include "lidbox/met/csv_met.hpp"
#include "lidbox/met/netcdf_met.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"

namespace lidbox {

double RunResult::total(std::size_t hour, std::size_t p) const {
  double s = 0.0;
  for (std::size_t j = 0; j < n_parts; ++j) s += mean(hour, p, j);
  return s;
}

double RunResult::closure_g_m2(std::size_t hour, std::size_t p, bool residual_layer) const {
  if (budget_streamed)
    throw InternalError("the closure of an hour of a run whose budget was streamed");
  double lines = 0.0;
  for (std::size_t i = 0; i <= hour; ++i) {
    const BudgetTerms& b = budget_of(i, p);
    lines += residual_layer ? b.mixed_layer_change() + b.residual_layer_change() : b.mixed_layer_change();
  }
  double storage = mixed_mass(hour, p) - initial_mixed_mass_g_m2[p];
  if (residual_layer) {
    storage += residual_mass(hour, p) - initial_residual_mass_g_m2[p];
  }
  return storage - lines;
}

std::vector<double> RunResult::closure_series_g_m2(bool residual_layer) const {
  if (budget_streamed) throw InternalError("the closure series of a run whose budget was streamed");
  std::vector<double> out(hours.size() * n_pollutants);
  for (std::size_t p = 0; p < n_pollutants; ++p) {
    double lines = 0.0;
    for (std::size_t i = 0; i < hours.size(); ++i) {
      const BudgetTerms& b = budget_of(i, p);
      lines += residual_layer ? b.mixed_layer_change() + b.residual_layer_change() : b.mixed_layer_change();
      double storage = mixed_mass(i, p) - initial_mixed_mass_g_m2[p];
      if (residual_layer) {
        storage += residual_mass(i, p) - initial_residual_mass_g_m2[p];
      }
      out[at(i, p)] = storage - lines;
    }
  }
  return out;
}

double RunResult::closure_latest_g_m2(std::size_t hour, std::size_t p) const {
  double storage = mixed_mass(hour, p) - initial_mixed_mass_g_m2[p];
  if (stepped_with_residual_layer) storage += residual_mass(hour, p) - initial_residual_mass_g_m2[p];
  return storage - lines_sum_g_m2[p];
}

double RunResult::relative_closure(std::size_t p, bool residual_layer_lines) const {
  if (hours.empty()) return 0.0;
  if (residual_layer_lines != stepped_with_residual_layer) {
    throw InternalError("relative closure asked with other layers than the run had");
  }
  const double r = closure_latest_g_m2(hours.size() - 1, p);
  const double scale = magnitude_sum_g_m2[p];
  return scale > 0.0 ? std::fabs(r) / scale : 0.0;
}

MetSeries read_case_met(const CaseSpec& c) {
  if (c.met.format == MetFormat::netcdf) {
    NetcdfMetOptions o = c.met.netcdf;
    // Background columns named by the case are read as extra variables of the same name (or
    // standard_name).
    for (const auto& p : c.pollutants) {
      if (p.background.kind == BackgroundSpec::Kind::column) o.extra[p.background.column] = p.background.column;
    }
    for (const auto& [field, variable] : c.diagnostics.fields) o.extra[field] = variable;
    o.limits = c.plausibility;
    MetSeries met = read_met_netcdf(c.met.path, o);
    fill_gaps(met, c.met.max_gap_hours);
    validate_met(met, c.plausibility);
    return met;
  }
  CsvMetOptions o;
  o.zone_for_naive_times = &c.zone;
  o.max_gap_hours = c.met.max_gap_hours;
  o.limits = &c.plausibility;
  MetSeries met = read_met_csv(c.met.path, o, c.met.display_name);
  validate_met(met, c.plausibility);
  return met;
}

namespace {

// The met column a background names, and its unit's factor to g/m3 for pollutant `ps`.
struct ColumnLookup {
  const MetColumn* column = nullptr;
  double to_g_m3 = 1.0;
};

ColumnLookup background_column(const PollutantSpec& ps, const MetSeries& met) {
  ColumnLookup col;
  col.column = met.find_extra(ps.background.column);
  if (!col.column) {
    std::vector<std::string> names;
    for (const auto& e : met.extra) names.push_back(e.name);
    throw InputError(met.source,
                     "no column \"" + ps.background.column + "\" for the background of " + ps.name +
                         " (other columns: " + (names.empty() ? "none" : join(names)) + ")",
                     "a column \"" + ps.background.column + " [unit]\"");
  }
  col.to_g_m3 = parse_concentration_unit(
                    col.column->unit, ps.molar_mass_g_mol, ps.reference,
                    met.source + ": column \"" + col.column->name + " [" + col.column->unit + "]\"")
                    .to_g_m3;
  return col;
}

// Background of the inflowing air and free-troposphere air, per pollutant and hour. With
// instantaneous readings an hour takes the mean of its two end stamps.
void fill_backgrounds(const CaseSpec& c, const MetSeries& met, bool inst, Forcing& F) {
  const std::size_t n = F.n_hours;
  F.background_g_m3.assign(F.n_pollutants * n, 0.0);
  F.free_troposphere_g_m3.assign(F.n_pollutants * n, 0.0);
  for (std::size_t p = 0; p < F.n_pollutants; ++p) {
    const PollutantSpec& ps = c.pollutants[p];
    const bool by_column = ps.background.kind == BackgroundSpec::Kind::column;
    const ColumnLookup col = by_column ? background_column(ps, met) : ColumnLookup{};
    for (std::size_t i = 0; i < n; ++i) {
      double cb = ps.background.value_g_m3;
      if (by_column) {
        const auto& v = col.column->values;
        const double raw = inst ? 0.5 * (v[i] + v[i + 1]) : v[i];
        if (raw < 0.0) {
          throw InputError(met.source + ":" + std::to_string(met.source_line[i]),
                           "negative background " + format_number(raw), "a concentration >= 0");
        }
        cb = raw * col.to_g_m3;
      } else if (ps.background.kind == BackgroundSpec::Kind::by_wind_from) {
        const double u = inst ? 0.5 * (met.wind_u_m_s[i] + met.wind_u_m_s[i + 1]) : met.wind_u_m_s[i];
        const double v = inst ? 0.5 * (met.wind_v_m_s[i] + met.wind_v_m_s[i + 1]) : met.wind_v_m_s[i];
        cb = ps.background.for_direction(wind_from_deg(u, v));
      }
      F.background(p, i) = cb;
      F.free_troposphere(p, i) = ps.free_troposphere_g_m3;
    }
  }
}

// Emission rates and clock factors. A zone whose offset is not a whole number of hours changes
// its local hour part-way through each UTC hour, so each hour has two clock halves.
void fill_emissions(const CaseSpec& c, const std::vector<HourRecord>& hours, Forcing& F) {
  const std::size_t S = F.n_sectors;
  F.emission_g_s.assign(S * F.n_pollutants, 0.0);
  for (std::size_t s = 0; s < S; ++s) {
    for (std::size_t p = 0; p < F.n_pollutants; ++p) F.emission(s, p) = c.sectors[s].rate_g_s[p];
  }
  const int minutes_part = ((c.zone.standard_offset_s() % 3600) + 3600) % 3600;
  F.clock_split_s = minutes_part == 0 ? 0 : 3600 - minutes_part;
  F.clock_factor.assign(S * F.n_hours * 2, 0.0);
  for (std::size_t i = 0; i < F.n_hours; ++i) {
    const CivilTime a = c.zone.civil(hours[i].start_utc);
    const CivilTime b = c.zone.civil(hours[i].start_utc + F.clock_split_s);
    for (std::size_t s = 0; s < S; ++s) {
      F.clock(s, i, 0) = c.sectors[s].clock.factor(a);
      F.clock(s, i, 1) = c.sectors[s].clock.factor(b);
    }
  }
}

}  // namespace

Forcing build_forcing(const CaseSpec& c, const MetSeries& met, std::vector<HourRecord>& hours) {
  const bool inst = c.met.reading == MetReading::instantaneous;
  const std::size_t n_stamps = met.size();
  if (n_stamps < 2) throw InputError(met.source, "fewer than two hours of met", "at least two hours");
  const std::size_t n = inst ? n_stamps - 1 : n_stamps;
  Forcing F;
  F.n_hours = n;
  F.n_pollutants = c.pollutants.size();
  F.n_sectors = c.sectors.size();
  F.mixing_height_m = met.mixing_height_m;
  F.wind_u_m_s = met.wind_u_m_s;
  F.wind_v_m_s = met.wind_v_m_s;
  // Hour i starts at stamp i, except for hour averages stamped at the end of their hour.
  const UtcSeconds first_start =
      met.first_stamp_utc - (!inst && c.met.hour_label == HourLabel::period_end ? kSecondsPerHour : 0);
  hours.assign(n, HourRecord{});
  for (std::size_t i = 0; i < n; ++i) {
    HourRecord& h = hours[i];
    h.start_utc = first_start + static_cast<UtcSeconds>(i) * kSecondsPerHour;
    h.civil_offset_s = c.zone.civil_offset_s(h.start_utc);
    h.filled = inst ? (met.filled[i] || met.filled[i + 1]) : met.filled[i] != 0;
  }
  fill_backgrounds(c, met, inst, F);
  fill_emissions(c, hours, F);
  return F;
}

namespace {

// The first day repeated: 24 hours of forcing whose last instantaneous node wraps to the first.
Forcing first_day(const Forcing& F, MetReading reading) {
  const std::size_t d = 24;
  Forcing D;
  D.n_hours = d;
  D.n_pollutants = F.n_pollutants;
  D.n_sectors = F.n_sectors;
  D.clock_split_s = F.clock_split_s;
  const std::size_t nodes = reading == MetReading::instantaneous ? d + 1 : d;
  for (std::size_t i = 0; i < nodes; ++i) {
    const std::size_t k = i % d;
    D.mixing_height_m.push_back(F.mixing_height_m[k]);
    D.wind_u_m_s.push_back(F.wind_u_m_s[k]);
    D.wind_v_m_s.push_back(F.wind_v_m_s[k]);
  }
  for (std::size_t p = 0; p < F.n_pollutants; ++p) {
    for (std::size_t i = 0; i < d; ++i) {
      D.background_g_m3.push_back(F.background(p, i));
      D.free_troposphere_g_m3.push_back(F.free_troposphere(p, i));
    }
  }
  D.emission_g_s = F.emission_g_s;
  for (std::size_t s = 0; s < F.n_sectors; ++s) {
    for (std::size_t i = 0; i < d; ++i) {
      D.clock_factor.push_back(F.clock(s, i, 0));
      D.clock_factor.push_back(F.clock(s, i, 1));
    }
  }
  return D;
}

std::vector<PollutantProcesses> processes_of(const CaseSpec& c) {
  std::vector<PollutantProcesses> out;
  for (const auto& p : c.pollutants) out.push_back(p.processes);
  return out;
}

}  // namespace

namespace {

// Repeats the first day until the day's hour means change by less than the case's tolerance
// (physics note section 9), from the background in both layers.
void spin_up(const CaseSpec& c, const MetSeries& met, const Forcing& F, const BoxEngine& engine,
             BoxState& state, HourResult& hr, RunResult& R, const ProgressFn& progress) {
  const std::size_t P = F.n_pollutants;
  if (F.n_hours < 24) {
    throw InputError(met.source, std::to_string(F.n_hours) + " hours of met, too few to repeat a first day",
                     "at least 24 hours, or spin_up = \"none\" in [model]");
  }
  const Forcing D = first_day(F, c.met.reading);
  for (std::size_t p = 0; p < P; ++p) {
    state.c(p, 0) = D.background(p, 0);
    state.cr(p, 0) = D.free_troposphere(p, 0);
  }
  std::vector<double> previous(P * 24, -1.0), current(P * 24, 0.0);
  R.spin_up_converged = false;
  for (int day = 1; day <= c.spin_up_max_days; ++day) {
    for (std::size_t i = 0; i < 24; ++i) {
      engine.step_hour(state, D, i, hr);
      for (std::size_t p = 0; p < P; ++p) current[p * 24 + i] = hr.mean_total(p);
    }
    R.spin_up_days = day;
    if (day > 1) {
      // Largest change of an hour mean, relative to the day's peak of that pollutant.
      double change = 0.0;
      for (std::size_t p = 0; p < P; ++p) {
        double peak = 0.0, diff = 0.0;
        for (std::size_t i = 0; i < 24; ++i) {
          peak = std::max(peak, std::fabs(previous[p * 24 + i]));
          diff = std::max(diff, std::fabs(current[p * 24 + i] - previous[p * 24 + i]));
        }
        change = std::max(change, peak > 0.0 ? diff / peak : 0.0);
      }
      R.spin_up_last_change = change;
      if (change < c.spin_up_tolerance) {
        R.spin_up_converged = true;
        return;
      }
    }
    previous = current;
    if (progress) progress(static_cast<double>(day) / c.spin_up_max_days, "spin-up");
  }
}

// The case's start values in the "initial" part (spin_up = "none"), and the residual layer's
// top, which must not be below the first lid.
void set_initial_state(const CaseSpec& c, const MetSeries& met, const Forcing& F, BoxState& state) {
  if (c.initial_residual_top_m) {
    const double top = *c.initial_residual_top_m;
    if (top < state.mixing_height_m) {
      // Appended, not `":" + std::to_string(...)`: g++ 12 at -O3 warns falsely (-Wrestrict,
      // GCC bug 105329) on a literal plus a temporary string.
      std::string line;
      if (!met.source_line.empty()) line.append(":").append(std::to_string(met.source_line[0]));
      throw InputError(c.initial_residual_top_where,
                       "a top of " + format_number(top) + " m, below the first lid of " +
                           format_number(state.mixing_height_m) + " m (" + met.source + line + ")",
                       "a residual-layer top at or above the first lid");
    }
    state.set_residual_top(top);
  }
  for (std::size_t p = 0; p < F.n_pollutants; ++p) {
    const PollutantSpec& ps = c.pollutants[p];
    state.c(p, 1) = ps.initial_g_m3.value_or(F.background(p, 0));
    state.cr(p, 1) = ps.initial_residual_g_m3.value_or(0.0);
  }
}

void allocate(RunResult& R, std::size_t n, std::size_t P, std::size_t J, bool keep_budget) {
  R.mean_g_m3.assign(n * P * J, 0.0);
  R.end_mixed_g_m3.assign(n * P, 0.0);
  R.end_residual_g_m3.assign(n * P, 0.0);
  const std::size_t nb = keep_budget ? n : 1;
  R.budget_streamed = !keep_budget;
  R.budget.assign(nb * P, BudgetTerms{});
  R.mixed_mass_g_m2.assign(nb * P, 0.0);
  R.residual_mass_g_m2.assign(nb * P, 0.0);
  R.lines_sum_g_m2.assign(P, 0.0);
  R.magnitude_sum_g_m2.assign(P, 0.0);
  R.initial_mixed_mass_g_m2.assign(P, 0.0);
  R.initial_residual_mass_g_m2.assign(P, 0.0);
}

// Keeps what hour i produced: met used, flags, hour means by part, end values, budget, masses.
void record_hour(std::size_t i, const BoxEngine& engine, const BoxState& state, const HourResult& hr,
                 RunResult& R) {
  HourRecord& h = R.hours[i];
  h.mixing_height_m = hr.mixing_height_mean_m;
  h.wind_speed_m_s = hr.wind_speed_mean_m_s;
  h.wind_from_deg = wind_from_deg(hr.wind_u_mean_m_s, hr.wind_v_mean_m_s);
  h.ventilation_m2_s = hr.ventilation_mean_m2_s;
  h.flushing_time_h = 1.0 / hr.flushing_rate_mean_per_s / 3600.0;
  h.residual_top_m = state.residual_top_m;
  h.calm_floor = hr.calm_floor;
  h.lid_floor = hr.lid_floor;
  h.substeps = hr.substeps;
  const std::size_t block = R.n_pollutants * R.n_parts;
  std::copy(hr.mean_c_g_m3.begin(), hr.mean_c_g_m3.end(), R.mean_g_m3.begin() + static_cast<long>(i * block));
  for (std::size_t p = 0; p < R.n_pollutants; ++p) {
    const std::size_t k = R.at(i, p);
    R.end_mixed_g_m3[k] = state.c_total(p);
    R.end_residual_g_m3[k] = state.residual_mean_total(p);
    const std::size_t kb = R.budget_at(i, p);
    const BudgetTerms& b = hr.budget[p];
    R.budget[kb] = b;
    R.mixed_mass_g_m2[kb] = engine.mixed_mass(state, p);
    R.residual_mass_g_m2[kb] = engine.residual_mass(state, p);
    R.lines_sum_g_m2[p] += R.stepped_with_residual_layer ? b.mixed_layer_change() + b.residual_layer_change()
                                            : b.mixed_layer_change();
    R.magnitude_sum_g_m2[p] += b.magnitude();
  }
}

}  // namespace

BoxState start_state(const CaseSpec& c, const MetSeries& met, const Forcing& F, const BoxEngine& engine,
                     RunResult& spin, const ProgressFn& progress) {
  BoxState state = engine.make_state(F.mixing_height_m[0]);
  if (c.spin_up == SpinUp::repeat_first_day) {
    HourResult hr = engine.make_result();
    spin_up(c, met, F, engine, state, hr, spin, progress);
  } else {
    set_initial_state(c, met, F, state);
  }
  return state;
}

RunResult run_case(const CaseSpec& c, const MetSeries& met, const ProgressFn& progress,
                   const RunStreaming& streaming) {
  RunResult R;
  R.stepped_with_residual_layer = c.engine.residual_layer;
  Forcing F = build_forcing(c, met, R.hours);
  const std::size_t n = F.n_hours;
  const std::size_t P = F.n_pollutants;
  BoxEngine engine(c.footprint, processes_of(c), F.n_sectors, c.engine);
  R.n_pollutants = P;
  R.n_parts = engine.parts();
  R.clock_split_s = F.clock_split_s;
  HourResult hr = engine.make_result();

  BoxState state = start_state(c, met, F, engine, R, progress);
  allocate(R, n, P, R.n_parts, streaming.keep_budget);
  for (std::size_t p = 0; p < P; ++p) {
    R.initial_mixed_mass_g_m2[p] = engine.mixed_mass(state, p);
    R.initial_residual_mass_g_m2[p] = engine.residual_mass(state, p);
  }
  // After the spin-up, which always sees the case's own emissions: a scenario changes the run.
  if (c.scenario) apply_emission_scenario(*c.scenario, R.hours.front().start_utc, F);
  const std::size_t report_every = std::max<std::size_t>(1, n / 100);
  for (std::size_t i = 0; i < n; ++i) {
    engine.step_hour(state, F, i, hr);
    record_hour(i, engine, state, hr, R);
    if (streaming.on_hour) streaming.on_hour(R, i);
    if (progress && (i + 1) % report_every == 0) progress(static_cast<double>(i + 1) / static_cast<double>(n), "run");
  }
  return R;
}

}  // namespace lidbox
