#include "lidbox/met/netcdf_members.hpp"

#include "lidbox/base/error.hpp"
#include "met/netcdf_file.hpp"
#include "met/netcdf_layout.hpp"
#include "met/netcdf_roles.hpp"

namespace lidbox {

std::vector<long long> netcdf_member_values(const std::string& path,
                                            const NetcdfMetOptions& options) {
  const netcdf::File f(path, options.display_name);
  const netcdf::Var* h = netcdf::find_role(f, options, netcdf::role("mixing_height"), true);
  std::vector<long long> values = netcdf::member_values(f, *h);
  if (values.empty()) {
    throw InputError(f.where(*h), "no member dimension " + f.dims_text(*h),
                     "a member (realization) dimension holding the ensemble's members");
  }
  return values;
}

}  // namespace lidbox
