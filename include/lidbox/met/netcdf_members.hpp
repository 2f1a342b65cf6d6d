// The members of a NetCDF met ensemble: the values of the member (realization) dimension of the
// file's mixing-height variable (found as read_met_netcdf finds it, netcdf_met.hpp), so that a
// caller can read each member with NetcdfMetOptions::member.
#pragma once

#include <string>
#include <vector>

#include "lidbox/met/netcdf_met.hpp"

namespace lidbox {

// The member coordinate's values (0-based indices when the dimension has no coordinate), in
// the file's order. InputError naming the file when it cannot be read or when the mixing height
// has no member dimension.
std::vector<long long> netcdf_member_values(const std::string& path,
                                            const NetcdfMetOptions& options);

}  // namespace lidbox
