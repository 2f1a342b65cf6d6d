#include <doctest/doctest.h>

#include <cmath>

#include "lidbox/engine/case_file.hpp"
#include "lidbox/base/error.hpp"

using namespace lidbox;

namespace {
const char* kCase = R"(
name = "t"
time_zone = "+01:00"
[airshed]
x_side = "10 km"
y_side = "5000 m"
x_side_bearing = "0.5 rad"
[met]
file = "met.csv"
[pollutants.NO2]
unit = "ppb"
molar_mass = "46.01 g/mol"
reference_conditions = "eu"
lifetime = "10 h"
deposition_velocity = "0.3 cm/s"
background = "10 ppb"
free_troposphere = "2 ppb"
[pollutants.PM10]
unit = "ug/m3"
background = { by_wind_from = [ { from = "315 deg", to = "45 deg", value = "30 ug/m3" },
                                { from = "45 deg", to = "315 deg", value = "10 ug/m3" } ] }
free_troposphere = "5 ug/m3"
[sectors.roads]
emissions = { NO2 = "1.8 t/h", PM10 = "0.2 ug m-2 s-1" }
hour_of_day = [1,1,1,1,1,1,2,2,2,2,2,2,2,2,2,2,2,2,1,1,1,1,1,1]
)";
}  // namespace

TEST_CASE("a case file's quantities are converted to SI with their units") {
  const CaseSpec c = parse_case(kCase, "case.toml", "/data");
  CHECK(c.footprint.x_side_m == doctest::Approx(10000.0));
  CHECK(c.footprint.y_side_m == doctest::Approx(5000.0));
  CHECK(c.footprint.x_side_bearing_deg == doctest::Approx(28.6478898));
  CHECK(c.met.path == "/data/met.csv");
  CHECK(c.output_directory == "outputs/t");
  REQUIRE(c.pollutants.size() == 2);
  CHECK(c.pollutants[0].name == "NO2");  // source order, not alphabetical
  const PollutantSpec& no2 = c.pollutants[0];
  CHECK(no2.processes.loss_rate_per_s == doctest::Approx(1.0 / 36000.0));
  CHECK(no2.processes.residual_loss_rate_per_s == doctest::Approx(1.0 / 36000.0));
  CHECK(no2.processes.deposition_velocity_m_s == doctest::Approx(0.003));
  // 10 ppb NO2 at 293 K, 101.3 kPa: 1.913 ug/m3 per ppb (references.md section 4, derived).
  CHECK(no2.background.value_g_m3 * 1e6 == doctest::Approx(19.13).epsilon(1e-3));
  // Area flux 0.2 ug m-2 s-1 over 50 km2 = 10 g/s.
  CHECK(c.sectors[0].rate_g_s[1] == doctest::Approx(10.0));
  CHECK(c.sectors[0].rate_g_s[0] == doctest::Approx(500.0));
  // Clock normalised to a mean of 1: weights 1 (12 h) and 2 (12 h) have mean 1.5.
  CHECK(c.sectors[0].clock.hour_raw_mean == doctest::Approx(1.5));
  CHECK(c.sectors[0].clock.hour_of_day[6] == doctest::Approx(2.0 / 1.5));
  // Wind-sector background wraps through north.
  const BackgroundSpec& bg = c.pollutants[1].background;
  CHECK(bg.for_direction(0.0) * 1e6 == doctest::Approx(30.0));
  CHECK(bg.for_direction(350.0) * 1e6 == doctest::Approx(30.0));
  CHECK(bg.for_direction(180.0) * 1e6 == doctest::Approx(10.0));
}

