#include "lidbox/met/netcdf_met.hpp"

#include <netcdf.h>

#include <algorithm>
#include <cctype>
#include <cmath>
#include <functional>
#include <limits>
#include <numbers>
#include <set>

#include "lidbox/base/cf_time.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/base/units.hpp"
#include "met/netcdf_file.hpp"
#include "met/netcdf_layout.hpp"
#include "met/netcdf_time_axis.hpp"

namespace lidbox {
namespace {

using netcdf::cell_mean;
using netcdf::CellValues;
using netcdf::File;
using netcdf::Hourly;
using netcdf::is_coordinate;
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

// ---------------------------------------------------------------------------------------------
// Roles.

struct Role {
  std::string key;          // role name in NetcdfMetOptions::variables
  std::string description;  // for messages
  std::string standard_name;
  std::vector<std::string> aliases;  // common short names, only for "did you mean"
};

const std::vector<Role>& roles() {
  static const std::vector<Role> r = {
      {"mixing_height",
       "the mixing height",
       "atmosphere_boundary_layer_thickness",
       {"blh", "pblh", "hpbl", "mixing_height", "mlh", "zi", "boundary_layer_height"}},
      {"eastward_wind", "the eastward wind", "eastward_wind", {"u", "u10", "uwnd", "ua", "uas"}},
      {"northward_wind", "the northward wind", "northward_wind", {"v", "v10", "vwnd", "va", "vas"}},
      {"wind_speed", "the wind speed", "wind_speed", {"ws", "wspd", "ff", "si10", "sfcwind"}},
      {"wind_from_direction",
       "the wind direction",
       "wind_from_direction",
       {"wd", "wdir", "dd", "wind_dir", "wind_direction"}},
      {"air_temperature", "the air temperature", "air_temperature", {"t2m", "t", "temp", "tas"}},
      {"surface_pressure",
       "the surface pressure",
       "surface_air_pressure",
       {"sp", "ps", "pres", "psfc", "surface_pressure"}},
  };
  return r;
}

const Role& role(const std::string& key) {
  for (const auto& r : roles()) {
    if (r.key == key) return r;
  }
  throw InternalError("unknown role " + key);
}

// The variable closest to what was sought, among data variables (not coordinates); "" if none is
// near enough to be a useful hint.
std::string closest(const File& f, const std::vector<std::string>& probes, bool skip_taken) {
  // With skip_taken, variables that already carry the standard name of another role are not
  // candidates (a role looked up by standard name).
  std::set<std::string> taken;
  for (const auto& r : roles()) taken.insert(r.standard_name);
  for (const auto& [k, names] : concentration_standard_names())
    taken.insert(names.begin(), names.end());
  std::set<std::string> sought;
  for (const auto& p : probes) sought.insert(lower(p));
  std::string best;
  std::size_t best_score = std::numeric_limits<std::size_t>::max();
  for (const auto& v : f.vars()) {
    if (is_coordinate(f, v)) continue;
    const std::string sn = lower(f.standard_name(v));
    if (skip_taken && taken.count(sn) && !sought.count(sn)) continue;
    std::vector<std::string> names = {lower(v.name)};
    if (!sn.empty()) names.push_back(sn);
    for (const auto& probe : sought) {
      for (const auto& n : names) {
        std::size_t score = std::numeric_limits<std::size_t>::max();
        if (n == probe) {
          score = 0;
        } else if (probe.size() >= 3 && n.rfind(probe, 0) == 0 &&
                   !std::isalpha(static_cast<unsigned char>(n[probe.size()]))) {
          score = 1;  // "pblh_m", "blh2" for "pblh", "blh"
        } else {
          const std::size_t d = edit_distance(probe, n);
          if (d <= std::max<std::size_t>(1, probe.size() / 3)) score = 1 + d;
        }
        if (score < best_score) {
          best_score = score;
          best = v.name;
        }
      }
    }
  }
  return best;
}

std::string present_and_hint(const File& f, const std::vector<std::string>& probes,
                             bool skip_taken = false) {
  std::string s = " among the variables present: " + join(f.var_names());
  const std::string hint = closest(f, probes, skip_taken);
  if (!hint.empty()) s += "; did you mean " + quoted(hint) + "?";
  return s;
}

// Variables whose standard_name is `sn` (case-insensitive), coordinates excluded.
std::vector<const Var*> by_standard_name(const File& f, const std::string& sn) {
  std::vector<const Var*> r;
  for (const auto& v : f.vars()) {
    if (lower(f.standard_name(v)) == lower(sn)) r.push_back(&v);
  }
  return r;
}

// The variable for a role: mapped name first, then the standard name. nullptr when absent and
// not required.
const Var* find_role(const File& f, const NetcdfMetOptions& opt, const Role& r, bool required) {
  if (auto it = opt.variables.find(r.key); it != opt.variables.end()) {
    if (const Var* v = f.find(it->second)) return v;
    std::vector<std::string> probes = {it->second};
    throw InputError(f.path(),
                     "variable " + quoted(it->second) + " (mapped to " + r.description +
                         ") not found" + present_and_hint(f, probes),
                     "one of the variables present");
  }
  const auto found = by_standard_name(f, r.standard_name);
  if (found.size() > 1) {
    std::vector<std::string> names;
    for (const auto* v : found) names.push_back(v->name);
    throw InputError(f.path(),
                     "several variables with standard_name " + quoted(r.standard_name) + " (" +
                         join(names) + ")",
                     "one, or the role " + quoted(r.key) + " mapped to a variable name");
  }
  if (found.size() == 1) return found[0];
  if (!required) return nullptr;
  std::vector<std::string> probes = {r.standard_name, r.key};
  probes.insert(probes.end(), r.aliases.begin(), r.aliases.end());
  throw InputError(f.path(),
                   "no variable for " + r.description + " (standard_name " +
                       quoted(r.standard_name) + ")" + present_and_hint(f, probes, true),
                   "a variable with that standard_name, or the role " + quoted(r.key) +
                       " mapped to a variable name");
}

// ---------------------------------------------------------------------------------------------

struct Loaded {
  const Var* var = nullptr;
  CellValues values;
  Selection sel;
  TimeAxis axis;
};

Loaded load(const File& f, const Var& v, const NetcdfMetOptions& opt, const Var* mapped_time,
            const std::function<UnitConversion(const std::string&)>& convert, bool bounds_start) {
  Loaded l;
  l.var = &v;
  l.sel = select_layout(f, v, opt, mapped_time);
  l.values = read_cells(f, v, l.sel, convert);
  l.axis = read_time_axis(f, l.sel.time_dim, mapped_time, bounds_start);
  return l;
}

std::function<UnitConversion(const std::string&)> converter_to(const File& f, const Var& v,
                                                               std::string to,
                                                               std::string quantity) {
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

std::function<UnitConversion(const std::string&)> concentration_converter(
    const File& f, const Var& v, const ConcentrationTarget& c) {
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
    for (const auto& role : roles()) v.push_back(role.key);
    v.emplace_back("time");
    return v;
  }();
  return r;
}

MetSeries read_met_netcdf(const std::string& path, const NetcdfMetOptions& opt,
                          NetcdfReadInfo* info) {
  const File f(path, opt.display_name);
  refuse_ragged(f);
  const auto& known = netcdf_met_roles();
  for (const auto& [r, name] : opt.variables) {
    if (std::find(known.begin(), known.end(), r) == known.end()) {
      std::string hint;
      std::size_t best = 3;  // suggest only within two edits
      for (const auto& k : known) {
        const std::size_t d = edit_distance(r, k);
        if (d < best) {
          best = d;
          hint = "; did you mean " + quoted(k) + "?";
        }
      }
      throw InputError(f.path(), "unknown variable role " + quoted(r) + hint,
                       "one of " + join(known));
    }
  }
  const Var* mapped_time = nullptr;
  if (auto it = opt.variables.find("time"); it != opt.variables.end()) {
    mapped_time = f.find(it->second);
    if (!mapped_time) {
      throw InputError(f.path(),
                       "variable " + quoted(it->second) + " (mapped to the time) not found" +
                           present_and_hint(f, {it->second}),
                       "one of the variables present");
    }
  }
  const Var* h = find_role(f, opt, role("mixing_height"), true);
  // Components unless the caller mapped only the speed/direction form.
  const auto mapped = [&](const char* r) { return opt.variables.count(r) > 0; };
  const bool speed_form = (mapped("wind_speed") || mapped("wind_from_direction")) &&
                          !mapped("eastward_wind") && !mapped("northward_wind");
  const Var* u = speed_form ? nullptr : find_role(f, opt, role("eastward_wind"), false);
  const Var* v = speed_form ? nullptr : find_role(f, opt, role("northward_wind"), false);
  const Var* ws = nullptr;
  const Var* wd = nullptr;
  if (!u || !v) {
    ws = find_role(f, opt, role("wind_speed"), false);
    wd = find_role(f, opt, role("wind_from_direction"), false);
    if (!ws || !wd) {
      // Name what is missing from the more complete of the two forms.
      if (u || v) find_role(f, opt, role(u ? "northward_wind" : "eastward_wind"), true);
      find_role(f, opt, role(ws ? "wind_from_direction" : "wind_speed"), true);
    }
  }
  const Var* ta = find_role(f, opt, role("air_temperature"), false);
  const Var* ps = find_role(f, opt, role("surface_pressure"), false);

  std::vector<Loaded> loaded;
  loaded.push_back(load(f, *h, opt, mapped_time, converter_to(f, *h, "m", "length"), false));
  std::vector<double> col_u, col_v;
  const auto mean = [](const Loaded& l) { return cell_mean(l.values.cells, l.values.weights); };
  if (u && v) {
    loaded.push_back(load(f, *u, opt, mapped_time, converter_to(f, *u, "m/s", "speed"), false));
    loaded.push_back(load(f, *v, opt, mapped_time, converter_to(f, *v, "m/s", "speed"), false));
    col_u = mean(loaded[1]);
    col_v = mean(loaded[2]);
  } else {
    const std::string wd_where = f.where(*wd);
    loaded.push_back(load(f, *ws, opt, mapped_time, converter_to(f, *ws, "m/s", "speed"), false));
    loaded.push_back(load(
        f, *wd, opt, mapped_time,
        [wd_where](const std::string& from) { return direction_unit_to_degrees(from, wd_where); },
        false));
    // Per cell to components, then averaged (a footprint mean of directions would be wrong).
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
    col_u = cell_mean(cu, sp.weights);
    col_v = cell_mean(cvv, sp.weights);
  }
  std::vector<std::vector<double>> cols = {mean(loaded[0]), col_u, col_v};
  int ta_col = -1, ps_col = -1;
  if (ta) {
    loaded.push_back(
        load(f, *ta, opt, mapped_time, converter_to(f, *ta, "K", "temperature"), false));
    ta_col = static_cast<int>(cols.size());
    cols.push_back(mean(loaded.back()));
  }
  if (ps) {
    loaded.push_back(load(f, *ps, opt, mapped_time, converter_to(f, *ps, "Pa", "pressure"), false));
    ps_col = static_cast<int>(cols.size());
    cols.push_back(mean(loaded.back()));
  }
  std::vector<MetColumn> extra;
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
    std::function<UnitConversion(const std::string&)> conv;
    if (auto target = concentration_target(f.standard_name(*ev))) {
      unit = target->unit;
      conv = concentration_converter(f, *ev, *target);
    } else {
      unit = f.text_att(ev->id, "units").value_or("");
      conv = [](const std::string&) { return UnitConversion{}; };
    }
    loaded.push_back(load(f, *ev, opt, mapped_time, conv, false));
    cols.push_back(mean(loaded.back()));
    extra.push_back({column, unit, {}});
  }
  for (std::size_t i = 1; i < loaded.size(); ++i) {
    if (loaded[0].axis.t != loaded[i].axis.t) {
      throw InputError(f.where(*loaded[i].var),
                       "a time axis different from that of " + quoted(loaded[0].var->name),
                       "all met variables on one time axis");
    }
  }
  Hourly hr = to_hourly(f, loaded[0].axis, cols, opt.sub_hourly, opt.coarse);
  MetSeries m;
  m.source = f.path();
  m.first_stamp_utc = hr.first;
  m.mixing_height_m = std::move(hr.columns[0]);
  m.wind_u_m_s = std::move(hr.columns[1]);
  m.wind_v_m_s = std::move(hr.columns[2]);
  if (ta_col >= 0) m.air_temperature_K = std::move(hr.columns[static_cast<std::size_t>(ta_col)]);
  if (ps_col >= 0) m.surface_pressure_Pa = std::move(hr.columns[static_cast<std::size_t>(ps_col)]);
  const std::size_t first_extra = cols.size() - extra.size();
  for (std::size_t e = 0; e < extra.size(); ++e) {
    extra[e].values = std::move(hr.columns[first_extra + e]);
  }
  m.extra = std::move(extra);
  m.filled.assign(m.size(), 0);
  m.source_line = hr.record;
  if (info) {
    info->role_variable.clear();
    info->role_variable["mixing_height"] = h->name;
    if (u && v) {
      info->role_variable["eastward_wind"] = u->name;
      info->role_variable["northward_wind"] = v->name;
    } else {
      info->role_variable["wind_speed"] = ws->name;
      info->role_variable["wind_from_direction"] = wd->name;
    }
    if (ta) info->role_variable["air_temperature"] = ta->name;
    if (ps) info->role_variable["surface_pressure"] = ps->name;
    info->role_variable["time"] = loaded[0].axis.variable;
    info->layout = loaded[0].sel.layout;
    info->time_step = hr.rule;
    info->records = loaded[0].axis.t.size();
    info->time_bounds_label = loaded[0].axis.bounds_label;
  }
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
    std::function<UnitConversion(const std::string&)> conv = [](const std::string&) {
      return UnitConversion{};
    };
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
