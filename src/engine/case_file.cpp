#include "lidbox/engine/case_file.hpp"

#include <toml++/toml.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <map>
#include <set>

#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
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

// One TOML table being read: remembers which keys were used so that the rest can be reported
// as unknown, with a hint.
class TableReader {
 public:
  TableReader(const toml::table& table, std::string file, std::string name,
              std::vector<std::string> allowed)
      : t_(table), file_(std::move(file)), name_(std::move(name)), allowed_(std::move(allowed)) {}

  [[nodiscard]] std::string where(const std::string& key) const {
    const toml::node* n = t_.get(key);
    const auto line = n ? n->source().begin.line : t_.source().begin.line;
    return file_ + ":" + std::to_string(line) + ": " + name_ + " " + key;
  }
  [[nodiscard]] std::string where_table() const {
    return file_ + ":" + std::to_string(t_.source().begin.line) + ": " + name_;
  }
  [[nodiscard]] const toml::node* get(const std::string& key) const { return t_.get(key); }
  [[nodiscard]] bool has(const std::string& key) const { return t_.get(key) != nullptr; }

  void check_keys() const {
    for (auto&& [k, v] : t_) {
      const std::string key(k.str());
      if (std::find(allowed_.begin(), allowed_.end(), key) != allowed_.end()) continue;
      const std::string hint = closest_name(key, allowed_);
      const std::string line = std::to_string(v.source().begin.line);
      std::string allowed_list;
      for (const auto& a : allowed_) allowed_list += (allowed_list.empty() ? "" : ", ") + a;
      throw InputError(file_ + ":" + line + ": " + name_,
                       "unknown key \"" + key + "\"" +
                           (hint.empty() ? "" : " (did you mean \"" + hint + "\"?)"),
                       "one of " + allowed_list);
    }
  }

  std::string required_string(const std::string& key) const {
    const auto s = optional_string(key);
    if (!s) throw InputError(where_table(), "no \"" + key + "\"", "a value for " + key);
    return *s;
  }
  std::optional<std::string> optional_string(const std::string& key) const {
    const toml::node* n = get(key);
    if (!n) return std::nullopt;
    if (!n->is_string()) throw InputError(where(key), "a " + type_name(*n), "a string in quotes");
    return std::string(n->as_string()->get());
  }
  std::optional<bool> optional_bool(const std::string& key) const {
    const toml::node* n = get(key);
    if (!n) return std::nullopt;
    if (!n->is_boolean()) throw InputError(where(key), "a " + type_name(*n), "true or false");
    return n->as_boolean()->get();
  }
  std::optional<double> optional_number(const std::string& key) const {
    const toml::node* n = get(key);
    if (!n) return std::nullopt;
    if (!n->is_number()) {
      throw InputError(where(key), "a " + type_name(*n), "a plain number (no unit)");
    }
    return n->value<double>();
  }
  std::optional<long long> optional_integer(const std::string& key) const {
    const toml::node* n = get(key);
    if (!n) return std::nullopt;
    if (!n->is_integer()) throw InputError(where(key), "a " + type_name(*n), "a whole number");
    return n->as_integer()->get();
  }
  // "16 km" -> value in `si_unit`.
  std::optional<double> optional_quantity(const std::string& key, const std::string& si_unit,
                                          const std::string& quantity) const {
    const toml::node* n = get(key);
    if (!n) return std::nullopt;
    return quantity_value(*n, where(key), si_unit, quantity);
  }
  double required_quantity(const std::string& key, const std::string& si_unit,
                           const std::string& quantity) const {
    const auto v = optional_quantity(key, si_unit, quantity);
    if (!v) {
      throw InputError(where_table(), "no \"" + key + "\"",
                       "a " + quantity + " with its unit, such as " + key + " = \"" +
                           example(si_unit) + "\"");
    }
    return *v;
  }
  std::vector<double> number_array(const std::string& key) const {
    const toml::node* n = get(key);
    if (!n) return {};
    const toml::array* a = n->as_array();
    if (!a) throw InputError(where(key), "a " + type_name(*n), "an array of numbers");
    std::vector<double> out;
    for (const auto& el : *a) {
      if (!el.is_number()) throw InputError(where(key), "an element that is not a number", "numbers");
      out.push_back(el.value<double>().value_or(0.0));
    }
    return out;
  }
  const toml::table* optional_table(const std::string& key) const {
    const toml::node* n = get(key);
    if (!n) return nullptr;
    if (!n->is_table()) throw InputError(where(key), "a " + type_name(*n), "a table");
    return n->as_table();
  }

