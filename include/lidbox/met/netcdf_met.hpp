// Hourly met forcing and observed concentration series from CF-NetCDF files (NetCDF-C).
//
// Finding variables. Each role is looked up, in this order:
//   1. a variable name the caller maps to the role (options.variables["mixing_height"] = "blh");
//   2. the CF standard_name of the role (CF standard name table), exactly one variable;
// Roles and standard names:
//   mixing_height        atmosphere_boundary_layer_thickness   (required)            -> m
//   eastward_wind        eastward_wind                         (with northward_wind)  -> m/s
//   northward_wind       northward_wind
//   wind_speed           wind_speed                 (with wind_from_direction)        -> m/s
//   wind_from_direction  wind_from_direction                                          -> degree
//   air_temperature      air_temperature                        (optional)            -> K
//   surface_pressure     surface_air_pressure                   (optional)            -> Pa
//   time                 the coordinate variable of the data's time dimension
// Components are preferred when both wind forms are present, unless the caller maps only
// wind_speed and/or wind_from_direction.
//
// Values (CF Conventions 8.1 and 2.5.1): _FillValue and missing_value (compared with the packed
// values), values outside valid_min/valid_max/valid_range, and the NetCDF default fill value
// when no _FillValue is set (not for byte types), become NaN; signed types marked
// _Unsigned = "true" are read as unsigned (NetCDF User Guide); then
// value = packed * scale_factor + add_offset; then the variable's `units` attribute (required)
// is converted by UDUNITS-2 (units.hpp). Only the root group of a NetCDF-4 file is searched.
//
// Layouts of a data variable's dimensions, in any order:
//   time                 the dimension of the CF time coordinate (required, strictly increasing)
//   station              the instance dimension of a variable with cf_role = "timeseries_id"
//                        (CF Appendix H.2, orthogonal multidimensional): options.station_id
//                        picks the station by that variable's value; required when more than one
//   member               a dimension whose coordinate has standard_name "realization", or is
//                        named member/members/realization/ensemble/ens/number: options.member
//                        picks the member by its coordinate value (by 0-based index when there
//                        is no coordinate variable); required when more than one
//   latitude/longitude   dimensions of 1-D coordinates (standard_name latitude/longitude, or
//                        units degrees_north/degrees_east), or the (y, x) dimensions of 2-D
//                        latitude and longitude named in the variable's `coordinates` attribute
//                        (CF 5.2, a curvilinear grid): the nearest cell centre to options.point
//                        (great-circle distance), or the mean over the cells whose centres fall
//                        inside options.footprint, weighted by cos(latitude) on a lat/lon grid
//                        (the relative area of its cells) and equally on a curvilinear grid
//                        (near-equal cells of a projection); wind is averaged by components. A
//                        footprint hour with any cell missing is missing (the footprint never
//                        silently shrinks). A 1-cell grid needs neither option.
//   any other dimension  only of length 1 (a single height level, for example)
// Ragged station layouts (CF H.2.4, H.2.5: sample_dimension, instance_dimension) are refused.
//
// Time axis: decoded by cf_time.hpp. The step is the smallest difference between stamps; every
// difference must be a whole multiple of it (absent records become NaN gaps for fill_gaps).
//   hourly (3600 s)      stamps must fall on whole UTC hours; used as they are.
//   sub-hourly, dividing 3600 s exactly (60, 300, 600, 900, 1200, 1800 s, ...):
//       hour_mean   (default) the samples stamped in [H, H + 1 h) are averaged into the value
//                   stamped H (period-start label: read it as MetReading::hour_average with
//                   HourLabel::period_start); an hour needs at least 75 % of its samples valid
//                   (common practice for hourly means from sub-hourly data, no source), else NaN.
//       on_the_hour keeps only the samples stamped on whole hours (instantaneous readings).
//       refuse      InputError.
//   coarser, a whole multiple of 3600 s (3-hourly, 6-hourly, ...):
//       refuse      (default) InputError.
//       linear      values at the whole hours between two stamps are interpolated linearly in
//                   time (wind by components); an hour next to a missing stamp is NaN. Read the
//                   result as MetReading::instantaneous.
//   any other step      InputError.
// The resulting stamps are whole UTC hours, element i at first_stamp_utc + i * 3600.
//
// Errors are InputError naming the file and the variable, e.g. a missing variable:
//   met.nc: no variable for the mixing height (standard_name "atmosphere_boundary_layer_thickness")
//   among the variables present: time, lat, lon, blh, u10, v10; did you mean "blh"?; expected a
//   variable with that standard_name, or the role "mixing_height" mapped to a variable name
// The reader never prints; the caller runs fill_gaps() and validate_met() on the result.
#pragma once

