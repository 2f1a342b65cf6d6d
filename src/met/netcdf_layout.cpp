#include "met/netcdf_layout.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <initializer_list>
#include <limits>
#include <numbers>
#include <set>
#include <utility>

#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"

namespace lidbox::netcdf {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// ---------------------------------------------------------------------------------------------
// What a coordinate is.

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

// ---------------------------------------------------------------------------------------------
// Classifying the dimensions of one variable.

// 2-D latitude and longitude named in a variable's `coordinates` attribute (CF 5.2, a
// curvilinear grid); both or neither.
struct Curvilinear {
  const Var* lat = nullptr;
  const Var* lon = nullptr;
};

Curvilinear curvilinear_coordinates(const File& f, const Var& v, const std::string& where) {
  Curvilinear g;
  const auto coords = f.text_att(v.id, "coordinates");
  if (!coords) return g;
  std::size_t pos = 0;
  while (pos < coords->size()) {
    const std::size_t end = std::min(coords->find(' ', pos), coords->size());
    const Var* c = f.find(coords->substr(pos, end - pos));
    pos = end + 1;
    if (!c || c->dims.size() != 2) continue;
    if (is_latitude(f, *c)) g.lat = c;
    if (is_longitude(f, *c)) g.lon = c;
  }
  if (g.lat && g.lon && g.lat->dims != g.lon->dims) {
    throw InputError(where,
                     "2-D latitude " + quoted(g.lat->name) + " and longitude " +
                         quoted(g.lon->name) + " on different dimensions",
                     "2-D latitude and longitude on the same (y, x) dimensions");
  }
  if (!g.lat || !g.lon) g = {};
  return g;
}

// The station id variable (cf_role = "timeseries_id", CF Appendix H.2) and its instance
// dimension; dim is -1 for a scalar id or a single char id (one station).
struct Stations {
  const Var* id_var = nullptr;
  int dim = -1;
};

Stations station_instance(const File& f) {
  Stations st;
  for (const auto& cand : f.vars()) {
    if (lower(f.text_att(cand.id, "cf_role").value_or("")) == "timeseries_id") st.id_var = &cand;
  }
  const Var* id = st.id_var;
  if (id && !id->dims.empty() && !(id->type == NC_CHAR && id->dims.size() == 1)) {
    st.dim = id->dims[0];
  }
  return st;
}

enum class DimKind { time, station, member, grid_y, grid_x, latitude, longitude, other };

// In this order of precedence: time, station, member, the (y, x) of a curvilinear grid, 1-D
// latitude, 1-D longitude, anything else. `coord` is the dimension's coordinate variable or null.
DimKind classify_dimension(const File& f, int d, const Var* coord, const Var* mapped_time,
                           const Stations& st, const Curvilinear& g) {
  const bool time_here = mapped_time ? (mapped_time->dims.size() == 1 && mapped_time->dims[0] == d)
                                     : (coord && is_time_coordinate(f, *coord));
  if (time_here) return DimKind::time;
  if (d == st.dim) return DimKind::station;
  if (is_member_dim(f, d)) return DimKind::member;
  if (g.lat && d == g.lat->dims[0]) return DimKind::grid_y;
  if (g.lat && d == g.lat->dims[1]) return DimKind::grid_x;
  if (coord && is_latitude(f, *coord)) return DimKind::latitude;
  if (coord && is_longitude(f, *coord)) return DimKind::longitude;
  return DimKind::other;
}

// ---------------------------------------------------------------------------------------------
// Picking one station or member.

struct Pick {
  std::size_t index = 0;
  std::string layout;
};

Pick pick_station(const File& f, const Stations& st, const NetcdfMetOptions& opt) {
  const auto ids = f.read_ids(*st.id_var);
  std::size_t pick = 0;
  if (opt.station_id) {
    auto it = std::find(ids.begin(), ids.end(), *opt.station_id);
    if (it == ids.end()) {
      throw InputError(f.where(*st.id_var), "no station " + quoted(*opt.station_id),
                       "one of the stations " + join(ids));
    }
    pick = static_cast<std::size_t>(it - ids.begin());
  } else if (ids.size() != 1) {
    throw InputError(
        f.where(*st.id_var),
        std::to_string(ids.size()) + " stations (" + join(ids) + ") and no station chosen",
        "a station id (--station or [met] station)");
  }
  return {pick, "station " + quoted(ids.at(pick))};
}

// By the coordinate's value, or by 0-based index when the dimension has no coordinate.
std::vector<long long> member_coordinate_values(const File& f, int d, const Var* coord) {
  std::vector<long long> values;
  if (coord) {
    for (double x : f.read_all(*coord)) values.push_back(std::llround(x));
  } else {
    for (std::size_t i = 0; i < f.dim_len(d); ++i) values.push_back(static_cast<long long>(i));
  }
  return values;
}

Pick pick_member(const File& f, const std::string& where, int d, const Var* coord,
                 const NetcdfMetOptions& opt) {
  const std::size_t len = f.dim_len(d);
  const bool has_coord = coord != nullptr;
  const std::vector<long long> values = member_coordinate_values(f, d, coord);
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
  return {pick, "member " + std::to_string(values.at(pick))};
}

// ---------------------------------------------------------------------------------------------
// The dimension scan.

// The grid dimensions found: positions in the variable's dims (a = latitude or y, b = longitude
// or x), and the 1-D coordinates when the grid is not curvilinear.
struct GridDims {
  int a_pos = -1;
  int b_pos = -1;
  const Var* lat_1d = nullptr;
  const Var* lon_1d = nullptr;
  Curvilinear curvilinear;
};

// Each dimension in the variable's order, picked from or refused as soon as it is met.
void scan_dimensions(const File& f, const Var& v, const NetcdfMetOptions& opt,
                     const Var* mapped_time, const Stations& st, GridDims& grid, Selection& s,
                     std::vector<std::string>& layout) {
  const std::string where = f.where(v);
  for (std::size_t k = 0; k < v.dims.size(); ++k) {
    const int d = v.dims[k];
    const std::size_t len = f.dim_len(d);
    const Var* coord = f.find(f.dim_name(d));
    if (coord && !is_coordinate(f, *coord)) coord = nullptr;
    const int pos = static_cast<int>(k);
    Pick p;
    switch (classify_dimension(f, d, coord, mapped_time, st, grid.curvilinear)) {
      case DimKind::time:
        if (s.time_dim >= 0) {
          throw InputError(where, "two time dimensions " + f.dims_text(v), "one time dimension");
        }
        s.time_dim = d;
        s.time_pos = k;
        s.count[k] = len;
        break;
      case DimKind::station:
        p = pick_station(f, st, opt);
        s.start[k] = p.index;
        layout.push_back(p.layout);
        break;
      case DimKind::member:
        p = pick_member(f, where, d, coord, opt);
        s.start[k] = p.index;
        layout.push_back(p.layout);
        break;
      case DimKind::grid_y:
        grid.a_pos = pos;
        break;
      case DimKind::grid_x:
        grid.b_pos = pos;
        break;
      case DimKind::latitude:
        grid.a_pos = pos;
        grid.lat_1d = coord;
        break;
      case DimKind::longitude:
        grid.b_pos = pos;
        grid.lon_1d = coord;
        break;
      case DimKind::other:
        if (len != 1) {
          throw InputError(where,
                           "dimensions " + f.dims_text(v) + " with dimension " +
                               quoted(f.dim_name(d)) + " of length " + std::to_string(len) +
                               " that is neither time, station, ensemble member, latitude nor "
                               "longitude",
                           "dimensions time [, station | member | latitude, longitude], other "
                           "dimensions of length 1");
        }
        break;
    }
  }
}

// What the scan must have found: one time dimension, both grid dimensions or neither, and for a
// single time series with a station asked for, that station's id.
void check_scan(const File& f, const Var& v, const NetcdfMetOptions& opt, const Selection& s,
                const GridDims& grid, const Stations& st) {
  const std::string where = f.where(v);
  if (s.time_dim < 0) {
    throw InputError(where, "dimensions " + f.dims_text(v) + " without a time dimension",
                     "a dimension with a CF time coordinate (standard_name time, or units "
                     "\"<unit> since <date>\")");
  }
  if ((grid.a_pos >= 0) != (grid.b_pos >= 0)) {
    throw InputError(where,
                     "dimensions " + f.dims_text(v) + " with only one of latitude and longitude",
                     "both a latitude and a longitude dimension (or both dimensions of 2-D "
                     "latitude and longitude), or neither");
  }
  if (grid.a_pos >= 0 || !opt.station_id || st.dim >= 0) return;
  if (!st.id_var) {
    throw InputError(f.path(),
                     "station " + quoted(*opt.station_id) +
                         " asked for, but the file has no station id (cf_role = timeseries_id)",
                     "a station file, or no station option");
  }
  const auto ids = f.read_ids(*st.id_var);
  if (ids.empty() || ids[0] != *opt.station_id) {
    throw InputError(f.where(*st.id_var), "station " + quoted(ids.empty() ? "" : ids[0]),
                     "station " + quoted(*opt.station_id));
  }
}

// A variable without grid dimensions: its one cell, named by the station id when it has one.
void single_series(const File& f, const NetcdfMetOptions& opt, const Stations& st, Selection& s,
                   std::vector<std::string>& layout) {
  s.cells.push_back({0, 1.0});
  if (layout.empty()) {
    std::string one = "a single time series";
    if (st.id_var && st.dim < 0) {
      const auto ids = f.read_ids(*st.id_var);
      if (!ids.empty() && !ids[0].empty()) one += " " + quoted(ids[0]);
    }
    layout.push_back(one);
  }
  if (opt.point || opt.footprint) layout.push_back("point/footprint not needed");
}

// ---------------------------------------------------------------------------------------------
// Picking grid cells.

// Cell centres, row-major: cell c is (c / nb, c % nb), index a along the first grid dimension.
struct Centres {
  std::vector<double> lats, lons;
  std::size_t na = 0, nb = 0;
  bool curvilinear = false;
};

Centres grid_centres(const File& f, const GridDims& grid) {
  Centres c;
  c.curvilinear = grid.curvilinear.lat != nullptr;
  if (c.curvilinear) {
    c.lats = f.read_all(*grid.curvilinear.lat);
    c.lons = f.read_all(*grid.curvilinear.lon);
    c.na = f.dim_len(grid.curvilinear.lat->dims[0]);
    c.nb = f.dim_len(grid.curvilinear.lat->dims[1]);
    return c;
  }
  const auto la = f.read_all(*grid.lat_1d);
  const auto lo = f.read_all(*grid.lon_1d);
  c.na = la.size();
  c.nb = lo.size();
  for (std::size_t i = 0; i < c.na; ++i) {
    for (std::size_t j = 0; j < c.nb; ++j) {
      c.lats.push_back(la[i]);
      c.lons.push_back(lo[j]);
    }
  }
  return c;
}

std::string extent_text(const Centres& c) {
  const auto [la0, la1] = std::minmax_element(c.lats.begin(), c.lats.end());
  std::vector<double> w(c.lons.size());
  std::transform(c.lons.begin(), c.lons.end(), w.begin(), wrap180);
  const auto [lo0, lo1] = std::minmax_element(w.begin(), w.end());
  return "grid lat " + fmt(*la0) + ".." + fmt(*la1) + ", lon " + fmt(*lo0) + ".." + fmt(*lo1);
}

struct Chosen {
  std::vector<std::pair<std::size_t, std::size_t>> cells;  // (a, b)
  std::vector<double> weights;
  std::string layout;
};

Chosen nearest_cell(const std::string& where, const Centres& c, const LatLon& point) {
  const double plat = point.lat_deg, plon = point.lon_deg;
  if (!(plat >= -90.0 && plat <= 90.0) || !std::isfinite(plon)) {
    throw InputError(where, "point latitude " + fmt(plat) + ", longitude " + fmt(plon),
                     "latitude -90..90 degrees north and a finite longitude");
  }
  double best = std::numeric_limits<double>::infinity();
  std::size_t bi = 0;
  for (std::size_t i = 0; i < c.lats.size(); ++i) {
    const double ang = central_angle(plat, plon, c.lats[i], c.lons[i]);
    if (ang < best) {
      best = ang;
      bi = i;
    }
  }
  Chosen r;
  r.cells.emplace_back(bi / c.nb, bi % c.nb);
  r.weights.push_back(1.0);
  r.layout = "grid cell nearest to " + fmt(plat) + "N " + fmt(plon) + "E: lat " + fmt(c.lats[bi]) +
             ", lon " + fmt(c.lons[bi]) + " (" + fmt(best * 6371.0088) + " km away)";
  return r;
}

Chosen footprint_cells(const std::string& where, const Centres& c, const LatLonBox& bx) {
  Chosen r;
  const double w0 = wrap180(bx.lon_min_deg), w1 = wrap180(bx.lon_max_deg);
  for (std::size_t i = 0; i < c.lats.size(); ++i) {
    if (!(c.lats[i] >= bx.lat_min_deg && c.lats[i] <= bx.lat_max_deg)) continue;
    const double lo = wrap180(c.lons[i]);
    const bool inside = w0 <= w1 ? (lo >= w0 && lo <= w1) : (lo >= w0 || lo <= w1);
    if (!inside) continue;
    r.cells.emplace_back(i / c.nb, i % c.nb);
    // A regular lat/lon cell's area is proportional to cos(latitude); the cells of a projected
    // (curvilinear) grid are close to equal in area, so they weigh the same.
    r.weights.push_back(c.curvilinear ? 1.0 : std::cos(c.lats[i] * std::numbers::pi / 180.0));
  }
  if (r.cells.empty()) {
    throw InputError(where,
                     "no grid cell centre inside the footprint lat " + fmt(bx.lat_min_deg) + ".." +
                         fmt(bx.lat_max_deg) + ", lon " + fmt(bx.lon_min_deg) + ".." +
                         fmt(bx.lon_max_deg) + " (" + extent_text(c) + ")",
                     "a footprint that contains at least one cell centre");
  }
  r.layout = "mean over " + std::to_string(r.cells.size()) + " grid cells in the footprint (" +
             (c.curvilinear ? "equal weights" : "cos-latitude weights") + ")";
  return r;
}

Chosen choose_cells(const std::string& where, const Centres& c, const NetcdfMetOptions& opt) {
  if (opt.point && opt.footprint) {
    throw InputError(where, "both a point and a footprint", "one of them");
  }
  if (opt.point) return nearest_cell(where, c, *opt.point);
  if (opt.footprint) return footprint_cells(where, c, *opt.footprint);
  if (c.na * c.nb == 1) {
    Chosen r;
    r.cells.emplace_back(0, 0);
    r.weights.push_back(1.0);
    r.layout = "the single grid cell";
    return r;
  }
  throw InputError(where,
                   "a grid of " + std::to_string(c.na) + " x " + std::to_string(c.nb) +
                       " cells and neither a point nor a footprint",
                   "a point (--point LAT,LON) or a footprint (lat/lon box)");
}

// Offset of grid cell (a, b), relative to the slab's start, within one time record of the slab.
std::size_t record_offset(const Selection& s, const GridDims& grid, std::size_t a_rel,
                          std::size_t b_rel) {
  std::size_t off = 0;
  for (std::size_t k = 0; k < s.count.size(); ++k) {
    if (k == s.time_pos) continue;
    std::size_t idx = 0;
    if (static_cast<int>(k) == grid.a_pos) idx = a_rel;
    if (static_cast<int>(k) == grid.b_pos) idx = b_rel;
    off = off * s.count[k] + idx;
  }
  return off;
}

// The slab is the bounding box of the chosen cells.
void place_cells(const Chosen& chosen, const GridDims& grid, const Centres& c, Selection& s) {
  std::size_t i0 = c.na, i1 = 0, j0 = c.nb, j1 = 0;
  for (auto [i, j] : chosen.cells) {
    i0 = std::min(i0, i);
    i1 = std::max(i1, i);
    j0 = std::min(j0, j);
    j1 = std::max(j1, j);
  }
  const auto a = static_cast<std::size_t>(grid.a_pos);
  const auto b = static_cast<std::size_t>(grid.b_pos);
  s.start[a] = i0;
  s.count[a] = i1 - i0 + 1;
  s.start[b] = j0;
  s.count[b] = j1 - j0 + 1;
  for (std::size_t k = 0; k < chosen.cells.size(); ++k) {
    const auto [i, j] = chosen.cells[k];
    s.cells.push_back({record_offset(s, grid, i - i0, j - j0), chosen.weights[k]});
  }
}

}  // namespace

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