TEST_CASE("case-file mistakes are named with file, line and key") {
  auto message = [](const std::string& from, const std::string& to) {
    std::string text = kCase;
    text.replace(text.find(from), from.size(), to);
    try {
      (void)parse_case(text, "case.toml", ".");
    } catch (const InputError& e) {
      return std::string(e.what());
    }
    return std::string("no error");
  };
  CHECK(message("lifetime = \"10 h\"", "lifetim = \"10 h\"") ==
        "case.toml:14: [pollutants.NO2]: unknown key \"lifetim\"; expected one of unit, "
        "molar_mass, reference_conditions, lifetime, loss_rate, residual_lifetime, "
        "residual_loss_rate, deposition_velocity, background, free_troposphere, initial, "
        "initial_residual (did you mean \"lifetime\"?)");
  CHECK(message("lifetime = \"10 h\"", "lifetime = \"10 m\"") ==
        "case.toml:14: [pollutants.NO2] lifetime: unit \"m\" cannot be converted to \"s\"; "
        "expected a unit of time convertible to \"s\"");
  CHECK(message("NO2 = \"1.8 t/h\"", "NO2 = \"1.8 t\"") ==
        "case.toml:24: [sectors.roads.emissions] NO2: unit \"t\" is neither a mass rate nor an "
        "area flux; expected a total rate such as \"1.5 t/h\" or \"400 g/s\", or an area flux "
        "such as \"2 ug m-2 s-1\"");
  CHECK(message("NO2 = \"1.8 t/h\"", "NOx = \"1.8 t/h\"") ==
        "case.toml:24: [sectors.roads.emissions]: unknown key \"NOx\"; expected one of NO2, PM10 "
        "(did you mean \"NO2\"?)");
  CHECK(message("{ from = \"45 deg\", to = \"315 deg\"", "{ from = \"50 deg\", to = \"315 deg\"") ==
        "case.toml:20: [pollutants.PM10.background] by_wind_from: the sector starting at 315 "
        "deg ends at 45 deg but the next starts at 50 deg; expected sectors that cover 0-360 deg "
        "without gaps or overlaps");
  CHECK(message("unit = \"ppb\"", "unit = \"ppb\"\nunit = \"ppm\"").rfind("case.toml:12: TOML syntax", 0) == 0);
  CHECK(message("[met]\nfile = \"met.csv\"", "[met]") ==
        "case.toml:8: [met]: no \"file\"; expected a string in quotes");
  CHECK(message("[met]\nfile = \"met.csv\"", "[met]\nfile = \"met.csv\"\nmax_gap_hours = 49") ==
        "case.toml:10: [met] max_gap_hours: 49; expected a whole number from 0 to 48");
  // 2^32 + 1 wraps to 1 in a 32-bit int (closed form): refused, not run for one day.
  CHECK(message("[met]\nfile = \"met.csv\"",
                "[met]\nfile = \"met.csv\"\n[model]\nspin_up_max_days = 4294967297") ==
        "case.toml:11: [model] spin_up_max_days: 4294967297; expected a whole number from 1 to "
        "2147483647");
  // The same for the sub-step cap (toml_table reads TOML's 64-bit integers before narrowing).
  CHECK(message("[met]\nfile = \"met.csv\"",
                "[met]\nfile = \"met.csv\"\n[model]\nmax_substeps_per_hour = 4294967297") ==
        "case.toml:11: [model] max_substeps_per_hour: 4294967297; expected a whole number from 1 "
        "to 2147483647");
  CHECK(message("[airshed]", "[airshd]") ==
        "case.toml:4: (top level): unknown key \"airshd\"; expected one of name, title, invented, "
        "time_zone, airshed, met, model, pollutants, sectors, standards, diagnostics, grid, output, "
        "scenario, ensemble, cut, plausibility, bulletin (did you mean \"airshed\"?)");
}

TEST_CASE("month weights are normalised by the mean month lengths of the Gregorian cycle") {
  // 146097 days in 400 years = 4800 months; February averages 28.2425 days (Gregorian rules).
  std::vector<double> month(12, 1.0);
  month[0] = 2.0;  // January doubled
  const ClockProfile c = ClockProfile::from_weights({}, {}, month, "t");
  CHECK(c.month_raw_mean == doctest::Approx((365.2425 + 31.0) / 365.2425));
  CHECK_THROWS_AS((void)ClockProfile::from_weights({1, 2, 3}, {}, {}, "t"), InputError);
}

