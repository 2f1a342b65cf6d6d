#include "met/netcdf_roles.hpp"

#include <algorithm>
#include <cctype>
#include <limits>
#include <set>

#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"

namespace lidbox::netcdf {
namespace {

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

}  // namespace

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

std::string present_and_hint(const File& f, const std::vector<std::string>& probes,
                             bool skip_taken) {
  std::string s = " among the variables present: " + join(f.var_names());
  const std::string hint = closest(f, probes, skip_taken);
  if (!hint.empty()) s += "; did you mean " + quoted(hint) + "?";
  return s;
}

std::vector<const Var*> by_standard_name(const File& f, const std::string& sn) {
  std::vector<const Var*> r;
  for (const auto& v : f.vars()) {
    if (lower(f.standard_name(v)) == lower(sn)) r.push_back(&v);
  }
  return r;
}

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

void check_role_names(const File& f, const NetcdfMetOptions& opt) {
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
}

const Var* mapped_time_variable(const File& f, const NetcdfMetOptions& opt) {
  const auto it = opt.variables.find("time");
  if (it == opt.variables.end()) return nullptr;
  const Var* t = f.find(it->second);
  if (!t) {
    throw InputError(f.path(),
                     "variable " + quoted(it->second) + " (mapped to the time) not found" +
                         present_and_hint(f, {it->second}),
                     "one of the variables present");
  }
  return t;
}

MetVariables find_met_variables(const File& f, const NetcdfMetOptions& opt) {
  MetVariables mv;
  mv.mixing_height = find_role(f, opt, role("mixing_height"), true);
  const auto mapped = [&](const char* r) { return opt.variables.count(r) > 0; };
  const bool speed_form = (mapped("wind_speed") || mapped("wind_from_direction")) &&
                          !mapped("eastward_wind") && !mapped("northward_wind");
  const Var* u = speed_form ? nullptr : find_role(f, opt, role("eastward_wind"), false);
  const Var* v = speed_form ? nullptr : find_role(f, opt, role("northward_wind"), false);
  if (u && v) {
    mv.eastward_wind = u;
    mv.northward_wind = v;
  } else {
    const Var* ws = find_role(f, opt, role("wind_speed"), false);
    const Var* wd = find_role(f, opt, role("wind_from_direction"), false);
    if (!ws || !wd) {
      // Name what is missing from the more complete of the two forms.
      if (u || v) find_role(f, opt, role(u ? "northward_wind" : "eastward_wind"), true);
      find_role(f, opt, role(ws ? "wind_from_direction" : "wind_speed"), true);
    }
    mv.wind_speed = ws;
    mv.wind_from_direction = wd;
  }
  mv.air_temperature = find_role(f, opt, role("air_temperature"), false);
  mv.surface_pressure = find_role(f, opt, role("surface_pressure"), false);
  return mv;
}

}  // namespace lidbox::netcdf
