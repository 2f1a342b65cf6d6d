// Private to the NetCDF met reader: the time coordinate of a data variable, decoded by
// cf_time.hpp, and the step rules that turn its records into whole UTC hours.
//
// The step is the smallest difference between stamps; every difference must be a whole multiple
// of it (absent records become NaN gaps for fill_gaps). The rules, as netcdf_met.hpp states them:
//   hourly (3600 s)    stamps on whole UTC hours, used as they are;
//   sub-hourly, dividing 3600 s exactly: hour means of the samples in [H, H + 1 h) stamped H
//                      (75 % of the samples valid, common practice, no source), or only the
//                      samples on whole hours, or refused;
//   coarser, a whole multiple of 3600 s: refused, or interpolated linearly to whole hours;
//   any other step     InputError.
#pragma once

#include <string>
#include <vector>

#include "lidbox/base/time.hpp"
#include "lidbox/met/netcdf_met.hpp"
#include "met/netcdf_file.hpp"

namespace lidbox::netcdf {

struct TimeAxis {
  std::vector<UtcSeconds> t;  // strictly increasing, at least one
  std::string variable;       // name of the time coordinate
  std::string bounds_label;   // NetcdfReadInfo::time_bounds_label
};

// The time coordinate of dimension `time_dim`, or `mapped_time` when the caller named it. With
// use_bounds_start, stamps are the starts of their bounds (CF 7.1) when the coordinate has them.
// InputError for a time coordinate that is not 1-D, has no CF units, a missing value, no
// records, or stamps that do not strictly increase.
TimeAxis read_time_axis(const File& f, int time_dim, const Var* mapped_time, bool use_bounds_start);

struct Hourly {
  UtcSeconds first = 0;                      // stamp of element 0, a whole UTC hour
  std::vector<std::vector<double>> columns;  // per column, one value per hour, NaN = missing
  std::vector<int> record;                   // 1-based record of each hour; 0 when none
  std::string rule;                          // NetcdfReadInfo::time_step
};

// The columns (one value per record of `axis`) on whole UTC hours by the rules above.
Hourly to_hourly(const File& f, const TimeAxis& axis, const std::vector<std::vector<double>>& cols,
                 SubHourlyRule sub, CoarseStepRule coarse);

}  // namespace lidbox::netcdf
