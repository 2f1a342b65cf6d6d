#include "met/netcdf_file.hpp"

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <limits>

#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"

namespace lidbox::netcdf {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

double default_fill(nc_type t) {
  switch (t) {
    case NC_BYTE:
      return NC_FILL_BYTE;
    case NC_SHORT:
      return NC_FILL_SHORT;
    case NC_INT:
      return NC_FILL_INT;
    case NC_FLOAT:
      return static_cast<double>(NC_FILL_FLOAT);
    case NC_DOUBLE:
      return NC_FILL_DOUBLE;
    case NC_UBYTE:
      return NC_FILL_UBYTE;
    case NC_USHORT:
      return NC_FILL_USHORT;
    case NC_UINT:
      return NC_FILL_UINT;
    default:
      return kNaN;
  }
}

}  // namespace

File::File(const std::string& path, const std::string& shown_as)
    : path_(shown_as.empty() ? path : shown_as) {
  std::error_code ec;
  if (!std::filesystem::exists(path, ec)) {
    throw InputError(path_, "no such file", "an existing NetCDF file");
  }
  if (std::filesystem::is_directory(path, ec)) {
    throw InputError(path_, "the path is a folder", "a NetCDF file");
  }
  const int st = nc_open(path.c_str(), NC_NOWRITE, &id_);
  if (st != NC_NOERR) {
    id_ = -1;
    throw InputError(path_, std::string("not readable as NetCDF (") + nc_strerror(st) + ")",
                     "a NetCDF-3 or NetCDF-4 file");
  }
  int ndims = 0, nvars = 0;
  check(nc_inq_ndims(id_, &ndims), "dimensions");
  check(nc_inq_nvars(id_, &nvars), "variables");
  // Dimension ids are 0..ndims-1 in the root group of the files lidbox reads.
  for (int d = 0; d < ndims; ++d) {
    char name[NC_MAX_NAME + 1] = {};
    std::size_t len = 0;
    check(nc_inq_dim(id_, d, name, &len), "dimension");
    dim_names_.emplace_back(name);
    dim_lens_.push_back(len);
  }
  for (int v = 0; v < nvars; ++v) {
    Var var;
    var.id = v;
    char name[NC_MAX_NAME + 1] = {};
    int nd = 0;
    check(nc_inq_var(id_, v, name, &var.type, &nd, nullptr, nullptr), "variable");
    var.name = name;
    var.dims.resize(static_cast<std::size_t>(nd));
    if (nd > 0) check(nc_inq_vardimid(id_, v, var.dims.data()), var.name);
    vars_.push_back(var);
  }
}

File::~File() {
  if (id_ >= 0) nc_close(id_);
}

const Var* File::find(const std::string& name) const {
  for (const auto& v : vars_) {
    if (v.name == name) return &v;
  }
  return nullptr;
}

std::string File::where(const Var& v) const {
  return path_ + ": variable " + quoted(v.name);
}

std::vector<std::string> File::var_names() const {
  std::vector<std::string> r;
  for (const auto& v : vars_) r.push_back(v.name);
  return r;
}

std::string File::dims_text(const Var& v) const {
  std::vector<std::string> n;
  for (int d : v.dims) n.push_back(dim_name(d) + "=" + std::to_string(dim_len(d)));
  // Built by appending: g++ 12 at -O3 reports a false -Wrestrict on "literal" + std::string&&
  // (GCC bug 105329).
  std::string text = "(";
  text += join(n);
  text += ')';
  return text;
}

void File::check(int status, const std::string& what) const {
  if (status != NC_NOERR) {
    throw InputError(path_ + ": " + what, std::string("NetCDF error: ") + nc_strerror(status),
                     "a readable NetCDF file");
  }
}

std::optional<std::string> File::text_att(int varid, const char* name) const {
  nc_type t = NC_NAT;
  std::size_t len = 0;
  if (nc_inq_att(id_, varid, name, &t, &len) != NC_NOERR) return std::nullopt;
  if (t == NC_CHAR) {
    std::string s(len, '\0');
    if (len > 0) check(nc_get_att_text(id_, varid, name, s.data()), name);
    while (!s.empty() && s.back() == '\0') s.pop_back();
    return s;
  }
  if (t == NC_STRING && len >= 1) {
    std::vector<char*> p(len, nullptr);
    check(nc_get_att_string(id_, varid, name, p.data()), name);
    std::string s = p[0] ? p[0] : "";
    nc_free_string(len, p.data());
    return s;
  }
  return std::nullopt;
}

std::vector<double> File::number_att(int varid, const char* name) const {
  nc_type t = NC_NAT;
  std::size_t len = 0;
  if (nc_inq_att(id_, varid, name, &t, &len) != NC_NOERR) return {};
  if (t == NC_CHAR || t == NC_STRING) return {};
  std::vector<double> r(len);
  check(nc_get_att_double(id_, varid, name, r.data()), name);
  return r;
}