#include "lidbox/base/plausibility.hpp"

#include <map>
#include <optional>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "lidbox/base/hourly_series.hpp"
#include "lidbox/met/met_series.hpp"

namespace lidbox {

struct LatLon {
  double lat_deg = 0.0;  // degrees north, -90..90
  double lon_deg = 0.0;  // degrees east; any branch (-180..180 or 0..360)
};

// A latitude/longitude box; lon_min > lon_max means a box across the 180th meridian.
struct LatLonBox {
  double lat_min_deg = 0.0;
  double lat_max_deg = 0.0;
  double lon_min_deg = 0.0;
  double lon_max_deg = 0.0;
};

enum class SubHourlyRule { hour_mean, on_the_hour, refuse };
enum class CoarseStepRule { refuse, linear };

// The rules by name, as a case file or the command line spells them: "hour_mean", "on_the_hour",
// "refuse"; "refuse", "linear". InputError naming `where` and listing the names otherwise.
SubHourlyRule parse_sub_hourly_rule(std::string_view text, std::string_view where);
CoarseStepRule parse_coarse_step_rule(std::string_view text, std::string_view where);

// The roles NetcdfMetOptions::variables accepts (as listed above, plus "time").
const std::vector<std::string>& netcdf_met_roles();

struct NetcdfMetOptions {
  // Names the file in messages and in MetSeries::source, e.g. as the case file writes it
  // ("" = the path as given).
  std::string display_name;
  // role -> variable name; roles as listed above. Unknown roles are an InputError.
  std::map<std::string, std::string> variables;
  // Extra columns for MetSeries::extra (a background concentration, for example):
  // column name -> variable name, or a CF standard_name when no variable has that name.
  // Concentrations with a known standard name (see concentration_standard_names()) are
  // converted to "ug m-3" (mass) or "ppb" (mole fraction); other columns keep their unit.
  std::map<std::string, std::string> extra;
  std::optional<std::string> station_id;
  std::optional<long long> member;
  std::optional<LatLon> point;         // nearest grid cell
  std::optional<LatLonBox> footprint;  // mean over the cells inside (excludes `point`)
  SubHourlyRule sub_hourly = SubHourlyRule::hour_mean;
  CoarseStepRule coarse = CoarseStepRule::refuse;
  // Every value read (mixing height, wind speed or components, direction, temperature,
  // pressure) is checked against its range per cell and record, before cell means and
  // resampling, so that the message names the variable and the record (plausibility.hpp).
  PlausibilityLimits limits;
};

// What the reader did, for a log line or a run's metadata.
struct NetcdfReadInfo {
  std::map<std::string, std::string> role_variable;  // role -> variable name used
  std::string layout;       // "single time series", "station \"X\"", "grid cell (i, j) ..."
  std::string time_step;    // "3600 s, used as is", "600 s, hour means (75 % rule)", ...
  std::size_t records = 0;  // time records read
  // From the time coordinate's bounds (CF 7.1), which end of its period each stamp marks:
  // "period_start", "period_end", "other" (e.g. the middle), or "" without bounds. A caller can
  // check it against the hour label it was told (MetSpec::hour_label).
  std::string time_bounds_label;
};

// Reads hourly met. InputError for every problem of the file (see above); `info`, when given,
// is filled on success.
MetSeries read_met_netcdf(const std::string& path, const NetcdfMetOptions& options,
                          NetcdfReadInfo* info = nullptr);

// Pollutant key ("pm2p5", "pm10", "co", "no2", "o3", "so2") -> accepted CF standard names
// (mass concentration, current and older PM spellings, and mole fraction).
const std::map<std::string, std::vector<std::string>>& concentration_standard_names();

// Reads every variable whose standard_name is a known concentration (or, when `variables` is
// not empty, exactly the listed variable names) as hourly series, returned as
// (pollutant key or variable name, series). Mass concentrations come out in "ug m-3", mole
// fractions in "ppb". Layout, time and resampling rules as for read_met_netcdf (sub-hourly data
// is averaged to hour means labelled by the hour's start, the HourlySeries convention; a coarser
// step is refused, never interpolated). InputError when none is found.
std::vector<std::pair<std::string, HourlySeries>> read_concentrations_netcdf(
    const std::string& path, const NetcdfMetOptions& options,
    const std::vector<std::string>& variables = {});

}  // namespace lidbox
