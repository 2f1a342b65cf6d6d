// ensemble.nc: NetCDF-C written in memory, so that the file joins the run's all-or-nothing set.
#include <netcdf.h>
#include <netcdf_mem.h>

#include <algorithm>
#include <cmath>
#include <cstdlib>

#include "lidbox/base/caution.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/report/ensemble_report.hpp"
#include "lidbox/report/netcdf_writer.hpp"
#include "lidbox/standards/averaging.hpp"

namespace lidbox {

namespace {

void ok(int status, const std::string& what) {
  if (status != NC_NOERR) throw InternalError("ensemble.nc: " + what + ": " + nc_strerror(status));
}

void text_att(int nc, int var, const char* name, const std::string& value) {
  ok(nc_put_att_text(nc, var, name, value.size(), value.c_str()), name);
}

// CF writes mixing ratios as plain numbers (canonical unit "1"); UDUNITS has no ppm.
std::string cf_unit(const std::string& canonical) {
  if (canonical == "ppm") return "1e-6";
  if (canonical == "ppb") return "1e-9";
  if (canonical == "ppt") return "1e-12";
  return canonical;
}

int def_var(int nc, const std::string& name, nc_type type, std::vector<int> dims,
            const std::string& long_name, const std::string& units) {
  int v = -1;
  ok(nc_def_var(nc, name.c_str(), type, static_cast<int>(dims.size()), dims.data(), &v),
     "define " + name);
  text_att(nc, v, "long_name", long_name);
  if (!units.empty()) text_att(nc, v, "units", units);
  if (type == NC_DOUBLE) {
    const double fill = NC_FILL_DOUBLE;
    ok(nc_put_att_double(nc, v, "_FillValue", NC_DOUBLE, 1, &fill), "fill " + name);
  }
  return v;
}

// The variables' ids and the file's shape.
struct EnsembleFile {
  std::size_t n = 0, N = 0, Q = 0, longest = 1;  // hours, members, percentiles, label length
  UtcSeconds t0 = 0;
  int v_time = -1, v_bnds = -1, v_real = -1, v_label = -1, v_q = -1;
  std::vector<int> v_hour, v_pct, v_mean;  // per pollutant
  // Daily probabilities per rule (rows of ensemble_days.csv) on (rule, day).
  std::vector<std::string> rules;
  std::int64_t day0 = 0;
  std::size_t D = 0;
  std::size_t rule_len = 1;
  int v_day = -1, v_rule = -1, v_prob = -1, v_count = -1, v_kernel = -1;
};

// Dimensions and coordinate variables: time and its bounds, members, percentiles.
void define_axes(int nc, const EnsembleOutcome& e, EnsembleFile& f) {
  int d_time = -1, d_nv = -1, d_real = -1, d_q = -1, d_len = -1;
  ok(nc_def_dim(nc, "time", f.n, &d_time), "time");
  ok(nc_def_dim(nc, "nv", 2, &d_nv), "nv");
  ok(nc_def_dim(nc, "realization", f.N, &d_real), "realization");
  ok(nc_def_dim(nc, "percentile", f.Q, &d_q), "percentile");
  for (const auto& l : e.labels) f.longest = std::max(f.longest, l.size());
  ok(nc_def_dim(nc, "label_strlen", f.longest, &d_len), "label_strlen");
  const std::string since = "hours since " + format_utc(f.t0).substr(0, 10) + " " +
                            format_utc(f.t0).substr(11, 8) + " +00:00";
  f.v_time = def_var(nc, "time", NC_DOUBLE, {d_time}, "start of the hour", since);
  text_att(nc, f.v_time, "standard_name", "time");
  text_att(nc, f.v_time, "calendar", "standard");
  text_att(nc, f.v_time, "axis", "T");
  text_att(nc, f.v_time, "bounds", "time_bnds");
  f.v_bnds = def_var(nc, "time_bnds", NC_DOUBLE, {d_time, d_nv}, "hour covered", since);
  f.v_real = def_var(nc, "realization", NC_INT, {d_real},
                     "ensemble member (position in the case's list)", "");
  text_att(nc, f.v_real, "standard_name", "realization");
  f.v_label = def_var(nc, "member_source", NC_CHAR, {d_real, d_len}, "the member's met", "");
  f.v_q = def_var(nc, "percentile", NC_DOUBLE, {d_q},
                  "percentile over the members (numpy linear method)", "percent");
}

// Per pollutant: member hour means (realization, time), percentiles (percentile, time), mean.
void define_pollutants(int nc, const CaseSpec& c, EnsembleFile& f) {
  int d_time = -1, d_real = -1, d_q = -1;
  ok(nc_inq_dimid(nc, "time", &d_time), "time");
  ok(nc_inq_dimid(nc, "realization", &d_real), "realization");
  ok(nc_inq_dimid(nc, "percentile", &d_q), "percentile");
  for (const auto& ps : c.pollutants) {
    const std::string u = cf_unit(ps.unit.canonical);
    const std::string what =
        ps.name + " hour mean of the mixed layer (reporting unit " + ps.unit.canonical + ")";
    f.v_hour.push_back(def_var(nc, cf_variable_name(ps.name + "_hour_mean"), NC_DOUBLE,
                               {d_real, d_time}, what, u));
    text_att(nc, f.v_hour.back(), "cell_methods", "time: mean (interval: 1 hour)");
    f.v_pct.push_back(def_var(nc, cf_variable_name(ps.name + "_percentile"), NC_DOUBLE,
                              {d_q, d_time},
                              ps.name + " percentiles over the members of the hour means", u));
    text_att(nc, f.v_pct.back(), "cell_methods",
             "time: mean (interval: 1 hour) realization: percentile");
    f.v_mean.push_back(def_var(nc, cf_variable_name(ps.name + "_member_mean"), NC_DOUBLE,
                               {d_time}, ps.name + " mean over the members of the hour means", u));
    text_att(nc, f.v_mean.back(), "cell_methods",
             "time: mean (interval: 1 hour) realization: mean");
  }
}

// The (rule, day) probability variables, when the ensemble judged any rule.
void define_rule_days(int nc, const EnsembleOutcome& e, EnsembleFile& f) {
  std::int64_t day1 = -1;
  for (const EnsembleDay& d : e.rules.days) {
    const std::string k = d.rule_set_id + " " + d.rule_id;
    if (std::find(f.rules.begin(), f.rules.end(), k) == f.rules.end()) f.rules.push_back(k);
    if (day1 < f.day0) f.day0 = day1 = d.day;
    f.day0 = std::min(f.day0, d.day);
    day1 = std::max(day1, d.day);
  }
  if (f.rules.empty()) return;
  f.D = static_cast<std::size_t>(day1 - f.day0 + 1);
  for (const auto& k : f.rules) f.rule_len = std::max(f.rule_len, k.size());
  int d_day = -1, d_rule = -1, d_rlen = -1;
  ok(nc_def_dim(nc, "day", f.D, &d_day), "day");
  ok(nc_def_dim(nc, "rule", f.rules.size(), &d_rule), "rule");
  ok(nc_def_dim(nc, "rule_strlen", f.rule_len, &d_rlen), "rule_strlen");
  f.v_day = def_var(nc, "day", NC_DOUBLE, {d_day}, "start of the local-standard-time day",
                    "days since 1970-01-01 00:00:00 +00:00");
  text_att(nc, f.v_day, "standard_name", "time");
  text_att(nc, f.v_day, "calendar", "standard");
  f.v_rule = def_var(nc, "rule_id", NC_CHAR, {d_rule, d_rlen}, "rule set and rule", "");
  f.v_prob = def_var(
      nc, "exceedance_probability", NC_DOUBLE, {d_rule, d_day},
      "fraction of members exceeding the rule that day (alert rules: an episode under way)", "1");
  text_att(nc, f.v_prob, "comment", "member counting; a finite ensemble proves neither 0 nor 1");
  int fill = -1;
  f.v_count = def_var(nc, "members_exceeding", NC_INT, {d_rule, d_day},
                      "members exceeding the rule that day", "1");
  ok(nc_put_att_int(nc, f.v_count, "_FillValue", NC_INT, 1, &fill), "fill");
  if (e.kernel_dressing) {
    f.v_kernel = def_var(
        nc, "exceedance_probability_kernel_dressed", NC_DOUBLE, {d_rule, d_day},
        "kernel-dressed probability (Gaussian kernels, Silverman bandwidth, divisor N - 1)", "1");
  }
}

void write_rule_days(int nc, const CaseSpec& c, const EnsembleOutcome& e, const EnsembleFile& f) {
  if (f.rules.empty()) return;
  const int off = c.zone.standard_offset_s();
  std::vector<double> days(f.D);
  for (std::size_t d = 0; d < f.D; ++d) {
    days[d] = static_cast<double>(lst_day_start_utc(f.day0 + static_cast<std::int64_t>(d), off)) /
              86400.0;
  }
  ok(nc_put_var_double(nc, f.v_day, days.data()), "day");
  std::vector<char> names(f.rules.size() * f.rule_len, '\0');
  for (std::size_t k = 0; k < f.rules.size(); ++k) {
    std::copy(f.rules[k].begin(), f.rules[k].end(),
              names.begin() + static_cast<long>(k * f.rule_len));
  }
  ok(nc_put_var_text(nc, f.v_rule, names.data()), "rule_id");
  std::vector<double> prob(f.rules.size() * f.D, NC_FILL_DOUBLE),
      kern(f.rules.size() * f.D, NC_FILL_DOUBLE);
  std::vector<int> count(f.rules.size() * f.D, -1);
  for (const EnsembleDay& d : e.rules.days) {
    const auto k = static_cast<std::size_t>(
        std::find(f.rules.begin(), f.rules.end(), d.rule_set_id + " " + d.rule_id) -
        f.rules.begin());
    const std::size_t at = k * f.D + static_cast<std::size_t>(d.day - f.day0);
    prob[at] = d.probability;
    count[at] = d.exceeding;
    if (!std::isnan(d.kernel_probability)) kern[at] = d.kernel_probability;
  }
  ok(nc_put_var_double(nc, f.v_prob, prob.data()), "probability");
  ok(nc_put_var_int(nc, f.v_count, count.data()), "members exceeding");
  if (f.v_kernel >= 0) ok(nc_put_var_double(nc, f.v_kernel, kern.data()), "kernel probability");
}

void write_axes(int nc, const EnsembleOutcome& e, const EnsembleFile& f) {
  const RunResult& r0 = e.members.front();
  std::vector<double> t(f.n), b(2 * f.n);
  for (std::size_t i = 0; i < f.n; ++i) {
    t[i] = static_cast<double>(r0.hours[i].start_utc - f.t0) / 3600.0;
    b[2 * i] = t[i];
    b[2 * i + 1] = t[i] + 1.0;
  }
  ok(nc_put_var_double(nc, f.v_time, t.data()), "time");
  ok(nc_put_var_double(nc, f.v_bnds, b.data()), "time_bnds");
  std::vector<int> real(f.N);
  std::vector<char> labels(f.N * f.longest, '\0');
  for (std::size_t m = 0; m < f.N; ++m) {
    real[m] = static_cast<int>(m + 1);
    std::copy(e.labels[m].begin(), e.labels[m].end(),
              labels.begin() + static_cast<long>(m * f.longest));
  }
  ok(nc_put_var_int(nc, f.v_real, real.data()), "realization");
  ok(nc_put_var_text(nc, f.v_label, labels.data()), "member_source");
  ok(nc_put_var_double(nc, f.v_q, e.percentiles.percentiles().data()), "percentile");
}

void write_pollutants(int nc, const CaseSpec& c, const EnsembleOutcome& e,
                      const EnsembleFile& f) {
  const std::size_t n = f.n;
  for (std::size_t p = 0; p < c.pollutants.size(); ++p) {
    const double to = c.pollutants[p].unit.to_g_m3;
    std::vector<double> h(f.N * n), q(f.Q * n), mean(n);
    for (std::size_t m = 0; m < f.N; ++m) {
      for (std::size_t i = 0; i < n; ++i) h[m * n + i] = e.members[m].total(i, p) / to;
    }
    for (std::size_t k = 0; k < f.Q; ++k) {
      for (std::size_t i = 0; i < n; ++i) q[k * n + i] = e.percentiles.value(i, p, k) / to;
    }
    for (std::size_t i = 0; i < n; ++i) mean[i] = e.percentiles.mean(i, p) / to;
    ok(nc_put_var_double(nc, f.v_hour[p], h.data()), "hour means");
    ok(nc_put_var_double(nc, f.v_pct[p], q.data()), "percentiles");
    ok(nc_put_var_double(nc, f.v_mean[p], mean.data()), "member mean");
  }
}

void write_file(int nc, const CaseSpec& c, const EnsembleOutcome& e) {
  EnsembleFile f;
  f.n = e.members.front().hours.size();
  f.N = e.members.size();
  f.Q = e.percentiles.percentiles().size();
  f.t0 = e.members.front().hours.front().start_utc;
  define_axes(nc, e, f);
  define_pollutants(nc, c, f);
  define_rule_days(nc, e, f);
  text_att(nc, NC_GLOBAL, "Conventions", "CF-1.12");
  text_att(nc, NC_GLOBAL, "title", "ensemble of " + c.name + ": member hour means and percentiles");
  text_att(nc, NC_GLOBAL, "source", std::string("lidbox ") + LIDBOX_VERSION);
  text_att(nc, NC_GLOBAL, "caution", kScreeningCaution);
  text_att(nc, NC_GLOBAL, "probability_note",
           "member counting (ensemble_days.csv): a finite ensemble proves neither 0 % nor 100 %");
  ok(nc_enddef(nc), "enddef");
  write_rule_days(nc, c, e, f);
  write_axes(nc, e, f);
  write_pollutants(nc, c, e, f);
}

}  // namespace

std::string render_ensemble_netcdf(const CaseSpec& c, const EnsembleOutcome& e) {
  int nc = -1;
  try {
    ok(nc_create_mem("lidbox-ensemble.nc", NC_NETCDF4 | NC_CLASSIC_MODEL, 64 * 1024, &nc),
       "create in memory");
    write_file(nc, c, e);
    NC_memio io{};
    const int st = nc_close_memio(nc, &io);
    nc = -1;
    ok(st, "close in memory");
    std::string bytes(static_cast<const char*>(io.memory), io.size);
    std::free(io.memory);
    return bytes;
  } catch (...) {
    if (nc >= 0) nc_close(nc);
    throw;
  }
}

}  // namespace lidbox
