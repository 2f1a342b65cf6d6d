#include "met/netcdf_time_axis.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "lidbox/base/cf_time.hpp"
#include "lidbox/base/error.hpp"

namespace lidbox::netcdf {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

using Columns = std::vector<std::vector<double>>;

const Var& time_variable(const File& f, int time_dim, const Var* mapped_time) {
  if (mapped_time) return *mapped_time;
  const Var* tv = f.find(f.dim_name(time_dim));
  if (!tv) throw InternalError("time coordinate vanished");
  return *tv;
}

// CF 7.1: a bounds variable (time, 2) gives each cell's start and end. Hour means are labelled
// by their start in an HourlySeries (use_bounds_start); for met the stamps stay and the caller
// learns which end they mark.
void apply_bounds(const File& f, const Var& tv, const CfTimeUnits& tu, bool use_bounds_start,
                  TimeAxis& axis) {
  const auto bname = f.text_att(tv.id, "bounds");
  if (!bname) return;
  const Var* bv = f.find(*bname);
  const std::size_t n = axis.t.size();
  if (!(bv && bv->dims.size() == 2 && f.dim_len(bv->dims[1]) == 2 && f.dim_len(bv->dims[0]) == n &&
        n > 0)) {
    return;
  }
  const auto b = f.read_all(*bv);
  std::vector<UtcSeconds> lo(n), hi(n);
  for (std::size_t i = 0; i < n; ++i) {
    lo[i] = decode_cf_time(tu, std::min(b[2 * i], b[2 * i + 1]), f.where(*bv));
    hi[i] = decode_cf_time(tu, std::max(b[2 * i], b[2 * i + 1]), f.where(*bv));
  }
  axis.bounds_label = lo == axis.t ? "period_start" : hi == axis.t ? "period_end" : "other";
  if (use_bounds_start) axis.t = lo;
}

void check_increasing(const std::string& where, const std::vector<UtcSeconds>& t) {
  for (std::size_t i = 1; i < t.size(); ++i) {
    if (t[i] <= t[i - 1]) {
      throw InputError(where,
                       std::string(t[i] == t[i - 1] ? "a duplicate" : "a decreasing") +
                           " time at index " + std::to_string(i) + " (" + format_utc(t[i]) +
                           " after " + format_utc(t[i - 1]) + ")",
                       "strictly increasing times");
    }
  }
}

// The smallest difference between stamps, which every difference must be a multiple of.
UtcSeconds regular_step(const std::string& where, const std::vector<UtcSeconds>& t) {
  const std::size_t n = t.size();
  if (n < 2) return kSecondsPerHour;
  UtcSeconds step = std::numeric_limits<UtcSeconds>::max();
  for (std::size_t i = 1; i < n; ++i) step = std::min(step, t[i] - t[i - 1]);
  for (std::size_t i = 1; i < n; ++i) {
    if ((t[i] - t[i - 1]) % step != 0) {
      throw InputError(where,
                       "an irregular time axis (steps of " + std::to_string(step) + " s and " +
                           std::to_string(t[i] - t[i - 1]) + " s at " + format_utc(t[i]) + ")",
                       "a regular time step; absent records may leave whole steps out");
    }
  }
  return step;
}

UtcSeconds floor_hour(UtcSeconds x) {
  return x - ((x % kSecondsPerHour) + kSecondsPerHour) % kSecondsPerHour;
}

// The records `keep` (all on whole hours, increasing) placed on the hours from the first.
Hourly on_hours(const std::vector<UtcSeconds>& t, const Columns& cols,
                const std::vector<std::size_t>& keep) {
  Hourly h;
  h.columns.resize(cols.size());
  h.first = t[keep.front()];
  const std::size_t nh = static_cast<std::size_t>((t[keep.back()] - h.first) / kSecondsPerHour) + 1;
  for (auto& c : h.columns) c.assign(nh, kNaN);
  h.record.assign(nh, 0);
  for (std::size_t i : keep) {
    const auto k = static_cast<std::size_t>((t[i] - h.first) / kSecondsPerHour);
    for (std::size_t c = 0; c < cols.size(); ++c) h.columns[c][k] = cols[c][i];
    h.record[k] = static_cast<int>(i + 1);
  }
  return h;
}

Hourly hourly_as_is(const std::string& where, const std::vector<UtcSeconds>& t,
                    const Columns& cols) {
  if (t[0] % kSecondsPerHour != 0) {
    throw InputError(where, "hourly stamps off the whole hour (first " + format_utc(t[0]) + ")",
                     "stamps on whole UTC hours");
  }
  std::vector<std::size_t> all(t.size());
  for (std::size_t i = 0; i < t.size(); ++i) all[i] = i;
  Hourly h = on_hours(t, cols, all);
  h.rule = "hourly, used as is";
  return h;
}

Hourly samples_on_the_hour(const std::string& where, const std::vector<UtcSeconds>& t,
                           const Columns& cols, const std::string& step_text) {
  std::vector<std::size_t> keep;
  for (std::size_t i = 0; i < t.size(); ++i) {
    if (t[i] % kSecondsPerHour == 0) keep.push_back(i);
  }
  if (keep.empty()) {
    throw InputError(where, "no stamp on a whole UTC hour", "samples on whole hours");
  }
  Hourly h = on_hours(t, cols, keep);
  h.rule = step_text + ", the samples on whole hours";
  return h;
}

Hourly hour_means(const std::vector<UtcSeconds>& t, const Columns& cols, UtcSeconds step,
                  const std::string& step_text) {
  const std::size_t n = t.size();
  const auto per_hour = static_cast<std::size_t>(kSecondsPerHour / step);
  Hourly h;
  h.columns.resize(cols.size());
  h.first = floor_hour(t[0]);
  const std::size_t nh =
      static_cast<std::size_t>((floor_hour(t[n - 1]) - h.first) / kSecondsPerHour) + 1;
  h.record.assign(nh, 0);
  for (std::size_t c = 0; c < cols.size(); ++c) {
    std::vector<double> sum(nh, 0.0);
    std::vector<std::size_t> cnt(nh, 0);
    for (std::size_t i = 0; i < n; ++i) {
      const auto k = static_cast<std::size_t>((floor_hour(t[i]) - h.first) / kSecondsPerHour);
      if (h.record[k] == 0) h.record[k] = static_cast<int>(i + 1);
      if (!std::isnan(cols[c][i])) {
        sum[k] += cols[c][i];
        ++cnt[k];
      }
    }
    h.columns[c].assign(nh, kNaN);
    for (std::size_t k = 0; k < nh; ++k) {
      if (cnt[k] > 0 && 4 * cnt[k] >= 3 * per_hour)
        h.columns[c][k] = sum[k] / static_cast<double>(cnt[k]);
    }
  }
  h.rule = step_text + ", hour means of the samples in [H, H+1h) stamped H (75 % rule)";
  return h;
}

// Values between two stamps `step` apart, interpolated linearly at the whole hours between them.
Hourly linear_to_hours(const std::string& where, const std::vector<UtcSeconds>& t,
                       const Columns& cols, UtcSeconds step, const std::string& step_text) {
  if (t[0] % kSecondsPerHour != 0) {
    throw InputError(where, "stamps off the whole hour (first " + format_utc(t[0]) + ")",
                     "stamps on whole UTC hours");
  }
  const std::size_t n = t.size();
  const auto ratio = static_cast<std::size_t>(step / kSecondsPerHour);
  const std::size_t ng = static_cast<std::size_t>((t[n - 1] - t[0]) / step) + 1;
  Columns grid(cols.size(), std::vector<double>(ng, kNaN));
  std::vector<int> grec(ng, 0);
  for (std::size_t i = 0; i < n; ++i) {
    const auto g = static_cast<std::size_t>((t[i] - t[0]) / step);
    for (std::size_t c = 0; c < cols.size(); ++c) grid[c][g] = cols[c][i];
    grec[g] = static_cast<int>(i + 1);
  }
  Hourly h;
  h.columns.resize(cols.size());
  h.first = t[0];
  const std::size_t nh = (ng - 1) * ratio + 1;
  h.record.assign(nh, 0);
  for (std::size_t k = 0; k < nh; ++k) {
    const std::size_t g = k / ratio;
    if (k % ratio == 0) h.record[k] = grec[g];
  }
  for (std::size_t c = 0; c < cols.size(); ++c) {
    h.columns[c].assign(nh, kNaN);
    for (std::size_t k = 0; k < nh; ++k) {
      const std::size_t g = k / ratio, r = k % ratio;
      if (r == 0) {
        h.columns[c][k] = grid[c][g];
      } else {
        const double a = grid[c][g], b = grid[c][g + 1];
        const double frac = static_cast<double>(r) / static_cast<double>(ratio);
        h.columns[c][k] = a + (b - a) * frac;  // NaN when either end is missing
      }
    }
  }
  h.rule = step_text + ", interpolated linearly to whole hours";
  return h;
}

}  // namespace

