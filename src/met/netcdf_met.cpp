#include "lidbox/met/netcdf_met.hpp"

#include <netcdf.h>

#include <algorithm>
#include <cctype>
#include <cmath>
#include <functional>
#include <limits>
#include <numbers>
#include <set>

#include "lidbox/base/cf_time.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/base/units.hpp"
#include "met/netcdf_file.hpp"
#include "met/netcdf_time_axis.hpp"

namespace lidbox {
namespace {

using netcdf::File;
using netcdf::Hourly;
using netcdf::is_coordinate;
using netcdf::quoted;
using netcdf::read_time_axis;
using netcdf::TimeAxis;
using netcdf::to_hourly;
using netcdf::Var;

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// ---------------------------------------------------------------------------------------------
// Roles.

struct Role {
  std::string key;          // role name in NetcdfMetOptions::variables
  std::string description;  // for messages
  std::string standard_name;
  std::vector<std::string> aliases;  // common short names, only for "did you mean"
};

const std::vector<Role>& roles() {
  static const std::vector<Role> r = {
      {"mixing_height",
       "the mixing height",
       "atmosphere_boundary_layer_thickness",
       {"blh", "pblh", "hpbl", "mixing_height", "mlh", "zi", "boundary_layer_height"}},
      {"eastward_wind", "the eastward wind", "eastward_wind", {"u", "u10", "uwnd", "ua", "uas"}},
      {"northward_wind", "the northward wind", "northward_wind", {"v", "v10", "vwnd", "va", "vas"}},
      {"wind_speed", "the wind speed", "wind_speed", {"ws", "wspd", "ff", "si10", "sfcwind"}},
      {"wind_from_direction",
       "the wind direction",
       "wind_from_direction",
       {"wd", "wdir", "dd", "wind_dir", "wind_direction"}},
      {"air_temperature", "the air temperature", "air_temperature", {"t2m", "t", "temp", "tas"}},
      {"surface_pressure",
       "the surface pressure",
       "surface_air_pressure",
       {"sp", "ps", "pres", "psfc", "surface_pressure"}},
  };
  return r;
}

const Role& role(const std::string& key) {
  for (const auto& r : roles()) {
    if (r.key == key) return r;
  }
  throw InternalError("unknown role " + key);
}

// The variable closest to what was sought, among data variables (not coordinates); "" if none is
// near enough to be a useful hint.
std::string closest(const File& f, const std::vector<std::string>& probes, bool skip_taken) {
  // With skip_taken, variables that already carry the standard name of another role are not
  // candidates (a role looked up by standard name).
  std::set<std::string> taken;
  for (const auto& r : roles()) taken.insert(r.standard_name);
  for (const auto& [k, names] : concentration_standard_names())
    taken.insert(names.begin(), names.end());
  std::set<std::string> sought;
  for (const auto& p : probes) sought.insert(lower(p));
  std::string best;
  std::size_t best_score = std::numeric_limits<std::size_t>::max();
  for (const auto& v : f.vars()) {
    if (is_coordinate(f, v)) continue;
    const std::string sn = lower(f.standard_name(v));
    if (skip_taken && taken.count(sn) && !sought.count(sn)) continue;
    std::vector<std::string> names = {lower(v.name)};
    if (!sn.empty()) names.push_back(sn);
    for (const auto& probe : sought) {
      for (const auto& n : names) {
        std::size_t score = std::numeric_limits<std::size_t>::max();
        if (n == probe) {
          score = 0;
        } else if (probe.size() >= 3 && n.rfind(probe, 0) == 0 &&
                   !std::isalpha(static_cast<unsigned char>(n[probe.size()]))) {
          score = 1;  // "pblh_m", "blh2" for "pblh", "blh"
        } else {
          const std::size_t d = edit_distance(probe, n);
          if (d <= std::max<std::size_t>(1, probe.size() / 3)) score = 1 + d;
        }
        if (score < best_score) {
          best_score = score;
          best = v.name;
        }
      }
    }
  }
  return best;
}

std::string present_and_hint(const File& f, const std::vector<std::string>& probes,
                             bool skip_taken = false) {
  std::string s = " among the variables present: " + join(f.var_names());
  const std::string hint = closest(f, probes, skip_taken);
  if (!hint.empty()) s += "; did you mean " + quoted(hint) + "?";
  return s;
}

// Variables whose standard_name is `sn` (case-insensitive), coordinates excluded.
std::vector<const Var*> by_standard_name(const File& f, const std::string& sn) {
  std::vector<const Var*> r;
  for (const auto& v : f.vars()) {
    if (lower(f.standard_name(v)) == lower(sn)) r.push_back(&v);
  }
  return r;
}

// The variable for a role: mapped name first, then the standard name. nullptr when absent and
// not required.
const Var* find_role(const File& f, const NetcdfMetOptions& opt, const Role& r, bool required) {
  if (auto it = opt.variables.find(r.key); it != opt.variables.end()) {
    if (const Var* v = f.find(it->second)) return v;
    std::vector<std::string> probes = {it->second};
    throw InputError(f.path(),
                     "variable " + quoted(it->second) + " (mapped to " + r.description +
                         ") not found" + present_and_hint(f, probes),
                     "one of the variables present");
  }
  const auto found = by_standard_name(f, r.standard_name);
  if (found.size() > 1) {
    std::vector<std::string> names;
    for (const auto* v : found) names.push_back(v->name);
    throw InputError(f.path(),
                     "several variables with standard_name " + quoted(r.standard_name) + " (" +
                         join(names) + ")",
                     "one, or the role " + quoted(r.key) + " mapped to a variable name");
  }
  if (found.size() == 1) return found[0];
  if (!required) return nullptr;
  std::vector<std::string> probes = {r.standard_name, r.key};
  probes.insert(probes.end(), r.aliases.begin(), r.aliases.end());
  throw InputError(f.path(),
                   "no variable for " + r.description + " (standard_name " +
                       quoted(r.standard_name) + ")" + present_and_hint(f, probes, true),
                   "a variable with that standard_name, or the role " + quoted(r.key) +
                       " mapped to a variable name");
}

// ---------------------------------------------------------------------------------------------
// Dimensions of a data variable and what is taken from each.

bool is_time_coordinate(const File& f, const Var& v) {
  if (lower(f.standard_name(v)) == "time") return true;
  if (lower(f.text_att(v.id, "axis").value_or("")) == "t") return true;
  return lower(f.text_att(v.id, "units").value_or("")).find(" since ") != std::string::npos;
}

bool units_in(const std::string& u, std::initializer_list<const char*> list) {
  const std::string l = lower(u);
  for (const char* s : list) {
    if (l == s) return true;
  }
  return false;
}

bool is_latitude(const File& f, const Var& v) {
  const std::string sn = lower(f.standard_name(v));
  if (sn == "latitude") return true;
  if (sn == "grid_latitude") return false;
  if (units_in(f.text_att(v.id, "units").value_or(""),
               {"degrees_north", "degree_north", "degree_n", "degrees_n", "degreen", "degreesn"})) {
    return true;
  }
  const std::string n = lower(v.name);
  return n == "lat" || n == "latitude";
}

bool is_longitude(const File& f, const Var& v) {
  const std::string sn = lower(f.standard_name(v));
  if (sn == "longitude") return true;
  if (sn == "grid_longitude") return false;
  if (units_in(f.text_att(v.id, "units").value_or(""),
               {"degrees_east", "degree_east", "degree_e", "degrees_e", "degreee", "degreese"})) {
    return true;
  }
  const std::string n = lower(v.name);
  return n == "lon" || n == "longitude";
}

bool is_member_dim(const File& f, int d) {
  if (const Var* c = f.find(f.dim_name(d)); c && is_coordinate(f, *c)) {
    if (lower(f.standard_name(*c)) == "realization") return true;
  }
  static const std::set<std::string> names = {"member",   "members", "realization",
                                              "ensemble", "ens",     "number"};
  return names.count(lower(f.dim_name(d))) > 0;
}

double wrap180(double deg) {
  double d = std::fmod(deg, 360.0);
  if (d > 180.0) d -= 360.0;
  if (d <= -180.0) d += 360.0;
  return d;
}

// Great-circle angle between two points [rad] (haversine form, well conditioned for near
// points).
double central_angle(double lat1, double lon1, double lat2, double lon2) {
  const double k = std::numbers::pi / 180.0;
  const double s1 = std::sin((lat2 - lat1) * k / 2.0);
  const double s2 = std::sin(wrap180(lon2 - lon1) * k / 2.0);
  const double a = s1 * s1 + std::cos(lat1 * k) * std::cos(lat2 * k) * s2 * s2;
  return 2.0 * std::asin(std::min(1.0, std::sqrt(a)));
}

std::string fmt(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.6g", v);
  return buf;
}

// The cells taken from one variable: a hyperslab and, per cell inside it, an offset and a weight.
struct Selection {
  int time_dim = -1;
  std::size_t time_pos = 0;  // position of the time dimension in the variable's dims
  std::vector<std::size_t> start, count;
  struct Cell {
    std::size_t offset_in_record = 0;  // offset within one time record of the slab
    double weight = 1.0;
  };
  std::vector<Cell> cells;
  std::string layout;
};

// CF Appendix H.2.4/H.2.5 ragged arrays are not read; say so before anything else fails.
void refuse_ragged(const File& f) {
  for (const auto& cand : f.vars()) {
    for (const char* att : {"sample_dimension", "instance_dimension"}) {
      if (f.text_att(cand.id, att)) {
        throw InputError(f.path(),
                         "a ragged-array layout (variable " + quoted(cand.name) + " has " + att +
                             ", CF Appendix H.2.4/H.2.5)",
                         "a single time series or the orthogonal layout X(station, time) "
                         "(CF Appendix H.2.1, H.4)");
      }
    }
  }
}

Selection select(const File& f, const Var& v, const NetcdfMetOptions& opt, const Var* mapped_time) {
  const std::string where = f.where(v);
  Selection s;
  const std::size_t nd = v.dims.size();
  s.start.assign(nd, 0);
  s.count.assign(nd, 1);
  // The two grid dimensions (a, b) of the variable: latitude and longitude dimensions with 1-D
  // coordinates, or the (y, x) dimensions of 2-D latitude/longitude auxiliary coordinates named
  // in its `coordinates` attribute (CF 5.2, curvilinear grids).
  int lat_pos = -1, lon_pos = -1;
  const Var* lat_var = nullptr;
  const Var* lon_var = nullptr;
  const Var* lat2d = nullptr;
  const Var* lon2d = nullptr;
  if (auto coords = f.text_att(v.id, "coordinates")) {
    std::size_t pos = 0;
    while (pos < coords->size()) {
      const std::size_t end = std::min(coords->find(' ', pos), coords->size());
      const Var* c = f.find(coords->substr(pos, end - pos));
      pos = end + 1;
      if (!c || c->dims.size() != 2) continue;
      if (is_latitude(f, *c)) lat2d = c;
      if (is_longitude(f, *c)) lon2d = c;
    }
    if (lat2d && lon2d && lat2d->dims != lon2d->dims) {
      throw InputError(where,
                       "2-D latitude " + quoted(lat2d->name) + " and longitude " +
                           quoted(lon2d->name) + " on different dimensions",
                       "2-D latitude and longitude on the same (y, x) dimensions");
    }
    if (!lat2d || !lon2d) lat2d = lon2d = nullptr;
  }
  std::vector<std::string> layout;

  // The station (instance) dimension, from the cf_role variable (CF Appendix H.2).
  const Var* id_var = nullptr;
  for (const auto& cand : f.vars()) {
    if (lower(f.text_att(cand.id, "cf_role").value_or("")) == "timeseries_id") id_var = &cand;
  }
  int station_dim = -1;
  if (id_var && !id_var->dims.empty() && !(id_var->type == NC_CHAR && id_var->dims.size() == 1)) {
    station_dim = id_var->dims[0];
  }

  for (std::size_t k = 0; k < nd; ++k) {
    const int d = v.dims[k];
    const std::size_t len = f.dim_len(d);
    const Var* coord = f.find(f.dim_name(d));
    if (coord && !is_coordinate(f, *coord)) coord = nullptr;
    const bool time_here = mapped_time
                               ? (mapped_time->dims.size() == 1 && mapped_time->dims[0] == d)
                               : (coord && is_time_coordinate(f, *coord));
    if (time_here) {
      if (s.time_dim >= 0) {
        throw InputError(where, "two time dimensions " + f.dims_text(v), "one time dimension");
      }
      s.time_dim = d;
      s.time_pos = k;
      s.count[k] = len;
    } else if (d == station_dim) {
      const auto ids = f.read_ids(*id_var);
      std::size_t pick = 0;
      if (opt.station_id) {
        auto it = std::find(ids.begin(), ids.end(), *opt.station_id);
        if (it == ids.end()) {
          throw InputError(f.where(*id_var), "no station " + quoted(*opt.station_id),
                           "one of the stations " + join(ids));
        }
        pick = static_cast<std::size_t>(it - ids.begin());
      } else if (ids.size() != 1) {
        throw InputError(
            f.where(*id_var),
            std::to_string(ids.size()) + " stations (" + join(ids) + ") and no station chosen",
            "a station id (--station or [met] station)");
      }
      s.start[k] = pick;
      layout.push_back("station " + quoted(ids.at(pick)));
    } else if (is_member_dim(f, d)) {
      std::vector<long long> values;
      const bool has_coord = coord != nullptr;
      if (has_coord) {
        for (double x : f.read_all(*coord)) values.push_back(std::llround(x));
      } else {
        for (std::size_t i = 0; i < len; ++i) values.push_back(static_cast<long long>(i));
      }
      std::size_t pick = 0;
      if (opt.member) {
        auto it = std::find(values.begin(), values.end(), *opt.member);
        if (it == values.end()) {
          std::vector<std::string> txt;
          for (auto x : values) txt.push_back(std::to_string(x));
          throw InputError(
              where + ": dimension " + quoted(f.dim_name(d)),
              "no member " + std::to_string(*opt.member),
              std::string("one of the members ") + join(txt) +
                  (has_coord ? "" : " (0-based indices; the file has no member coordinate)"));
        }
        pick = static_cast<std::size_t>(it - values.begin());
      } else if (len != 1) {
        throw InputError(where,
                         std::to_string(len) + " ensemble members along dimension " +
                             quoted(f.dim_name(d)) + " and no member chosen",
                         "a member (--member or [met] member)");
      }
      s.start[k] = pick;
      layout.push_back("member " + std::to_string(values.at(pick)));
    } else if (lat2d && d == lat2d->dims[0]) {
      lat_pos = static_cast<int>(k);
    } else if (lat2d && d == lat2d->dims[1]) {
      lon_pos = static_cast<int>(k);
    } else if (coord && is_latitude(f, *coord)) {
      lat_pos = static_cast<int>(k);
      lat_var = coord;
    } else if (coord && is_longitude(f, *coord)) {
      lon_pos = static_cast<int>(k);
      lon_var = coord;
    } else if (len != 1) {
      throw InputError(where,
                       "dimensions " + f.dims_text(v) + " with dimension " + quoted(f.dim_name(d)) +
                           " of length " + std::to_string(len) +
                           " that is neither time, station, ensemble member, latitude nor "
                           "longitude",
                       "dimensions time [, station | member | latitude, longitude], other "
                       "dimensions of length 1");
    }
  }
  if (s.time_dim < 0) {
    throw InputError(where, "dimensions " + f.dims_text(v) + " without a time dimension",
                     "a dimension with a CF time coordinate (standard_name time, or units "
                     "\"<unit> since <date>\")");
  }
  if ((lat_pos >= 0) != (lon_pos >= 0)) {
    throw InputError(where,
                     "dimensions " + f.dims_text(v) + " with only one of latitude and longitude",
                     "both a latitude and a longitude dimension (or both dimensions of 2-D "
                     "latitude and longitude), or neither");
  }
  if (lat_pos < 0 && opt.station_id && station_dim < 0) {
    // A single time series: its id, when it has one, must be the one asked for.
    if (!id_var) {
      throw InputError(f.path(),
                       "station " + quoted(*opt.station_id) +
                           " asked for, but the file has no station id (cf_role = timeseries_id)",
                       "a station file, or no station option");
    }
    const auto ids = f.read_ids(*id_var);
    if (ids.empty() || ids[0] != *opt.station_id) {
      throw InputError(f.where(*id_var), "station " + quoted(ids.empty() ? "" : ids[0]),
                       "station " + quoted(*opt.station_id));
    }
  }

  // Strides of one time record of the slab, in the variable's dimension order.
  auto record_offset = [&](std::size_t ilat_rel, std::size_t ilon_rel) {
    std::size_t off = 0;
    for (std::size_t k = 0; k < nd; ++k) {
      if (k == s.time_pos) continue;
      std::size_t idx = 0;
      if (static_cast<int>(k) == lat_pos) idx = ilat_rel;
      if (static_cast<int>(k) == lon_pos) idx = ilon_rel;
      off = off * s.count[k] + idx;
    }
    return off;
  };

  if (lat_pos < 0) {
    s.cells.push_back({0, 1.0});
    if (layout.empty()) {
      std::string one = "a single time series";
      if (id_var && station_dim < 0) {
        const auto ids = f.read_ids(*id_var);
        if (!ids.empty() && !ids[0].empty()) one += " " + quoted(ids[0]);
      }
      layout.push_back(one);
    }
    if (opt.point || opt.footprint) layout.push_back("point/footprint not needed");
    s.layout = join(layout);
    return s;
  }

  // Cell centres: index a runs along the first grid dimension (latitude or y), b the second.
  std::vector<double> lats, lons;
  std::size_t na = 0, nb = 0;
  const bool curvilinear = lat2d != nullptr;
  if (curvilinear) {
    lats = f.read_all(*lat2d);
    lons = f.read_all(*lon2d);
    na = f.dim_len(lat2d->dims[0]);
    nb = f.dim_len(lat2d->dims[1]);
  } else {
    const auto la = f.read_all(*lat_var);
    const auto lo = f.read_all(*lon_var);
    na = la.size();
    nb = lo.size();
    for (std::size_t i = 0; i < na; ++i) {
      for (std::size_t j = 0; j < nb; ++j) {
        lats.push_back(la[i]);
        lons.push_back(lo[j]);
      }
    }
  }
  const auto extent = [&]() {
    const auto [la0, la1] = std::minmax_element(lats.begin(), lats.end());
    std::vector<double> w(lons.size());
    std::transform(lons.begin(), lons.end(), w.begin(), wrap180);
    const auto [lo0, lo1] = std::minmax_element(w.begin(), w.end());
    return "grid lat " + fmt(*la0) + ".." + fmt(*la1) + ", lon " + fmt(*lo0) + ".." + fmt(*lo1);
  };
  std::vector<std::pair<std::size_t, std::size_t>> chosen;
  std::vector<double> weights;
  if (opt.point && opt.footprint) {
    throw InputError(where, "both a point and a footprint", "one of them");
  }
  if (opt.point) {
    const double plat = opt.point->lat_deg, plon = opt.point->lon_deg;
    if (!(plat >= -90.0 && plat <= 90.0) || !std::isfinite(plon)) {
      throw InputError(where, "point latitude " + fmt(plat) + ", longitude " + fmt(plon),
                       "latitude -90..90 degrees north and a finite longitude");
    }
    double best = std::numeric_limits<double>::infinity();
    std::size_t bi = 0;
    for (std::size_t c = 0; c < lats.size(); ++c) {
      const double ang = central_angle(plat, plon, lats[c], lons[c]);
      if (ang < best) {
        best = ang;
        bi = c;
      }
    }
    chosen.emplace_back(bi / nb, bi % nb);
    weights.push_back(1.0);
    layout.push_back("grid cell nearest to " + fmt(plat) + "N " + fmt(plon) + "E: lat " +
                     fmt(lats[bi]) + ", lon " + fmt(lons[bi]) + " (" + fmt(best * 6371.0088) +
                     " km away)");
  } else if (opt.footprint) {
    const auto& bx = *opt.footprint;
    const double w0 = wrap180(bx.lon_min_deg), w1 = wrap180(bx.lon_max_deg);
    for (std::size_t c = 0; c < lats.size(); ++c) {
      if (!(lats[c] >= bx.lat_min_deg && lats[c] <= bx.lat_max_deg)) continue;
      const double lo = wrap180(lons[c]);
      const bool inside = w0 <= w1 ? (lo >= w0 && lo <= w1) : (lo >= w0 || lo <= w1);
      if (!inside) continue;
      chosen.emplace_back(c / nb, c % nb);
      // A regular lat/lon cell's area is proportional to cos(latitude); the cells of a projected
      // (curvilinear) grid are close to equal in area, so they weigh the same.
      weights.push_back(curvilinear ? 1.0 : std::cos(lats[c] * std::numbers::pi / 180.0));
    }
    if (chosen.empty()) {
      throw InputError(where,
                       "no grid cell centre inside the footprint lat " + fmt(bx.lat_min_deg) +
                           ".." + fmt(bx.lat_max_deg) + ", lon " + fmt(bx.lon_min_deg) + ".." +
                           fmt(bx.lon_max_deg) + " (" + extent() + ")",
                       "a footprint that contains at least one cell centre");
    }
    layout.push_back("mean over " + std::to_string(chosen.size()) +
                     " grid cells in the footprint (" +
                     (curvilinear ? "equal weights" : "cos-latitude weights") + ")");
  } else if (na * nb == 1) {
    chosen.emplace_back(0, 0);
    weights.push_back(1.0);
    layout.push_back("the single grid cell");
  } else {
    throw InputError(where,
                     "a grid of " + std::to_string(na) + " x " + std::to_string(nb) +
                         " cells and neither a point nor a footprint",
                     "a point (--point LAT,LON) or a footprint (lat/lon box)");
  }
  std::size_t i0 = na, i1 = 0, j0 = nb, j1 = 0;
  for (auto [i, j] : chosen) {
    i0 = std::min(i0, i);
    i1 = std::max(i1, i);
    j0 = std::min(j0, j);
    j1 = std::max(j1, j);
  }
  s.start[static_cast<std::size_t>(lat_pos)] = i0;
  s.count[static_cast<std::size_t>(lat_pos)] = i1 - i0 + 1;
  s.start[static_cast<std::size_t>(lon_pos)] = j0;
  s.count[static_cast<std::size_t>(lon_pos)] = j1 - j0 + 1;
  for (std::size_t c = 0; c < chosen.size(); ++c) {
    s.cells.push_back({record_offset(chosen[c].first - i0, chosen[c].second - j0), weights[c]});
  }
  s.layout = join(layout);
  return s;
}

// ---------------------------------------------------------------------------------------------
// Values of the selected cells, in the caller's units.

// One variable, read for its selected cells: cells[cell][record], unpacked and in `to` units.
struct CellValues {
  std::vector<std::vector<double>> cells;
  std::vector<double> weights;
  std::string unit;  // unit of the values
};

CellValues read_cells(const File& f, const Var& v, const Selection& s,
                      const std::function<UnitConversion(const std::string&)>& convert) {
  const auto units = f.text_att(v.id, "units");
  if (!units) {
    throw InputError(f.where(v), "no units attribute", "a units attribute (CF 3.1)");
  }
  const UnitConversion cv = convert(*units);
  const auto values = f.read_values(v, s.start, s.count);
  const std::size_t nt = s.count[s.time_pos];
  // Records are the time index; the slab is in the variable's own dimension order, so the
  // element of (record r, cell offset o) is found through the strides around the time position.
  std::size_t inner = 1;  // product of counts after the time dimension
  for (std::size_t k = s.time_pos + 1; k < s.count.size(); ++k) inner *= s.count[k];
  CellValues out;
  for (const auto& cell : s.cells) {
    const std::size_t hi = cell.offset_in_record / inner;  // index over dims before time
    const std::size_t lo = cell.offset_in_record % inner;  // index over dims after time
    std::vector<double> series(nt);
    for (std::size_t r = 0; r < nt; ++r) {
      const double x = values[(hi * nt + r) * inner + lo];
      series[r] = std::isnan(x) ? kNaN : cv(x);
    }
    out.cells.push_back(std::move(series));
    out.weights.push_back(cell.weight);
  }
  return out;
}

// Weighted mean over cells; NaN when any cell is missing.
std::vector<double> cell_mean(const std::vector<std::vector<double>>& cells,
                              const std::vector<double>& w) {
  const std::size_t nt = cells.empty() ? 0 : cells[0].size();
  std::vector<double> r(nt, kNaN);
  for (std::size_t t = 0; t < nt; ++t) {
    double sw = 0.0, sx = 0.0;
    bool missing = false;
    for (std::size_t c = 0; c < cells.size(); ++c) {
      if (std::isnan(cells[c][t])) {
        missing = true;
        break;
      }
      sw += w[c];
      sx += w[c] * cells[c][t];
    }
    if (!missing && sw > 0.0) r[t] = sx / sw;
  }
  return r;
}

// ---------------------------------------------------------------------------------------------

struct Loaded {
  const Var* var = nullptr;
  CellValues values;
  Selection sel;
  TimeAxis axis;
};

Loaded load(const File& f, const Var& v, const NetcdfMetOptions& opt, const Var* mapped_time,
            const std::function<UnitConversion(const std::string&)>& convert, bool bounds_start) {
  Loaded l;
  l.var = &v;
  l.sel = select(f, v, opt, mapped_time);
  l.values = read_cells(f, v, l.sel, convert);
  l.axis = read_time_axis(f, l.sel.time_dim, mapped_time, bounds_start);
  return l;
}

std::function<UnitConversion(const std::string&)> converter_to(const File& f, const Var& v,
                                                               std::string to,
                                                               std::string quantity) {
  const std::string where = f.where(v);
  return [where, to, quantity](const std::string& from) {
    return unit_conversion(from, to, quantity, where);
  };
}

struct ConcentrationTarget {
  std::string key;
  std::string unit;  // "ug m-3" or "ppb"
  bool mole_fraction = false;
};

std::optional<ConcentrationTarget> concentration_target(const std::string& standard_name) {
  const std::string sn = lower(standard_name);
  for (const auto& [key, names] : concentration_standard_names()) {
    for (const auto& n : names) {
      if (n == sn) {
        const bool mf = sn.rfind("mole_fraction", 0) == 0;
        return ConcentrationTarget{key, mf ? "ppb" : "ug m-3", mf};
      }
    }
  }
  return std::nullopt;
}

std::function<UnitConversion(const std::string&)> concentration_converter(
    const File& f, const Var& v, const ConcentrationTarget& c) {
  const std::string where = f.where(v);
  if (!c.mole_fraction) {
    return [where](const std::string& from) {
      return unit_conversion(from, "ug m-3", "mass concentration", where);
    };
  }
  return [where](const std::string& from) {
    // UDUNITS has no ppb; mole fractions are plain numbers (CF canonical unit "1").
    std::string u = lower(from);
    static const std::map<std::string, std::string> ratio = {{"ppm", "1e-6"},  {"ppmv", "1e-6"},
                                                             {"ppb", "1e-9"},  {"ppbv", "1e-9"},
                                                             {"ppt", "1e-12"}, {"pptv", "1e-12"}};
    if (auto it = ratio.find(u); it != ratio.end()) u = it->second;
    return unit_conversion(u, "1e-9", "mole fraction", where);
  };
}

}  // namespace

const std::map<std::string, std::vector<std::string>>& concentration_standard_names() {
  static const std::map<std::string, std::vector<std::string>> m = {
      {"pm2p5",
       {"mass_concentration_of_pm2p5_ambient_aerosol_particles_in_air",
        "mass_concentration_of_pm2p5_ambient_aerosol_in_air"}},
      {"pm10",
       {"mass_concentration_of_pm10_ambient_aerosol_particles_in_air",
        "mass_concentration_of_pm10_ambient_aerosol_in_air"}},
      {"co",
       {"mass_concentration_of_carbon_monoxide_in_air", "mole_fraction_of_carbon_monoxide_in_air"}},
      {"no2",
       {"mass_concentration_of_nitrogen_dioxide_in_air",
        "mole_fraction_of_nitrogen_dioxide_in_air"}},
      {"o3", {"mass_concentration_of_ozone_in_air", "mole_fraction_of_ozone_in_air"}},
      {"so2",
       {"mass_concentration_of_sulfur_dioxide_in_air", "mole_fraction_of_sulfur_dioxide_in_air"}},
  };
  return m;
}

SubHourlyRule parse_sub_hourly_rule(std::string_view text, std::string_view where) {
  if (text == "hour_mean") return SubHourlyRule::hour_mean;
  if (text == "on_the_hour") return SubHourlyRule::on_the_hour;
  if (text == "refuse") return SubHourlyRule::refuse;
  throw InputError(std::string(where), "sub-hourly rule " + quoted(std::string(text)),
                   "hour_mean, on_the_hour or refuse");
}

CoarseStepRule parse_coarse_step_rule(std::string_view text, std::string_view where) {
  if (text == "refuse") return CoarseStepRule::refuse;
  if (text == "linear") return CoarseStepRule::linear;
  throw InputError(std::string(where), "coarse-step rule " + quoted(std::string(text)),
                   "refuse or linear");
}

const std::vector<std::string>& netcdf_met_roles() {
  static const std::vector<std::string> r = [] {
    std::vector<std::string> v;
    for (const auto& role : roles()) v.push_back(role.key);
    v.emplace_back("time");
    return v;
  }();
  return r;
}

MetSeries read_met_netcdf(const std::string& path, const NetcdfMetOptions& opt,
                          NetcdfReadInfo* info) {
  const File f(path, opt.display_name);
  refuse_ragged(f);
  const auto& known = netcdf_met_roles();
  for (const auto& [r, name] : opt.variables) {
    if (std::find(known.begin(), known.end(), r) == known.end()) {
      std::string hint;
      std::size_t best = 3;  // suggest only within two edits
      for (const auto& k : known) {
        const std::size_t d = edit_distance(r, k);
        if (d < best) {
          best = d;
          hint = "; did you mean " + quoted(k) + "?";
        }
      }
      throw InputError(f.path(), "unknown variable role " + quoted(r) + hint,
                       "one of " + join(known));
    }
  }
  const Var* mapped_time = nullptr;
  if (auto it = opt.variables.find("time"); it != opt.variables.end()) {
    mapped_time = f.find(it->second);
    if (!mapped_time) {
      throw InputError(f.path(),
                       "variable " + quoted(it->second) + " (mapped to the time) not found" +
                           present_and_hint(f, {it->second}),
                       "one of the variables present");
    }
  }
  const Var* h = find_role(f, opt, role("mixing_height"), true);
  // Components unless the caller mapped only the speed/direction form.
  const auto mapped = [&](const char* r) { return opt.variables.count(r) > 0; };
  const bool speed_form = (mapped("wind_speed") || mapped("wind_from_direction")) &&
                          !mapped("eastward_wind") && !mapped("northward_wind");
  const Var* u = speed_form ? nullptr : find_role(f, opt, role("eastward_wind"), false);
  const Var* v = speed_form ? nullptr : find_role(f, opt, role("northward_wind"), false);
  const Var* ws = nullptr;
  const Var* wd = nullptr;
  if (!u || !v) {
    ws = find_role(f, opt, role("wind_speed"), false);
    wd = find_role(f, opt, role("wind_from_direction"), false);
    if (!ws || !wd) {
      // Name what is missing from the more complete of the two forms.
      if (u || v) find_role(f, opt, role(u ? "northward_wind" : "eastward_wind"), true);
      find_role(f, opt, role(ws ? "wind_from_direction" : "wind_speed"), true);
    }
  }
  const Var* ta = find_role(f, opt, role("air_temperature"), false);
  const Var* ps = find_role(f, opt, role("surface_pressure"), false);

  std::vector<Loaded> loaded;
  loaded.push_back(load(f, *h, opt, mapped_time, converter_to(f, *h, "m", "length"), false));
  std::vector<double> col_u, col_v;
  const auto mean = [](const Loaded& l) { return cell_mean(l.values.cells, l.values.weights); };
  if (u && v) {
    loaded.push_back(load(f, *u, opt, mapped_time, converter_to(f, *u, "m/s", "speed"), false));
    loaded.push_back(load(f, *v, opt, mapped_time, converter_to(f, *v, "m/s", "speed"), false));
    col_u = mean(loaded[1]);
    col_v = mean(loaded[2]);
  } else {
    const std::string wd_where = f.where(*wd);
    loaded.push_back(load(f, *ws, opt, mapped_time, converter_to(f, *ws, "m/s", "speed"), false));
    loaded.push_back(load(
        f, *wd, opt, mapped_time,
        [wd_where](const std::string& from) { return direction_unit_to_degrees(from, wd_where); },
        false));
    // Per cell to components, then averaged (a footprint mean of directions would be wrong).
    const auto& sp = loaded[1].values;
    const auto& dir = loaded[2].values;
    std::vector<std::vector<double>> cu = sp.cells, cvv = sp.cells;
    for (std::size_t c = 0; c < sp.cells.size(); ++c) {
      for (std::size_t r = 0; r < sp.cells[c].size(); ++r) {
        const double s = sp.cells[c][r], d = dir.cells[c][r];
        if (std::isnan(s) || std::isnan(d)) {
          cu[c][r] = cvv[c][r] = kNaN;
        } else {
          wind_components(s, d, cu[c][r], cvv[c][r]);
        }
      }
    }
    col_u = cell_mean(cu, sp.weights);
    col_v = cell_mean(cvv, sp.weights);
  }
  std::vector<std::vector<double>> cols = {mean(loaded[0]), col_u, col_v};
  int ta_col = -1, ps_col = -1;
  if (ta) {
    loaded.push_back(
        load(f, *ta, opt, mapped_time, converter_to(f, *ta, "K", "temperature"), false));
    ta_col = static_cast<int>(cols.size());
    cols.push_back(mean(loaded.back()));
  }
  if (ps) {
    loaded.push_back(load(f, *ps, opt, mapped_time, converter_to(f, *ps, "Pa", "pressure"), false));
    ps_col = static_cast<int>(cols.size());
    cols.push_back(mean(loaded.back()));
  }
  std::vector<MetColumn> extra;
  for (const auto& [column, wanted] : opt.extra) {
    const Var* ev = f.find(wanted);
    if (!ev) {
      const auto found = by_standard_name(f, wanted);
      if (found.size() == 1) ev = found[0];
      if (found.size() > 1) {
        throw InputError(f.path(),
                         "several variables with standard_name " + quoted(wanted) + " for column " +
                             quoted(column),
                         "one, or the variable named");
      }
    }
    if (!ev) {
      throw InputError(f.path(),
                       "no variable or standard_name " + quoted(wanted) + " for column " +
                           quoted(column) + present_and_hint(f, {wanted}),
                       "a variable name or a CF standard_name present in the file");
    }
    std::string unit;
    std::function<UnitConversion(const std::string&)> conv;
    if (auto target = concentration_target(f.standard_name(*ev))) {
      unit = target->unit;
      conv = concentration_converter(f, *ev, *target);
    } else {
      unit = f.text_att(ev->id, "units").value_or("");
      conv = [](const std::string&) { return UnitConversion{}; };
    }
    loaded.push_back(load(f, *ev, opt, mapped_time, conv, false));
    cols.push_back(mean(loaded.back()));
    extra.push_back({column, unit, {}});
  }
  for (std::size_t i = 1; i < loaded.size(); ++i) {
    if (loaded[0].axis.t != loaded[i].axis.t) {
      throw InputError(f.where(*loaded[i].var),
                       "a time axis different from that of " + quoted(loaded[0].var->name),
                       "all met variables on one time axis");
    }
  }
  Hourly hr = to_hourly(f, loaded[0].axis, cols, opt.sub_hourly, opt.coarse);
  MetSeries m;
  m.source = f.path();
  m.first_stamp_utc = hr.first;
  m.mixing_height_m = std::move(hr.columns[0]);
  m.wind_u_m_s = std::move(hr.columns[1]);
  m.wind_v_m_s = std::move(hr.columns[2]);
  if (ta_col >= 0) m.air_temperature_K = std::move(hr.columns[static_cast<std::size_t>(ta_col)]);
  if (ps_col >= 0) m.surface_pressure_Pa = std::move(hr.columns[static_cast<std::size_t>(ps_col)]);
  const std::size_t first_extra = cols.size() - extra.size();
  for (std::size_t e = 0; e < extra.size(); ++e) {
    extra[e].values = std::move(hr.columns[first_extra + e]);
  }
  m.extra = std::move(extra);
  m.filled.assign(m.size(), 0);
  m.source_line = hr.record;
  if (info) {
    info->role_variable.clear();
    info->role_variable["mixing_height"] = h->name;
    if (u && v) {
      info->role_variable["eastward_wind"] = u->name;
      info->role_variable["northward_wind"] = v->name;
    } else {
      info->role_variable["wind_speed"] = ws->name;
      info->role_variable["wind_from_direction"] = wd->name;
    }
    if (ta) info->role_variable["air_temperature"] = ta->name;
    if (ps) info->role_variable["surface_pressure"] = ps->name;
    info->role_variable["time"] = loaded[0].axis.variable;
    info->layout = loaded[0].sel.layout;
    info->time_step = hr.rule;
    info->records = loaded[0].axis.t.size();
    info->time_bounds_label = loaded[0].axis.bounds_label;
  }
  return m;
}

std::vector<std::pair<std::string, HourlySeries>> read_concentrations_netcdf(
    const std::string& path, const NetcdfMetOptions& opt,
    const std::vector<std::string>& variables) {
  const File f(path, opt.display_name);
  refuse_ragged(f);
  std::vector<std::pair<std::string, const Var*>> chosen;
  if (!variables.empty()) {
    for (const auto& name : variables) {
      const Var* v = f.find(name);
      if (!v) {
        throw InputError(f.path(),
                         "variable " + quoted(name) + " not found" + present_and_hint(f, {name}),
                         "one of the variables present");
      }
      chosen.emplace_back(name, v);
    }
  } else {
    for (const auto& v : f.vars()) {
      if (auto t = concentration_target(f.standard_name(v))) chosen.emplace_back(t->key, &v);
    }
    if (chosen.empty()) {
      std::vector<std::string> probes;
      for (const auto& [k, names] : concentration_standard_names()) probes.push_back(names[0]);
      throw InputError(f.path(),
                       "no concentration variable (CF standard_name "
                       "mass_concentration_of_..._in_air or mole_fraction_of_..._in_air)" +
                           present_and_hint(f, probes),
                       "a variable with a concentration standard_name, or the variables named");
    }
  }
  const Var* mapped_time = nullptr;
  if (auto it = opt.variables.find("time"); it != opt.variables.end())
    mapped_time = f.find(it->second);
  std::vector<std::pair<std::string, HourlySeries>> out;
  NetcdfMetOptions series_opt = opt;
  series_opt.coarse = CoarseStepRule::refuse;
  if (series_opt.sub_hourly == SubHourlyRule::on_the_hour)
    series_opt.sub_hourly = SubHourlyRule::hour_mean;
  for (const auto& [key, v] : chosen) {
    const auto target = concentration_target(f.standard_name(*v));
    std::string unit = f.text_att(v->id, "units").value_or("");
    std::function<UnitConversion(const std::string&)> conv = [](const std::string&) {
      return UnitConversion{};
    };
    if (target) {
      unit = target->unit;
      conv = concentration_converter(f, *v, *target);
    }
    Loaded l = load(f, *v, opt, mapped_time, conv, true);
    Hourly hr = to_hourly(f, l.axis, {cell_mean(l.values.cells, l.values.weights)},
                          series_opt.sub_hourly, series_opt.coarse);
    HourlySeries s;
    s.first_hour_start_utc = hr.first;
    s.values = std::move(hr.columns[0]);
    s.unit = unit;
    out.emplace_back(key, std::move(s));
  }
  return out;
}

}  // namespace lidbox