  static std::string type_name(const toml::node& n) {
    switch (n.type()) {
      case toml::node_type::string: return "string";
      case toml::node_type::integer: return "integer";
      case toml::node_type::floating_point: return "number";
      case toml::node_type::boolean: return "boolean";
      case toml::node_type::array: return "array";
      case toml::node_type::table: return "table";
      default: return "date or time";
    }
  }
  static std::string example(const std::string& si_unit) {
    if (si_unit == "m") return "500 m";
    if (si_unit == "m/s") return "0.5 m/s";
    if (si_unit == "s") return "3 day";
    if (si_unit == "degree") return "90 deg";
    return "1 " + si_unit;
  }
  static void split_quantity(const std::string& text, double& number, std::string& unit) {
    const std::string s(trim(text));
    std::size_t i = 0;
    while (i < s.size() && (std::isdigit(static_cast<unsigned char>(s[i])) || s[i] == '.' ||
                            s[i] == '-' || s[i] == '+' ||
                            ((s[i] == 'e' || s[i] == 'E') && i > 0 && i + 1 < s.size() &&
                             (std::isdigit(static_cast<unsigned char>(s[i + 1])) || s[i + 1] == '-' ||
                              s[i + 1] == '+')))) {
      ++i;
    }
    if (i == 0 || !parse_double(s.substr(0, i), number)) {
      number = std::nan("");
      unit.clear();
      return;
    }
    unit = trim(s.substr(i));
  }
  static double quantity_value(const toml::node& n, const std::string& where,
                               const std::string& si_unit, const std::string& quantity) {
    if (n.is_number()) {
      throw InputError(where, "a number without a unit",
                       "a " + quantity + " with its unit in quotes, such as \"" + example(si_unit) + "\"");
    }
    if (!n.is_string()) {
      throw InputError(where, "a " + type_name(n), "a " + quantity + " such as \"" + example(si_unit) + "\"");
    }
    const std::string text(n.as_string()->get());
    double number = 0.0;
    std::string unit;
    split_quantity(text, number, unit);
    if (std::isnan(number)) {
      throw InputError(where, "\"" + text + "\" does not start with a number",
                       "a " + quantity + " such as \"" + example(si_unit) + "\"");
    }
    if (si_unit == "degree") return direction_unit_to_degrees(unit, where)(number);
    return unit_conversion(unit, si_unit, quantity, where)(number);
  }

 private:
  const toml::table& t_;
  std::string file_;
  std::string name_;
  std::vector<std::string> allowed_;
};

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

// Tables in source order (toml++ keeps keys sorted).
std::vector<std::pair<std::string, const toml::table*>> tables_in_order(const toml::table& t,
                                                                        const std::string& file,
                                                                        const std::string& name) {
  std::vector<std::pair<std::string, const toml::table*>> out;
  for (auto&& [k, v] : t) {
    if (!v.is_table()) {
      throw InputError(file + ":" + std::to_string(v.source().begin.line) + ": " + name,
                       "\"" + std::string(k.str()) + "\" is not a table",
                       "a table [" + name.substr(1, name.size() - 2) + "." + std::string(k.str()) + "]");
    }
    out.emplace_back(std::string(k.str()), v.as_table());
  }
  std::sort(out.begin(), out.end(), [](const auto& a, const auto& b) {
    return a.second->source().begin.line < b.second->source().begin.line;
  });
  return out;
}

