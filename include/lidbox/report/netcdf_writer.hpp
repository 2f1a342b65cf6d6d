// CF-NetCDF output: one station's table of values on a time axis, as a CF-1.12 discrete sampling
// geometry file with featureType "timeSeries" (CF Conventions, Appendix H.2, single time series
// as in Example H.4).
//
// Layout written:
//   dimensions  time (fixed, the number of rows), nv = 2 (with periods), name_strlen (with a
//   station name) time(time)          double, "hours since <first time> +00:00", calendar
//   "standard",
//                       units_metadata "leap_seconds: none", axis T, standard_name time
//   time_bnds(time, nv) when the rows are periods (hour means, days): [start, end]
//   lat, lon, alt       scalars, when given; station_name(name_strlen) with cf_role timeseries_id
//   <var>(time)         double with _FillValue = NetCDF's default double fill (9.969...e36) for
//                       NaN, units, standard_name where one exists, long_name, cell_methods,
//                       coordinates; flag variables are bytes with flag_values or flag_masks
//                       and flag_meanings (CF 3.5) and never missing.
//
// Time label of a period (decided here): the time coordinate is the START of the period it
// covers, as HourlySeries keeps it and as pandas/xarray label resampled means; time_bnds give
// [start, end) and the time variable's comment says so. Instantaneous rows (period_s = 0) are
// stamped at their instant and have no bounds.
//
// Every variable along time is stored contiguously (NetCDF-4): the whole series is one block.
//
// Global attributes: Conventions "CF-1.12", featureType "timeSeries", title, source
// "lidbox <version>", history "<UTC now> lidbox <version>: <table.history>" (now is
// SOURCE_DATE_EPOCH when that is set, for byte-reproducible files), caution
// (kScreeningCaution), then the caller's (case name, rule sets, ...).
//
// The file is written atomically: to a hidden temporary name in the target directory, renamed
// over the target only when complete; on any error the temporary file is removed and the target
// is untouched. A target directory that does not exist, or a target that cannot be replaced, is
// an InputError naming the path; a malformed table (lengths, names, times) is an InternalError.
#pragma once

#include <cstdint>
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "lidbox/met/met_series.hpp"
#include "lidbox/base/time.hpp"

namespace lidbox {

struct CfVariable {
  std::string name;           // CF 2.3: a letter, then letters, digits and underscores
  std::string standard_name;  // "" when the CF table has none for the quantity
  std::string long_name;
  std::string units;         // UDUNITS text ("m", "m s-1", "ug m-3", "1"); "" only for flags
  std::string cell_methods;  // "time: mean (interval: 1 hour)", "time: point", ...
  std::string comment;
  std::vector<double> values;  // one per row; NaN -> _FillValue (not allowed for flags)
  // A flag variable (CF 3.5) when flag_meanings is set: values are written as signed bytes and
  // must be integers; give flag_values (exclusive states) or flag_masks (bits), one per meaning.
  std::vector<int> flag_values;
  std::vector<int> flag_masks;
  std::string flag_meanings;  // blank-separated words, e.g. "observed gap_filled"
  std::map<std::string, std::string> attributes;  // further text attributes
};

struct CfTable {
  std::vector<UtcSeconds> time_utc;  // row times, strictly increasing (period starts)
  UtcSeconds period_s = 3600;        // length of each row's period; 0 = instantaneous rows
  std::string title;
  std::string history;            // what produced the table, e.g. the command line
  std::string station_name;       // "" for none
  std::optional<double> lat_deg;  // degrees_north
  std::optional<double> lon_deg;  // degrees_east
  std::optional<double> alt_m;    // metres above mean sea level
  std::vector<CfVariable> vars;
  std::map<std::string, std::string> global_attributes;  // may not replace the reserved ones
};

enum class CfFileFormat {
  netcdf4_classic,  // HDF5-based NetCDF-4 restricted to the classic model (the default)
  netcdf3_64bit,    // NetCDF-3 64-bit offset, for tools that read only NetCDF-3
};

void write_cf_timeseries(const std::string& path, const CfTable& table,
                         CfFileFormat format = CfFileFormat::netcdf4_classic);

// The file written at `path` directly, replacing what is there (no temporary: for a folder that
// is published as a whole, output_folder.hpp). Failures as above.
void write_cf_file(const std::string& path, const CfTable& table,
                   CfFileFormat format = CfFileFormat::netcdf4_classic);

// The same file written variable block by variable block, for tables too long to hold: `layout`
// gives the rows (time_utc) and the variables' descriptions, with no values. Every row of every
// variable must be put before close(). Failures as above; an unclosed file is closed by the
// destructor and left to its folder's cleanup.
class CfStreamWriter {
 public:
  CfStreamWriter(std::string path, CfTable layout,
                 CfFileFormat format = CfFileFormat::netcdf4_classic);
  ~CfStreamWriter();
  CfStreamWriter(const CfStreamWriter&) = delete;
  CfStreamWriter& operator=(const CfStreamWriter&) = delete;
  // Rows [first_row, first_row + n) of variable k (its index in layout.vars); NaN -> _FillValue.
  void put(std::size_t k, std::size_t first_row, const double* values, std::size_t n);
  void close();

 private:
  std::string path_;
  CfTable layout_;
  int nc_ = -1;
  std::vector<int> ids_;
};

// The same file as bytes in memory (NetCDF-C in-memory files), for a caller that writes a set of
// outputs all-or-nothing itself (atomic_file.hpp's OutputFile::content takes them as they are).
// A malformed table is an InternalError, as above.
std::string render_cf_timeseries(const CfTable& table,
                                 CfFileFormat format = CfFileFormat::netcdf4_classic);

// Daily values on local-standard-time (LST) days, for daily statistics tables. The rows are the
// days present in any series; a day's time is its LST midnight as a UTC instant and its bounds
// span 24 h (LST has no daylight saving, so every day is 86400 s).
struct CfDailySeries {
  std::string name;  // CF variable name, e.g. "PM25_daily_mean"
  std::string standard_name;
  std::string long_name;
  std::string units;
  std::string cell_methods;  // e.g. "time: mean (interval: 1 hour)", "time: maximum"
  std::string comment;
  std::int64_t first_day = 0;    // LST days since 1970-01-01 of values[0]
  std::vector<double> values;    // NaN when missing
  std::vector<int> valid_count;  // empty, or one per value: written as <name>_valid_count
  int possible_count = 0;        // hours (or windows) a full day has, with valid_count
  std::vector<int> complete;     // empty, or one 0/1 per value: flag variable <name>_complete
};

// The table for write_cf_timeseries/render_cf_timeseries: `lst_offset_s` is the standard offset
// east of UTC; the global attribute local_standard_time names it ("UTC-07:00"). The caller adds
// title, history and station fields. InternalError for mismatched lengths.
CfTable daily_cf_table(const std::vector<CfDailySeries>& series, int lst_offset_s);

// A text as a CF variable name (CF 2.3): other characters become '_', and a leading non-letter
// gets an 'x' in front ("2m temp" -> "x2m_temp", "PM2.5" -> "PM2_5").
std::string cf_variable_name(const std::string& text);

// The met forcing as a table: mixing height, wind components, speed and direction, temperature
// and pressure when present, the extra columns with their units, and the gap-filled flag.
// Rows are the met stamps, instantaneous (period_s = 0); `title` and station fields are left to
// the caller.
CfTable met_cf_table(const MetSeries& met);

}  // namespace lidbox
