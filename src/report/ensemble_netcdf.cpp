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

void write_file(int nc, const CaseSpec& c, const EnsembleOutcome& e) {
  std::vector<char> day_names;
  const RunResult& r0 = e.members.front();
  const std::size_t n = r0.hours.size(), N = e.members.size(),
                    Q = e.percentiles.percentiles().size();
  int d_time = -1, d_nv = -1, d_real = -1, d_q = -1, d_len = -1;
  ok(nc_def_dim(nc, "time", n, &d_time), "time");
  ok(nc_def_dim(nc, "nv", 2, &d_nv), "nv");
  ok(nc_def_dim(nc, "realization", N, &d_real), "realization");
  ok(nc_def_dim(nc, "percentile", Q, &d_q), "percentile");
  std::size_t longest = 1;
  for (const auto& l : e.labels) longest = std::max(longest, l.size());
  ok(nc_def_dim(nc, "label_strlen", longest, &d_len), "label_strlen");
  const UtcSeconds t0 = r0.hours.front().start_utc;
  const std::string since = "hours since " + format_utc(t0).substr(0, 10) + " " +
                            format_utc(t0).substr(11, 8) + " +00:00";
  const int v_time = def_var(nc, "time", NC_DOUBLE, {d_time}, "start of the hour", since);
  text_att(nc, v_time, "standard_name", "time");
  text_att(nc, v_time, "calendar", "standard");
  text_att(nc, v_time, "axis", "T");
  text_att(nc, v_time, "bounds", "time_bnds");
  const int v_bnds = def_var(nc, "time_bnds", NC_DOUBLE, {d_time, d_nv}, "hour covered", since);
  const int v_real = def_var(nc, "realization", NC_INT, {d_real},
                             "ensemble member (position in the case's list)", "");
  text_att(nc, v_real, "standard_name", "realization");
  const int v_label =
      def_var(nc, "member_source", NC_CHAR, {d_real, d_len}, "the member's met", "");
  const int v_q = def_var(nc, "percentile", NC_DOUBLE, {d_q},
                          "percentile over the members (numpy linear method)", "percent");
  std::vector<int> v_hour, v_pct, v_mean;
  for (const auto& ps : c.pollutants) {
    const std::string u = cf_unit(ps.unit.canonical);
    const std::string what =
        ps.name + " hour mean of the mixed layer (reporting unit " + ps.unit.canonical + ")";
    v_hour.push_back(def_var(nc, cf_variable_name(ps.name + "_hour_mean"), NC_DOUBLE,
                             {d_real, d_time}, what, u));
    text_att(nc, v_hour.back(), "cell_methods", "time: mean (interval: 1 hour)");
    v_pct.push_back(def_var(nc, cf_variable_name(ps.name + "_percentile"), NC_DOUBLE, {d_q, d_time},
                            ps.name + " percentiles over the members of the hour means", u));
    text_att(nc, v_pct.back(), "cell_methods",
             "time: mean (interval: 1 hour) realization: percentile");
    v_mean.push_back(def_var(nc, cf_variable_name(ps.name + "_member_mean"), NC_DOUBLE, {d_time},
                             ps.name + " mean over the members of the hour means", u));
    text_att(nc, v_mean.back(), "cell_methods", "time: mean (interval: 1 hour) realization: mean");
  }
  // Daily probabilities per rule (rows of ensemble_days.csv) on (rule, day).
  std::vector<std::string> rules;
  std::int64_t day0 = 0, day1 = -1;
  for (const EnsembleDay& d : e.rules.days) {
    const std::string k = d.rule_set_id + " " + d.rule_id;
    if (std::find(rules.begin(), rules.end(), k) == rules.end()) rules.push_back(k);
    if (day1 < day0) day0 = day1 = d.day;
    day0 = std::min(day0, d.day);
    day1 = std::max(day1, d.day);
  }
  int v_day = -1, v_rule = -1, v_prob = -1, v_count = -1, v_kernel = -1;
  const std::size_t D = rules.empty() ? 0 : static_cast<std::size_t>(day1 - day0 + 1);
  if (!rules.empty()) {
    std::size_t rlen = 1;
    for (const auto& k : rules) rlen = std::max(rlen, k.size());
    int d_day = -1, d_rule = -1, d_rlen = -1;
    ok(nc_def_dim(nc, "day", D, &d_day), "day");
    ok(nc_def_dim(nc, "rule", rules.size(), &d_rule), "rule");
    ok(nc_def_dim(nc, "rule_strlen", rlen, &d_rlen), "rule_strlen");
    v_day = def_var(nc, "day", NC_DOUBLE, {d_day}, "start of the local-standard-time day",
                    "days since 1970-01-01 00:00:00 +00:00");
    text_att(nc, v_day, "standard_name", "time");
    text_att(nc, v_day, "calendar", "standard");
    v_rule = def_var(nc, "rule_id", NC_CHAR, {d_rule, d_rlen}, "rule set and rule", "");
    v_prob = def_var(
        nc, "exceedance_probability", NC_DOUBLE, {d_rule, d_day},
        "fraction of members exceeding the rule that day (alert rules: an episode under way)", "1");
    text_att(nc, v_prob, "comment", "member counting; a finite ensemble proves neither 0 nor 1");
    int fill = -1;
    v_count = def_var(nc, "members_exceeding", NC_INT, {d_rule, d_day},
                      "members exceeding the rule that day", "1");
    ok(nc_put_att_int(nc, v_count, "_FillValue", NC_INT, 1, &fill), "fill");
    if (e.kernel_dressing) {
      v_kernel = def_var(
          nc, "exceedance_probability_kernel_dressed", NC_DOUBLE, {d_rule, d_day},
          "kernel-dressed probability (Gaussian kernels, Silverman bandwidth, divisor N - 1)", "1");
    }
    std::vector<char> names(rules.size() * rlen, '\0');
    for (std::size_t k = 0; k < rules.size(); ++k)
      std::copy(rules[k].begin(), rules[k].end(), names.begin() + static_cast<long>(k * rlen));
    day_names = std::move(names);
  }
  text_att(nc, NC_GLOBAL, "Conventions", "CF-1.12");
  text_att(nc, NC_GLOBAL, "title", "ensemble of " + c.name + ": member hour means and percentiles");
  text_att(nc, NC_GLOBAL, "source", std::string("lidbox ") + LIDBOX_VERSION);
  text_att(nc, NC_GLOBAL, "caution", kScreeningCaution);
  text_att(nc, NC_GLOBAL, "probability_note",
           "member counting (ensemble_days.csv): a finite ensemble proves neither 0 % nor 100 %");
  ok(nc_enddef(nc), "enddef");
  if (!rules.empty()) {
    const int off = c.zone.standard_offset_s();
    std::vector<double> days(D);
    for (std::size_t d = 0; d < D; ++d) {
      days[d] = static_cast<double>(lst_day_start_utc(day0 + static_cast<std::int64_t>(d), off)) /
                86400.0;
    }
    ok(nc_put_var_double(nc, v_day, days.data()), "day");
    ok(nc_put_var_text(nc, v_rule, day_names.data()), "rule_id");
    std::vector<double> prob(rules.size() * D, NC_FILL_DOUBLE),
        kern(rules.size() * D, NC_FILL_DOUBLE);
    std::vector<int> count(rules.size() * D, -1);
    for (const EnsembleDay& d : e.rules.days) {
      const auto k = static_cast<std::size_t>(
          std::find(rules.begin(), rules.end(), d.rule_set_id + " " + d.rule_id) - rules.begin());
      const std::size_t at = k * D + static_cast<std::size_t>(d.day - day0);
      prob[at] = d.probability;
      count[at] = d.exceeding;
      if (!std::isnan(d.kernel_probability)) kern[at] = d.kernel_probability;
    }
    ok(nc_put_var_double(nc, v_prob, prob.data()), "probability");
    ok(nc_put_var_int(nc, v_count, count.data()), "members exceeding");
    if (v_kernel >= 0) ok(nc_put_var_double(nc, v_kernel, kern.data()), "kernel probability");
  }
  std::vector<double> t(n), b(2 * n);
  for (std::size_t i = 0; i < n; ++i) {
    t[i] = static_cast<double>(r0.hours[i].start_utc - t0) / 3600.0;
    b[2 * i] = t[i];
    b[2 * i + 1] = t[i] + 1.0;
  }
  ok(nc_put_var_double(nc, v_time, t.data()), "time");
  ok(nc_put_var_double(nc, v_bnds, b.data()), "time_bnds");
  std::vector<int> real(N);
  std::vector<char> labels(N * longest, '\0');
  for (std::size_t m = 0; m < N; ++m) {
    real[m] = static_cast<int>(m + 1);
    std::copy(e.labels[m].begin(), e.labels[m].end(),
              labels.begin() + static_cast<long>(m * longest));
  }
  ok(nc_put_var_int(nc, v_real, real.data()), "realization");
  ok(nc_put_var_text(nc, v_label, labels.data()), "member_source");
  ok(nc_put_var_double(nc, v_q, e.percentiles.percentiles().data()), "percentile");
  for (std::size_t p = 0; p < c.pollutants.size(); ++p) {
    const double to = c.pollutants[p].unit.to_g_m3;
    std::vector<double> h(N * n), q(Q * n), mean(n);
    for (std::size_t m = 0; m < N; ++m) {
      for (std::size_t i = 0; i < n; ++i) h[m * n + i] = e.members[m].total(i, p) / to;
    }
    for (std::size_t k = 0; k < Q; ++k) {
      for (std::size_t i = 0; i < n; ++i) q[k * n + i] = e.percentiles.value(i, p, k) / to;
    }
    for (std::size_t i = 0; i < n; ++i) mean[i] = e.percentiles.mean(i, p) / to;
    ok(nc_put_var_double(nc, v_hour[p], h.data()), "hour means");
    ok(nc_put_var_double(nc, v_pct[p], q.data()), "percentiles");
    ok(nc_put_var_double(nc, v_mean[p], mean.data()), "member mean");
  }
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