double concentration_value(const toml::node& n, const std::string& where,
                           const PollutantSpec& p) {
  if (!n.is_string()) {
    throw InputError(where, "a " + TableReader::type_name(n),
                     "a concentration with its unit in quotes, such as \"0.2 " + p.unit.text + "\"");
  }
  const std::string text(n.as_string()->get());
  double number = 0.0;
  std::string unit;
  TableReader::split_quantity(text, number, unit);
  if (std::isnan(number)) {
    throw InputError(where, "\"" + text + "\" does not start with a number",
                     "a concentration such as \"0.2 " + p.unit.text + "\"");
  }
  if (number < 0.0) throw InputError(where, "a negative concentration", "a value >= 0");
  const ConcentrationUnit u = parse_concentration_unit(unit, p.molar_mass_g_mol, p.reference, where);
  return number * u.to_g_m3;
}

PollutantSpec read_pollutant(const std::string& name, const toml::table& t, const std::string& file,
                             SpinUp spin_up) {
  TableReader r(t, file, "[pollutants." + name + "]",
                {"unit", "molar_mass", "reference_conditions", "lifetime", "loss_rate",
                 "residual_lifetime", "residual_loss_rate", "deposition_velocity", "background",
                 "free_troposphere", "initial", "initial_residual"});
  r.check_keys();
  PollutantSpec p;
  p.name = name;
  p.molar_mass_g_mol = r.optional_quantity("molar_mass", "g/mol", "molar mass").value_or(0.0);
  if (r.has("molar_mass") && !(p.molar_mass_g_mol > 0.0)) {
    throw InputError(r.where("molar_mass"), "a molar mass <= 0", "a positive molar mass");
  }
  p.reference = kUsReferenceConditions;
  p.reference_label = "us";
  if (const toml::node* n = r.get("reference_conditions")) {
    if (n->is_string()) {
      const std::string s(n->as_string()->get());
      if (s == "us") {
        p.reference = kUsReferenceConditions;
      } else if (s == "eu") {
        p.reference = kEuReferenceConditions;
        p.reference_label = "eu";
      } else {
        throw InputError(r.where("reference_conditions"), "\"" + s + "\"",
                         "\"us\" (298.15 K, 101.325 kPa), \"eu\" (293 K, 101.3 kPa) or a table "
                         "{ temperature = \"...\", pressure = \"...\" }");
      }
    } else if (n->is_table()) {
      TableReader rc(*n->as_table(), file, "[pollutants." + name + ".reference_conditions]",
                     {"temperature", "pressure"});
      rc.check_keys();
      p.reference.temperature_K = rc.required_quantity("temperature", "K", "temperature");
      p.reference.pressure_Pa = rc.required_quantity("pressure", "Pa", "pressure");
      p.reference_label = "custom";
    } else {
      throw InputError(r.where("reference_conditions"), "a " + TableReader::type_name(*n),
                       "\"us\", \"eu\" or a table");
    }
  }
  const std::string unit_text = r.required_string("unit");
  p.unit = parse_concentration_unit(unit_text, p.molar_mass_g_mol, p.reference, r.where("unit"));

  auto rate = [&](const std::string& lifetime_key, const std::string& rate_key) -> std::optional<double> {
    if (r.has(lifetime_key) && r.has(rate_key)) {
      throw InputError(r.where(rate_key), "both " + lifetime_key + " and " + rate_key,
                       "one of them (rate = 1 / lifetime)");
    }
    if (auto tau = r.optional_quantity(lifetime_key, "s", "time")) {
      if (!(*tau > 0.0)) throw InputError(r.where(lifetime_key), "a lifetime <= 0", "a positive lifetime");
      return 1.0 / *tau;
    }
    if (auto k = r.optional_quantity(rate_key, "1/s", "rate")) {
      if (*k < 0.0) throw InputError(r.where(rate_key), "a negative loss rate", "a rate >= 0");
      return *k;
    }
    return std::nullopt;
  };
  p.processes.loss_rate_per_s = rate("lifetime", "loss_rate").value_or(0.0);
  p.processes.residual_loss_rate_per_s =
      rate("residual_lifetime", "residual_loss_rate").value_or(p.processes.loss_rate_per_s);
  p.processes.deposition_velocity_m_s =
      r.optional_quantity("deposition_velocity", "m/s", "speed").value_or(0.0);
  if (p.processes.deposition_velocity_m_s < 0.0) {
    throw InputError(r.where("deposition_velocity"), "a negative deposition velocity", "a value >= 0");
  }

  // Background: "0.1 ppm", { column = "..." } or { by_wind_from = [ {from, to, value}, ... ] }.
  const toml::node* bg = r.get("background");
  if (!bg) {
    throw InputError(r.where_table(), "no \"background\"",
                     "the concentration of the air arriving upwind, such as background = \"0.1 " +
                         p.unit.text + "\"");
  }
  if (bg->is_string()) {
    p.background.value_g_m3 = concentration_value(*bg, r.where("background"), p);
  } else if (bg->is_table()) {
    TableReader rb(*bg->as_table(), file, "[pollutants." + name + ".background]",
                   {"column", "by_wind_from"});
    rb.check_keys();
    if (rb.has("column") == rb.has("by_wind_from")) {
      throw InputError(rb.where_table(), "neither or both of column and by_wind_from",
                       "exactly one of them");
    }
    if (auto col = rb.optional_string("column")) {
      p.background.kind = BackgroundSpec::Kind::column;
      p.background.column = *col;
    } else {
      p.background.kind = BackgroundSpec::Kind::by_wind_from;
      const toml::array* arr = rb.get("by_wind_from")->as_array();
      if (!arr || arr->empty()) {
        throw InputError(rb.where("by_wind_from"), "not a non-empty array",
                         "an array of { from = \"0 deg\", to = \"90 deg\", value = \"...\" }");
      }
      for (const auto& el : *arr) {
        if (!el.is_table()) throw InputError(rb.where("by_wind_from"), "an element that is not a table", "tables");
        TableReader rs(*el.as_table(), file, "[pollutants." + name + ".background.by_wind_from]",
                       {"from", "to", "value"});
        rs.check_keys();
        WindSectorValue w;
        w.from_deg = rs.required_quantity("from", "degree", "direction");
        w.to_deg = rs.required_quantity("to", "degree", "direction");
        const toml::node* v = rs.get("value");
        if (!v) throw InputError(rs.where_table(), "no \"value\"", "a concentration");
        w.value_g_m3 = concentration_value(*v, rs.where("value"), p);
        for (double* d : {&w.from_deg, &w.to_deg}) {
          if (*d < 0.0 || *d > 360.0) throw InputError(rs.where_table(), "a direction outside 0-360", "0 to 360 deg");
          if (*d == 360.0) *d = 0.0;
        }
        p.background.sectors.push_back(w);
      }
      // The sectors must tile the circle: sorted by start, each ends where the next begins.
      auto sorted = p.background.sectors;
      std::sort(sorted.begin(), sorted.end(), [](auto& a, auto& b) { return a.from_deg < b.from_deg; });
      double covered = 0.0;
      for (std::size_t i = 0; i < sorted.size(); ++i) {
        const auto& s = sorted[i];
        const auto& next = sorted[(i + 1) % sorted.size()];
        double width = s.to_deg - s.from_deg;
        if (width <= 0.0) width += 360.0;
        covered += width;
        if (std::fabs(s.to_deg - next.from_deg) > 1e-9) {
          throw InputError(rb.where("by_wind_from"),
                           "the sector starting at " + format_number(s.from_deg) +
                               " deg ends at " + format_number(s.to_deg) +
                               " deg but the next starts at " + format_number(next.from_deg) + " deg",
                           "sectors that cover 0-360 deg without gaps or overlaps");
        }
      }
      if (std::fabs(covered - 360.0) > 1e-9) {
        throw InputError(rb.where("by_wind_from"), "sectors covering " + format_number(covered) + " deg",
                         "sectors that cover 360 deg exactly once");
      }
    }
  } else {
    throw InputError(r.where("background"), "a " + TableReader::type_name(*bg),
                     "a concentration string or a table with column or by_wind_from");
  }
  if (const toml::node* ft = r.get("free_troposphere")) {
    p.free_troposphere_g_m3 = concentration_value(*ft, r.where("free_troposphere"), p);
  } else {
    throw InputError(r.where_table(), "no \"free_troposphere\"",
                     "the concentration above the residual layer, such as free_troposphere = \"0.08 " +
                         p.unit.text + "\"");
  }
  for (const char* key : {"initial", "initial_residual"}) {
    if (const toml::node* n = r.get(key)) {
      if (spin_up != SpinUp::none) {
        throw InputError(r.where(key), "an initial value with spin_up = \"repeat_first_day\"",
                         "spin_up = \"none\" in [model] to start from given values");
      }
      const double v = concentration_value(*n, r.where(key), p);
      (std::string(key) == "initial" ? p.initial_g_m3 : p.initial_residual_g_m3) = v;
    }
  }
  return p;
}

}  // namespace