TEST_CASE("NetCDF met options in the case file are checked against the format") {
  auto message = [](const std::string& met) {
    std::string text = kCase;
    text.replace(text.find("[met]\nfile = \"met.csv\""), 22, met);
    try {
      (void)parse_case(text, "case.toml", ".");
    } catch (const InputError& e) {
      return std::string(e.what());
    }
    return std::string("no error");
  };
  CHECK(message("[met]\nfile = \"met.csv\"\nmember = 2") ==
        "case.toml:8: [met]: NetCDF options for a CSV met file; expected station, "
        "latitude/longitude, footprint, member, sub_hourly, coarse_step and variables only with "
        "format = \"netcdf\"");
  CHECK(message("[met]\nfile = \"m.nc\"\nlatitude = \"41 deg\"") ==
        "case.toml:8: [met]: only one of latitude and longitude; expected both, for the nearest "
        "grid cell");
  CHECK(message("[met]\nfile = \"m.nc\"\ncoarse_step = \"linear\"") ==
        "case.toml:10: [met] coarse_step: coarse_step = \"linear\" with hour averages; expected "
        "reading = \"instantaneous\": interpolated values are instants, not hour means");
  CHECK(message("[met]\nfile = \"m.nc\"\n[met.variables]\nmixing_hieght = \"blh\"") ==
        "case.toml:11: [met.variables]: unknown key \"mixing_hieght\"; expected one of "
        "mixing_height, eastward_wind, northward_wind, wind_speed, wind_from_direction, "
        "air_temperature, surface_pressure, time (did you mean \"mixing_height\"?)");
  // A point west of Greenwich written as a negative bearing-like angle is kept as -112 degrees.
  std::string text = kCase;
  text.replace(text.find("[met]\nfile = \"met.csv\""), 22,
               "[met]\nfile = \"m.nc\"\nlatitude = \"41 deg\"\nlongitude = \"-112 deg\"\nmember = 3");
  const CaseSpec c = parse_case(text, "case.toml", ".");
  CHECK(c.met.format == MetFormat::netcdf);
  REQUIRE(c.met.netcdf.point.has_value());
  CHECK(c.met.netcdf.point->lon_deg == doctest::Approx(-112.0));
  CHECK(*c.met.netcdf.member == 3);
}

TEST_CASE("the residual layer's rule and cycle threshold are read from [model]") {
  auto with_model = [](const std::string& model) {
    std::string text = kCase;
    text.replace(text.find("[pollutants.NO2]"), 16, "[model]\n" + model + "\n[pollutants.NO2]");
    return text;
  };
  const CaseSpec d = parse_case(kCase, "case.toml", ".");
  CHECK(d.engine.residual_top == ResidualTop::most_recent_cycle);
  CHECK(d.engine.cycle_threshold_m == 100.0);
  const CaseSpec c =
      parse_case(with_model("residual_cycle_threshold = \"0.2 km\""), "case.toml", ".");
  CHECK(c.engine.cycle_threshold_m == doctest::Approx(200.0));
  const CaseSpec o =
      parse_case(with_model("residual_top = \"highest_since_emptied\""), "case.toml", ".");
  CHECK(o.engine.residual_top == ResidualTop::highest_since_emptied);
  CHECK_THROWS_WITH_AS(
      (void)parse_case(with_model("residual_top = \"yesterday\""), "case.toml", "."),
      "case.toml:11: [model] residual_top: \"yesterday\"; expected "
      "\"most_recent_cycle\" or \"highest_since_emptied\"",
      InputError);
  CHECK_THROWS_WITH_AS(
      (void)parse_case(with_model("residual_top = \"highest_since_emptied\"\n"
                                  "residual_cycle_threshold = \"50 m\""),
                       "case.toml", "."),
      "case.toml:12: [model] residual_cycle_threshold: a cycle threshold with residual_top = "
      "\"highest_since_emptied\"; expected it only with residual_top = \"most_recent_cycle\"",
      InputError);
}
