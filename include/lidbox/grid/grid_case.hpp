// A grid case: an ordinary case file (the box, its pollutant, model options, time zone, the met
// file as CF-NetCDF) with a [grid] table, run with every cell of the met grid as its own box
// (grid_run.hpp). Each cell carries one pollutant of the case and one emission sector, a uniform
// area flux with a flat clock: a given flux, or the unit flux 1 g m-2 s-1, whose concentration
// is then the dilution potential (concentration per unit emission flux, s/m).
//
// [grid] keys (every key checked, misspelt keys reported with a hint):
//   pollutant            the case's pollutant the cells carry (default: the first)
//   flux                 "unit" (default) or an area flux with its unit, "2 ug m-2 s-1"
//   periods              maps per ["year", "season", "month"] (default ["year"]); seasons are
//                        DJF, MAM, JJA, SON, December counted with the following year's winter
//   percentiles          of the daily mean ventilation, 0..100 (default [10, 50, 90])
//   exceedance_statistic "daily_mean" (default) or "daily_max_1h" of the emission part of the
//                        concentration per unit flux
//   exceedance_level     "40 s/m": days whose statistic exceeds it are counted (optional)
//   series               [{ latitude = "41 deg", longitude = "-112 deg" }, ...]: full hourly
//                        series of the nearest cells
//   threads              worker threads (default: all cores; grid_run.hpp)
//   chunk_days           days read and stepped at a time (default: from a 64 MB budget)
// The case's [met] names the grid file and its variables (mixing_height, eastward_wind,
// northward_wind; ERA5's blh, u10, v10 are found by name); [diagnostics] names the ventilation
// table, the schemes and the NetCDF variables of their extra fields. A pollutant background
// from a met column is refused (there is no column per cell).
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "lidbox/diagnostics/daily_diagnostics.hpp"
#include "lidbox/engine/case_file.hpp"
#include "lidbox/met/netcdf_grid.hpp"

namespace lidbox {

enum class GridPeriod { year, season, month };
const char* to_string(GridPeriod p);

enum class GridExceedanceStatistic { daily_mean, daily_max_1h };

struct GridSpec {
  std::size_t pollutant = 0;  // index into the case's pollutants
  bool unit_flux = true;
  double flux_g_m2_s = 1.0;
  std::vector<GridPeriod> periods = {GridPeriod::year};
  std::vector<double> percentiles = {10.0, 50.0, 90.0};
  GridExceedanceStatistic exceedance_statistic = GridExceedanceStatistic::daily_mean;
  std::optional<double> exceedance_level_s_m;
  std::vector<std::pair<double, double>> series;  // (latitude, longitude) in degrees
  unsigned threads = 0;                           // 0: all cores
  int chunk_days = 0;                             // 0: automatic
};

struct GridCase {
  CaseSpec base;  // as written
  CaseSpec cell;  // what every cell runs: the one pollutant and the flux sector
  GridSpec grid;
  DiagnosticsSetup diagnostics;
  GridMetOptions met;  // variables and fields for NetcdfGrid
};

// Reads a case file with a [grid] table. InputError for a case without one, a met file that is
// not NetCDF, a background column, or any bad [grid] key.
GridCase load_grid_case(const std::string& path);
GridCase parse_grid_case(const std::string& text, const std::string& file,
                         const std::string& base_dir);

// The cell case for a given pollutant and flux (exposed so that a point run of one cell can be
// set beside a grid run in tests).
CaseSpec grid_cell_case(const CaseSpec& base, const GridSpec& grid);

}  // namespace lidbox