TimeAxis read_time_axis(const File& f, int time_dim, const Var* mapped_time,
                        bool use_bounds_start) {
  const Var& tv = time_variable(f, time_dim, mapped_time);
  const std::string where = f.where(tv);
  if (tv.dims.size() != 1) {
    throw InputError(where, "dimensions " + f.dims_text(tv), "a 1-D time coordinate time(time)");
  }
  const auto units = f.text_att(tv.id, "units");
  if (!units) throw InputError(where, "no units attribute", "time units \"<unit> since <date>\"");
  const CfTimeUnits tu =
      parse_cf_time_units(*units, f.text_att(tv.id, "calendar").value_or(""), where);
  const auto raw = f.read_values(tv);
  TimeAxis axis;
  axis.variable = tv.name;
  for (std::size_t i = 0; i < raw.size(); ++i) {
    if (std::isnan(raw[i])) {
      throw InputError(where, "a missing time value at index " + std::to_string(i),
                       "a time value for every record");
    }
    axis.t.push_back(decode_cf_time(tu, raw[i], where));
  }
  apply_bounds(f, tv, tu, use_bounds_start, axis);
  check_increasing(where, axis.t);
  if (axis.t.empty()) throw InputError(where, "no time records", "at least one record");
  return axis;
}

Hourly to_hourly(const File& f, const TimeAxis& axis, const Columns& cols, SubHourlyRule sub,
                 CoarseStepRule coarse) {
  const std::string where = f.path() + ": variable " + quoted(axis.variable);
  const auto& t = axis.t;
  const UtcSeconds step = regular_step(where, t);
  const std::string step_text = std::to_string(step) + " s";
  if (step == kSecondsPerHour) return hourly_as_is(where, t, cols);
  if (step < kSecondsPerHour && kSecondsPerHour % step == 0) {
    if (sub == SubHourlyRule::refuse) {
      throw InputError(where, "a time step of " + step_text,
                       "hourly data (sub-hourly refused by option)");
    }
    if (sub == SubHourlyRule::on_the_hour) return samples_on_the_hour(where, t, cols, step_text);
    return hour_means(t, cols, step, step_text);
  }
  if (step > kSecondsPerHour && step % kSecondsPerHour == 0) {
    if (coarse == CoarseStepRule::refuse) {
      throw InputError(
          where,
          "a time step of " + step_text + " (" + std::to_string(step / kSecondsPerHour) + " h)",
          "hourly data, or linear interpolation to hours asked for "
          "([met] coarse_step = \"linear\", --coarse linear)");
    }
    return linear_to_hours(where, t, cols, step, step_text);
  }
  throw InputError(where, "a time step of " + step_text,
                   "hourly data, a step that divides an hour, or a whole number of hours");
}

}  // namespace lidbox::netcdf
