// A grid run: every cell of a CF latitude/longitude grid is its own box (grid_case.hpp), stepped
// by the engine exactly as a point run of that cell would step it (same forcing, same spin-up:
// a cell's hourly series equals run_case on read_met_netcdf of that cell), streamed through time
// in chunks of whole local-standard days so that memory does not grow with the series' length,
// on worker threads, and optionally over MPI processes that each take a block of grid rows.
// Threads: N worker threads step the cells; with N >= 2 the next chunk is read on one more
// thread while they step (reading is mostly NetCDF-C's decompression, which is serial); with
// N = 1 the run reads and steps in turn on one thread, one core.
//
// Per cell and day (local standard days of the case's zone, daily_diagnostics.hpp): the
// ventilation of the met as given, the verdict of each stagnation scheme, and the daily mean
// (or maximum hour) of the emission part of the concentration divided by the flux: the
// concentration per unit emission flux [s/m]. Per period (year, season DJF/MAM/JJA/SON, month):
//   valid_days                        days with all 24 hours of met (judged days)
//   stagnation_days_<scheme>          days the scheme holds
//   longest_streak_<scheme>           longest run of stagnation days, counted within the period
//   stagnation_episodes_<scheme>      episodes (the scheme's episode_min_days or more in a row),
//                                     each counted in the period of the day its run reaches that
//                                     length (StreakCounter's rule; runs go on across periods)
//   ventilation_mean                  mean of the daily mean ventilation [m2 s-1]
//   ventilation_p<q>                  percentiles of the daily mean ventilation (linear
//                                     interpolation between order statistics, numpy's default,
//                                     Hyndman and Fan 1996 definition 7)
//   dilution_mean                     mean of the daily statistic per unit flux [s m-1]
//   exceedance_days                   days that statistic exceeds [grid] exceedance_level
// A cell whose met has a missing or non-positive mixing height or a missing wind (a point run
// would refuse it) is dropped from that moment on: its maps are fill values, and the summary
// counts it. Periods only partly inside the series are written with their valid_days.
#pragma once

#include <cstdint>
#include <functional>
#include <string>
#include <vector>

#include "lidbox/grid/grid_case.hpp"

namespace lidbox {

// How a run over several processes brings its blocks of rows together; one block serially.
struct GridBlocks {
  int rank = 0;
  int size = 1;
  // Every rank calls it with its block's values, in the same order; rank 0 gets every rank's
  // values concatenated in rank order. Null for a serial run.
  std::function<void(const std::vector<double>& local, std::vector<double>& all)> gather;
};

struct GridRunOptions {
  unsigned threads = 0;  // worker threads (see above); 0: the case's [grid] threads, else all cores
  GridBlocks blocks;
  std::function<void(double fraction)> progress;  // after each chunk, 0..1
};

struct GridRunSummary {
  std::size_t cells = 0;
  std::size_t rows = 0, columns = 0;
  std::size_t hours = 0;
  unsigned threads = 0;
  int processes = 1;
  std::size_t chunk_days = 0;
  std::size_t dropped_cells = 0;
  std::string first_dropped;       // where and when, for the summary
  std::string chunk_note;          // NetcdfGrid::chunk_note()
  std::vector<std::string> files;  // written (rank 0)
  std::string text;                // the summary as printed
};

// Runs the case and writes maps_<period>.nc, series.nc (with [grid] series) and summary.txt
// into output_dir (rank 0 only; every file under a temporary name until the run completes).
GridRunSummary run_grid(const GridCase& gc, const std::string& output_dir,
                        const GridRunOptions& options);

}  // namespace lidbox
