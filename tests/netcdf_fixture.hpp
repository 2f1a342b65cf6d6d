// Writes small NetCDF fixtures with NetCDF-C for the reader and writer tests.
#pragma once

#include <netcdf.h>

#include <filesystem>
#include <initializer_list>
#include <stdexcept>
#include <string>
#include <vector>

namespace lidbox::test {

inline void nc_ok(int status) {
  if (status != NC_NOERR) throw std::runtime_error(nc_strerror(status));
}

// A scratch directory under the build tree, emptied for each test that asks for it.
inline std::string scratch_dir(const std::string& name) {
  const std::filesystem::path p = std::filesystem::path(LIDBOX_BINARY_DIR) / "test-scratch" / name;
  std::filesystem::remove_all(p);
  std::filesystem::create_directories(p);
  return p.string();
}

class NcWriter {
 public:
  explicit NcWriter(const std::string& path, int mode = NC_NETCDF4) {
    nc_ok(nc_create(path.c_str(), NC_CLOBBER | mode, &id_));
  }
  NcWriter(const NcWriter&) = delete;
  NcWriter& operator=(const NcWriter&) = delete;
  ~NcWriter() {
    if (id_ >= 0) nc_close(id_);
  }
  int dim(const std::string& name, std::size_t len) {
    int d = 0;
    nc_ok(nc_def_dim(id_, name.c_str(), len, &d));
    return d;
  }
  int var(const std::string& name, nc_type type, std::initializer_list<int> dims) {
    std::vector<int> d(dims);
    int v = 0;
    nc_ok(nc_def_var(id_, name.c_str(), type, static_cast<int>(d.size()), d.data(), &v));
    return v;
  }
  // A variable with its standard_name (skipped when empty) and units.
  int var(const std::string& name, nc_type type, std::initializer_list<int> dims,
          const std::string& standard_name, const std::string& units) {
    const int v = var(name, type, dims);
    if (!standard_name.empty()) text(v, "standard_name", standard_name);
    text(v, "units", units);
    return v;
  }
  void text(int var, const std::string& name, const std::string& value) {
    nc_ok(nc_put_att_text(id_, var, name.c_str(), value.size(), value.c_str()));
  }
  void number(int var, const std::string& name, nc_type type, std::initializer_list<double> v) {
    std::vector<double> d(v);
    nc_ok(nc_put_att_double(id_, var, name.c_str(), type, d.size(), d.data()));
  }
  void end_define() { nc_ok(nc_enddef(id_)); }
  void put(int var, const std::vector<double>& values) {
    nc_ok(nc_put_var_double(id_, var, values.data()));
  }
  void put_text(int var, const std::string& values) {
    nc_ok(nc_put_var_text(id_, var, values.c_str()));
  }
  void close() {
    nc_ok(nc_close(id_));
    id_ = -1;
  }
  [[nodiscard]] int id() const { return id_; }

 private:
  int id_ = -1;
};

}  // namespace lidbox::test
