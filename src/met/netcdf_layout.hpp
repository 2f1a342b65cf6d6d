// Private to the NetCDF met reader: which cells of a data variable make its one time series.
//
// The layouts (dimensions in any order), as netcdf_met.hpp states them:
//   time                 the dimension of the CF time coordinate (or of the mapped time variable)
//   station              the instance dimension of the cf_role = "timeseries_id" variable
//                        (CF Appendix H.2, orthogonal multidimensional), picked by station id
//   member               a realization dimension, picked by its coordinate value or index
//   latitude/longitude   dimensions of 1-D latitude/longitude coordinates, or the (y, x)
//                        dimensions of 2-D latitude/longitude named in `coordinates` (CF 5.2):
//                        the nearest cell to a point (great-circle distance) or the cells inside
//                        a footprint (cos-latitude weights on a lat/lon grid, equal weights on a
//                        curvilinear grid)
//   any other dimension  only of length 1
// Ragged layouts (CF H.2.4, H.2.5) are refused. Every refusal is an InputError naming the file
// and the variable.
#pragma once

#include <cstddef>
#include <functional>
#include <string>
#include <vector>

#include "lidbox/base/units.hpp"
#include "lidbox/met/netcdf_met.hpp"
#include "met/netcdf_file.hpp"

namespace lidbox::netcdf {

// The cells taken from one variable: a hyperslab and, per cell inside it, an offset and a weight.
struct Selection {
  int time_dim = -1;
  std::size_t time_pos = 0;  // position of the time dimension in the variable's dims
  std::vector<std::size_t> start, count;
  struct Cell {
    std::size_t offset_in_record = 0;  // offset within one time record of the slab
    double weight = 1.0;
  };
  std::vector<Cell> cells;
  std::string layout;  // NetcdfReadInfo::layout
};

// A latitude (longitude) variable: standard_name latitude (longitude), units degrees_north
// (degrees_east) or a spelling of them, or the name lat/latitude (lon/longitude); rotated-pole
// grid_latitude/grid_longitude are not.
bool is_latitude(const File& f, const Var& v);
bool is_longitude(const File& f, const Var& v);

// InputError when any variable carries sample_dimension or instance_dimension (CF Appendix
// H.2.4/H.2.5): said before anything else fails.
void refuse_ragged(const File& f);

// The layout of `v` and the cells the options pick from it. `mapped_time`, when the caller named
// the time variable, marks the time dimension instead of the CF time coordinate.
Selection select_layout(const File& f, const Var& v, const NetcdfMetOptions& opt,
                        const Var* mapped_time);

// The values of v's member (realization) dimension: its coordinate's values, or 0-based indices
// when it has no coordinate variable; empty when v has no member dimension.
std::vector<long long> member_values(const File& f, const Var& v);

// One variable, read for its selected cells: cells[cell][record], unpacked and converted.
struct CellValues {
  std::vector<std::vector<double>> cells;
  std::vector<double> weights;
};

// `convert` maps the variable's `units` attribute (required, CF 3.1) to the conversion wanted.
CellValues read_cells(const File& f, const Var& v, const Selection& s,
                      const std::function<UnitConversion(const std::string&)>& convert);

// Weighted mean over cells per record; NaN when any cell is missing (a footprint never silently
// shrinks).
std::vector<double> cell_mean(const std::vector<std::vector<double>>& cells,
                              const std::vector<double>& w);

}  // namespace lidbox::netcdf
