// Private to the NetCDF met reader: which variable of a file plays which role (mixing height,
// wind, temperature, pressure, time), by the caller's mapping or the CF standard_name, and the
// "did you mean" hint when none does. The roles and their standard names are netcdf_met.hpp's.
#pragma once

#include <string>
#include <vector>

#include "lidbox/met/netcdf_met.hpp"
#include "met/netcdf_file.hpp"

namespace lidbox::netcdf {

struct Role {
  std::string key;          // role name in NetcdfMetOptions::variables
  std::string description;  // for messages
  std::string standard_name;
  std::vector<std::string> aliases;  // common short names, only for "did you mean"
};

// The met roles, without "time".
const std::vector<Role>& roles();
// InternalError for a key that is not a role.
const Role& role(const std::string& key);

// " among the variables present: a, b, c" and, when a data variable is near one of `probes`,
// "; did you mean \"x\"?". With skip_taken, variables that carry the standard name of another
// role or of a concentration are not offered.
std::string present_and_hint(const File& f, const std::vector<std::string>& probes,
                             bool skip_taken = false);

// Variables whose standard_name is `sn` (case-insensitive).
std::vector<const Var*> by_standard_name(const File& f, const std::string& sn);

// The variable for a role: mapped name first, then the standard name. nullptr when absent and
// not required; InputError when required and absent, mapped to a missing name, or ambiguous.
const Var* find_role(const File& f, const NetcdfMetOptions& opt, const Role& r, bool required);

// InputError for a mapped role that is not one of netcdf_met_roles(), with the closest one.
void check_role_names(const File& f, const NetcdfMetOptions& opt);

// The variable mapped to "time", or nullptr when none is; InputError when it is absent.
const Var* mapped_time_variable(const File& f, const NetcdfMetOptions& opt);

// The variables of a met file. Components unless the caller mapped only the speed/direction
// form; exactly one of the two wind forms is set.
struct MetVariables {
  const Var* mixing_height = nullptr;
  const Var* eastward_wind = nullptr;
  const Var* northward_wind = nullptr;
  const Var* wind_speed = nullptr;
  const Var* wind_from_direction = nullptr;
  const Var* air_temperature = nullptr;   // optional
  const Var* surface_pressure = nullptr;  // optional

  [[nodiscard]] bool components() const { return eastward_wind && northward_wind; }
};

MetVariables find_met_variables(const File& f, const NetcdfMetOptions& opt);

}  // namespace lidbox::netcdf
