#include "lidbox/grid/grid_case.hpp"

#include <filesystem>

#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/base/toml_table.hpp"
#include "lidbox/base/units.hpp"

namespace lidbox {

const char* to_string(GridPeriod p) {
  switch (p) {
    case GridPeriod::year:
      return "year";
    case GridPeriod::season:
      return "season";
    case GridPeriod::month:
      return "month";
  }
  return "?";
}

CaseSpec grid_cell_case(const CaseSpec& base, const GridSpec& grid) {
  CaseSpec c = base;
  c.pollutants = {base.pollutants.at(grid.pollutant)};
  EmissionSector s;
  s.name = grid.unit_flux ? "unit_flux" : "flux";
  s.rate_g_s = {grid.flux_g_m2_s * base.footprint.area_m2()};
  s.clock = ClockProfile::flat();
  c.sectors = {s};
  c.standards.reset();
  return c;
}

namespace {

GridSpec read_grid_table(const TomlTable& g, const CaseSpec& c) {
  GridSpec s;
  if (auto p = g.optional_string("pollutant")) {
    std::vector<std::string> names;
    for (const auto& ps : c.pollutants) names.push_back(ps.name);
    std::size_t k = 0;
    while (k < names.size() && names[k] != *p) ++k;
    if (k == names.size()) {
      throw InputError(g.where("pollutant"), "\"" + *p + "\"",
                       "one of the case's pollutants: " + join(names) + did_you_mean(*p, names));
    }
    s.pollutant = k;
  }
  if (auto f = g.optional_string("flux"); f && *f != "unit") {
    s.unit_flux = false;
    s.flux_g_m2_s = g.required_quantity("flux", "g m-2 s-1", "area emission flux");
    if (!(s.flux_g_m2_s > 0.0)) {
      throw InputError(g.where("flux"), "\"" + *f + "\"",
                       "\"unit\" or a positive area flux such as \"2 ug m-2 s-1\"");
    }
  }
  if (g.has("periods")) {
    s.periods.clear();
    for (const auto& p : g.string_array("periods")) {
      if (p == "year") {
        s.periods.push_back(GridPeriod::year);
      } else if (p == "season") {
        s.periods.push_back(GridPeriod::season);
      } else if (p == "month") {
        s.periods.push_back(GridPeriod::month);
      } else {
        const std::vector<std::string> all = {"year", "season", "month"};
        throw InputError(g.where("periods"), "\"" + p + "\"",
                         "some of year, season, month" + did_you_mean(p, all));
      }
    }
    if (s.periods.empty())
      throw InputError(g.where("periods"), "an empty array", "some of year, season, month");
  }
  if (g.has("percentiles")) {
    s.percentiles = g.number_array("percentiles");
    for (double q : s.percentiles) {
      if (q < 0.0 || q > 100.0 || q != std::floor(q * 10.0) / 10.0) {
        throw InputError(g.where("percentiles"), format_number(q),
                         "percentiles from 0 to 100 in steps of 0.1");
      }
    }
  }
  if (auto st = g.optional_string("exceedance_statistic")) {
    if (*st == "daily_max_1h") {
      s.exceedance_statistic = GridExceedanceStatistic::daily_max_1h;
    } else if (*st != "daily_mean") {
      throw InputError(g.where("exceedance_statistic"), "\"" + *st + "\"",
                       "daily_mean or daily_max_1h");
    }
  }
  if (g.has("exceedance_level")) {
    s.exceedance_level_s_m =
        g.required_quantity("exceedance_level", "s/m", "concentration per unit area flux");
  }
  for (const auto& cell :
       g.array_of_tables("series", {"latitude", "longitude"},
                         "inline tables { latitude = \"41 deg\", longitude = \"-112 deg\" }")) {
    const double lat = cell.required_quantity("latitude", "degree", "angle");
    const double lon = cell.required_quantity("longitude", "degree", "angle");
    if (lat < -90.0 || lat > 90.0)
      throw InputError(cell.where("latitude"), format_number(lat) + " deg", "-90 to 90 deg");
    s.series.emplace_back(lat, lon);
  }
  if (auto t = g.optional_whole_number("threads", 1, 1024)) s.threads = static_cast<unsigned>(*t);
  if (auto d = g.optional_whole_number("chunk_days", 1, 3660)) s.chunk_days = *d;
  return s;
}

}  // namespace

GridCase parse_grid_case(const std::string& text, const std::string& file,
                         const std::string& base_dir) {
  GridCase gc;
  gc.base = parse_case(text, file, base_dir);
  const CaseSpec& c = gc.base;
  const TomlDocument doc(text, file);
  const TomlTable top(doc, {"name", "title", "invented", "time_zone", "airshed", "met", "model",
                            "pollutants", "sectors", "standards", "diagnostics", "grid", "output", "scenario", "ensemble", "cut",
                            "plausibility"});
  const auto g = top.optional_table(
      "grid", {"pollutant", "flux", "periods", "percentiles", "exceedance_statistic",
               "exceedance_level", "series", "threads", "chunk_days"});
  if (!g)
    top.throw_missing("grid",
                      "a [grid] table for `lidbox grid` (or run a point case with `lidbox run`)");
  if (c.met.format != MetFormat::netcdf) {
    throw InputError(file + ": [met] file", "\"" + c.met.display_name + "\", not NetCDF",
                     "a CF-NetCDF grid (time, latitude, longitude) for a grid run");
  }
  gc.grid = read_grid_table(*g, c);
  const PollutantSpec& p = c.pollutants.at(gc.grid.pollutant);
  if (p.background.kind == BackgroundSpec::Kind::column) {
    throw InputError(file + ": [pollutants." + p.name + "] background", "a met column",
                     "a constant background or one by wind direction for a grid run (there is no "
                     "column per cell)");
  }
  gc.cell = grid_cell_case(c, gc.grid);
  gc.diagnostics = load_diagnostics_setup(c.diagnostics.ventilation_table, c.diagnostics.schemes);
  gc.met.display_name = c.met.display_name;
  gc.met.variables = c.met.netcdf.variables;
  gc.met.limits = c.plausibility;
  for (DiagnosticField f : gc.diagnostics.needed_fields()) {
    if (f == DiagnosticField::mixing_height || f == DiagnosticField::wind_10m) continue;
    const auto it = c.diagnostics.fields.find(to_string(f));
    if (it == c.diagnostics.fields.end()) {
      throw InputError(file + ": [diagnostics] fields",
                       "no variable for the field \"" + std::string(to_string(f)) +
                           "\" a chosen stagnation scheme needs",
                       std::string("fields = { ") + to_string(f) +
                           " = \"<variable>\" }, or a scheme that does not need it");
    }
    gc.met.fields[it->first] = {it->second, si_unit(f)};
  }
  return gc;
}

GridCase load_grid_case(const std::string& path) {
  const std::string text = read_text_file(path, path);
  const std::string base = std::filesystem::path(path).parent_path().string();
  return parse_grid_case(text, path, base.empty() ? "." : base);
}

}  // namespace lidbox
