// Private to the NetCDF met reader: one NetCDF file open for reading through NetCDF-C, its root
// group's dimensions, variables and attributes, and a variable's values unpacked.
//
// A failing NetCDF-C call becomes an InputError naming the file (as shown in messages) and what
// was being read; an absent attribute is not a failure. The file is closed when the File goes
// out of scope.
//
// Unpacking (CF Conventions 8.1 and 2.5.1, NetCDF User Guide): _FillValue and missing_value
// (compared with the packed values), values outside valid_min/valid_max/valid_range, and the
// NetCDF default fill value when no _FillValue is set (not for byte types), become NaN; signed
// types marked _Unsigned = "true" are read as unsigned; then value = packed * scale_factor +
// add_offset. Units are the caller's business.
#pragma once

#include <netcdf.h>

#include <cstddef>
#include <optional>
#include <string>
#include <vector>

namespace lidbox::netcdf {

// Names in messages are set in double quotes.
inline std::string quoted(const std::string& s) {
  return "\"" + s + "\"";
}

struct Var {
  int id = -1;
  std::string name;
  nc_type type = NC_NAT;
  std::vector<int> dims;  // dimension ids, slowest first
};

class File {
 public:
  // Opens `path`; `shown_as` names the file in messages ("" = the path). InputError when the
  // file does not exist or is not NetCDF.
  File(const std::string& path, const std::string& shown_as);
  File(const File&) = delete;
  File& operator=(const File&) = delete;
  ~File();

  [[nodiscard]] const std::string& path() const { return path_; }  // as named in messages
  [[nodiscard]] const std::vector<Var>& vars() const { return vars_; }
  [[nodiscard]] const std::string& dim_name(int d) const { return dim_names_.at(d); }
  [[nodiscard]] std::size_t dim_len(int d) const { return dim_lens_.at(d); }

  // The variable of that exact name, or nullptr.
  [[nodiscard]] const Var* find(const std::string& name) const;
  // "<file>: variable \"<name>\"", the where of messages about one variable.
  [[nodiscard]] std::string where(const Var& v) const;
  [[nodiscard]] std::vector<std::string> var_names() const;
  // "(time=24, lat=3, lon=4)"
  [[nodiscard]] std::string dims_text(const Var& v) const;

  // InputError "<file>: <what>: NetCDF error: ..." unless status is NC_NOERR.
  void check(int status, const std::string& what) const;

  // Attributes of a variable (varid) or the file (NC_GLOBAL). A text attribute that is absent or
  // not text is nullopt; a numeric attribute that is absent or text is empty.
  [[nodiscard]] std::optional<std::string> text_att(int varid, const char* name) const;
  [[nodiscard]] std::vector<double> number_att(int varid, const char* name) const;
  [[nodiscard]] std::string standard_name(const Var& v) const;

  // Stored numbers of a whole variable converted to double by NetCDF-C, not unpacked.
  [[nodiscard]] std::vector<double> read_all(const Var& v) const;
  // Unpacked (see above; missing values are NaN): a whole variable, or the hyperslab start/count
  // in the variable's dimension order.
  [[nodiscard]] std::vector<double> read_values(const Var& v) const;
  [[nodiscard]] std::vector<double> read_values(const Var& v, const std::vector<std::size_t>& start,
                                                const std::vector<std::size_t>& count) const;
  // The hyperslab unpacked into `out` (resized; its memory is reused from call to call, as the
  // grid reader's slabs are). The stored numbers are read in their own type and converted here,
  // exactly as NetCDF-C converts them to double (every integer type of up to 32 bits and float
  // is exact in double), and unpacked in the same pass: the same doubles as read_values gives,
  // without NetCDF-C's conversion pass. Not for concurrent use (NetCDF-C is not thread-safe).
  void read_values(const Var& v, const std::vector<std::size_t>& start,
                   const std::vector<std::size_t>& count, std::vector<double>& out) const;
  // Chunk lengths of a NetCDF-4 chunked variable, slowest dimension first; empty for contiguous
  // storage and classic files.
  [[nodiscard]] std::vector<std::size_t> chunk_sizes(const Var& v) const;
  // Text values of a 1-D string variable, a 2-D char variable (instance, strlen), a scalar, or
  // numbers formatted as integers.
  [[nodiscard]] std::vector<std::string> read_ids(const Var& v) const;

 private:
  std::string path_;
  int id_ = -1;
  std::vector<std::string> dim_names_;
  std::vector<std::size_t> dim_lens_;
  std::vector<Var> vars_;
  mutable std::vector<unsigned char> stored_;  // read_values' buffer of stored numbers
};

// A coordinate variable: one dimension, named like it (NetCDF User Guide).
bool is_coordinate(const File& f, const Var& v);

// The unpacking attributes of one variable, applied to one stored number at a time.
class Packing {
 public:
  Packing(const File& f, const Var& v);
  // The physical value of a stored number; NaN when it marks a missing value.
  [[nodiscard]] double operator()(double packed) const;
  // out[i] = (*this)(in[i]) for stored numbers of type T, the same doubles; integer types in one
  // branch-free pass that the compiler vectorises.
  template <class T>
  void unpack(const T* in, double* out, std::size_t n) const;

 private:
  std::vector<double> missing_;
  double valid_min_;
  double valid_max_;
  double scale_ = 1.0;
  double offset_ = 0.0;
  bool is_float_ = false;
  double unsigned_wrap_ = 0.0;  // 2^bits for a signed type marked _Unsigned = "true"
};

}  // namespace lidbox::netcdf
