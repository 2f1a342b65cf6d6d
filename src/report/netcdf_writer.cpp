#include "lidbox/report/netcdf_writer.hpp"

#include <netcdf.h>
#include <netcdf_mem.h>
#include <unistd.h>

#include <atomic>
#include <cctype>
#include <charconv>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <set>

#include "lidbox/base/caution.hpp"
#include "lidbox/base/cf_time.hpp"
#include "lidbox/base/error.hpp"

namespace lidbox {
namespace {

namespace fs = std::filesystem;

// A NetCDF-C failure while writing: the caller turns it into an InputError about the path
// (disk full, permissions) after removing the temporary file.
struct WriteFailure {
  std::string what;
};

void ok(int status, const std::string& what) {
  if (status != NC_NOERR) throw WriteFailure{what + ": " + nc_strerror(status)};
}

bool valid_cf_name(const std::string& n) {
  if (n.empty() || !std::isalpha(static_cast<unsigned char>(n[0]))) return false;
  for (char c : n) {
    if (!std::isalnum(static_cast<unsigned char>(c)) && c != '_') return false;
  }
  return true;
}

void text_att(int nc, int var, const char* name, const std::string& value) {
  ok(nc_put_att_text(nc, var, name, value.size(), value.c_str()), std::string("attribute ") + name);
}

// `streamed`: the variables' values come later (CfStreamWriter), so only their descriptions are
// checked here.
void check_table(const CfTable& t, bool streamed = false) {
  const std::size_t n = t.time_utc.size();
  if (n == 0) throw InternalError("CF table without rows");
  for (std::size_t i = 1; i < n; ++i) {
    if (t.time_utc[i] <= t.time_utc[i - 1]) {
      throw InternalError("CF table times not increasing at row " + std::to_string(i));
    }
  }
  if (t.period_s < 0) throw InternalError("CF table with a negative period");
  std::set<std::string> names = {"time", "time_bnds", "lat", "lon", "alt", "station_name"};
  for (const auto& v : t.vars) {
    if (!valid_cf_name(v.name)) throw InternalError("invalid CF variable name \"" + v.name + "\"");
    if (!names.insert(v.name).second) {
      throw InternalError("CF variable name \"" + v.name + "\" used twice or reserved");
    }
    if (!streamed && v.values.size() != n) {
      throw InternalError("CF variable \"" + v.name + "\" has " + std::to_string(v.values.size()) +
                          " values for " + std::to_string(n) + " rows");
    }
    if (!v.flag_meanings.empty()) {
      if (streamed && !v.values.empty()) throw InternalError("streamed variable with values");
      for (double x : v.values) {
        if (!(x >= -128.0 && x <= 127.0) || x != std::floor(x)) {
          throw InternalError("flag variable \"" + v.name + "\" with a non-byte value");
        }
      }
    } else if (v.units.empty()) {
      throw InternalError("CF variable \"" + v.name + "\" without units");
    }
  }
  static const std::set<std::string> reserved = {"Conventions", "featureType", "title",
                                                 "source",      "history",     "caution"};
  for (const auto& [k, value] : t.global_attributes) {
    if (reserved.count(k)) throw InternalError("global attribute \"" + k + "\" is reserved");
    if (!valid_cf_name(k)) throw InternalError("invalid global attribute name \"" + k + "\"");
  }
}

// The time of the run for `history`: SOURCE_DATE_EPOCH when it is set (seconds since 1970, the
// reproducible-builds convention, https://reproducible-builds.org/specs/source-date-epoch/), so
// that a run can be repeated byte for byte; otherwise the wall clock. A value that is not a
// whole number of seconds is ignored, as the convention allows.
std::string now_utc() {
  if (const char* e = std::getenv("SOURCE_DATE_EPOCH")) {
    long long t = 0;
    const char* end = e + std::strlen(e);
    const auto [p, ec] = std::from_chars(e, end, t);
    if (ec == std::errc() && p == end && p != e && t >= 0) return format_utc(t);
  }
  const auto now = std::chrono::system_clock::now();
  return format_utc(
      std::chrono::duration_cast<std::chrono::seconds>(now.time_since_epoch()).count());
}

// Whole series in one contiguous block (NetCDF-4 only; NetCDF-3 stores fixed-size variables
// contiguously anyway).
void contiguous(int nc, int var, const std::string& name) {
  int format = 0;
  ok(nc_inq_format(nc, &format), "format");
  if (format == NC_FORMAT_NETCDF4 || format == NC_FORMAT_NETCDF4_CLASSIC) {
    ok(nc_def_var_chunking(nc, var, NC_CONTIGUOUS, nullptr), "storage of " + name);
  }
}

// Ids of what write_file defines, for the data phase.
struct Layout {
  int time_dim = 0, nv_dim = 0, strlen_dim = 0;
  int time_var = 0, bnds_var = -1, station_var = -1;
  std::string coordinates = "time";
  std::vector<std::pair<int, double>> scalars;  // lat, lon, alt: variable id and value
  std::vector<int> ids;                          // one per CfTable::vars
};

void define_globals(int nc, const CfTable& t) {
  text_att(nc, NC_GLOBAL, "Conventions", "CF-1.12");
  text_att(nc, NC_GLOBAL, "featureType", "timeSeries");
  text_att(nc, NC_GLOBAL, "title", t.title.empty() ? std::string("lidbox output") : t.title);
  text_att(nc, NC_GLOBAL, "source", std::string("lidbox ") + LIDBOX_VERSION);
  text_att(nc, NC_GLOBAL, "history",
           now_utc() + " lidbox " + LIDBOX_VERSION + (t.history.empty() ? "" : ": " + t.history));
  text_att(nc, NC_GLOBAL, "caution", kScreeningCaution);
  for (const auto& [k, value] : t.global_attributes) text_att(nc, NC_GLOBAL, k.c_str(), value);
}

// Dimensions, time, time bounds, the station's scalar coordinates (CF 4.4, Appendix H.4).
void define_coordinates(int nc, const CfTable& t, Layout& L) {
  const bool bounds = t.period_s > 0;
  // The length is known: a fixed dimension, stored contiguously (below), instead of an unlimited
  // one in chunks of 512 values.
  ok(nc_def_dim(nc, "time", t.time_utc.size(), &L.time_dim), "dimension time");
  if (bounds) ok(nc_def_dim(nc, "nv", 2, &L.nv_dim), "dimension nv");
  const bool has_station = !t.station_name.empty();
  if (has_station)
    ok(nc_def_dim(nc, "name_strlen", t.station_name.size(), &L.strlen_dim), "dimension name_strlen");
  ok(nc_def_var(nc, "time", NC_DOUBLE, 1, &L.time_dim, &L.time_var), "variable time");
  contiguous(nc, L.time_var, "time");
  text_att(nc, L.time_var, "standard_name", "time");
  text_att(nc, L.time_var, "long_name", bounds ? "start of the averaging period" : "time");
  text_att(nc, L.time_var, "units", cf_hours_since(t.time_utc.front()));
  text_att(nc, L.time_var, "calendar", "standard");
  text_att(nc, L.time_var, "units_metadata", "leap_seconds: none");
  text_att(nc, L.time_var, "axis", "T");
  if (bounds) {
    text_att(nc, L.time_var, "bounds", "time_bnds");
    text_att(nc, L.time_var, "comment",
             "each value covers the period [time_bnds(0), time_bnds(1)); time is its start");
    const int dims[2] = {L.time_dim, L.nv_dim};
    ok(nc_def_var(nc, "time_bnds", NC_DOUBLE, 2, dims, &L.bnds_var), "variable time_bnds");
    contiguous(nc, L.bnds_var, "time_bnds");
  }
  const auto scalar = [&](const char* name, const char* sn, const char* units, double value) {
    int v = 0;
    ok(nc_def_var(nc, name, NC_DOUBLE, 0, nullptr, &v), std::string("variable ") + name);
    text_att(nc, v, "standard_name", sn);
    text_att(nc, v, "units", units);
    L.scalars.emplace_back(v, value);
    L.coordinates += std::string(" ") + name;
  };
  if (t.lat_deg) scalar("lat", "latitude", "degrees_north", *t.lat_deg);
  if (t.lon_deg) scalar("lon", "longitude", "degrees_east", *t.lon_deg);
  if (t.alt_m) scalar("alt", "altitude", "m", *t.alt_m);
  if (has_station) {
    ok(nc_def_var(nc, "station_name", NC_CHAR, 1, &L.strlen_dim, &L.station_var),
       "variable station_name");
    text_att(nc, L.station_var, "long_name", "station name");
    text_att(nc, L.station_var, "cf_role", "timeseries_id");
    L.coordinates += " station_name";
  }
}

// One data variable: doubles with a fill value, or a CF 3.5 flag variable of bytes.
int define_variable(int nc, const CfVariable& v, const Layout& L) {
  const bool flag = !v.flag_meanings.empty();
  int id = 0;
  ok(nc_def_var(nc, v.name.c_str(), flag ? NC_BYTE : NC_DOUBLE, 1, &L.time_dim, &id),
     "variable " + v.name);
  contiguous(nc, id, v.name);
  if (!flag) {
    const double fill = NC_FILL_DOUBLE;
    ok(nc_put_att_double(nc, id, "_FillValue", NC_DOUBLE, 1, &fill), "_FillValue of " + v.name);
  }
  if (!v.standard_name.empty()) text_att(nc, id, "standard_name", v.standard_name);
  if (!v.long_name.empty()) text_att(nc, id, "long_name", v.long_name);
  if (!v.units.empty()) text_att(nc, id, "units", v.units);
  if (!v.cell_methods.empty()) text_att(nc, id, "cell_methods", v.cell_methods);
  if (flag) {
    const auto put_bytes = [&](const char* name, const std::vector<int>& values) {
      if (values.empty()) return;
      std::vector<signed char> b;
      for (int x : values) b.push_back(static_cast<signed char>(x));
      ok(nc_put_att_schar(nc, id, name, NC_BYTE, b.size(), b.data()), std::string(name));
    };
    put_bytes("flag_values", v.flag_values);
    put_bytes("flag_masks", v.flag_masks);
    text_att(nc, id, "flag_meanings", v.flag_meanings);
  }
  text_att(nc, id, "coordinates", L.coordinates);
  if (!v.comment.empty()) text_att(nc, id, "comment", v.comment);
  for (const auto& [k, value] : v.attributes) text_att(nc, id, k.c_str(), value);
  return id;
}

void put_coordinates(int nc, const CfTable& t, const Layout& L) {
  const std::size_t n = t.time_utc.size();
  const UtcSeconds t0 = t.time_utc.front();
  std::vector<double> hours(n);
  for (std::size_t i = 0; i < n; ++i) {
    hours[i] = static_cast<double>(t.time_utc[i] - t0) / static_cast<double>(kSecondsPerHour);
  }
  const std::size_t start0 = 0;
  ok(nc_put_vara_double(nc, L.time_var, &start0, &n, hours.data()), "time values");
  if (L.bnds_var >= 0) {
    std::vector<double> b(2 * n);
    const double p = static_cast<double>(t.period_s) / static_cast<double>(kSecondsPerHour);
    for (std::size_t i = 0; i < n; ++i) {
      b[2 * i] = hours[i];
      b[2 * i + 1] = hours[i] + p;
    }
    const std::size_t start[2] = {0, 0}, count[2] = {n, 2};
    ok(nc_put_vara_double(nc, L.bnds_var, start, count, b.data()), "time_bnds values");
  }
  for (auto [v, value] : L.scalars) ok(nc_put_var_double(nc, v, &value), "coordinate value");
  if (L.station_var >= 0) ok(nc_put_var_text(nc, L.station_var, t.station_name.c_str()), "station_name");
}

// Rows [first, first + n) of one variable: NaN becomes the fill value; flags go as bytes.
void put_variable(int nc, int id, const CfVariable& v, std::size_t first, const double* values,
                  std::size_t n) {
  if (!v.flag_meanings.empty()) {
    std::vector<signed char> b(n);
    for (std::size_t i = 0; i < n; ++i) {
      if (!(values[i] >= -128.0 && values[i] <= 127.0) || values[i] != std::floor(values[i])) {
        throw InternalError("flag variable \"" + v.name + "\" with a non-byte value");
      }
      b[i] = static_cast<signed char>(values[i]);
    }
    ok(nc_put_vara_schar(nc, id, &first, &n, b.data()), "values of " + v.name);
  } else {
    std::vector<double> out(values, values + n);
    for (auto& x : out) {
      if (std::isnan(x)) x = NC_FILL_DOUBLE;
    }
    ok(nc_put_vara_double(nc, id, &first, &n, out.data()), "values of " + v.name);
  }
}

Layout define_file(int nc, const CfTable& t) {
  Layout L;
  define_coordinates(nc, t, L);
  define_globals(nc, t);
  for (const auto& v : t.vars) L.ids.push_back(define_variable(nc, v, L));
  ok(nc_enddef(nc), "end of definitions");
  put_coordinates(nc, t, L);
  return L;
}

void write_file(int nc, const CfTable& t) {
  const Layout L = define_file(nc, t);
  for (std::size_t k = 0; k < t.vars.size(); ++k) {
    put_variable(nc, L.ids[k], t.vars[k], 0, t.vars[k].values.data(), t.time_utc.size());
  }
}

}  // namespace

void write_cf_file(const std::string& path, const CfTable& table, CfFileFormat format) {
  check_table(table);
  const int mode =
      NC_CLOBBER |
      (format == CfFileFormat::netcdf4_classic ? (NC_NETCDF4 | NC_CLASSIC_MODEL) : NC_64BIT_OFFSET);
  int nc = -1;
  try {
    ok(nc_create(path.c_str(), mode, &nc), "create");
    write_file(nc, table);
    const int st = nc_close(nc);
    nc = -1;
    ok(st, "close");
  } catch (const WriteFailure& e) {
    if (nc >= 0) nc_close(nc);
    throw InputError(path, "writing failed (" + e.what + ")", "a writable output location");
  }
}

CfStreamWriter::CfStreamWriter(std::string path, CfTable layout, CfFileFormat format)
    : path_(std::move(path)), layout_(std::move(layout)) {
  check_table(layout_, true);
  const int mode =
      NC_CLOBBER |
      (format == CfFileFormat::netcdf4_classic ? (NC_NETCDF4 | NC_CLASSIC_MODEL) : NC_64BIT_OFFSET);
  try {
    ok(nc_create(path_.c_str(), mode, &nc_), "create");
    ids_ = define_file(nc_, layout_).ids;
  } catch (const WriteFailure& e) {
    if (nc_ >= 0) nc_close(nc_);
    nc_ = -1;
    throw InputError(path_, "writing failed (" + e.what + ")", "a writable output location");
  }
}

CfStreamWriter::~CfStreamWriter() {
  if (nc_ >= 0) nc_close(nc_);
}

void CfStreamWriter::put(std::size_t k, std::size_t first_row, const double* values,
                         std::size_t n) {
  if (k >= ids_.size() || first_row + n > layout_.time_utc.size()) {
    throw InternalError("CF stream: rows or variable out of range");
  }
  try {
    put_variable(nc_, ids_[k], layout_.vars[k], first_row, values, n);
  } catch (const WriteFailure& e) {
    throw InputError(path_, "writing failed (" + e.what + ")", "a writable output location");
  }
}

void CfStreamWriter::close() {
  const int st = nc_close(nc_);
  nc_ = -1;
  if (st != NC_NOERR) {
    throw InputError(path_, std::string("writing failed (close: ") + nc_strerror(st) + ")",
                     "a writable output location");
  }
}

void write_cf_timeseries(const std::string& path, const CfTable& table, CfFileFormat format) {
  check_table(table);
  const fs::path target(path);
  const fs::path dir = target.has_parent_path() ? target.parent_path() : fs::path(".");
  std::error_code ec;
  if (!fs::is_directory(dir, ec)) {
    throw InputError(path, "directory \"" + dir.string() + "\" does not exist",
                     "an existing output directory");
  }
  if (fs::is_directory(target, ec)) {
    throw InputError(path, "a directory", "a file name for the NetCDF output");
  }
  static std::atomic<int> counter{0};
  const fs::path tmp = dir / ("." + target.filename().string() + ".tmp." +
                              std::to_string(::getpid()) + "." + std::to_string(counter++));
  const int mode =
      NC_NOCLOBBER |
      (format == CfFileFormat::netcdf4_classic ? (NC_NETCDF4 | NC_CLASSIC_MODEL) : NC_64BIT_OFFSET);
  int nc = -1;
  try {
    ok(nc_create(tmp.c_str(), mode, &nc), "create");
    write_file(nc, table);
    const int st = nc_close(nc);
    nc = -1;
    ok(st, "close");
    fs::rename(tmp, target);  // atomic within one file system (POSIX rename)
  } catch (const WriteFailure& e) {
    if (nc >= 0) nc_close(nc);
    fs::remove(tmp, ec);
    throw InputError(path, "writing failed (" + e.what + ")", "a writable output location");
  } catch (const fs::filesystem_error& e) {
    fs::remove(tmp, ec);
    throw InputError(path, std::string("could not be replaced (") + e.code().message() + ")",
                     "a writable output location");
  } catch (...) {
    if (nc >= 0) nc_close(nc);
    fs::remove(tmp, ec);
    throw;
  }
}

std::string cf_variable_name(const std::string& s) {
  std::string r;
  for (char c : s) r += std::isalnum(static_cast<unsigned char>(c)) ? c : '_';
  if (r.empty() || !std::isalpha(static_cast<unsigned char>(r[0]))) r = "x" + r;
  return r;
}

std::string render_cf_timeseries(const CfTable& table, CfFileFormat format) {
  check_table(table);
  const int mode =
      format == CfFileFormat::netcdf4_classic ? (NC_NETCDF4 | NC_CLASSIC_MODEL) : NC_64BIT_OFFSET;
  int nc = -1;
  try {
    ok(nc_create_mem("lidbox-in-memory.nc", mode, 64 * 1024, &nc), "create in memory");
    write_file(nc, table);
    NC_memio io{};
    const int st = nc_close_memio(nc, &io);
    nc = -1;
    ok(st, "close in memory");
    // NetCDF-C hands over a malloc'ed block.
    std::string bytes(static_cast<const char*>(io.memory), io.size);
    std::free(io.memory);
    return bytes;
  } catch (const WriteFailure& e) {
    if (nc >= 0) nc_close(nc);
    throw InternalError("NetCDF in memory: " + e.what);
  }
}

CfTable daily_cf_table(const std::vector<CfDailySeries>& series, int lst_offset_s) {
  CfTable t;
  t.period_s = kSecondsPerDay;
  bool any = false;
  std::int64_t d0 = 0, d1 = 0;
  for (const auto& s : series) {
    if ((!s.valid_count.empty() && s.valid_count.size() != s.values.size()) ||
        (!s.complete.empty() && s.complete.size() != s.values.size())) {
      throw InternalError("daily series \"" + s.name + "\" with mismatched counts or flags");
    }
    if (s.values.empty()) continue;
    const std::int64_t last = s.first_day + static_cast<std::int64_t>(s.values.size()) - 1;
    d0 = any ? std::min(d0, s.first_day) : s.first_day;
    d1 = any ? std::max(d1, last) : last;
    any = true;
  }
  if (!any) throw InternalError("daily table without days");
  const auto n = static_cast<std::size_t>(d1 - d0 + 1);
  for (std::size_t i = 0; i < n; ++i) {
    t.time_utc.push_back((d0 + static_cast<std::int64_t>(i)) * kSecondsPerDay - lst_offset_s);
  }
  for (const auto& s : series) {
    CfVariable v;
    v.name = s.name;
    v.standard_name = s.standard_name;
    v.long_name = s.long_name;
    v.units = s.units;
    v.cell_methods = s.cell_methods;
    v.comment = s.comment;
    v.values.assign(n, std::nan(""));
    CfVariable c;
    if (!s.valid_count.empty()) {
      c.name = s.name + "_valid_count";
      c.long_name = "hours (or windows) present for " + s.name;
      c.units = "1";
      c.attributes["possible_count"] = std::to_string(s.possible_count);
      c.values.assign(n, 0.0);
      v.attributes["ancillary_variables"] = c.name;  // CF 3.4
    }
    CfVariable done;
    if (!s.complete.empty()) {
      done.name = s.name + "_complete";
      done.long_name = "day complete enough for " + s.name;
      done.flag_values = {0, 1};
      done.flag_meanings = "incomplete complete";
      done.values.assign(n, 0.0);
      const std::string anc = v.attributes["ancillary_variables"];
      v.attributes["ancillary_variables"] = anc.empty() ? done.name : anc + " " + done.name;
    }
    for (std::size_t k = 0; k < s.values.size(); ++k) {
      const auto row = static_cast<std::size_t>(s.first_day - d0) + k;
      v.values[row] = s.values[k];
      if (!s.valid_count.empty()) c.values[row] = s.valid_count[k];
      if (!s.complete.empty()) done.values[row] = s.complete[k] ? 1.0 : 0.0;
    }
    t.vars.push_back(std::move(v));
    if (!s.valid_count.empty()) t.vars.push_back(std::move(c));
    if (!s.complete.empty()) t.vars.push_back(std::move(done));
  }
  const int a = lst_offset_s < 0 ? -lst_offset_s : lst_offset_s;
  char buf[32];
  std::snprintf(buf, sizeof buf, "UTC%c%02d:%02d", lst_offset_s < 0 ? '-' : '+', a / 3600,
                (a % 3600) / 60);
  t.global_attributes["local_standard_time"] = buf;
  t.global_attributes["day_definition"] =
      "days are local standard time days (no daylight saving); time is the day's start";
  return t;
}

CfTable met_cf_table(const MetSeries& met) {
  CfTable t;
  t.period_s = 0;
  for (std::size_t i = 0; i < met.size(); ++i) t.time_utc.push_back(met.stamp(i));
  const auto add = [&](const char* name, const char* sn, const char* long_name, const char* units,
                       std::vector<double> values) {
    CfVariable v;
    v.name = name;
    v.standard_name = sn;
    v.long_name = long_name;
    v.units = units;
    v.cell_methods = "time: point";
    v.values = std::move(values);
    t.vars.push_back(std::move(v));
  };
  add("mixing_height", "atmosphere_boundary_layer_thickness", "mixing height", "m",
      met.mixing_height_m);
  add("eastward_wind", "eastward_wind", "eastward wind", "m s-1", met.wind_u_m_s);
  add("northward_wind", "northward_wind", "northward wind", "m s-1", met.wind_v_m_s);
  std::vector<double> speed(met.size()), from(met.size());
  for (std::size_t i = 0; i < met.size(); ++i) {
    const double u = met.wind_u_m_s[i], v = met.wind_v_m_s[i];
    speed[i] = wind_speed_m_s(u, v);
    from[i] = std::isnan(u) || std::isnan(v) ? std::nan("") : wind_from_deg(u, v);
  }
  add("wind_speed", "wind_speed", "wind speed", "m s-1", speed);
  add("wind_from_direction", "wind_from_direction", "wind from direction", "degree", from);
  if (!met.air_temperature_K.empty()) {
    add("air_temperature", "air_temperature", "air temperature", "K", met.air_temperature_K);
  }
  if (!met.surface_pressure_Pa.empty()) {
    add("surface_air_pressure", "surface_air_pressure", "surface air pressure", "Pa",
        met.surface_pressure_Pa);
  }
  for (const auto& c : met.extra) {
    CfVariable v;
    v.name = cf_variable_name(c.name);
    v.long_name = c.name;
    v.units = c.unit.empty() ? "1" : c.unit;
    v.values = c.values;
    t.vars.push_back(std::move(v));
  }
  if (met.filled.size() == met.size()) {
    CfVariable f;
    f.name = "met_filled";
    f.long_name = "met values supplied by the gap rule";
    f.flag_values = {0, 1};
    f.flag_meanings = "from_source gap_filled";
    for (auto x : met.filled) f.values.push_back(x);
    t.vars.push_back(std::move(f));
  }
  return t;
}

}  // namespace lidbox
