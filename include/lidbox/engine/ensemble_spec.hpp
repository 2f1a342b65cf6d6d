// The [ensemble] table of a case file: which met files (or which NetCDF file's members) make the
// ensemble, and what to compute from it. The runs themselves are ensemble.hpp.
//
// Case file:
//   [ensemble]
//   members = ["m01.csv", "m02.csv"]    # met files, relative to the case file
//   members = "forecast/m*.csv"         # or a pattern ('*' and '?' in the file name), sorted
//   members = "forecast-ensemble.nc"    # or every member of one NetCDF file with a member
//                                       # (realization) dimension, in the file's order
//   percentiles = [5, 25, 50, 75, 95]   # of the members' hour means (default)
//   kernel_dressing = false             # add kernel-dressed probabilities (ensemble_statistics)
//
// An ensemble needs at least 2 members (a probability from one member is no probability): an
// InputError at [ensemble] members otherwise.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "lidbox/base/toml_table.hpp"

namespace lidbox {

struct EnsembleSpec {
  // One entry per met file (paths resolved against the case's folder), or, with netcdf_members,
  // the single NetCDF file whose member dimension holds the members.
  std::vector<std::string> files;
  std::vector<std::string> display_names;  // as the case (or the pattern's folder) names them
  bool netcdf_members = false;
  std::vector<double> percentiles = {5.0, 25.0, 50.0, 75.0, 95.0};  // each in [0, 100], rising
  bool kernel_dressing = false;
  std::string where;  // "<file>:<line>: [ensemble] members"
};

// The [ensemble] table, when present; patterns are expanded here (no match is an InputError).
std::optional<EnsembleSpec> read_ensemble_spec(const TomlTable& top, const std::string& base_dir);

}  // namespace lidbox
