#include "netcdf_options.hpp"

#include <charconv>

#include "lidbox/base/error.hpp"

namespace lidbox::cli {
namespace {

std::vector<double> numbers(const std::string& text, std::size_t n, const std::string& option,
                            const std::string& expected) {
  std::vector<double> r;
  std::size_t pos = 0;
  while (pos <= text.size()) {
    const std::size_t comma = text.find(',', pos);
    const std::string part =
        text.substr(pos, comma == std::string::npos ? std::string::npos : comma - pos);
    double v = 0.0;
    const auto res = std::from_chars(part.data(), part.data() + part.size(), v);
    if (part.empty() || res.ec != std::errc() || res.ptr != part.data() + part.size()) {
      throw InputError(option, "\"" + text + "\"", expected);
    }
    r.push_back(v);
    if (comma == std::string::npos) break;
    pos = comma + 1;
  }
  if (r.size() != n) throw InputError(option, "\"" + text + "\"", expected);
  return r;
}

std::pair<std::string, std::string> key_value(const std::string& text, const std::string& option,
                                              const std::string& expected) {
  const std::size_t eq = text.find('=');
  if (eq == std::string::npos || eq == 0 || eq + 1 == text.size()) {
    throw InputError(option, "\"" + text + "\"", expected);
  }
  return {text.substr(0, eq), text.substr(eq + 1)};
}

}  // namespace

void add_netcdf_options(CLI::App& app, NetcdfOptionTexts& t) {
  app.add_option("--station", t.station, "Station id (cf_role timeseries_id) in a station file");
  app.add_option("--point", t.point, "LAT,LON: the grid cell nearest to this point [deg N, deg E]");
  app.add_option("--footprint", t.footprint,
                 "LATMIN,LATMAX,LONMIN,LONMAX: mean over the grid cells inside [deg]");
  app.add_option("--member", t.member, "Ensemble member (its realization value)");
  app.add_option("--map", t.maps, "ROLE=VARIABLE: take a role from a named variable");
  app.add_option("--extra", t.extras,
                 "COLUMN=VARIABLE: an extra series (by name or standard_name)");
  app.add_option("--sub-hourly", t.sub_hourly,
                 "Sub-hourly rule: hour_mean (default), on_the_hour or refuse");
  app.add_option("--coarse", t.coarse,
                 "Coarse-step rule: refuse (default) or linear, for steps longer than an hour");
}

NetcdfMetOptions netcdf_met_options(const NetcdfOptionTexts& t) {
  NetcdfMetOptions o;
  if (!t.station.empty()) o.station_id = t.station;
  if (!t.point.empty()) {
    const auto v = numbers(t.point, 2, "--point", "LAT,LON in degrees, e.g. 45.07,7.69");
    o.point = LatLon{v[0], v[1]};
  }
  if (!t.footprint.empty()) {
    const auto v = numbers(t.footprint, 4, "--footprint",
                           "LATMIN,LATMAX,LONMIN,LONMAX in degrees, e.g. 44.9,45.2,7.5,7.9");
    o.footprint = LatLonBox{v[0], v[1], v[2], v[3]};
  }
  if (!t.member.empty()) {
    long long m = 0;
    const auto res = std::from_chars(t.member.data(), t.member.data() + t.member.size(), m);
    if (res.ec != std::errc() || res.ptr != t.member.data() + t.member.size()) {
      throw InputError("--member", "\"" + t.member + "\"", "an integer member number");
    }
    o.member = m;
  }
  for (const auto& m : t.maps) {
    auto [role, var] = key_value(m, "--map", "ROLE=VARIABLE, e.g. mixing_height=blh");
    o.variables[role] = var;
  }
  for (const auto& e : t.extras) {
    auto [column, var] = key_value(e, "--extra", "COLUMN=VARIABLE, e.g. background_pm2p5=pm25");
    o.extra[column] = var;
  }
  o.sub_hourly = parse_sub_hourly_rule(t.sub_hourly, "--sub-hourly");
  o.coarse = parse_coarse_step_rule(t.coarse, "--coarse");
  return o;
}

}  // namespace lidbox::cli