std::vector<long long> member_values(const File& f, const Var& v) {
  for (int d : v.dims) {
    if (!is_member_dim(f, d)) continue;
    const Var* coord = f.find(f.dim_name(d));
    if (coord && !is_coordinate(f, *coord)) coord = nullptr;
    return member_coordinate_values(f, d, coord);
  }
  return {};
}

Selection select_layout(const File& f, const Var& v, const NetcdfMetOptions& opt,
                        const Var* mapped_time) {
  const std::string where = f.where(v);
  Selection s;
  s.start.assign(v.dims.size(), 0);
  s.count.assign(v.dims.size(), 1);
  GridDims grid;
  grid.curvilinear = curvilinear_coordinates(f, v, where);
  const Stations st = station_instance(f);
  std::vector<std::string> layout;
  scan_dimensions(f, v, opt, mapped_time, st, grid, s, layout);
  check_scan(f, v, opt, s, grid, st);
  if (grid.a_pos < 0) {
    single_series(f, opt, st, s, layout);
  } else {
    const Centres centres = grid_centres(f, grid);
    const Chosen chosen = choose_cells(where, centres, opt);
    layout.push_back(chosen.layout);
    place_cells(chosen, grid, centres, s);
  }
  s.layout = join(layout);
  return s;
}

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

}  // namespace lidbox::netcdf
