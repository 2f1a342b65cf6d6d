#include "lidbox/grid/grid_files.hpp"

#include <netcdf.h>

#include <cmath>
#include <cstdio>
#include <filesystem>
#include <limits>

#include "lidbox/base/caution.hpp"
#include "lidbox/base/error.hpp"

namespace lidbox {

namespace {

constexpr double kFill = 9.969209968386869e36;  // NC_FILL_DOUBLE

void check(int status, const std::string& file, const std::string& what) {
  if (status != NC_NOERR) {
    throw InputError(file, std::string("NetCDF error while ") + what + ": " + nc_strerror(status),
                     "a writable output folder");
  }
}

void put_text(int ncid, int varid, const char* name, const std::string& value,
              const std::string& file) {
  if (value.empty()) return;
  check(nc_put_att_text(ncid, varid, name, value.size(), value.c_str()), file,
        std::string("writing ") + name);
}

// Common header: dimension ids returned through the arguments.
int create(const std::string& dir, const std::string& name, std::string& tmp,
           std::string& final_path) {
  std::filesystem::create_directories(dir);
  final_path = (std::filesystem::path(dir) / name).string();
  tmp = (std::filesystem::path(dir) / ("." + name + ".partial")).string();
  int ncid = -1;
  check(nc_create(tmp.c_str(), NC_CLOBBER | NC_64BIT_OFFSET, &ncid), final_path,
        "creating the file");
  return ncid;
}

void global_attributes(int ncid, const GridFileInfo& info, const std::string& file) {
  put_text(ncid, NC_GLOBAL, "Conventions", "CF-1.8", file);
  put_text(ncid, NC_GLOBAL, "title", info.title, file);
  put_text(ncid, NC_GLOBAL, "source", info.source, file);
  put_text(ncid, NC_GLOBAL, "comment", info.comment, file);
  put_text(ncid, NC_GLOBAL, "caution", kScreeningCaution, file);
  for (const auto& [k, v] : info.attributes) put_text(ncid, NC_GLOBAL, k.c_str(), v, file);
}

int time_variables(int ncid, int time_dim, int bnds_dim, int& bnds_id, const std::string& file) {
  int tid = -1;
  check(nc_def_var(ncid, "time", NC_DOUBLE, 1, &time_dim, &tid), file, "defining time");
  put_text(ncid, tid, "standard_name", "time", file);
  put_text(ncid, tid, "units", "hours since 1970-01-01 00:00:00", file);
  put_text(ncid, tid, "calendar", "proleptic_gregorian", file);
  put_text(ncid, tid, "bounds", "time_bnds", file);
  const int dims[2] = {time_dim, bnds_dim};
  check(nc_def_var(ncid, "time_bnds", NC_DOUBLE, 2, dims, &bnds_id), file, "defining time_bnds");
  return tid;
}

int data_variable(int ncid, const GridVariableSpec& v, int ndims, const int* dims,
                  const std::string& coordinates, const std::string& file) {
  int id = -1;
  check(nc_def_var(ncid, v.name.c_str(), NC_DOUBLE, ndims, dims, &id), file, "defining " + v.name);
  check(nc_def_var_fill(ncid, id, 0, &kFill), file, "setting the fill value of " + v.name);
  put_text(ncid, id, "long_name", v.long_name, file);
  put_text(ncid, id, "units", v.units, file);
  put_text(ncid, id, "standard_name", v.standard_name, file);
  put_text(ncid, id, "cell_methods", v.cell_methods, file);
  put_text(ncid, id, "coordinates", coordinates, file);
  return id;
}

void put_time(int ncid, int tid, int bid, std::size_t rec, std::size_t n, UtcSeconds first,
              UtcSeconds step, const std::vector<UtcSeconds>* ends, const std::string& file) {
  std::vector<double> t(n), b(2 * n);
  for (std::size_t i = 0; i < n; ++i) {
    const UtcSeconds s = first + static_cast<UtcSeconds>(i) * step;
    const UtcSeconds e = ends ? (*ends)[i] : s + step;
    t[i] = static_cast<double>(s) / 3600.0;
    b[2 * i] = t[i];
    b[2 * i + 1] = static_cast<double>(e) / 3600.0;
  }
  const std::size_t start[2] = {rec, 0}, count[2] = {n, 2};
  check(nc_put_vara_double(ncid, tid, start, count, t.data()), file, "writing time");
  check(nc_put_vara_double(ncid, bid, start, count, b.data()), file, "writing time_bnds");
}

std::vector<double> filled(const std::vector<double>& v) {
  std::vector<double> out(v);
  for (double& x : out) {
    if (!std::isfinite(x)) x = kFill;
  }
  return out;
}

std::string finish(int& ncid, const std::string& tmp, const std::string& final_path) {
  if (ncid >= 0) {
    const int id = ncid;
    ncid = -1;
    check(nc_close(id), final_path, "closing");
    std::filesystem::rename(tmp, final_path);
  }
  return final_path;
}

void abandon(int& ncid, const std::string& tmp) {
  if (ncid < 0) return;
  nc_close(ncid);
  ncid = -1;
  std::error_code ec;
  std::filesystem::remove(tmp, ec);
}

}  // namespace

GridMapFile::GridMapFile(const std::string& dir, const std::string& name, const GridFileInfo& info,
                         const std::string& lat_name, const std::vector<double>& lat_deg,
                         const std::string& lon_name, const std::vector<double>& lon_deg,
                         const std::vector<GridVariableSpec>& vars)
    : n_lat_(lat_deg.size()), n_lon_(lon_deg.size()) {
  ncid_ = create(dir, name, tmp_, final_);
  try {
    int time_dim = -1, bnds_dim = -1, lat_dim = -1, lon_dim = -1;
    check(nc_def_dim(ncid_, "time", NC_UNLIMITED, &time_dim), final_, "defining time");
    check(nc_def_dim(ncid_, "bnds", 2, &bnds_dim), final_, "defining bnds");
    check(nc_def_dim(ncid_, lat_name.c_str(), n_lat_, &lat_dim), final_, "defining " + lat_name);
    check(nc_def_dim(ncid_, lon_name.c_str(), n_lon_, &lon_dim), final_, "defining " + lon_name);
    time_id_ = time_variables(ncid_, time_dim, bnds_dim, bnds_id_, final_);
    int lat_id = -1, lon_id = -1;
    check(nc_def_var(ncid_, lat_name.c_str(), NC_DOUBLE, 1, &lat_dim, &lat_id), final_,
          "defining " + lat_name);
    put_text(ncid_, lat_id, "standard_name", "latitude", final_);
    put_text(ncid_, lat_id, "units", "degrees_north", final_);
    check(nc_def_var(ncid_, lon_name.c_str(), NC_DOUBLE, 1, &lon_dim, &lon_id), final_,
          "defining " + lon_name);
    put_text(ncid_, lon_id, "standard_name", "longitude", final_);
    put_text(ncid_, lon_id, "units", "degrees_east", final_);
    const int dims[3] = {time_dim, lat_dim, lon_dim};
    for (const auto& v : vars) varids_.push_back(data_variable(ncid_, v, 3, dims, "", final_));
    global_attributes(ncid_, info, final_);
    check(nc_enddef(ncid_), final_, "ending the definitions");
    check(nc_put_var_double(ncid_, lat_id, lat_deg.data()), final_, "writing " + lat_name);
    check(nc_put_var_double(ncid_, lon_id, lon_deg.data()), final_, "writing " + lon_name);
  } catch (...) {
    abandon(ncid_, tmp_);
    throw;
  }
}

GridMapFile::~GridMapFile() {
  abandon(ncid_, tmp_);
}

void GridMapFile::append(UtcSeconds start_utc, UtcSeconds end_utc,
                         const std::vector<std::vector<double>>& maps) {
  if (maps.size() != varids_.size())
    throw InternalError("GridMapFile::append: wrong number of maps");
  const std::vector<UtcSeconds> ends = {end_utc};
  put_time(ncid_, time_id_, bnds_id_, records_, 1, start_utc, end_utc - start_utc, &ends, final_);
  const std::size_t start[3] = {records_, 0, 0}, count[3] = {1, n_lat_, n_lon_};
  for (std::size_t k = 0; k < maps.size(); ++k) {
    if (maps[k].size() != n_lat_ * n_lon_)
      throw InternalError("GridMapFile::append: map of the wrong size");
    const auto v = filled(maps[k]);
    check(nc_put_vara_double(ncid_, varids_[k], start, count, v.data()), final_, "writing a map");
  }
  ++records_;
}

std::string GridMapFile::close() {
  return finish(ncid_, tmp_, final_);
}

GridSeriesFile::GridSeriesFile(const std::string& dir, const std::string& name,
                               const GridFileInfo& info, const std::vector<double>& cell_lat_deg,
                               const std::vector<double>& cell_lon_deg,
                               const std::vector<GridVariableSpec>& vars)
    : cells_(cell_lat_deg.size()) {
  ncid_ = create(dir, name, tmp_, final_);
  try {
    int time_dim = -1, bnds_dim = -1, cell_dim = -1;
    check(nc_def_dim(ncid_, "time", NC_UNLIMITED, &time_dim), final_, "defining time");
    check(nc_def_dim(ncid_, "bnds", 2, &bnds_dim), final_, "defining bnds");
    check(nc_def_dim(ncid_, "cell", cells_, &cell_dim), final_, "defining cell");
    time_id_ = time_variables(ncid_, time_dim, bnds_dim, bnds_id_, final_);
    int lat_id = -1, lon_id = -1;
    check(nc_def_var(ncid_, "lat", NC_DOUBLE, 1, &cell_dim, &lat_id), final_, "defining lat");
    put_text(ncid_, lat_id, "standard_name", "latitude", final_);
    put_text(ncid_, lat_id, "units", "degrees_north", final_);
    check(nc_def_var(ncid_, "lon", NC_DOUBLE, 1, &cell_dim, &lon_id), final_, "defining lon");
    put_text(ncid_, lon_id, "standard_name", "longitude", final_);
    put_text(ncid_, lon_id, "units", "degrees_east", final_);
    const int dims[2] = {time_dim, cell_dim};
    for (const auto& v : vars)
      varids_.push_back(data_variable(ncid_, v, 2, dims, "lat lon", final_));
    global_attributes(ncid_, info, final_);
    put_text(ncid_, NC_GLOBAL, "featureType", "timeSeries", final_);
    check(nc_enddef(ncid_), final_, "ending the definitions");
    check(nc_put_var_double(ncid_, lat_id, cell_lat_deg.data()), final_, "writing lat");
    check(nc_put_var_double(ncid_, lon_id, cell_lon_deg.data()), final_, "writing lon");
  } catch (...) {
    abandon(ncid_, tmp_);
    throw;
  }
}

GridSeriesFile::~GridSeriesFile() {
  abandon(ncid_, tmp_);
}

void GridSeriesFile::append(UtcSeconds first_hour_utc, std::size_t hours,
                            const std::vector<std::vector<double>>& values) {
  if (hours == 0) return;
  put_time(ncid_, time_id_, bnds_id_, records_, hours, first_hour_utc, kSecondsPerHour, nullptr,
           final_);
  const std::size_t start[2] = {records_, 0}, count[2] = {hours, cells_};
  for (std::size_t k = 0; k < values.size(); ++k) {
    const auto v = filled(values[k]);
    check(nc_put_vara_double(ncid_, varids_[k], start, count, v.data()), final_,
          "writing a series");
  }
  records_ += hours;
}

std::string GridSeriesFile::close() {
  return finish(ncid_, tmp_, final_);
}

}  // namespace lidbox