std::string File::standard_name(const Var& v) const {
  return text_att(v.id, "standard_name").value_or("");
}

std::vector<double> File::read_all(const Var& v) const {
  std::size_t n = 1;
  for (int d : v.dims) n *= dim_len(d);
  std::vector<double> r(n);
  if (n > 0) check(nc_get_var_double(id_, v.id, r.data()), "variable " + quoted(v.name));
  return r;
}

std::vector<double> File::read_values(const Var& v) const {
  const Packing unpack(*this, v);
  auto r = read_all(v);
  for (auto& x : r) x = unpack(x);
  return r;
}

std::vector<double> File::read_values(const Var& v, const std::vector<std::size_t>& start,
                                      const std::vector<std::size_t>& count) const {
  std::vector<double> r;
  read_values(v, start, count, r);
  return r;
}

namespace {
// Reads the hyperslab in the stored type T into `stored`, then unpacks it into `out`.
template <class T>
void read_stored(const File& f, int ncid, const Var& v, const std::vector<std::size_t>& start,
                 const std::vector<std::size_t>& count, std::vector<unsigned char>& stored,
                 std::vector<double>& out) {
  const std::size_t n = out.size();
  stored.resize(n * sizeof(T));
  auto* values = reinterpret_cast<T*>(stored.data());  // vector storage is aligned for any T
  f.check(nc_get_vara(ncid, v.id, start.data(), count.data(), values),
          "variable " + quoted(v.name));
  Packing(f, v).unpack(values, out.data(), n);
}
}  // namespace

void File::read_values(const Var& v, const std::vector<std::size_t>& start,
                       const std::vector<std::size_t>& count, std::vector<double>& out) const {
  std::size_t n = 1;
  for (auto c : count) n *= c;
  out.resize(n);
  if (n == 0) return;
  switch (v.type) {
    case NC_BYTE:
      return read_stored<signed char>(*this, id_, v, start, count, stored_, out);
    case NC_UBYTE:
      return read_stored<unsigned char>(*this, id_, v, start, count, stored_, out);
    case NC_SHORT:
      return read_stored<short>(*this, id_, v, start, count, stored_, out);
    case NC_USHORT:
      return read_stored<unsigned short>(*this, id_, v, start, count, stored_, out);
    case NC_INT:
      return read_stored<int>(*this, id_, v, start, count, stored_, out);
    case NC_UINT:
      return read_stored<unsigned int>(*this, id_, v, start, count, stored_, out);
    case NC_FLOAT:
      return read_stored<float>(*this, id_, v, start, count, stored_, out);
    default:
      break;  // double and 64-bit integers: NetCDF-C's conversion to double
  }
  check(nc_get_vara_double(id_, v.id, start.data(), count.data(), out.data()),
        "variable " + quoted(v.name));
  const Packing unpack(*this, v);
  for (auto& x : out) x = unpack(x);
}

std::vector<std::string> File::read_ids(const Var& v) const {
  std::vector<std::string> ids;
  if (v.type == NC_STRING) {
    std::size_t n = v.dims.empty() ? 1 : dim_len(v.dims[0]);
    std::vector<char*> p(n, nullptr);
    check(nc_get_var_string(id_, v.id, p.data()), "variable " + quoted(v.name));
    for (auto* s : p) ids.emplace_back(s ? s : "");
    nc_free_string(n, p.data());
  } else if (v.type == NC_CHAR) {
    const std::size_t n = v.dims.size() >= 2 ? dim_len(v.dims[0]) : 1;
    const std::size_t w = v.dims.empty() ? 1 : dim_len(v.dims.back());
    std::string buf(n * w, '\0');
    if (!buf.empty()) check(nc_get_var_text(id_, v.id, buf.data()), "variable " + quoted(v.name));
    for (std::size_t i = 0; i < n; ++i) {
      std::string s = buf.substr(i * w, w);
      s = s.substr(0, s.find('\0'));
      while (!s.empty() && s.back() == ' ') s.pop_back();
      ids.push_back(s);
    }
  } else {
    for (double x : read_all(v)) ids.push_back(std::to_string(std::llround(x)));
  }
  return ids;
}

bool is_coordinate(const File& f, const Var& v) {
  return v.dims.size() == 1 && f.dim_name(v.dims[0]) == v.name;
}

