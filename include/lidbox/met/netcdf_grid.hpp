// A CF latitude/longitude grid of hourly met, read in slabs of time records and grid rows, for
// runs where every cell is its own box (grid/grid_run.hpp).
//
// Expected layout: every data variable has the dimensions (time, latitude, longitude) in that
// order (the order of ERA5 and most reanalysis files), where latitude and longitude are
// dimensions with 1-D coordinate variables (standard_name latitude/longitude or units
// degrees_north/degrees_east, as for netcdf_met.hpp), and time is the CF time coordinate of the
// first dimension (any name: ERA5's "time" in hours since 1900-01-01 or the newer "valid_time"
// in seconds since 1970-01-01; decoded by cf_time.hpp). Stamps must be whole UTC hours exactly
// one hour apart (a grid run streams, it does not fill gaps: cdo or nco can).
//
// Variables: mixing height and the wind components by the roles of netcdf_met.hpp (a mapped name,
// then the CF standard_name), and, when neither gives one, ERA5's short names blh, u10 and v10.
// Extra fields (a stagnation scheme's precipitation, 500 hPa wind, ...) by the variable names
// the caller maps. Values are unpacked as netcdf_met.hpp says (packed shorts with scale_factor
// and add_offset, _FillValue and missing_value become NaN) and converted by UDUNITS-2 from each
// variable's `units` attribute, in the same order of operations as the point reader, so that a
// cell reads to the same doubles as read_met_netcdf gives for it.
//
// Errors are InputErrors naming the file and the variable: a variable without the three
// dimensions, a latitude or longitude dimension without its coordinate, grids that differ between
// variables, a time axis that is not hourly.
//
// Chunking: a NetCDF-4 file chunked one map per time step (time chunk length 1, the usual layout
// of reanalysis downloads) is accepted; reading whole time slabs of it is still sequential in the
// file, but a run over blocks of cells reads each chunk once per block. chunk_note() says so and
// names the fix (`nccopy -c time/720,<lat>/..,<lon>/.. in.nc out.nc`, a copy with longer time
// chunks, nccopy(1)).
#pragma once

#include "lidbox/base/plausibility.hpp"

#include <cstddef>
#include <map>
#include <memory>
#include <string>
#include <utility>
#include <vector>

#include "lidbox/base/time.hpp"

namespace lidbox {

struct GridMetOptions {
  std::string display_name;  // names the file in messages ("" = the path)
  // role -> variable: mixing_height, eastward_wind, northward_wind (netcdf_met_roles()).
  std::map<std::string, std::string> variables;
  // extra column -> (variable name, SI unit it is converted to), e.g. precipitation -> (tp, m).
  std::map<std::string, std::pair<std::string, std::string>> fields;
  // Every value read is checked against its range (plausibility.hpp): mixing_height, the wind
  // components (their magnitude against wind_speed), and the fields named precipitation and
  // wind_500hPa; other fields have no range.
  PlausibilityLimits limits;
};

class NetcdfGrid {
 public:
  NetcdfGrid(const std::string& path, const GridMetOptions& options);
  ~NetcdfGrid();
  NetcdfGrid(const NetcdfGrid&) = delete;
  NetcdfGrid& operator=(const NetcdfGrid&) = delete;

  [[nodiscard]] const std::string& source() const;
  [[nodiscard]] std::size_t records() const;
  [[nodiscard]] UtcSeconds first_stamp_utc() const;
  [[nodiscard]] const std::vector<double>& latitude_deg() const;
  [[nodiscard]] const std::vector<double>& longitude_deg() const;
  [[nodiscard]] std::size_t rows() const { return latitude_deg().size(); }
  [[nodiscard]] std::size_t columns_per_row() const { return longitude_deg().size(); }
  [[nodiscard]] std::size_t cells() const { return rows() * columns_per_row(); }
  // Names: the latitude and longitude coordinate variables, and the variable of each column.
  [[nodiscard]] const std::string& latitude_name() const;
  [[nodiscard]] const std::string& longitude_name() const;
  // The columns read: 0 mixing height [m], 1 eastward wind [m/s], 2 northward wind [m/s], then
  // the fields in the order of GridMetOptions::fields (a std::map: sorted by name).
  [[nodiscard]] const std::vector<std::string>& column_names() const;
  [[nodiscard]] const std::vector<std::string>& column_variables() const;
  // "" or the note on one-map-per-time-step chunking (see above).
  [[nodiscard]] const std::string& chunk_note() const;

  // Records [record0, record0 + n_records) of grid rows [row0, row0 + n_rows), every column:
  // out[column][(record - record0) * n_rows * columns_per_row() + (row - row0) *
  // columns_per_row() + lon]. NaN where missing. `out` is resized.
  void read(std::size_t record0, std::size_t n_records, std::size_t row0, std::size_t n_rows,
            std::vector<std::vector<double>>& out) const;

 private:
  // InputError for the first value of column k outside its range in a slab read by read().
  void check_slab(std::size_t k, std::size_t record0, std::size_t row0, std::size_t n_rows,
                  const std::vector<double>& values) const;
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

}  // namespace lidbox
