#include "lidbox/met/netcdf_grid.hpp"

#include <cmath>
#include <limits>

#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/base/units.hpp"
#include "lidbox/met/netcdf_met.hpp"
#include "met/netcdf_file.hpp"
#include "met/netcdf_layout.hpp"
#include "met/netcdf_roles.hpp"
#include "met/netcdf_time_axis.hpp"

namespace lidbox {

using netcdf::File;
using netcdf::quoted;
using netcdf::Var;

namespace {
constexpr double kInf = std::numeric_limits<double>::infinity();

// One pass over a slab: the unit conversion in place, and whether any value (its magnitude for a
// wind component) lies outside [lo, hi]; NaN does not. The flag is a double set by selects, the
// form GCC vectorises (a bool or integer reduction of double comparisons it does not);
// NetcdfGrid::check_slab then names the first value outside.
bool convert_and_flag(double* v, std::size_t n, UnitConversion c, double lo, double hi,
                      bool magnitude) {
  double outside = 0.0;
  if (magnitude) {
    for (std::size_t i = 0; i < n; ++i) {
      v[i] = c(v[i]);
      const double a = std::fabs(v[i]);
      outside = a < lo ? 1.0 : outside;
      outside = a > hi ? 1.0 : outside;
    }
  } else {
    for (std::size_t i = 0; i < n; ++i) {
      v[i] = c(v[i]);
      outside = v[i] < lo ? 1.0 : outside;
      outside = v[i] > hi ? 1.0 : outside;
    }
  }
  return outside != 0.0;
}
}  // namespace

struct NetcdfGrid::Impl {
  explicit Impl(const std::string& path, const std::string& shown) : file(path, shown) {}
  File file;
  std::vector<const Var*> vars;
  std::vector<UnitConversion> conv;
  std::vector<std::string> names, variables;
  std::vector<double> lat, lon;
  std::string lat_name, lon_name, note;
  UtcSeconds first = 0;
  std::size_t records = 0;
  PlausibilityLimits limits;
  std::vector<std::string> range_keys;  // per column; "" for a field without a range
};

namespace {

// ERA5's short names, used when neither a mapping nor a standard_name gives the role.
void add_era5_names(const File& f, NetcdfMetOptions& opt) {
  const std::pair<const char*, const char*> era5[] = {
      {"mixing_height", "blh"}, {"eastward_wind", "u10"}, {"northward_wind", "v10"}};
  for (const auto& [role, name] : era5) {
    if (opt.variables.count(role) ||
        !netcdf::by_standard_name(f, netcdf::role(role).standard_name).empty())
      continue;
    if (f.find(name)) opt.variables[role] = name;
  }
}

const Var* coordinate_of(const File& f, const Var& data, std::size_t pos, bool latitude) {
  const std::string& dim = f.dim_name(data.dims[pos]);
  const Var* c = f.find(dim);
  const bool ok = c && netcdf::is_coordinate(f, *c) &&
                  (latitude ? netcdf::is_latitude(f, *c) : netcdf::is_longitude(f, *c));
  if (!ok) {
    const std::string what = latitude ? "latitude" : "longitude";
    throw InputError(
        f.where(data),
        "dimension " + quoted(dim) + " (place " + std::to_string(pos + 1) + " of " +
            f.dims_text(data) + ") has no " + what + " coordinate",
        "a grid (time, latitude, longitude) whose latitude and longitude dimensions have 1-D "
        "coordinate variables of the same name with units " +
            std::string(latitude ? "degrees_north" : "degrees_east") + " or standard_name " + what);
  }
  return c;
}

// Refuses a time axis that is not hourly on whole UTC hours without gaps.
void check_hourly_axis(const File& f, const netcdf::TimeAxis& axis) {
  for (std::size_t i = 0; i < axis.t.size(); ++i) {
    const bool step_ok = i == 0 || axis.t[i] - axis.t[i - 1] == kSecondsPerHour;
    if (axis.t[i] % kSecondsPerHour != 0 || !step_ok) {
      throw InputError(
          f.path() + ": variable " + quoted(axis.variable),
          "record " + std::to_string(i + 1) + " at " + format_utc(axis.t[i]) +
              (step_ok ? ", not on a whole hour" : ", not one hour after the record before"),
          "hourly records on whole UTC hours without gaps for a grid run (fill or resample with "
          "cdo or nco first)");
    }
  }
}

// A note on speed when the file is chunked one map per time step ("" otherwise).
std::string chunk_note_of(const File& f, const Var& first, std::size_t records) {
  const auto chunks = f.chunk_sizes(first);
  if (chunks.empty() || chunks[0] != 1 || records <= 1) return "";
  return f.path() + ": variable " + quoted(first.name) +
         " is chunked one map per time step (chunks " + f.dims_text(first) + " -> " +
         join({std::to_string(chunks[0]), std::to_string(chunks[1]), std::to_string(chunks[2])},
              " x ") +
         "); it runs, but every block of cells reads every chunk: for speed, copy it with longer "
         "time chunks, e.g. nccopy -c " +
         f.dim_name(first.dims[0]) + "/720," + f.dim_name(first.dims[1]) + "/16," +
         f.dim_name(first.dims[2]) + "/16 in.nc out.nc";
}

}  // namespace

NetcdfGrid::NetcdfGrid(const std::string& path, const GridMetOptions& options)
    : impl_(std::make_unique<Impl>(path,
                                   options.display_name.empty() ? path : options.display_name)) {
  Impl& m = *impl_;
  const File& f = m.file;
  NetcdfMetOptions opt;
  opt.display_name = options.display_name;
  opt.variables = options.variables;
  add_era5_names(f, opt);
  netcdf::check_role_names(f, opt);
  const netcdf::MetVariables mv = netcdf::find_met_variables(f, opt);
  if (!mv.components()) {
    throw InputError(
        f.path(), "wind as speed and direction",
        "the eastward and northward wind components (u10, v10 or the CF standard names "
        "eastward_wind, northward_wind) for a grid run");
  }
  m.vars = {mv.mixing_height, mv.eastward_wind, mv.northward_wind};
  m.names = {"mixing_height", "eastward_wind", "northward_wind"};
  std::vector<std::string> to = {"m", "m/s", "m/s"};
  for (const auto& [name, var_unit] : options.fields) {
    const Var* v = f.find(var_unit.first);
    if (!v) {
      throw InputError(f.path(),
                       "no variable " + quoted(var_unit.first) + " for the field " + quoted(name) +
                           netcdf::present_and_hint(f, {var_unit.first}),
                       "the variable named for " + name);
    }
    m.vars.push_back(v);
    m.names.push_back(name);
    to.push_back(var_unit.second);
  }
  const Var& first = *m.vars[0];
  if (first.dims.size() != 3) {
    throw InputError(f.where(first), "dimensions " + f.dims_text(first),
                     "three dimensions (time, latitude, longitude) for a grid run");
  }
  for (const Var* v : m.vars) {
    if (v->dims != first.dims) {
      throw InputError(f.where(*v),
                       "dimensions " + f.dims_text(*v) + ", a grid other than " +
                           quoted(first.name) + "'s " + f.dims_text(first),
                       "every variable of a grid run on the same (time, latitude, longitude) grid");
    }
    m.variables.push_back(v->name);
  }
  const Var* lat = coordinate_of(f, first, 1, true);
  const Var* lon = coordinate_of(f, first, 2, false);
  m.lat = f.read_all(*lat);
  m.lon = f.read_all(*lon);
  m.lat_name = lat->name;
  m.lon_name = lon->name;
  const netcdf::TimeAxis axis = netcdf::read_time_axis(f, first.dims[0], nullptr, false);
  check_hourly_axis(f, axis);
  m.first = axis.t.front();
  m.records = axis.t.size();
  m.limits = options.limits;
  for (const auto& name : m.names) {
    const bool wind = name == "eastward_wind" || name == "northward_wind";
    const bool ranged = name == "mixing_height" || name == "precipitation" || name == "wind_500hPa";
    m.range_keys.push_back(wind ? "wind_speed" : ranged ? name : "");
  }
  for (std::size_t k = 0; k < m.vars.size(); ++k) {
    const std::string units = f.text_att(m.vars[k]->id, "units").value_or("");
    m.conv.push_back(
        unit_conversion(units, to[k], to[k] == "m" ? "length" : "speed", f.where(*m.vars[k])));
  }
  m.note = chunk_note_of(f, first, m.records);
}

NetcdfGrid::~NetcdfGrid() = default;

const std::string& NetcdfGrid::source() const {
  return impl_->file.path();
}
std::size_t NetcdfGrid::records() const {
  return impl_->records;
}
UtcSeconds NetcdfGrid::first_stamp_utc() const {
  return impl_->first;
}
const std::vector<double>& NetcdfGrid::latitude_deg() const {
  return impl_->lat;
}
const std::vector<double>& NetcdfGrid::longitude_deg() const {
  return impl_->lon;
}
const std::string& NetcdfGrid::latitude_name() const {
  return impl_->lat_name;
}
const std::string& NetcdfGrid::longitude_name() const {
  return impl_->lon_name;
}
const std::vector<std::string>& NetcdfGrid::column_names() const {
  return impl_->names;
}
const std::vector<std::string>& NetcdfGrid::column_variables() const {
  return impl_->variables;
}
const std::string& NetcdfGrid::chunk_note() const {
  return impl_->note;
}

void NetcdfGrid::read(std::size_t record0, std::size_t n_records, std::size_t row0,
                      std::size_t n_rows, std::vector<std::vector<double>>& out) const {
  const Impl& m = *impl_;
  if (record0 + n_records > m.records || row0 + n_rows > rows()) {
    throw InternalError("NetcdfGrid::read: slab outside the grid");
  }
  out.resize(m.vars.size());
  for (std::size_t k = 0; k < m.vars.size(); ++k) {
    std::vector<double>& values = out[k];
    m.file.read_values(*m.vars[k], {record0, row0, 0}, {n_records, n_rows, columns_per_row()},
                       values);
    const PlausibleRange* range =
        m.range_keys[k].empty() ? nullptr : &m.limits.range(m.range_keys[k]);
    const bool outside =
        convert_and_flag(values.data(), values.size(), m.conv[k], range ? range->min : -kInf,
                         range ? range->max : kInf, m.range_keys[k] == "wind_speed");
    if (outside) check_slab(k, record0, row0, n_rows, values);
  }
}

void NetcdfGrid::check_slab(std::size_t k, std::size_t record0, std::size_t row0,
                            std::size_t n_rows, const std::vector<double>& values) const {
  const Impl& m = *impl_;
  const PlausibleRange& range = m.limits.range(m.range_keys[k]);
  const bool magnitude = m.range_keys[k] == "wind_speed";
  const std::size_t per_record = n_rows * columns_per_row();
  for (std::size_t i = 0; i < values.size(); ++i) {
    const double x = magnitude ? std::fabs(values[i]) : values[i];
    if (std::isnan(x) || (x >= range.min && x <= range.max)) continue;
    const std::size_t record = record0 + i / per_record;
    const std::size_t row = row0 + (i % per_record) / columns_per_row();
    const std::size_t column = i % columns_per_row();
    m.limits.check(m.range_keys[k], x,
                   m.file.where(*m.vars[k]) + ": record " + std::to_string(record + 1) + " (" +
                       format_utc(m.first + static_cast<UtcSeconds>(record) * kSecondsPerHour) +
                       "), row " + std::to_string(row + 1) + ", column " +
                       std::to_string(column + 1));
  }
}

}  // namespace lidbox
