#include "metdump_command.hpp"

#include <cmath>
#include <cstdio>
#include <iostream>
#include <memory>
#include <set>

#include "lidbox/base/concentration_units.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/base/plausibility.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/base/time.hpp"
#include "lidbox/met/met_series.hpp"
#include "lidbox/met/netcdf_met.hpp"
#include "lidbox/report/netcdf_writer.hpp"
#include "lidbox/standards/pollutant.hpp"
#include "netcdf_options.hpp"

namespace lidbox::cli {
namespace {

struct MetDumpArgs {
  std::string input;
  std::string to_netcdf;
  bool netcdf3 = false;
  bool concentrations = false;
  int fill_gaps_hours = -1;
  NetcdfOptionTexts nc;
  std::string command_line;
};

std::string num(double v) {
  if (std::isnan(v)) return "";
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.10g", v);
  return buf;
}

void dump_met(const MetDumpArgs& a) {
  const NetcdfMetOptions opt = netcdf_met_options(a.nc);
  NetcdfReadInfo info;
  MetSeries m = read_met_netcdf(a.input, opt, &info);
  if (a.fill_gaps_hours >= 0) {
    fill_gaps(m, a.fill_gaps_hours);
    validate_met(m);
  }
  std::cerr << "met-dump: " << a.input << ": " << info.layout << "; time step " << info.time_step
            << "; " << info.records << " records -> " << m.size() << " hours"
            << (info.time_bounds_label.empty()
                    ? ""
                    : "; time bounds: stamps mark the " + info.time_bounds_label)
            << "\n";
  if (!a.to_netcdf.empty()) {
    CfTable t = met_cf_table(m);
    t.title = "hourly met decoded by lidbox from " + a.input;
    t.history = a.command_line;
    t.global_attributes["met_source"] = a.input;
    t.global_attributes["met_layout"] = info.layout;
    t.global_attributes["met_time_step"] = info.time_step;
    write_cf_timeseries(a.to_netcdf, t,
                        a.netcdf3 ? CfFileFormat::netcdf3_64bit : CfFileFormat::netcdf4_classic);
    return;
  }
  std::string header =
      "time,mixing_height [m],eastward_wind [m/s],northward_wind [m/s],"
      "wind_speed [m/s],wind_from [deg]";
  if (!m.air_temperature_K.empty()) header += ",air_temperature [K]";
  if (!m.surface_pressure_Pa.empty()) header += ",surface_pressure [Pa]";
  for (const auto& c : m.extra) header += "," + c.name + " [" + c.unit + "]";
  header += ",filled,record";
  std::cout << header << "\n";
  for (std::size_t i = 0; i < m.size(); ++i) {
    const double u = m.wind_u_m_s[i], v = m.wind_v_m_s[i];
    const bool wind = !std::isnan(u) && !std::isnan(v);
    std::cout << format_utc(m.stamp(i)) << "," << num(m.mixing_height_m[i]) << "," << num(u) << ","
              << num(v) << "," << (wind ? num(wind_speed_m_s(u, v)) : "") << ","
              << (wind ? num(wind_from_deg(u, v)) : "");
    if (!m.air_temperature_K.empty()) std::cout << "," << num(m.air_temperature_K[i]);
    if (!m.surface_pressure_Pa.empty()) std::cout << "," << num(m.surface_pressure_Pa[i]);
    for (const auto& c : m.extra) std::cout << "," << num(c.values[i]);
    std::cout << "," << static_cast<int>(m.filled[i]) << "," << m.source_line[i] << "\n";
  }
}

// The CF name a pollutant key is written under: the current standard name of its kind.
std::string standard_name_for(const std::string& key, const std::string& unit) {
  const auto& names = concentration_standard_names();
  const auto it = names.find(key);
  if (it == names.end()) return "";
  for (const auto& n : it->second) {
    const bool mole = n.rfind("mole_fraction", 0) == 0;
    if (mole == (unit == "ppb")) return n;  // the first listed of each kind is the current one
  }
  return "";
}

// Measured values are checked against the plausible ranges (plausibility.hpp) as the monitor
// CSV reader checks them: mass concentrations as read, mole fractions through the pollutant's
// molar mass at the EU reference conditions. A variable named by the user in a unit of its own
// has no range and is dumped as read.
void check_concentrations(const std::string& file,
                          const std::vector<std::pair<std::string, HourlySeries>>& series) {
  const PlausibilityLimits limits;
  for (const auto& [k, s] : series) {
    const PollutantInfo* info = find_pollutant(k);
    double to_ug_m3 = 1.0;
    if (s.unit == "ppb" && info && info->molar_mass_g_mol > 0.0) {
      to_ug_m3 = 1e6 * parse_concentration_unit("ppb", info->molar_mass_g_mol,
                                                kEuReferenceConditions, file)
                           .to_g_m3;
    } else if (s.unit != "ug m-3") {
      continue;
    }
    const char* key = info && std::string_view(info->name) == "CO" ? "monitor_co"
                                                                    : "monitor_concentration";
    const PlausibleRange& r = limits.range(key);
    for (std::size_t i = 0; i < s.size(); ++i) {
      const double x = s.values[i] * to_ug_m3;
      if (r.admits(x)) continue;
      limits.check(key, x,
                   file + ": variable " + k + " (" + format_utc(s.hour_start(i)) + ")",
                   format_number(s.values[i]), s.unit,
                   "declare a missing-value code with the variable's _FillValue or "
                   "missing_value attribute");
    }
  }
}

void dump_concentrations(const MetDumpArgs& a) {
  const auto series = read_concentrations_netcdf(a.input, netcdf_met_options(a.nc));
  check_concentrations(a.input, series);
  // Fill and missing values of monitor data are gaps: counted here, never dropped silently.
  for (const auto& [k, s] : series) {
    std::size_t missing = 0;
    for (double x : s.values) missing += std::isnan(x) ? 1 : 0;
    if (missing > 0) {
      std::cerr << "lidbox met-dump: note: " << k << ": " << missing << " of " << s.size()
                << " hours missing (_FillValue, missing_value or outside valid_range): gaps in "
                   "the output\n";
    }
  }
  UtcSeconds first = series.front().second.first_hour_start_utc, last = first;
  for (const auto& [k, s] : series) {
    first = std::min(first, s.first_hour_start_utc);
    last = std::max(last, s.hour_start(s.size() - 1));
  }
  const auto n = static_cast<std::size_t>((last - first) / kSecondsPerHour) + 1;
  const auto value = [&](const HourlySeries& s, std::size_t i) {
    const UtcSeconds t = first + static_cast<UtcSeconds>(i) * kSecondsPerHour;
    const auto k = (t - s.first_hour_start_utc) / kSecondsPerHour;
    if (k < 0 || static_cast<std::size_t>(k) >= s.size()) return std::nan("");
    return s.values[static_cast<std::size_t>(k)];
  };
  if (!a.to_netcdf.empty()) {
    CfTable t;
    for (std::size_t i = 0; i < n; ++i) {
      t.time_utc.push_back(first + static_cast<UtcSeconds>(i) * kSecondsPerHour);
    }
    t.period_s = kSecondsPerHour;
    t.title = "hourly concentrations decoded by lidbox from " + a.input;
    t.history = a.command_line;
    for (const auto& [k, s] : series) {
      CfVariable v;
      v.name = k;
      v.standard_name = standard_name_for(k, s.unit);
      v.long_name = k + ", hour mean";
      v.units = s.unit == "ppb" ? "1e-9" : s.unit;  // CF writes mole fractions as numbers
      v.cell_methods = "time: mean (interval: 1 hour)";
      for (std::size_t i = 0; i < n; ++i) v.values.push_back(value(s, i));
      t.vars.push_back(std::move(v));
    }
    write_cf_timeseries(a.to_netcdf, t,
                        a.netcdf3 ? CfFileFormat::netcdf3_64bit : CfFileFormat::netcdf4_classic);
    return;
  }
  std::cout << "hour_start";
  for (const auto& [k, s] : series) std::cout << "," << k << " [" << s.unit << "]";
  std::cout << "\n";
  for (std::size_t i = 0; i < n; ++i) {
    std::cout << format_utc(first + static_cast<UtcSeconds>(i) * kSecondsPerHour);
    for (const auto& [k, s] : series) std::cout << "," << num(value(s, i));
    std::cout << "\n";
  }
}

}  // namespace

void add_met_dump_command(CLI::App& app, int& exit_code) {
  auto args = std::make_shared<MetDumpArgs>();
  CLI::App* sub = app.add_subcommand(
      "met-dump", "Show the hourly met (or concentrations) lidbox reads from a NetCDF file");
  sub->add_option("file", args->input, "CF-NetCDF input file")->required();
  add_netcdf_options(*sub, args->nc);
  sub->add_flag("--concentrations", args->concentrations,
                "Read the observed concentration variables instead of met");
  sub->add_option("--fill-gaps", args->fill_gaps_hours,
                  "Fill gaps of up to this many hours and check the met (as a run does)");
  sub->add_option("--to-netcdf", args->to_netcdf, "Write through the CF writer instead of CSV");
  sub->add_flag("--netcdf3", args->netcdf3, "Write NetCDF-3 (64-bit offset) instead of NetCDF-4");
  sub->callback([args, &exit_code, sub] {
    args->command_line = "lidbox met-dump " + args->input;
    for (const CLI::Option* o : sub->get_options()) {
      if (o->get_name() == "file" || o->count() == 0) continue;
      for (const auto& r : o->results()) args->command_line += " " + o->get_name() + " " + r;
    }
    try {
      if (args->concentrations) {
        dump_concentrations(*args);
      } else {
        dump_met(*args);
      }
      exit_code = 0;
    } catch (const InputError& e) {
      std::cerr << "lidbox met-dump: error: " << e.what() << "\n";
      exit_code = 2;
    } catch (const std::exception& e) {
      std::cerr << "lidbox met-dump: " << e.what() << "\n";
      exit_code = 1;
    }
  });
}

}  // namespace lidbox::cli
