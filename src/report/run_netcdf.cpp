#include "lidbox/report/run_netcdf.hpp"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <cstdio>
#include <functional>
#include <memory>

#include "lidbox/base/error.hpp"
#include "lidbox/met/netcdf_met.hpp"

namespace lidbox {
namespace {

std::string part_name(const CaseSpec& c, std::size_t j) {
  if (j == 0) return "background";
  if (j == 1) return "initial";
  return c.sectors[j - 2].name;
}

// CF writes mixing ratios as plain numbers (canonical unit "1"); UDUNITS has no ppm.
std::string cf_unit(const std::string& canonical) {
  if (canonical == "ppm") return "1e-6";
  if (canonical == "ppb") return "1e-9";
  if (canonical == "ppt") return "1e-12";
  return canonical;
}
std::string cf_unit(const ConcentrationUnit& u) {
  return cf_unit(u.canonical);
}

std::string number(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.10g", v);
  return buf;
}

// Title, history, station and the case's global attributes.
void describe_case(CfTable& t, const CaseSpec& c, const std::string& what) {
  t.title = "lidbox " + what + ": " + c.title;
  t.history = "lidbox run " + c.file;
  t.station_name = c.name;
  t.global_attributes["case_name"] = c.name;
  t.global_attributes["case_title"] = c.title;
  t.global_attributes["case_file"] = c.file;
  t.global_attributes["time_zone"] = c.zone.spec();
  t.global_attributes["time_zone_source"] = c.zone.kind_label();
  t.global_attributes["invented"] = c.invented ? "true" : "false";
  if (c.invented) {
    t.global_attributes["comment"] =
        "INVENTED scenario: the case says its inputs are invented; nothing here describes a real "
        "place or real measurements.";
  }
}

// A table on the run's hours, described as the case.
CfTable hours_table(const CaseSpec& c, const RunResult& r, const std::string& what) {
  CfTable t;
  for (const auto& h : r.hours) t.time_utc.push_back(h.start_utc);
  t.period_s = kSecondsPerHour;
  describe_case(t, c, what);
  return t;
}

CfVariable var(std::string name, std::string standard_name, std::string long_name,
               std::string units, std::string cell_methods) {
  CfVariable v;
  v.name = std::move(name);
  v.standard_name = std::move(standard_name);
  v.long_name = std::move(long_name);
  v.units = std::move(units);
  v.cell_methods = std::move(cell_methods);
  return v;
}

CfVariable flag(std::string name, std::string long_name) {
  CfVariable v;
  v.name = std::move(name);
  v.long_name = std::move(long_name);
  v.flag_values = {0, 1};
  v.flag_meanings = "no yes";
  return v;
}

const char* kHourMean = "time: mean (interval: 1 hour)";
const char* kAtEnd = "value at the end of the hour (the upper time bound)";

}  // namespace

std::string pollutant_standard_name(const std::string& pollutant, bool mixing_ratio) {
  std::string k;
  for (char ch : pollutant) {
    if (std::isalnum(static_cast<unsigned char>(ch))) {
      k += static_cast<char>(std::tolower(static_cast<unsigned char>(ch)));
    }
  }
  if (k == "pm25") k = "pm2p5";
  const auto& names = concentration_standard_names();
  const auto it = names.find(k);
  if (it == names.end()) return "";
  for (const auto& n : it->second) {
    // The first name of each kind in the table is the current one.
    if ((n.rfind("mole_fraction", 0) == 0) == mixing_ratio) return n;
  }
  return "";
}

CfTable hourly_cf_table(const CaseSpec& c, const RunResult& r) {
  CfTable t = hours_table(c, r, "hourly results");
  const std::size_t n = r.hours.size();
  auto h = var("mixing_height", "atmosphere_boundary_layer_thickness",
               "mixing height used (after the floor)", "m", kHourMean);
  auto ws =
      var("wind_speed", "wind_speed", "wind speed used (after the floor)", "m s-1", kHourMean);
  auto wd = var("wind_from_direction", "wind_from_direction",
                "direction the mean wind vector comes from", "degree", kHourMean);
  auto vc = var("ventilation_coefficient", "",
                "ventilation coefficient (mixing height x wind speed)", "m2 s-1", kHourMean);
  auto ft = var("flushing_time", "", "flushing time of the box (1 / hour-mean flushing rate)", "h",
                kHourMean);
  auto rt = var("residual_layer_top", "", "top of the residual layer", "m", "");
  rt.comment = kAtEnd;
  auto filled = flag("met_filled", "met of the hour supplied by the gap rule");
  auto calm = flag("calm_floor_applied", "wind speed raised to the calm floor");
  auto lid = flag("lid_floor_applied", "mixing height raised to the lid floor");
  auto sub = var("substeps", "", "integration sub-steps in the hour", "1", "");
  for (const auto& x : r.hours) {
    h.values.push_back(x.mixing_height_m);
    ws.values.push_back(x.wind_speed_m_s);
    wd.values.push_back(x.wind_from_deg);
    vc.values.push_back(x.ventilation_m2_s);
    ft.values.push_back(x.flushing_time_h);
    rt.values.push_back(x.residual_top_m);
    filled.values.push_back(x.filled ? 1 : 0);
    calm.values.push_back(x.calm_floor ? 1 : 0);
    lid.values.push_back(x.lid_floor ? 1 : 0);
    sub.values.push_back(x.substeps);
  }
  for (auto* v : {&h, &ws, &wd, &vc, &ft, &rt, &filled, &calm, &lid, &sub}) {
    t.vars.push_back(std::move(*v));
  }
  for (std::size_t p = 0; p < r.n_pollutants; ++p) {
    const PollutantSpec& ps = c.pollutants[p];
    const std::string P = cf_variable_name(ps.name);
    const std::string sn = pollutant_standard_name(ps.name, ps.unit.is_mixing_ratio);
    const std::string units = cf_unit(ps.unit);
    const auto conc = [&](std::string name, std::string long_name, std::string cell_methods) {
      CfVariable v = var(std::move(name), sn, std::move(long_name), units, std::move(cell_methods));
      v.attributes["reporting_unit"] = ps.unit.canonical;
      if (ps.unit.is_mixing_ratio) {
        v.attributes["reference_conditions"] = number(ps.reference.temperature_K) + " K, " +
                                               number(ps.reference.pressure_Pa) + " Pa (" +
                                               ps.reference_label + ")";
      }
      return v;
    };
    CfVariable mean = conc(P, ps.name + ", mixed-layer hour mean", kHourMean);
    CfVariable end = conc(P + "_end_of_hour", ps.name + ", mixed layer", "");
    end.comment = kAtEnd;
    CfVariable res = conc(P + "_residual_end_of_hour", ps.name + ", residual layer", "");
    res.comment = kAtEnd;
    std::vector<CfVariable> parts;
    for (std::size_t j = 0; j < r.n_parts; ++j) {
      // A part is not the whole concentration: no standard name.
      CfVariable v = conc(P + "_part_" + cf_variable_name(part_name(c, j)),
                          ps.name + ", hour-mean part from " + part_name(c, j), kHourMean);
      v.standard_name.clear();
      parts.push_back(std::move(v));
    }
    const double k = 1.0 / ps.unit.to_g_m3;
    for (std::size_t i = 0; i < n; ++i) {
      mean.values.push_back(r.total(i, p) * k);
      end.values.push_back(r.end_mixed(i, p) * k);
      res.values.push_back(r.end_residual(i, p) * k);
      for (std::size_t j = 0; j < r.n_parts; ++j) parts[j].values.push_back(r.mean(i, p, j) * k);
    }
    t.vars.push_back(std::move(mean));
    t.vars.push_back(std::move(end));
    t.vars.push_back(std::move(res));
    for (auto& v : parts) t.vars.push_back(std::move(v));
  }
  return t;
}

namespace {

struct BudgetLine {
  const char* name;
  double BudgetTerms::*member;
  const char* long_name;
};

const BudgetLine kBudgetLines[] = {
    {"emitted", &BudgetTerms::emitted, "emitted into the mixed layer"},
    {"advected_in", &BudgetTerms::advected_in, "carried in by the wind"},
    {"advected_out", &BudgetTerms::advected_out, "carried out by the wind"},
    {"reacted", &BudgetTerms::reacted, "removed by first-order loss"},
    {"deposited", &BudgetTerms::deposited, "deposited to the surface"},
    {"entrained_from_residual", &BudgetTerms::entrained_from_residual,
     "entrained from the residual layer"},
    {"entrained_from_free_troposphere", &BudgetTerms::entrained_from_free_troposphere,
     "entrained from the free troposphere"},
    {"detrained", &BudgetTerms::detrained, "left behind above a falling lid"},
    {"residual_reacted", &BudgetTerms::residual_reacted, "removed in the residual layer"},
    {"residual_advected_in", &BudgetTerms::residual_advected_in, "carried into the residual layer"},
    {"residual_advected_out", &BudgetTerms::residual_advected_out,
     "carried out of the residual layer"},
    {"vented_aloft", &BudgetTerms::vented_aloft,
     "older residual air vented to the free troposphere when a new mixing cycle begins"},
};

}  // namespace

CfTable budget_cf_layout(const CaseSpec& c, const RunResult& r) {
  CfTable t = hours_table(c, r, "mass budget");
  t.global_attributes["footprint_area_m2"] = number(c.footprint.area_m2());
  for (std::size_t p = 0; p < r.n_pollutants; ++p) {
    const std::string P = cf_variable_name(c.pollutants[p].name);
    const std::string& name = c.pollutants[p].name;
    for (const auto& line : kBudgetLines) {
      t.vars.push_back(var(P + "_" + line.name, "",
                           name + " " + line.long_name + ", over the footprint", "g h-1",
                           kHourMean));
    }
    CfVariable mm = var(P + "_mixed_layer_mass", "", name + " mass in the mixed layer", "g", "");
    CfVariable rm =
        var(P + "_residual_layer_mass", "", name + " mass in the residual layer", "g", "");
    CfVariable cl =
        var(P + "_cumulative_closure", "",
            name + " storage change minus the sum of the lines since the start", "g", "");
    mm.comment = rm.comment = cl.comment = kAtEnd;
    t.vars.push_back(std::move(mm));
    t.vars.push_back(std::move(rm));
    t.vars.push_back(std::move(cl));
  }
  return t;
}

std::size_t budget_values_per_hour(const RunResult& r) {
  return r.n_pollutants * (std::size(kBudgetLines) + 3);
}

void budget_hour_values(const CaseSpec& c, const RunResult& r, std::size_t i,
                        const double* closure_g_m2, double* out) {
  const double A = c.footprint.area_m2();
  for (std::size_t p = 0; p < r.n_pollutants; ++p) {
    const BudgetTerms& b = r.budget_of(i, p);
    for (const auto& line : kBudgetLines) *out++ = b.*(line.member) * A;
    *out++ = r.mixed_mass(i, p) * A;
    *out++ = r.residual_mass(i, p) * A;
    *out++ = closure_g_m2[p] * A;
  }
}

CfTable budget_cf_table(const CaseSpec& c, const RunResult& r) {
  CfTable t = budget_cf_layout(c, r);
  const std::size_t n = r.hours.size();
  const std::size_t P = r.n_pollutants;
  const std::vector<double> closure = r.closure_series_g_m2(c.engine.residual_layer);
  for (auto& v : t.vars) v.values.resize(n);
  std::vector<double> row(budget_values_per_hour(r));
  for (std::size_t i = 0; i < n; ++i) {
    budget_hour_values(c, r, i, closure.data() + i * P, row.data());
    for (std::size_t k = 0; k < row.size(); ++k) t.vars[k].values[i] = row[k];
  }
  return t;
}

CfTable daily_statistics_cf_table(const CaseSpec& c, const StandardsReport& report) {
  if (report.daily.empty()) throw InternalError("a standards report without daily rows");
  // One series per (pollutant, statistic), in the order the report lists them.
  std::vector<std::pair<std::string, std::vector<const DailyStatisticsRow*>>> groups;
  for (const auto& row : report.daily) {
    const std::string key = row.pollutant + "\n" + row.statistic;
    auto it =
        std::find_if(groups.begin(), groups.end(), [&](const auto& g) { return g.first == key; });
    if (it == groups.end()) {
      groups.emplace_back(key, std::vector<const DailyStatisticsRow*>{});
      it = groups.end() - 1;
    }
    it->second.push_back(&row);
  }
  std::vector<CfDailySeries> series;
  for (const auto& [key, rows] : groups) {
    const DailyStatisticsRow& r0 = *rows.front();
    const std::string stat = r0.statistic;
    std::int64_t d0 = r0.day, d1 = r0.day;
    for (const auto* r : rows) {
      d0 = std::min(d0, r->day);
      d1 = std::max(d1, r->day);
    }
    CfDailySeries s;
    s.name = cf_variable_name(r0.pollutant) + "_" + stat;
    const bool ratio = r0.unit == "ppm" || r0.unit == "ppb" || r0.unit == "ppt";
    s.standard_name = pollutant_standard_name(r0.pollutant, ratio);
    s.long_name = r0.pollutant + " " + stat + " (local standard time day)";
    s.units = cf_unit(r0.unit);
    if (stat == "daily_mean") {
      s.cell_methods = "time: mean (interval: 1 hour)";
    } else if (stat == "daily_max_1h") {
      s.cell_methods = "time: maximum (interval: 1 hour)";
    } else {
      s.cell_methods = "time: maximum";
      s.comment = "maximum over the day of running 8-hour means (" + stat + ")";
    }
    s.first_day = d0;
    const auto n = static_cast<std::size_t>(d1 - d0 + 1);
    s.values.assign(n, std::nan(""));
    s.valid_count.assign(n, 0);
    s.complete.assign(n, 0);
    s.possible_count = r0.possible_count;
    for (const auto* r : rows) {
      const auto k = static_cast<std::size_t>(r->day - d0);
      s.values[k] = r->value;
      s.valid_count[k] = r->valid_count;
      s.complete[k] = r->complete ? 1 : 0;
    }
    series.push_back(std::move(s));
  }
  CfTable t = daily_cf_table(series, report.options.lst_offset_s);
  describe_case(t, c, "daily statistics");
  return t;
}

std::vector<CfTable> running_means_cf_tables(const CaseSpec& c, const StandardsReport& report) {
  // One table per window and minimum (rolling_8h_min6.nc), rows = windows (time = window start,
  // bounds = the window); variables named by window and minimum too (CO_mean_8h_min6), so two
  // requests of one length never share a name.
  std::vector<CfTable> tables;
  for (const RollingRequest& q : report.options.rolling) {
    const int k = q.window_h;
    const std::string tag = q.name();
    CfTable t;
    t.period_s = static_cast<UtcSeconds>(k) * kSecondsPerHour;
    describe_case(t, c,
                  std::to_string(k) + "-hour running means, at least " +
                      std::to_string(q.min_valid_h) + " hours present");
    for (const auto& rt : report.rolling) {
      if (rt.means.window_h != k || rt.means.min_valid_h != q.min_valid_h) continue;
      if (t.time_utc.empty()) {
        for (std::size_t i = 0; i < rt.means.size(); ++i)
          t.time_utc.push_back(rt.means.window_start_utc(i));
      }
      const bool ratio = rt.unit == "ppm" || rt.unit == "ppb" || rt.unit == "ppt";
      const std::string P = cf_variable_name(rt.pollutant);
      CfVariable m = var(P + "_mean_" + tag, pollutant_standard_name(rt.pollutant, ratio),
                         rt.pollutant + " " + std::to_string(k) +
                             "-hour running mean (divided by the hours present)",
                         cf_unit(rt.unit), "time: mean (interval: 1 hour)");
      m.comment = "window [time_bnds); missing where fewer than " +
                  std::to_string(rt.means.min_valid_h) + " of its " + std::to_string(k) +
                  " hours are present";
      if (ratio) m.attributes["reporting_unit"] = rt.unit;
      CfVariable v = var(P + "_valid_hours_" + std::to_string(k) + "h", "",
                         rt.pollutant + " hours present in the window", "1", "");
      for (std::size_t i = 0; i < rt.means.size(); ++i) {
        m.values.push_back(rt.means.mean[i]);
        v.values.push_back(rt.means.valid_h[i]);
      }
      t.vars.push_back(std::move(m));
      t.vars.push_back(std::move(v));
    }
    tables.push_back(std::move(t));
  }
  return tables;
}

namespace {

// The run's NetCDF files by name, each table built only when its file is written.
std::vector<std::pair<std::string, std::function<CfTable()>>> run_netcdf_tables(
    const CaseSpec& c, const RunResult& r, const StandardsReport* standards) {
  std::vector<std::pair<std::string, std::function<CfTable()>>> out;
  out.emplace_back("hourly.nc", [&c, &r] { return hourly_cf_table(c, r); });
  if (!r.budget_streamed) out.emplace_back("budget.nc", [&c, &r] { return budget_cf_table(c, r); });
  if (standards && !standards->daily.empty()) {
    out.emplace_back("daily.nc",
                     [&c, standards] { return daily_statistics_cf_table(c, *standards); });
  }
  if (standards) {
    // One table per request, in the order of the requests (running_means_cf_tables); small
    // (one value per window), built together and handed out one by one.
    auto rolling = std::make_shared<std::vector<CfTable>>(running_means_cf_tables(c, *standards));
    for (std::size_t k = 0; k < rolling->size(); ++k) {
      out.emplace_back("rolling_" + standards->options.rolling[k].name() + ".nc",
                       [rolling, k] { return std::move((*rolling)[k]); });
    }
  }
  return out;
}

}  // namespace

std::vector<OutputFile> render_run_netcdf_outputs(const CaseSpec& c, const RunResult& r,
                                                  const StandardsReport* standards,
                                                  CfFileFormat format) {
  std::vector<OutputFile> out;
  for (const auto& [name, table] : run_netcdf_tables(c, r, standards)) {
    out.push_back({name, render_cf_timeseries(table(), format)});
  }
  return out;
}

void write_run_netcdf_outputs(OutputFolder& folder, const CaseSpec& c, const RunResult& r,
                              const StandardsReport* standards, CfFileFormat format) {
  for (const auto& [name, table] : run_netcdf_tables(c, r, standards)) {
    write_cf_file(folder.staged(name).string(), table(), format);
    folder.adopt(name);
  }
}

}  // namespace lidbox
