#include "lidbox/engine/case_file.hpp"

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <limits>

#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/base/toml_table.hpp"
#include "lidbox/base/units.hpp"

namespace lidbox {

double BackgroundSpec::for_direction(double from_deg) const {
  double d = std::fmod(from_deg, 360.0);
  if (d < 0.0) d += 360.0;
  for (const auto& s : sectors) {
    const bool wraps = s.to_deg <= s.from_deg;
    const bool in = wraps ? (d >= s.from_deg || d < s.to_deg) : (d >= s.from_deg && d < s.to_deg);
    if (in) return s.value_g_m3;
  }
  return sectors.empty() ? value_g_m3 : sectors.front().value_g_m3;
}

namespace {

constexpr int kIntMin = std::numeric_limits<int>::min();
constexpr int kIntMax = std::numeric_limits<int>::max();

// ---- values whose unit the table reader cannot interpret alone -------------------------------

// A concentration's unit may be a mixing ratio, which needs the pollutant's molar mass and
// reference conditions (concentration_units.hpp).
std::optional<double> concentration_g_m3(const TomlTable& r, const std::string& key,
                                         const PollutantSpec& p, const PlausibilityLimits& lim) {
  const auto q = r.optional_quantity_text(key, "concentration", "0.2 " + p.unit.text);
  if (!q) return std::nullopt;
  if (q->number < 0.0) throw InputError(r.where(key), "a negative concentration", "a value >= 0");
  const double g_m3 =
      q->number *
      parse_concentration_unit(q->unit, p.molar_mass_g_mol, p.reference, r.where(key)).to_g_m3;
  lim.check("concentration", g_m3, r.where(key), q->text);
  return g_m3;
}

double required_concentration_g_m3(const TomlTable& r, const std::string& key,
                                   const PollutantSpec& p, const std::string& expected,
                                   const PlausibilityLimits& lim) {
  const auto v = concentration_g_m3(r, key, p, lim);
  if (!v) r.throw_missing(key, expected);
  return *v;
}

// A first-order loss is given as a lifetime or as a rate, never both (rate = 1 / lifetime).
std::optional<double> loss_rate_per_s(const TomlTable& r, const std::string& lifetime_key,
                                      const std::string& rate_key) {
  if (r.has(lifetime_key) && r.has(rate_key)) {
    throw InputError(r.where(rate_key), "both " + lifetime_key + " and " + rate_key,
                     "one of them (rate = 1 / lifetime)");
  }
  if (auto tau = r.optional_quantity(lifetime_key, "s", "time")) {
    if (!(*tau > 0.0))
      throw InputError(r.where(lifetime_key), "a lifetime <= 0", "a positive lifetime");
    return 1.0 / *tau;
  }
  if (auto k = r.optional_quantity(rate_key, "1/s", "rate")) {
    if (*k < 0.0) throw InputError(r.where(rate_key), "a negative loss rate", "a rate >= 0");
    return *k;
  }
  return std::nullopt;
}

// An emission is a total rate ("1.5 t/h") or an area flux ("2 ug m-2 s-1") over the footprint;
// the unit decides which.
double emission_rate_g_s(const TomlTable& r, const std::string& key, double area_m2,
                         const PlausibilityLimits& lim) {
  const auto q = r.optional_quantity_text(key, "emission rate", "1.5 t/h");
  if (!q) return 0.0;
  const std::string w = r.where(key);
  if (q->number < 0.0) throw InputError(w, "a negative emission rate", "a rate >= 0");
  if (units_convertible(q->unit, "g/s")) {
    const double g_s = unit_conversion(q->unit, "g/s", "mass rate", w)(q->number);
    lim.check("emission_rate", g_s, w, q->text);
    return g_s;
  }
  if (units_convertible(q->unit, "g m-2 s-1")) {
    const double flux = unit_conversion(q->unit, "g m-2 s-1", "area flux", w)(q->number);
    lim.check("emission_flux", flux, w, q->text);
    return flux * area_m2;
  }
  throw InputError(w, "unit \"" + q->unit + "\" is neither a mass rate nor an area flux",
                   "a total rate such as \"1.5 t/h\" or \"400 g/s\", or an area flux such as "
                   "\"2 ug m-2 s-1\"");
}

bool parse_whole(const std::string& text, int& out) {
  if (text.empty() || text.size() > 6) return false;
  int v = 0;
  for (char ch : text) {
    if (ch < '0' || ch > '9') return false;
    v = v * 10 + (ch - '0');
  }
  out = v;
  return true;
}

// ---- [pollutants.NAME] -----------------------------------------------------------------------

void read_reference_conditions(const TomlTable& r, PollutantSpec& p) {
  p.reference = kUsReferenceConditions;
  p.reference_label = "us";
  const toml::node* n = r.node("reference_conditions");
  if (!n) return;
  if (n->is_table()) {
    const TomlTable rc = *r.optional_table("reference_conditions", {"temperature", "pressure"});
    p.reference.temperature_K = rc.required_quantity("temperature", "K", "temperature");
    p.reference.pressure_Pa = rc.required_quantity("pressure", "Pa", "pressure");
    p.reference_label = "custom";
    return;
  }
  if (!n->is_string()) r.throw_wrong_type("reference_conditions", "\"us\", \"eu\" or a table");
  const std::string s(n->as_string()->get());
  if (s == "eu") {
    p.reference = kEuReferenceConditions;
    p.reference_label = "eu";
  } else if (s != "us") {
    throw InputError(r.where("reference_conditions"), "\"" + s + "\"",
                     "\"us\" (298.15 K, 101.325 kPa), \"eu\" (293 K, 101.3 kPa) or a table "
                     "{ temperature = \"...\", pressure = \"...\" }");
  }
}

// The sectors must tile the circle: sorted by start, each ends where the next begins.
void check_sectors_tile_circle(std::vector<WindSectorValue> sorted, const std::string& where) {
  std::sort(sorted.begin(), sorted.end(), [](auto& a, auto& b) { return a.from_deg < b.from_deg; });
  double covered = 0.0;
  for (std::size_t i = 0; i < sorted.size(); ++i) {
    const auto& s = sorted[i];
    const auto& next = sorted[(i + 1) % sorted.size()];
    double width = s.to_deg - s.from_deg;
    if (width <= 0.0) width += 360.0;
    covered += width;
    if (std::fabs(s.to_deg - next.from_deg) > 1e-9) {
      throw InputError(where,
                       "the sector starting at " + format_number(s.from_deg) + " deg ends at " +
                           format_number(s.to_deg) + " deg but the next starts at " +
                           format_number(next.from_deg) + " deg",
                       "sectors that cover 0-360 deg without gaps or overlaps");
    }
  }
  if (std::fabs(covered - 360.0) > 1e-9) {
    throw InputError(where, "sectors covering " + format_number(covered) + " deg",
                     "sectors that cover 360 deg exactly once");
  }
}

std::vector<WindSectorValue> read_wind_sectors(const TomlTable& rb, const PollutantSpec& p,
                                               const PlausibilityLimits& lim) {
  std::vector<WindSectorValue> out;
  for (const TomlTable& rs :
       rb.array_of_tables("by_wind_from", {"from", "to", "value"},
                          "an array of { from = \"0 deg\", to = \"90 deg\", value = \"...\" }")) {
    WindSectorValue w;
    w.from_deg = rs.required_quantity("from", "degree", "direction");
    w.to_deg = rs.required_quantity("to", "degree", "direction");
    w.value_g_m3 = required_concentration_g_m3(
        rs, "value", p,
        "a concentration with its unit in quotes, such as \"0.2 " + p.unit.text + "\"", lim);
    for (double* d : {&w.from_deg, &w.to_deg}) {
      if (*d < 0.0 || *d > 360.0)
        throw InputError(rs.where_table(), "a direction outside 0-360", "0 to 360 deg");
      if (*d == 360.0) *d = 0.0;
    }
    out.push_back(w);
  }
  check_sectors_tile_circle(out, rb.where("by_wind_from"));
  return out;
}

// Background: "0.1 ppm", { column = "..." } or { by_wind_from = [ {from, to, value}, ... ] }.
void read_background(const TomlTable& r, PollutantSpec& p, const PlausibilityLimits& lim) {
  const toml::node* bg = r.node("background");
  if (!bg) {
    r.throw_missing("background",
                    "the concentration of the air arriving upwind, such as "
                    "background = \"0.1 " +
                        p.unit.text + "\"");
  }
  if (bg->is_string()) {
    p.background.value_g_m3 = *concentration_g_m3(r, "background", p, lim);
    return;
  }
  if (!bg->is_table()) {
    r.throw_wrong_type("background",
                       "a concentration string or a table with column or by_wind_from");
  }
  const TomlTable rb = *r.optional_table("background", {"column", "by_wind_from"});
  if (rb.has("column") == rb.has("by_wind_from")) {
    throw InputError(rb.where_table(), "neither or both of column and by_wind_from",
                     "exactly one of them");
  }
  if (auto col = rb.optional_string("column")) {
    p.background.kind = BackgroundSpec::Kind::column;
    p.background.column = *col;
  } else {
    p.background.kind = BackgroundSpec::Kind::by_wind_from;
    p.background.sectors = read_wind_sectors(rb, p, lim);
  }
}

void read_initial_values(const TomlTable& r, PollutantSpec& p, const CaseSpec& c) {
  for (const char* key : {"initial", "initial_residual"}) {
    if (!r.has(key)) continue;
    if (c.spin_up != SpinUp::none) {
      throw InputError(r.where(key), "an initial value with spin_up = \"repeat_first_day\"",
                       "spin_up = \"none\" in [model] to start from given values");
    }
    const double v = *concentration_g_m3(r, key, p, c.plausibility);
    (std::string(key) == "initial" ? p.initial_g_m3 : p.initial_residual_g_m3) = v;
  }
  // Without a top the residual layer starts with no depth and its start value would weigh
  // nothing: refuse rather than ignore it.
  if (p.initial_residual_g_m3.value_or(0.0) > 0.0 && !c.initial_residual_top_m) {
    throw InputError(r.where("initial_residual"),
                     "an initial residual-layer concentration without a residual-layer top",
                     "initial_residual_top = \"800 m\" (say) in [model], the top of the "
                     "residual layer at the start, at or above the first hour's lid");
  }
}

PollutantSpec read_pollutant(const TomlTable& pollutants, const std::string& name,
                             const CaseSpec& c) {
  const TomlTable r = *pollutants.optional_table(
      name, {"unit", "molar_mass", "reference_conditions", "lifetime", "loss_rate",
             "residual_lifetime", "residual_loss_rate", "deposition_velocity", "background",
             "free_troposphere", "initial", "initial_residual"});
  PollutantSpec p;
  p.name = name;
  p.molar_mass_g_mol = r.optional_quantity("molar_mass", "g/mol", "molar mass").value_or(0.0);
  if (r.has("molar_mass") && !(p.molar_mass_g_mol > 0.0)) {
    throw InputError(r.where("molar_mass"), "a molar mass <= 0", "a positive molar mass");
  }
  read_reference_conditions(r, p);
  p.unit = parse_concentration_unit(r.required_string("unit"), p.molar_mass_g_mol, p.reference,
                                    r.where("unit"));
  p.processes.loss_rate_per_s = loss_rate_per_s(r, "lifetime", "loss_rate").value_or(0.0);
  p.processes.residual_loss_rate_per_s =
      loss_rate_per_s(r, "residual_lifetime", "residual_loss_rate")
          .value_or(p.processes.loss_rate_per_s);
  p.processes.deposition_velocity_m_s =
      r.optional_quantity("deposition_velocity", "m/s", "speed").value_or(0.0);
  if (p.processes.deposition_velocity_m_s < 0.0) {
    throw InputError(r.where("deposition_velocity"), "a negative deposition velocity",
                     "a value >= 0");
  }
  read_background(r, p, c.plausibility);
  p.free_troposphere_g_m3 = required_concentration_g_m3(
      r, "free_troposphere", p,
      "the concentration above the residual layer, such as free_troposphere = \"0.08 " +
          p.unit.text + "\"",
      c.plausibility);
  read_initial_values(r, p, c);
  return p;
}

// ---- the case, table by table ----------------------------------------------------------------

void read_top_level(const TomlTable& top, CaseSpec& c) {
  c.name = top.required_string("name");
  if (c.name.empty() || c.name.find_first_of("/\\ ") != std::string::npos) {
    throw InputError(top.where("name"), "\"" + c.name + "\"",
                     "a name without spaces or slashes (it names the output folder)");
  }
  c.title = top.optional_string("title").value_or(c.name);
  c.invented = top.optional_bool("invented").value_or(false);
  c.zone = TimeZone::parse(top.required_string("time_zone"), top.where("time_zone"));
}

void read_airshed(const TomlTable& top, CaseSpec& c) {
  const auto r = top.optional_table("airshed", {"x_side", "y_side", "x_side_bearing"});
  if (!r) top.throw_missing("airshed", "an [airshed] table with x_side and y_side");
  c.footprint.x_side_m = r->required_quantity("x_side", "m", "length");
  c.footprint.y_side_m = r->required_quantity("y_side", "m", "length");
  c.footprint.x_side_bearing_deg =
      r->optional_quantity("x_side_bearing", "degree", "direction").value_or(90.0);
  if (!(c.footprint.x_side_m > 0.0))
    throw InputError(r->where("x_side"), "a side <= 0 m", "a positive length");
  if (!(c.footprint.y_side_m > 0.0))
    throw InputError(r->where("y_side"), "a side <= 0 m", "a positive length");
}

// Latitudes and longitudes are read as directions, so "-30 deg" arrives as 330 deg.
double signed_degrees(const TomlTable& r, const std::string& key, bool latitude) {
  const double v = r.required_quantity(key, "degree", latitude ? "latitude" : "longitude");
  return v > (latitude ? 90.0 : 180.0) ? v - 360.0 : v;
}

void read_netcdf_options(const TomlTable& r, MetSpec& met) {
  NetcdfMetOptions& nc = met.netcdf;
  nc.display_name = met.display_name;
  const bool netcdf_key = r.has("station") || r.has("latitude") || r.has("longitude") ||
                          r.has("footprint") || r.has("member") || r.has("sub_hourly") ||
                          r.has("coarse_step") || r.has("variables");
  if (netcdf_key && met.format != MetFormat::netcdf) {
    throw InputError(r.where_table(), "NetCDF options for a CSV met file",
                     "station, latitude/longitude, footprint, member, sub_hourly, coarse_step and "
                     "variables only with format = \"netcdf\"");
  }
  if (auto st = r.optional_string("station")) nc.station_id = *st;
  if (auto m = r.optional_whole_number("member", kIntMin, kIntMax)) nc.member = *m;
  if (r.has("latitude") != r.has("longitude")) {
    throw InputError(r.where_table(), "only one of latitude and longitude",
                     "both, for the nearest grid cell");
  }
  if (r.has("latitude"))
    nc.point = LatLon{signed_degrees(r, "latitude", true), signed_degrees(r, "longitude", false)};
  if (const auto fp = r.optional_table("footprint", {"south", "north", "west", "east"})) {
    nc.footprint =
        LatLonBox{signed_degrees(*fp, "south", true), signed_degrees(*fp, "north", true),
                  signed_degrees(*fp, "west", false), signed_degrees(*fp, "east", false)};
  }
  if (nc.point && nc.footprint)
    throw InputError(r.where("footprint"), "both a point and a footprint", "one of them");
  if (auto sh = r.optional_string("sub_hourly"))
    nc.sub_hourly = parse_sub_hourly_rule(*sh, r.where("sub_hourly"));
  if (auto cs = r.optional_string("coarse_step"))
    nc.coarse = parse_coarse_step_rule(*cs, r.where("coarse_step"));
  if (const auto vars = r.optional_table("variables", netcdf_met_roles())) {
    for (const auto& role : netcdf_met_roles()) {
      if (auto v = vars->optional_string(role)) nc.variables[role] = *v;
    }
  }
}

// How the met values sample the hour, and how long a gap may be filled.
void read_met_sampling(const TomlTable& r, MetSpec& met) {
  const std::string reading = r.optional_string("reading").value_or("hour_average");
  if (reading == "hour_average") {
    met.reading = MetReading::hour_average;
  } else if (reading == "instantaneous") {
    met.reading = MetReading::instantaneous;
  } else {
    throw InputError(r.where("reading"), "\"" + reading + "\"",
                     "\"hour_average\" or \"instantaneous\"");
  }
  const std::string label = r.optional_string("hour_label").value_or("period_start");
  if (label == "period_start") {
    met.hour_label = HourLabel::period_start;
  } else if (label == "period_end") {
    met.hour_label = HourLabel::period_end;
  } else {
    throw InputError(r.where("hour_label"), "\"" + label + "\"",
                     "\"period_start\" or \"period_end\"");
  }
  if (met.netcdf.coarse == CoarseStepRule::linear && met.reading != MetReading::instantaneous) {
    throw InputError(
        r.where("coarse_step"), "coarse_step = \"linear\" with hour averages",
        "reading = \"instantaneous\": interpolated values are instants, not hour means");
  }
  if (r.has("hour_label") && met.reading == MetReading::instantaneous) {
    throw InputError(r.where("hour_label"), "an hour label for instantaneous values",
                     "hour_label only with reading = \"hour_average\"");
  }
  met.max_gap_hours = r.optional_whole_number("max_gap_hours", 0, 48).value_or(3);
}

void read_met(const TomlTable& top, const std::string& base_dir, CaseSpec& c) {
  const auto r = top.optional_table(
      "met", {"file", "format", "reading", "hour_label", "max_gap_hours", "station", "latitude",
              "longitude", "footprint", "member", "sub_hourly", "coarse_step", "variables"});
  if (!r) top.throw_missing("met", "a [met] table with the met file");
  c.met.display_name = r->required_string("file");
  const std::filesystem::path p(c.met.display_name);
  c.met.path = p.is_absolute() ? p.string() : (std::filesystem::path(base_dir) / p).string();
  const std::string ext = p.extension().string();
  const std::string format = r->optional_string("format").value_or(
      ext == ".nc" || ext == ".nc4" || ext == ".cdf" ? "netcdf" : "csv");
  if (format == "csv") {
    c.met.format = MetFormat::csv;
  } else if (format == "netcdf") {
    c.met.format = MetFormat::netcdf;
  } else {
    throw InputError(r->where("format"), "\"" + format + "\"", "\"csv\" or \"netcdf\"");
  }
  read_netcdf_options(*r, c.met);
  read_met_sampling(*r, c.met);
  c.engine.reading = c.met.reading;
}

// Which air the residual layer holds, and the rise and fall that make a new mixing cycle.
void read_residual_top_rule(const TomlTable& r, CaseSpec& c) {
  const std::string rule = r.optional_string("residual_top").value_or("most_recent_cycle");
  if (rule == "most_recent_cycle") {
    c.engine.residual_top = ResidualTop::most_recent_cycle;
  } else if (rule == "highest_since_emptied") {
    c.engine.residual_top = ResidualTop::highest_since_emptied;
  } else {
    throw InputError(r.where("residual_top"), "\"" + rule + "\"",
                     "\"most_recent_cycle\" or \"highest_since_emptied\"");
  }
  const auto threshold = r.optional_quantity("residual_cycle_threshold", "m", "length");
  if (!threshold) return;
  if (!(*threshold > 0.0)) {
    throw InputError(r.where("residual_cycle_threshold"), "a threshold <= 0 m",
                     "a positive height (a lid that wiggles by less starts no new cycle)");
  }
  if (c.engine.residual_top != ResidualTop::most_recent_cycle) {
    throw InputError(r.where("residual_cycle_threshold"),
                     "a cycle threshold with residual_top = \"highest_since_emptied\"",
                     "it only with residual_top = \"most_recent_cycle\"");
  }
  c.engine.cycle_threshold_m = *threshold;
}

// The residual layer's top at the start; whether it is at or above the first lid is checked
// against the met by run_case.
void read_initial_residual_top(const TomlTable& r, CaseSpec& c) {
  const std::string key = "initial_residual_top";
  const auto top = r.optional_quantity(key, "m", "length");
  if (!top) return;
  if (c.spin_up != SpinUp::none) {
    throw InputError(r.where(key), "a residual-layer top with spin_up = \"repeat_first_day\"",
                     "spin_up = \"none\" to start from given values");
  }
  if (!c.engine.residual_layer) {
    throw InputError(r.where(key), "a residual-layer top with residual_layer = false",
                     "residual_layer = true, or no initial_residual_top");
  }
  if (!(*top > 0.0)) throw InputError(r.where(key), "a top <= 0 m", "a positive height");
  c.initial_residual_top_m = *top;
  c.initial_residual_top_where = r.where(key);
}

void read_model(const TomlTable& top, CaseSpec& c) {
  const auto r = top.optional_table(
      "model", {"residual_layer", "residual_wind_factor", "min_wind_speed", "min_mixing_height",
                "spin_up", "spin_up_tolerance", "spin_up_max_days", "max_lambda_dt",
                "max_relative_lid_change", "max_relative_flushing_change", "max_substeps_per_hour",
                "initial_residual_top", "residual_top", "residual_cycle_threshold"});
  if (!r) return;
  c.engine.residual_layer = r->optional_bool("residual_layer").value_or(true);
  c.engine.residual_wind_factor = r->optional_number("residual_wind_factor").value_or(0.0);
  read_residual_top_rule(*r, c);
  if (c.engine.residual_wind_factor < 0.0) {
    throw InputError(r->where("residual_wind_factor"), "a negative factor", "a factor >= 0");
  }
  c.engine.min_wind_m_s = r->optional_quantity("min_wind_speed", "m/s", "speed").value_or(0.5);
  c.engine.min_mixing_height_m =
      r->optional_quantity("min_mixing_height", "m", "length").value_or(50.0);
  if (!(c.engine.min_wind_m_s > 0.0)) {
    throw InputError(r->where("min_wind_speed"), "a floor <= 0",
                     "a positive speed (a calm box never flushes)");
  }
  if (!(c.engine.min_mixing_height_m > 0.0)) {
    throw InputError(r->where("min_mixing_height"), "a floor <= 0", "a positive height");
  }
  const std::string spin = r->optional_string("spin_up").value_or("repeat_first_day");
  if (spin == "repeat_first_day") {
    c.spin_up = SpinUp::repeat_first_day;
  } else if (spin == "none") {
    c.spin_up = SpinUp::none;
  } else {
    throw InputError(r->where("spin_up"), "\"" + spin + "\"", "\"repeat_first_day\" or \"none\"");
  }
  c.spin_up_tolerance = r->optional_number("spin_up_tolerance").value_or(1e-3);
  if (!(c.spin_up_tolerance > 0.0))
    throw InputError(r->where("spin_up_tolerance"), "a tolerance <= 0", "a positive number");
  c.spin_up_max_days = r->optional_whole_number("spin_up_max_days", 1, kIntMax).value_or(60);
  c.engine.max_lambda_dt = r->optional_number("max_lambda_dt").value_or(0.1);
  c.engine.max_relative_lid_change = r->optional_number("max_relative_lid_change").value_or(0.04);
  c.engine.max_relative_flushing_change =
      r->optional_number("max_relative_flushing_change").value_or(0.25);
  c.engine.max_substeps_per_hour =
      r->optional_whole_number("max_substeps_per_hour", 1, kIntMax).value_or(3600);
  if (!(c.engine.max_lambda_dt > 0.0) || !(c.engine.max_relative_lid_change > 0.0) ||
      !(c.engine.max_relative_flushing_change > 0.0)) {
    throw InputError(r->where_table(), "a sub-step control <= 0", "positive sub-step controls");
  }
  read_initial_residual_top(*r, c);
}

void read_pollutants(const TomlTable& top, CaseSpec& c) {
  const auto pollutants = top.optional_open_table("pollutants");
  const auto names = pollutants ? pollutants->table_names_in_order() : std::vector<std::string>{};
  if (names.empty())
    top.throw_missing("pollutants", "at least one pollutant, e.g. [pollutants.CO]");
  for (const auto& name : names) c.pollutants.push_back(read_pollutant(*pollutants, name, c));
}

EmissionSector read_sector(const TomlTable& sectors, const std::string& name, const CaseSpec& c) {
  const TomlTable r =
      *sectors.optional_table(name, {"emissions", "hour_of_day", "day_of_week", "month"});
  std::vector<std::string> names;
  for (const auto& p : c.pollutants) names.push_back(p.name);
  const auto em = r.optional_table("emissions", names);
  if (!em) {
    r.throw_missing("emissions", "emissions = { " + names.front() +
                                     " = \"1.5 t/h\" } (a total rate, "
                                     "or an area flux such as \"2 ug m-2 s-1\")");
  }
  EmissionSector s;
  s.name = name;
  for (const auto& pollutant : names) {
    s.rate_g_s.push_back(
        emission_rate_g_s(*em, pollutant, c.footprint.area_m2(), c.plausibility));
  }
  s.clock = ClockProfile::from_weights(r.number_array("hour_of_day"), r.number_array("day_of_week"),
                                       r.number_array("month"), r.where_table());
  return s;
}

void read_sectors(const TomlTable& top, CaseSpec& c) {
  const auto sectors = top.optional_open_table("sectors");
  if (!sectors) return;
  for (const auto& name : sectors->table_names_in_order())
    c.sectors.push_back(read_sector(*sectors, name, c));
}

// Extra running-mean tables: "K" (K-hour windows, the standards' default completeness) or "K:M"
// (at least M valid hours).
std::vector<std::pair<int, int>> read_rolling(const TomlTable& r) {
  std::vector<std::pair<int, int>> out;
  for (const std::string& spec : r.string_array("rolling")) {
    int k = 0, m = 0;
    const auto colon = spec.find(':');
    const bool ok =
        parse_whole(spec.substr(0, colon), k) &&
        (colon == std::string::npos ? (m = 0, true) : parse_whole(spec.substr(colon + 1), m));
    if (!ok || k < 1 || (colon != std::string::npos && m < 1) || m > k || k > 8784) {
      throw InputError(
          r.where("rolling"), "\"" + spec + "\"",
          "\"K\" or \"K:M\": K-hour windows with at least M valid hours, 1 <= M <= K <= 8784");
    }
    out.emplace_back(k, m);
  }
  return out;
}

void read_standards(const TomlTable& top, const std::string& base_dir, CaseSpec& c) {
  const auto r = top.optional_table(
      "standards", {"rule_sets", "rules_dir", "aqi_table", "aqi", "aqhi", "index", "issue_time",
                    "rolling"});
  if (!r) return;
  const std::string sets_expected =
      "rule_sets = [\"us-naaqs\", \"eu-2008-50\"] (ids of src/data/rules or paths of TOML files)";
  StandardsSpec s;
  for (std::string v : r->string_array("rule_sets")) {
    const std::filesystem::path p(v);
    if (p.extension() == ".toml" && p.is_relative())
      v = (std::filesystem::path(base_dir) / p).string();
    s.rule_sets.push_back(v);
  }
  if (!r->has("rule_sets")) r->throw_missing("rule_sets", sets_expected);
  if (s.rule_sets.empty()) throw InputError(r->where("rule_sets"), "an empty array", sets_expected);
  if (auto d = r->optional_string("rules_dir")) {
    const std::filesystem::path p(*d);
    s.rules_dir = p.is_relative() ? (std::filesystem::path(base_dir) / p).string() : *d;
  }
  s.aqi_table = r->optional_string("aqi_table").value_or("2024");
  s.aqi = r->optional_bool("aqi").value_or(true);
  s.aqhi = r->optional_bool("aqhi").value_or(true);
  if (auto ix = r->optional_string("index")) {
    const std::filesystem::path p(*ix);
    s.index = p.extension() == ".toml" && p.is_relative()
                  ? (std::filesystem::path(base_dir) / p).string()
                  : *ix;
    s.index_where = r->where("index");
  }
  if (auto t = r->optional_string("issue_time"))
    s.issue_time_utc = parse_iso8601(*t, &c.zone, r->where("issue_time"));
  s.rolling_h = read_rolling(*r);
  c.standards = s;
}

}  // namespace

const std::vector<std::string>& diagnostics_extra_fields() {
  static const std::vector<std::string> names = {"wind_500hPa", "precipitation", "geostrophic_wind",
                                                 "mixed_layer_wind", "transport_wind"};
  return names;
}

namespace {

void read_diagnostics(const TomlTable& top, const std::string& base_dir, CaseSpec& c) {
  const auto r = top.optional_table("diagnostics", {"ventilation_table", "schemes", "fields"});
  if (!r) return;
  auto resolve = [&base_dir](std::string v) {
    const std::filesystem::path p(v);
    if (p.extension() == ".toml" && p.is_relative()) v = (std::filesystem::path(base_dir) / p).string();
    return v;
  };
  if (auto t = r->optional_string("ventilation_table")) c.diagnostics.ventilation_table = t->empty() ? "" : resolve(*t);
  for (const auto& s : r->string_array("schemes")) c.diagnostics.schemes.push_back(resolve(s));
  if (const auto f = r->optional_table("fields", diagnostics_extra_fields())) {
    if (c.met.format != MetFormat::netcdf) {
      throw InputError(r->where("fields"), "fields for a CSV met file",
                       "fields only with NetCDF met; a CSV file names its columns after the fields");
    }
    for (const auto& field : diagnostics_extra_fields()) {
      if (auto v = f->optional_string(field)) c.diagnostics.fields[field] = *v;
    }
  }
}

void read_output(const TomlTable& top, CaseSpec& c) {
  c.output_directory = (std::filesystem::path("outputs") / c.name).string();
  const auto r = top.optional_table("output", {"directory", "netcdf"});
  if (!r) return;
  if (auto d = r->optional_string("directory")) c.output_directory = *d;
  c.netcdf_output = r->optional_bool("netcdf").value_or(false);
}

void read_bulletin(const TomlTable& top, const std::string& base_dir, CaseSpec& c) {
  const auto r = top.optional_table("bulletin", {"templates", "area"});
  if (!r) return;
  if (auto t = r->optional_string("templates")) {
    const std::filesystem::path p(*t);
    c.bulletin_templates = p.extension() == ".toml" && p.is_relative()
                               ? (std::filesystem::path(base_dir) / p).string()
                               : *t;
  }
  c.bulletin_area = r->optional_string("area").value_or("");
}

// [plausibility]: key = ["min", "max"], two quantities in the range's unit family.
void read_plausibility(const TomlTable& top, CaseSpec& c) {
  const auto r = top.optional_table("plausibility", c.plausibility.keys());
  if (!r) return;
  for (const auto& key : c.plausibility.keys()) {
    if (!r->has(key)) continue;
    const PlausibleRange& range = c.plausibility.range(key);
    const std::string unit = range.unit == "degree" ? "deg" : range.unit;
    const std::string expected = "two quantities [min, max] with min <= max, such as [\"" +
                                 format_number(range.min) + " " + unit + "\", \"" +
                                 format_number(range.max) + " " + unit + "\"]";
    const std::vector<std::string> texts = r->string_array(key);
    if (texts.size() != 2) {
      throw InputError(r->where(key), std::to_string(texts.size()) + " elements", expected);
    }
    double v[2] = {0.0, 0.0};
    for (int i = 0; i < 2; ++i) {
      const auto q = split_quantity(texts[static_cast<std::size_t>(i)]);
      if (!q) throw InputError(r->where(key), "\"" + excerpt(texts[i]) + "\"", expected);
      v[i] = range.unit == "degree"
                 ? direction_unit_to_degrees(q->unit, r->where(key))(q->number)
                 : unit_conversion(q->unit, range.unit, range.quantity, r->where(key))(q->number);
    }
    if (!(v[0] <= v[1])) {
      throw InputError(r->where(key), "min " + texts[0] + " above max " + texts[1], expected);
    }
    c.plausibility.set(key, v[0], v[1], "set in " + r->where(key));
  }
}

// [scenario], [ensemble] and [cut]: their readers live with their concepts.
void read_forecast_tables(const TomlTable& top, const std::string& base_dir, CaseSpec& c) {
  std::vector<std::string> sectors;
  for (const auto& s : c.sectors) sectors.push_back(s.name);
  c.scenario = read_emission_scenario(top, sectors, c.zone);
  c.ensemble = read_ensemble_spec(top, base_dir);
  const std::size_t listed =
      c.ensemble && !c.ensemble->netcdf_members ? c.ensemble->files.size() : 0;
  c.cut = read_cut_request(top, sectors, c.zone, c.ensemble.has_value(), listed);
}

}  // namespace

CaseSpec parse_case(const std::string& text, const std::string& file, const std::string& base_dir) {
  const TomlDocument doc(text, file);
  const TomlTable top(doc, {"name", "title", "invented", "time_zone", "airshed", "met", "model",
                            "pollutants", "sectors", "standards", "diagnostics", "grid", "output",
                            "scenario", "ensemble", "cut", "plausibility", "bulletin"});
  CaseSpec c;
  c.file = file;
  read_plausibility(top, c);  // first: the values of every other table are checked against it
  read_top_level(top, c);
  read_airshed(top, c);
  read_met(top, base_dir, c);
  read_model(top, c);
  read_pollutants(top, c);  // after [model]: initial values depend on the spin-up
  read_sectors(top, c);     // after [airshed] and the pollutants: area fluxes and emission keys
  read_standards(top, base_dir, c);
  read_diagnostics(top, base_dir, c);
  if (top.has("grid")) c.grid_table = top.where("grid");  // the grid room reads it (grid_case.hpp)
  read_output(top, c);
  read_bulletin(top, base_dir, c);
  read_forecast_tables(top, base_dir, c);
  return c;
}

CaseSpec load_case(const std::string& path) {
  const std::string text = read_text_file(path, path);
  const std::string base = std::filesystem::path(path).parent_path().string();
  return parse_case(text, path, base.empty() ? "." : base);
}

}  // namespace lidbox
