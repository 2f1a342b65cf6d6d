#include "lidbox/met/netcdf_met.hpp"

#include <cmath>
#include <functional>
#include <limits>
#include <map>
#include <optional>
#include <utility>

#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/base/units.hpp"
#include "met/netcdf_file.hpp"
#include "met/netcdf_layout.hpp"
#include "met/netcdf_roles.hpp"
#include "met/netcdf_time_axis.hpp"

// The reader composes four private concepts of src/met: netcdf_file (access and unpacking),
// netcdf_roles (which variable is what), netcdf_layout (which cells) and netcdf_time_axis
// (which hours).

namespace lidbox {
namespace {

using netcdf::by_standard_name;
using netcdf::cell_mean;
using netcdf::CellValues;
using netcdf::File;
using netcdf::Hourly;
using netcdf::MetVariables;
using netcdf::present_and_hint;
using netcdf::quoted;
using netcdf::read_cells;
using netcdf::read_time_axis;
using netcdf::refuse_ragged;
using netcdf::select_layout;
using netcdf::Selection;
using netcdf::TimeAxis;
using netcdf::to_hourly;
using netcdf::Var;

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

using Converter = std::function<UnitConversion(const std::string&)>;

struct Loaded {
  const Var* var = nullptr;
  CellValues values;
  Selection sel;
  TimeAxis axis;
};

Loaded load(const File& f, const Var& v, const NetcdfMetOptions& opt, const Var* mapped_time,
            const Converter& convert, bool bounds_start) {
  Loaded l;
  l.var = &v;
  l.sel = select_layout(f, v, opt, mapped_time);
  l.values = read_cells(f, v, l.sel, convert);
  l.axis = read_time_axis(f, l.sel.time_dim, mapped_time, bounds_start);
  return l;
}

Converter converter_to(const File& f, const Var& v, std::string to, std::string quantity) {
  const std::string where = f.where(v);
  return [where, to, quantity](const std::string& from) {
    return unit_conversion(from, to, quantity, where);
  };
}

struct ConcentrationTarget {
  std::string key;
  std::string unit;  // "ug m-3" or "ppb"
  bool mole_fraction = false;
};

std::optional<ConcentrationTarget> concentration_target(const std::string& standard_name) {
  const std::string sn = lower(standard_name);
  for (const auto& [key, names] : concentration_standard_names()) {
    for (const auto& n : names) {
      if (n == sn) {
        const bool mf = sn.rfind("mole_fraction", 0) == 0;
        return ConcentrationTarget{key, mf ? "ppb" : "ug m-3", mf};
      }
    }
  }
  return std::nullopt;
}

Converter concentration_converter(const File& f, const Var& v, const ConcentrationTarget& c) {
  const std::string where = f.where(v);
  if (!c.mole_fraction) {
    return [where](const std::string& from) {
      return unit_conversion(from, "ug m-3", "mass concentration", where);
    };
  }
  return [where](const std::string& from) {
    // UDUNITS has no ppb; mole fractions are plain numbers (CF canonical unit "1").
    std::string u = lower(from);
    static const std::map<std::string, std::string> ratio = {{"ppm", "1e-6"},  {"ppmv", "1e-6"},
                                                             {"ppb", "1e-9"},  {"ppbv", "1e-9"},
                                                             {"ppt", "1e-12"}, {"pptv", "1e-12"}};
    if (auto it = ratio.find(u); it != ratio.end()) u = it->second;
    return unit_conversion(u, "1e-9", "mole fraction", where);
  };
}

// The met columns as read, before resampling: the mixing height, u and v, then the optional
// temperature and pressure, then the extra columns, one value per time record each.
struct MetColumns {
  std::vector<Loaded> loaded;  // one per variable read, the mixing height first
  std::vector<std::vector<double>> cols;
  int ta_col = -1, ps_col = -1;
  std::vector<MetColumn> extra;  // name and unit; values after resampling
};

// Wind as u and v, read as such or from speed and direction. Speed and direction become
// components per cell before the cell mean (a footprint mean of directions would be wrong).
void load_wind(const File& f, const NetcdfMetOptions& opt, const Var* mapped_time,
               const MetVariables& mv, MetColumns& mc) {
  auto& loaded = mc.loaded;
  const auto mean = [](const Loaded& l) { return cell_mean(l.values.cells, l.values.weights); };
  if (mv.components()) {
    const Var& u = *mv.eastward_wind;
    const Var& v = *mv.northward_wind;
    loaded.push_back(load(f, u, opt, mapped_time, converter_to(f, u, "m/s", "speed"), false));
    loaded.push_back(load(f, v, opt, mapped_time, converter_to(f, v, "m/s", "speed"), false));
    mc.cols.push_back(mean(loaded[1]));
    mc.cols.push_back(mean(loaded[2]));
    return;
  }
  const Var& ws = *mv.wind_speed;
  const Var& wd = *mv.wind_from_direction;
  const std::string wd_where = f.where(wd);
  loaded.push_back(load(f, ws, opt, mapped_time, converter_to(f, ws, "m/s", "speed"), false));
  loaded.push_back(load(
      f, wd, opt, mapped_time,
      [wd_where](const std::string& from) { return direction_unit_to_degrees(from, wd_where); },
      false));
  const auto& sp = loaded[1].values;
  const auto& dir = loaded[2].values;
  std::vector<std::vector<double>> cu = sp.cells, cvv = sp.cells;
  for (std::size_t c = 0; c < sp.cells.size(); ++c) {
    for (std::size_t r = 0; r < sp.cells[c].size(); ++r) {
      const double s = sp.cells[c][r], d = dir.cells[c][r];
      if (std::isnan(s) || std::isnan(d)) {
        cu[c][r] = cvv[c][r] = kNaN;
      } else {
        wind_components(s, d, cu[c][r], cvv[c][r]);
      }
    }
  }
  mc.cols.push_back(cell_mean(cu, sp.weights));
  mc.cols.push_back(cell_mean(cvv, sp.weights));
}

// Each extra column by variable name, else by a unique standard_name; a known concentration is
// converted to "ug m-3" or "ppb", anything else keeps its unit.
void load_extra(const File& f, const NetcdfMetOptions& opt, const Var* mapped_time,
                MetColumns& mc) {
  for (const auto& [column, wanted] : opt.extra) {
    const Var* ev = f.find(wanted);
    if (!ev) {
      const auto found = by_standard_name(f, wanted);
      if (found.size() == 1) ev = found[0];
      if (found.size() > 1) {
        throw InputError(f.path(),
                         "several variables with standard_name " + quoted(wanted) + " for column " +
                             quoted(column),
                         "one, or the variable named");
      }
    }
    if (!ev) {
      throw InputError(f.path(),
                       "no variable or standard_name " + quoted(wanted) + " for column " +
                           quoted(column) + present_and_hint(f, {wanted}),
                       "a variable name or a CF standard_name present in the file");
    }
    std::string unit;
    Converter conv;
    if (auto target = concentration_target(f.standard_name(*ev))) {
      unit = target->unit;
      conv = concentration_converter(f, *ev, *target);
    } else {
      unit = f.text_att(ev->id, "units").value_or("");
      conv = [](const std::string&) { return UnitConversion{}; };
    }
    mc.loaded.push_back(load(f, *ev, opt, mapped_time, conv, false));
    mc.cols.push_back(cell_mean(mc.loaded.back().values.cells, mc.loaded.back().values.weights));
    mc.extra.push_back({column, unit, {}});
  }
}

MetColumns load_met_columns(const File& f, const NetcdfMetOptions& opt, const Var* mapped_time,
                            const MetVariables& mv) {
  MetColumns mc;
  const auto mean = [](const Loaded& l) { return cell_mean(l.values.cells, l.values.weights); };
  const Var& h = *mv.mixing_height;
  mc.loaded.push_back(load(f, h, opt, mapped_time, converter_to(f, h, "m", "length"), false));
  mc.cols.push_back(mean(mc.loaded[0]));
  load_wind(f, opt, mapped_time, mv, mc);
  if (const Var* ta = mv.air_temperature) {
    mc.loaded.push_back(
        load(f, *ta, opt, mapped_time, converter_to(f, *ta, "K", "temperature"), false));
    mc.ta_col = static_cast<int>(mc.cols.size());
    mc.cols.push_back(mean(mc.loaded.back()));
  }
  if (const Var* ps = mv.surface_pressure) {
    mc.loaded.push_back(
        load(f, *ps, opt, mapped_time, converter_to(f, *ps, "Pa", "pressure"), false));
    mc.ps_col = static_cast<int>(mc.cols.size());
    mc.cols.push_back(mean(mc.loaded.back()));
  }
  load_extra(f, opt, mapped_time, mc);
  return mc;
}

// Each value of a variable as read, per cell and record, against its range: the message names the
// variable, the record (1-based) and its time.
void check_plausible(const File& f, const Loaded& l, std::string_view key,
                     const PlausibilityLimits& limits, bool magnitude = false) {
  for (std::size_t c = 0; c < l.values.cells.size(); ++c) {
    const auto& cell = l.values.cells[c];
    for (std::size_t r = 0; r < cell.size(); ++r) {
      const double x = magnitude ? std::fabs(cell[r]) : cell[r];
      if (std::isnan(x)) continue;
      const PlausibleRange& range = limits.range(key);
      if (x >= range.min && x <= range.max) continue;
      std::string where = f.where(*l.var) + ": record " + std::to_string(r + 1);
      if (r < l.axis.t.size()) where += " (" + format_utc(l.axis.t[r]) + ")";
      if (l.values.cells.size() > 1) where += ", cell " + std::to_string(c + 1);
      limits.check(key, x, where);
    }
  }
}

// Which range each loaded variable answers to; the extra columns have none of their own.
void check_met_plausible(const File& f, const MetColumns& mc, const MetVariables& mv,
                         const PlausibilityLimits& limits) {
  check_plausible(f, mc.loaded[0], "mixing_height", limits);
  if (mv.components()) {
    // A component is at most the speed.
    check_plausible(f, mc.loaded[1], "wind_speed", limits, true);
    check_plausible(f, mc.loaded[2], "wind_speed", limits, true);
  } else {
    check_plausible(f, mc.loaded[1], "wind_speed", limits);
    check_plausible(f, mc.loaded[2], "wind_from", limits);
  }
  std::size_t next = 3;
  if (mv.air_temperature) check_plausible(f, mc.loaded[next++], "air_temperature", limits);
  if (mv.surface_pressure) check_plausible(f, mc.loaded[next++], "surface_pressure", limits);
}

// A variable whose every value is missing would reach the gap rule as "missing values at the
// start of the series", naming no variable.
void refuse_all_missing(const File& f, const std::vector<Loaded>& loaded) {
  for (const Loaded& l : loaded) {
    bool any = false;
    for (const auto& cell : l.values.cells) {
      for (double x : cell) any = any || !std::isnan(x);
    }
    if (!any) {
      throw InputError(f.where(*l.var),
                       "every value is missing (_FillValue, missing_value or outside valid_range)",
                       "valid values in the cells and hours read");
    }
  }
}

void check_one_time_axis(const File& f, const std::vector<Loaded>& loaded) {
  for (std::size_t i = 1; i < loaded.size(); ++i) {
    if (loaded[0].axis.t != loaded[i].axis.t) {
      throw InputError(f.where(*loaded[i].var),
                       "a time axis different from that of " + quoted(loaded[0].var->name),
                       "all met variables on one time axis");
    }
  }
}

MetSeries met_series(const File& f, MetColumns& mc, Hourly& hr) {
  MetSeries m;
  m.source = f.path();
  m.first_stamp_utc = hr.first;
  m.mixing_height_m = std::move(hr.columns[0]);
  m.wind_u_m_s = std::move(hr.columns[1]);
  m.wind_v_m_s = std::move(hr.columns[2]);
  if (mc.ta_col >= 0) {
    m.air_temperature_K = std::move(hr.columns[static_cast<std::size_t>(mc.ta_col)]);
  }
  if (mc.ps_col >= 0) {
    m.surface_pressure_Pa = std::move(hr.columns[static_cast<std::size_t>(mc.ps_col)]);
  }
  const std::size_t first_extra = mc.cols.size() - mc.extra.size();
  for (std::size_t e = 0; e < mc.extra.size(); ++e) {
    mc.extra[e].values = std::move(hr.columns[first_extra + e]);
  }
  m.extra = std::move(mc.extra);
  m.filled.assign(m.size(), 0);
  m.source_line = hr.record;
  return m;
}

void fill_info(const MetVariables& mv, const Loaded& first, const Hourly& hr,
               NetcdfReadInfo& info) {
  info.role_variable.clear();
  info.role_variable["mixing_height"] = mv.mixing_height->name;
  if (mv.components()) {
    info.role_variable["eastward_wind"] = mv.eastward_wind->name;
    info.role_variable["northward_wind"] = mv.northward_wind->name;
  } else {
    info.role_variable["wind_speed"] = mv.wind_speed->name;
    info.role_variable["wind_from_direction"] = mv.wind_from_direction->name;
  }
  if (mv.air_temperature) info.role_variable["air_temperature"] = mv.air_temperature->name;
  if (mv.surface_pressure) info.role_variable["surface_pressure"] = mv.surface_pressure->name;
  info.role_variable["time"] = first.axis.variable;
  info.layout = first.sel.layout;
  info.time_step = hr.rule;
  info.records = first.axis.t.size();
  info.time_bounds_label = first.axis.bounds_label;
}

}  // namespace

const std::map<std::string, std::vector<std::string>>& concentration_standard_names() {
  static const std::map<std::string, std::vector<std::string>> m = {
      {"pm2p5",
       {"mass_concentration_of_pm2p5_ambient_aerosol_particles_in_air",
        "mass_concentration_of_pm2p5_ambient_aerosol_in_air"}},
      {"pm10",
       {"mass_concentration_of_pm10_ambient_aerosol_particles_in_air",
        "mass_concentration_of_pm10_ambient_aerosol_in_air"}},
      {"co",
       {"mass_concentration_of_carbon_monoxide_in_air", "mole_fraction_of_carbon_monoxide_in_air"}},
      {"no2",
       {"mass_concentration_of_nitrogen_dioxide_in_air",
        "mole_fraction_of_nitrogen_dioxide_in_air"}},
      {"o3", {"mass_concentration_of_ozone_in_air", "mole_fraction_of_ozone_in_air"}},
      {"so2",
       {"mass_concentration_of_sulfur_dioxide_in_air", "mole_fraction_of_sulfur_dioxide_in_air"}},
  };
  return m;
}

SubHourlyRule parse_sub_hourly_rule(std::string_view text, std::string_view where) {
  if (text == "hour_mean") return SubHourlyRule::hour_mean;
  if (text == "on_the_hour") return SubHourlyRule::on_the_hour;
  if (text == "refuse") return SubHourlyRule::refuse;
  throw InputError(std::string(where), "sub-hourly rule " + quoted(std::string(text)),
                   "hour_mean, on_the_hour or refuse");
}

CoarseStepRule parse_coarse_step_rule(std::string_view text, std::string_view where) {
  if (text == "refuse") return CoarseStepRule::refuse;
  if (text == "linear") return CoarseStepRule::linear;
  throw InputError(std::string(where), "coarse-step rule " + quoted(std::string(text)),
                   "refuse or linear");
}

const std::vector<std::string>& netcdf_met_roles() {
  static const std::vector<std::string> r = [] {
    std::vector<std::string> v;
    for (const auto& role : netcdf::roles()) v.push_back(role.key);
    v.emplace_back("time");
    return v;
  }();
  return r;
}

MetSeries read_met_netcdf(const std::string& path, const NetcdfMetOptions& opt,
                          NetcdfReadInfo* info) {
  const File f(path, opt.display_name);
  refuse_ragged(f);
  netcdf::check_role_names(f, opt);
  const Var* mapped_time = netcdf::mapped_time_variable(f, opt);
  const MetVariables mv = netcdf::find_met_variables(f, opt);
  MetColumns mc = load_met_columns(f, opt, mapped_time, mv);
  refuse_all_missing(f, mc.loaded);
  check_met_plausible(f, mc, mv, opt.limits);
  check_one_time_axis(f, mc.loaded);
  Hourly hr = to_hourly(f, mc.loaded[0].axis, mc.cols, opt.sub_hourly, opt.coarse);
  MetSeries m = met_series(f, mc, hr);
  if (info) fill_info(mv, mc.loaded[0], hr, *info);
  return m;
}

std::vector<std::pair<std::string, HourlySeries>> read_concentrations_netcdf(
    const std::string& path, const NetcdfMetOptions& opt,
    const std::vector<std::string>& variables) {
  const File f(path, opt.display_name);
  refuse_ragged(f);
  std::vector<std::pair<std::string, const Var*>> chosen;
  if (!variables.empty()) {
    for (const auto& name : variables) {
      const Var* v = f.find(name);
      if (!v) {
        throw InputError(f.path(),
                         "variable " + quoted(name) + " not found" + present_and_hint(f, {name}),
                         "one of the variables present");
      }
      chosen.emplace_back(name, v);
    }
  } else {
    for (const auto& v : f.vars()) {
      if (auto t = concentration_target(f.standard_name(v))) chosen.emplace_back(t->key, &v);
    }
    if (chosen.empty()) {
      std::vector<std::string> probes;
      for (const auto& [k, names] : concentration_standard_names()) probes.push_back(names[0]);
      throw InputError(f.path(),
                       "no concentration variable (CF standard_name "
                       "mass_concentration_of_..._in_air or mole_fraction_of_..._in_air)" +
                           present_and_hint(f, probes),
                       "a variable with a concentration standard_name, or the variables named");
    }
  }
  const Var* mapped_time = nullptr;
  if (auto it = opt.variables.find("time"); it != opt.variables.end())
    mapped_time = f.find(it->second);
  std::vector<std::pair<std::string, HourlySeries>> out;
  NetcdfMetOptions series_opt = opt;
  series_opt.coarse = CoarseStepRule::refuse;
  if (series_opt.sub_hourly == SubHourlyRule::on_the_hour)
    series_opt.sub_hourly = SubHourlyRule::hour_mean;
  for (const auto& [key, v] : chosen) {
    const auto target = concentration_target(f.standard_name(*v));
    std::string unit = f.text_att(v->id, "units").value_or("");
    Converter conv = [](const std::string&) { return UnitConversion{}; };
    if (target) {
      unit = target->unit;
      conv = concentration_converter(f, *v, *target);
    }
    Loaded l = load(f, *v, opt, mapped_time, conv, true);
    Hourly hr = to_hourly(f, l.axis, {cell_mean(l.values.cells, l.values.weights)},
                          series_opt.sub_hourly, series_opt.coarse);
    HourlySeries s;
    s.first_hour_start_utc = hr.first;
    s.values = std::move(hr.columns[0]);
    s.unit = unit;
    out.emplace_back(key, std::move(s));
  }
  return out;
}

}  // namespace lidbox
