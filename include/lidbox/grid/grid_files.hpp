// The CF-NetCDF files of a grid run, written by one process (rank 0 of an MPI run):
//   maps_<period>.nc   (time, lat, lon) maps, one time record per year, season or month, with
//                      time_bnds (CF 7.1) and cell_methods; written as each period completes;
//   series.nc          (time, cell) full hourly series of the chosen cells, with their lat/lon.
// NetCDF classic 64-bit-offset format (CDF-2): no timestamps or library versions in the bytes,
// so a run gives the same bytes whether it ran on one thread, many, or many processes. Files are
// written under a temporary name and renamed when the run completes (close_all); an abandoned
// run leaves no file of the final name.
#pragma once

#include <map>
#include <string>
#include <vector>

#include "lidbox/base/time.hpp"

namespace lidbox {

struct GridVariableSpec {
  std::string name;
  std::string long_name;
  std::string units;
  std::string standard_name;  // "" when CF has none
  std::string cell_methods;   // "" for none
};

struct GridFileInfo {
  std::string title;
  std::string source;  // the met file
  std::string comment;
  std::map<std::string, std::string> attributes;  // more global attributes
};

class GridMapFile {
 public:
  // Creates <dir>/<name> (under a temporary name); lat/lon as the met grid gives them.
  GridMapFile(const std::string& dir, const std::string& name, const GridFileInfo& info,
              const std::string& lat_name, const std::vector<double>& lat_deg,
              const std::string& lon_name, const std::vector<double>& lon_deg,
              const std::vector<GridVariableSpec>& vars);
  ~GridMapFile();
  GridMapFile(const GridMapFile&) = delete;
  GridMapFile& operator=(const GridMapFile&) = delete;
  // One period: its bounds and one full map per variable (row-major lat x lon, NaN = fill).
  void append(UtcSeconds start_utc, UtcSeconds end_utc,
              const std::vector<std::vector<double>>& maps);
  // Closes and renames to the final name; returns the final path.
  std::string close();
  [[nodiscard]] std::size_t records() const { return records_; }

 private:
  int ncid_ = -1;
  std::string tmp_, final_;
  std::vector<int> varids_;
  int time_id_ = -1, bnds_id_ = -1;
  std::size_t records_ = 0, n_lat_ = 0, n_lon_ = 0;
};

class GridSeriesFile {
 public:
  GridSeriesFile(const std::string& dir, const std::string& name, const GridFileInfo& info,
                 const std::vector<double>& cell_lat_deg, const std::vector<double>& cell_lon_deg,
                 const std::vector<GridVariableSpec>& vars);
  ~GridSeriesFile();
  GridSeriesFile(const GridSeriesFile&) = delete;
  GridSeriesFile& operator=(const GridSeriesFile&) = delete;
  // Hours starting at first_hour_utc; values[var][hour * cells + cell].
  void append(UtcSeconds first_hour_utc, std::size_t hours,
              const std::vector<std::vector<double>>& values);
  std::string close();

 private:
  int ncid_ = -1;
  std::string tmp_, final_;
  std::vector<int> varids_;
  int time_id_ = -1, bnds_id_ = -1;
  std::size_t records_ = 0, cells_ = 0;
};

}  // namespace lidbox