CaseSpec parse_case(const std::string& text, const std::string& file, const std::string& base_dir) {
  toml::table root;
  try {
    root = toml::parse(text, file);
  } catch (const toml::parse_error& e) {
    throw InputError(file + ":" + std::to_string(e.source().begin.line),
                     "TOML syntax: " + std::string(e.description()), "valid TOML (toml.io v1.0.0)");
  }
  CaseSpec c;
  c.file = file;
  TableReader top(root, file, "(top level)",
                  {"name", "title", "invented", "time_zone", "airshed", "met", "model", "pollutants",
                   "sectors", "standards", "output"});
  top.check_keys();
  c.name = top.required_string("name");
  if (c.name.empty() || c.name.find_first_of("/\\ ") != std::string::npos) {
    throw InputError(top.where("name"), "\"" + c.name + "\"",
                     "a name without spaces or slashes (it names the output folder)");
  }
  c.title = top.optional_string("title").value_or(c.name);
  c.invented = top.optional_bool("invented").value_or(false);
  c.zone = TimeZone::parse(top.required_string("time_zone"), top.where("time_zone"));

  const toml::table* airshed = top.optional_table("airshed");
  if (!airshed) throw InputError(file, "no [airshed] table", "an [airshed] table with x_side and y_side");
  {
    TableReader r(*airshed, file, "[airshed]", {"x_side", "y_side", "x_side_bearing"});
    r.check_keys();
    c.footprint.x_side_m = r.required_quantity("x_side", "m", "length");
    c.footprint.y_side_m = r.required_quantity("y_side", "m", "length");
    c.footprint.x_side_bearing_deg = r.optional_quantity("x_side_bearing", "degree", "direction").value_or(90.0);
    for (const char* k : {"x_side", "y_side"}) {
      const double v = std::string(k) == "x_side" ? c.footprint.x_side_m : c.footprint.y_side_m;
      if (!(v > 0.0)) throw InputError(r.where(k), "a side <= 0 m", "a positive length");
    }
  }

  const toml::table* met = top.optional_table("met");
  if (!met) throw InputError(file, "no [met] table", "a [met] table with the met file");
  {
    TableReader r(*met, file, "[met]",
                  {"file", "format", "reading", "hour_label", "max_gap_hours", "station", "latitude",
                   "longitude", "footprint", "member", "sub_hourly", "coarse_step", "variables"});
    r.check_keys();
    c.met.display_name = r.required_string("file");
    std::filesystem::path p(c.met.display_name);
    c.met.path = p.is_absolute() ? p.string() : (std::filesystem::path(base_dir) / p).string();
    const std::string ext = p.extension().string();
    const std::string format =
        r.optional_string("format").value_or(ext == ".nc" || ext == ".nc4" || ext == ".cdf" ? "netcdf" : "csv");
    if (format == "csv") {
      c.met.format = MetFormat::csv;
    } else if (format == "netcdf") {
      c.met.format = MetFormat::netcdf;
    } else {
      throw InputError(r.where("format"), "\"" + format + "\"", "\"csv\" or \"netcdf\"");
    }
    NetcdfMetOptions& nc = c.met.netcdf;
    nc.display_name = c.met.display_name;
    const bool netcdf_key = r.has("station") || r.has("latitude") || r.has("longitude") ||
                            r.has("footprint") || r.has("member") || r.has("sub_hourly") ||
                            r.has("coarse_step") || r.has("variables");
    if (netcdf_key && c.met.format != MetFormat::netcdf) {
      throw InputError(r.where_table(), "NetCDF options for a CSV met file",
                       "station, latitude/longitude, footprint, member, sub_hourly, coarse_step and "
                       "variables only with format = \"netcdf\"");
    }
    if (auto st = r.optional_string("station")) nc.station_id = *st;
    if (auto m = r.optional_integer("member")) nc.member = *m;
    if (r.has("latitude") != r.has("longitude")) {
      throw InputError(r.where_table(), "only one of latitude and longitude", "both, for the nearest grid cell");
    }
    if (r.has("latitude")) {
      nc.point = LatLon{r.required_quantity("latitude", "degree", "latitude"),
                        r.required_quantity("longitude", "degree", "longitude")};
      if (nc.point->lat_deg > 90.0) nc.point->lat_deg -= 360.0;  // "-30 deg" arrives as 330
      if (nc.point->lon_deg > 180.0) nc.point->lon_deg -= 360.0;
    }
    if (const toml::table* fp = r.optional_table("footprint")) {
      TableReader rf(*fp, file, "[met.footprint]", {"south", "north", "west", "east"});
      rf.check_keys();
      auto deg = [&rf](const char* k, bool lat) {
        double v = rf.required_quantity(k, "degree", lat ? "latitude" : "longitude");
        if (v > (lat ? 90.0 : 180.0)) v -= 360.0;
        return v;
      };
      nc.footprint = LatLonBox{deg("south", true), deg("north", true), deg("west", false), deg("east", false)};
    }
    if (nc.point && nc.footprint) {
      throw InputError(r.where("footprint"), "both a point and a footprint", "one of them");
    }
    if (auto sh = r.optional_string("sub_hourly")) nc.sub_hourly = parse_sub_hourly_rule(*sh, r.where("sub_hourly"));
    if (auto cs = r.optional_string("coarse_step")) nc.coarse = parse_coarse_step_rule(*cs, r.where("coarse_step"));
    if (const toml::table* vars = r.optional_table("variables")) {
      TableReader rv(*vars, file, "[met.variables]", netcdf_met_roles());
      rv.check_keys();
      for (const auto& role : netcdf_met_roles()) {
        if (auto v = rv.optional_string(role)) nc.variables[role] = *v;
      }
    }
    const std::string reading = r.optional_string("reading").value_or("hour_average");
    if (reading == "hour_average") {
      c.met.reading = MetReading::hour_average;
    } else if (reading == "instantaneous") {
      c.met.reading = MetReading::instantaneous;
    } else {
      throw InputError(r.where("reading"), "\"" + reading + "\"", "\"hour_average\" or \"instantaneous\"");
    }
    const std::string label = r.optional_string("hour_label").value_or("period_start");
    if (label == "period_start") {
      c.met.hour_label = HourLabel::period_start;
    } else if (label == "period_end") {
      c.met.hour_label = HourLabel::period_end;
    } else {
      throw InputError(r.where("hour_label"), "\"" + label + "\"", "\"period_start\" or \"period_end\"");
    }
    if (nc.coarse == CoarseStepRule::linear && c.met.reading != MetReading::instantaneous) {
      throw InputError(r.where("coarse_step"), "coarse_step = \"linear\" with hour averages",
                       "reading = \"instantaneous\": interpolated values are instants, not hour means");
    }
    if (r.has("hour_label") && c.met.reading == MetReading::instantaneous) {
      throw InputError(r.where("hour_label"), "an hour label for instantaneous values",
                       "hour_label only with reading = \"hour_average\"");
    }
    const long long gap = r.optional_integer("max_gap_hours").value_or(3);
    if (gap < 0 || gap > 48) throw InputError(r.where("max_gap_hours"), std::to_string(gap), "0 to 48");
    c.met.max_gap_hours = static_cast<int>(gap);
  }
  c.engine.reading = c.met.reading;

  if (const toml::table* model = top.optional_table("model")) {
    TableReader r(*model, file, "[model]",
                  {"residual_layer", "residual_wind_factor", "min_wind_speed", "min_mixing_height",
                   "spin_up", "spin_up_tolerance", "spin_up_max_days", "max_lambda_dt",
                   "max_relative_lid_change", "max_substeps_per_hour"});
    r.check_keys();
    c.engine.residual_layer = r.optional_bool("residual_layer").value_or(true);
    c.engine.residual_wind_factor = r.optional_number("residual_wind_factor").value_or(0.0);
    if (c.engine.residual_wind_factor < 0.0) {
      throw InputError(r.where("residual_wind_factor"), "a negative factor", "a factor >= 0");
    }
    c.engine.min_wind_m_s = r.optional_quantity("min_wind_speed", "m/s", "speed").value_or(0.5);
    c.engine.min_mixing_height_m = r.optional_quantity("min_mixing_height", "m", "length").value_or(50.0);
    if (!(c.engine.min_wind_m_s > 0.0)) {
      throw InputError(r.where("min_wind_speed"), "a floor <= 0", "a positive speed (a calm box never flushes)");
    }
    if (!(c.engine.min_mixing_height_m > 0.0)) {
      throw InputError(r.where("min_mixing_height"), "a floor <= 0", "a positive height");
    }
    const std::string spin = r.optional_string("spin_up").value_or("repeat_first_day");
    if (spin == "repeat_first_day") {
      c.spin_up = SpinUp::repeat_first_day;
    } else if (spin == "none") {
      c.spin_up = SpinUp::none;
    } else {
      throw InputError(r.where("spin_up"), "\"" + spin + "\"", "\"repeat_first_day\" or \"none\"");
    }
    c.spin_up_tolerance = r.optional_number("spin_up_tolerance").value_or(1e-3);
    if (!(c.spin_up_tolerance > 0.0)) throw InputError(r.where("spin_up_tolerance"), "a tolerance <= 0", "a positive number");
    c.spin_up_max_days = static_cast<int>(r.optional_integer("spin_up_max_days").value_or(60));
    if (c.spin_up_max_days < 1) throw InputError(r.where("spin_up_max_days"), "fewer than 1 day", "1 or more");
    c.engine.max_lambda_dt = r.optional_number("max_lambda_dt").value_or(0.1);
    c.engine.max_relative_lid_change = r.optional_number("max_relative_lid_change").value_or(0.02);
    c.engine.max_substeps_per_hour = static_cast<int>(r.optional_integer("max_substeps_per_hour").value_or(3600));
    if (!(c.engine.max_lambda_dt > 0.0) || !(c.engine.max_relative_lid_change > 0.0) ||
        c.engine.max_substeps_per_hour < 1) {
      throw InputError(r.where_table(), "a sub-step control <= 0", "positive sub-step controls");
    }
  }

  const toml::table* pollutants = top.optional_table("pollutants");
  if (!pollutants || pollutants->empty()) {
    throw InputError(file, "no [pollutants.NAME] table", "at least one pollutant, e.g. [pollutants.CO]");
  }
  std::vector<std::string> names;
  for (const auto& [name, t] : tables_in_order(*pollutants, file, "[pollutants]")) {
    c.pollutants.push_back(read_pollutant(name, *t, file, c.spin_up));
    names.push_back(name);
  }

  if (const toml::table* sectors = top.optional_table("sectors")) {
    for (const auto& [name, t] : tables_in_order(*sectors, file, "[sectors]")) {
      TableReader r(*t, file, "[sectors." + name + "]",
                    {"emissions", "hour_of_day", "day_of_week", "month"});
      r.check_keys();
      EmissionSector s;
      s.name = name;
      s.rate_g_s.assign(c.pollutants.size(), 0.0);
      const toml::table* em = r.optional_table("emissions");
      if (!em) {
        throw InputError(r.where_table(), "no \"emissions\"",
                         "emissions = { " + names.front() + " = \"1.5 t/h\" } (a total rate, or an "
                         "area flux such as \"2 ug m-2 s-1\")");
      }
      TableReader re(*em, file, "[sectors." + name + ".emissions]", names);
      re.check_keys();
      for (std::size_t p = 0; p < names.size(); ++p) {
        const toml::node* n = re.get(names[p]);
        if (!n) continue;
        const std::string w = re.where(names[p]);
        if (!n->is_string()) {
          throw InputError(w, "a " + TableReader::type_name(*n), "a rate with its unit, such as \"1.5 t/h\"");
        }
        double number = 0.0;
        std::string unit;
        TableReader::split_quantity(std::string(n->as_string()->get()), number, unit);
        if (std::isnan(number) || number < 0.0) {
          throw InputError(w, "\"" + std::string(n->as_string()->get()) + "\"", "a rate >= 0 with its unit");
        }
        if (units_convertible(unit, "g/s")) {
          s.rate_g_s[p] = unit_conversion(unit, "g/s", "mass rate", w)(number);
        } else if (units_convertible(unit, "g m-2 s-1")) {
          s.rate_g_s[p] = unit_conversion(unit, "g m-2 s-1", "area flux", w)(number) * c.footprint.area_m2();
        } else {
          throw InputError(w, "unit \"" + unit + "\" is neither a mass rate nor an area flux",
                           "a total rate such as \"1.5 t/h\" or \"400 g/s\", or an area flux such as "
                           "\"2 ug m-2 s-1\"");
        }
      }
      s.clock = ClockProfile::from_weights(r.number_array("hour_of_day"), r.number_array("day_of_week"),
                                           r.number_array("month"), r.where_table());
      c.sectors.push_back(std::move(s));
    }
  }

  if (const toml::table* st = top.optional_table("standards")) {
    TableReader r(*st, file, "[standards]",
                  {"rule_sets", "rules_dir", "aqi_table", "aqi", "aqhi", "issue_time", "rolling"});
    r.check_keys();
    StandardsSpec s;
    const toml::node* sets = r.get("rule_sets");
    const toml::array* arr = sets ? sets->as_array() : nullptr;
    if (!arr || arr->empty()) {
      throw InputError(sets ? r.where("rule_sets") : r.where_table(), sets ? "not a non-empty array" : "no \"rule_sets\"",
                       "rule_sets = [\"us-naaqs\", \"eu-2008-50\"] (ids of src/data/rules or paths of TOML files)");
    }
    for (const auto& el : *arr) {
      if (!el.is_string()) throw InputError(r.where("rule_sets"), "an element that is not a string", "rule-set ids or paths");
      std::string v(el.as_string()->get());
      const std::filesystem::path p(v);
      if (p.extension() == ".toml" && p.is_relative()) v = (std::filesystem::path(base_dir) / p).string();
      s.rule_sets.push_back(v);
    }
    if (auto d = r.optional_string("rules_dir")) {
      const std::filesystem::path p(*d);
      s.rules_dir = p.is_relative() ? (std::filesystem::path(base_dir) / p).string() : *d;
    }
    s.aqi_table = r.optional_string("aqi_table").value_or("2024");
    s.aqi = r.optional_bool("aqi").value_or(true);
    s.aqhi = r.optional_bool("aqhi").value_or(true);
    if (auto t = r.optional_string("issue_time")) s.issue_time_utc = parse_iso8601(*t, &c.zone, r.where("issue_time"));
    if (const toml::node* rn = r.get("rolling")) {
      const toml::array* ra = rn->as_array();
      if (!ra) throw InputError(r.where("rolling"), "not an array", "an array such as [\"8:6\", \"24\"]");
      for (const auto& el : *ra) {
        const std::string spec = el.is_string() ? std::string(el.as_string()->get()) : "";
        int k = 0, m = 0;
        const auto colon = spec.find(':');
        const bool ok = parse_whole(spec.substr(0, colon), k) &&
                        (colon == std::string::npos ? (m = 0, true) : parse_whole(spec.substr(colon + 1), m));
        if (!ok || k < 1 || (colon != std::string::npos && m < 1) || m > k || k > 8784) {
          throw InputError(r.where("rolling"), "\"" + spec + "\"",
                           "\"K\" or \"K:M\": K-hour windows with at least M valid hours, 1 <= M <= K <= 8784");
        }
        s.rolling_h.emplace_back(k, m);
      }
    }
    c.standards = s;
  }

  c.output_directory = (std::filesystem::path("outputs") / c.name).string();
  if (const toml::table* out = top.optional_table("output")) {
    TableReader r(*out, file, "[output]", {"directory", "netcdf"});
    r.check_keys();
    if (auto d = r.optional_string("directory")) c.output_directory = *d;
    c.netcdf_output = r.optional_bool("netcdf").value_or(false);
  }
  return c;
}

CaseSpec load_case(const std::string& path) {
  const std::string text = read_text_file(path, path);
  const std::string base = std::filesystem::path(path).parent_path().string();
  return parse_case(text, path, base.empty() ? "." : base);
}

}  // namespace lidbox