Packing::Packing(const File& f, const Var& v)
    : valid_min_(-std::numeric_limits<double>::infinity()),
      valid_max_(std::numeric_limits<double>::infinity()) {
  is_float_ = v.type == NC_FLOAT || v.type == NC_DOUBLE;
  auto fill = f.number_att(v.id, "_FillValue");
  if (fill.empty() && v.type != NC_BYTE && v.type != NC_UBYTE) {
    // CF 2.5.1 / NetCDF User Guide: without _FillValue, the type's default fill marks
    // unwritten values (not for bytes, which often hold flags or small counts).
    const double d = default_fill(v.type);
    if (!std::isnan(d)) fill.push_back(d);
  }
  // NetCDF User Guide, "_Unsigned": NetCDF-3 stores unsigned data in signed types.
  if (lower(f.text_att(v.id, "_Unsigned").value_or("")) == "true") {
    if (v.type == NC_BYTE) unsigned_wrap_ = 256.0;
    if (v.type == NC_SHORT) unsigned_wrap_ = 65536.0;
    if (v.type == NC_INT) unsigned_wrap_ = 4294967296.0;
  }
  missing_ = fill;
  for (double m : f.number_att(v.id, "missing_value")) missing_.push_back(m);
  const auto range = f.number_att(v.id, "valid_range");
  if (range.size() == 2) {
    valid_min_ = range[0];
    valid_max_ = range[1];
  }
  if (auto a = f.number_att(v.id, "valid_min"); a.size() == 1) valid_min_ = a[0];
  if (auto a = f.number_att(v.id, "valid_max"); a.size() == 1) valid_max_ = a[0];
  if (auto a = f.number_att(v.id, "scale_factor"); a.size() == 1) scale_ = a[0];
  // A zero scale would turn every stored number into add_offset: a broken file, not data.
  if (scale_ == 0.0 || !std::isfinite(scale_)) {
    throw InputError(f.where(v), "scale_factor " + format_number(scale_),
                     "a scale_factor other than 0 (CF 8.1: value = stored * scale_factor + "
                     "add_offset)");
  }
  if (auto a = f.number_att(v.id, "add_offset"); a.size() == 1) offset_ = a[0];
}

// Fill and missing values are compared in the stored (signed) type; valid bounds after the
// unsigned reinterpretation, as the NetCDF User Guide reads them.
std::vector<std::size_t> File::chunk_sizes(const Var& v) const {
  int storage = NC_CONTIGUOUS;
  std::vector<std::size_t> sizes(v.dims.size(), 0);
  if (v.dims.empty() || nc_inq_var_chunking(id_, v.id, &storage, sizes.data()) != NC_NOERR ||
      storage != NC_CHUNKED) {
    return {};
  }
  return sizes;
}

double Packing::operator()(double packed) const {
  if (std::isnan(packed)) return kNaN;
  for (double m : missing_) {
    // Float fill values pass through NetCDF-C's float->double conversion exactly, so equality
    // is the right test; a relative tolerance guards fills written as float but declared as
    // double by careless writers.
    if (packed == m || (is_float_ && m != 0.0 && std::fabs(packed - m) <= 1e-7 * std::fabs(m))) {
      return kNaN;
    }
  }
  if (unsigned_wrap_ > 0.0 && packed < 0.0) packed += unsigned_wrap_;
  if (packed < valid_min_ || packed > valid_max_) return kNaN;
  return packed * scale_ + offset_;
}

// operator()'s steps in its order, without branches: the missing values (at most four; NaN pads
// never compare equal), the _Unsigned wrap, the valid bounds, the scale and offset.
template <class T>
void Packing::unpack(const T* in, double* out, std::size_t n) const {
  if (is_float_ || missing_.size() > 4) {
    for (std::size_t i = 0; i < n; ++i) out[i] = (*this)(static_cast<double>(in[i]));
    return;
  }
  double m[4] = {kNaN, kNaN, kNaN, kNaN};
  std::copy(missing_.begin(), missing_.end(), m);
  const double wrap = unsigned_wrap_, lo = valid_min_, hi = valid_max_;
  const double scale = scale_, offset = offset_;
  for (std::size_t i = 0; i < n; ++i) {
    const double stored = static_cast<double>(in[i]);
    const double packed = wrap > 0.0 && stored < 0.0 ? stored + wrap : stored;
    const bool missing = (stored == m[0]) | (stored == m[1]) | (stored == m[2]) | (stored == m[3]) |
                         (packed < lo) | (packed > hi);
    out[i] = missing ? kNaN : packed * scale + offset;
  }
}

template void Packing::unpack(const signed char*, double*, std::size_t) const;
template void Packing::unpack(const unsigned char*, double*, std::size_t) const;
template void Packing::unpack(const short*, double*, std::size_t) const;
template void Packing::unpack(const unsigned short*, double*, std::size_t) const;
template void Packing::unpack(const int*, double*, std::size_t) const;
template void Packing::unpack(const unsigned int*, double*, std::size_t) const;
template void Packing::unpack(const float*, double*, std::size_t) const;

}  // namespace lidbox::netcdf
