#include <doctest/doctest.h>

#include <filesystem>

#include "lidbox/base/error.hpp"
#include "lidbox/engine/case_file.hpp"
#include "lidbox/engine/ensemble.hpp"
#include "lidbox/engine/run.hpp"

using namespace lidbox;

namespace {

// A steady box (physics note section 2, closed form): C = E / (u W H) = 400 / (2 * 10000 * 500)
// g/m3 = 40 ug/m3 from each of two equal sectors, wind 2 m/s along a 10 km side, lid 500 m.
const std::string kSteady = R"(
name = "steady"
time_zone = "UTC"
[airshed]
x_side = "10 km"
y_side = "10 km"
[met]
file = "m.csv"
[pollutants.PM25]
unit = "ug/m3"
background = "0 ug/m3"
free_troposphere = "0 ug/m3"
[sectors.traffic]
emissions = { PM25 = "400 g/s" }
[sectors.home_heating]
emissions = { PM25 = "400 g/s" }
)";

MetSeries steady_met(std::size_t n) {
  MetSeries m;
  m.source = "m.csv";
  m.first_stamp_utc = parse_iso8601("2026-01-05T00:00Z", nullptr, "t");
  m.mixing_height_m.assign(n, 500.0);
  m.wind_u_m_s.assign(n, 2.0);
  m.wind_v_m_s.assign(n, 0.0);
  m.filled.assign(n, 0);
  m.source_line.assign(n, 0);
  return m;
}

std::string message_of(const std::string& text) {
  try {
    parse_case(text, "c.toml", ".");
  } catch (const InputError& e) {
    return e.what();
  }
  return "";
}

}  // namespace

TEST_CASE("a scenario scales the named sector from its start hour and leaves the past alone") {
  const CaseSpec c = parse_case(kSteady +
                                    "[scenario]\nstart = \"2026-01-06T00:00Z\"\n"
                                    "scale = { home_heating = 0.25 }\n",
                                "c.toml", ".");
  REQUIRE(c.scenario.has_value());
  const RunResult base = run_case(parse_case(kSteady, "c.toml", "."), steady_met(72));
  const RunResult cut = run_case(c, steady_met(72));
  const double ug = 1e-6;
  for (std::size_t i = 0; i < 24; ++i)
    CHECK(cut.mean(i, 0, 3) == base.mean(i, 0, 3));  // before: unchanged
  // Two days after the start the heating part is at its scaled steady state, 0.25 * 40 ug/m3
  // (closed form above; the flushing time 10 km / 2 m/s = 1.4 h has long passed), and traffic
  // is untouched.
  CHECK(cut.mean(71, 0, 3) / ug == doctest::Approx(10.0).epsilon(1e-9));
  CHECK(cut.mean(71, 0, 2) == base.mean(71, 0, 2));
}

TEST_CASE("scenario mistakes name the key") {
  CHECK(message_of(kSteady +
                   "[scenario]\nstart = \"2026-01-06T00:00Z\"\nscale = { home_heatin = 0.5 }\n") ==
        "c.toml:19: [scenario] scale: no sector \"home_heatin\" (did you mean \"home_heating\"?); "
        "expected one of "
        "the case's sectors: traffic, home_heating");
  CHECK(message_of(kSteady +
                   "[scenario]\nstart = \"2026-01-06T00:00Z\"\nscale = { traffic = -0.5 }\n") ==
        "c.toml:19: [scenario.scale] traffic: -0.5; expected a factor >= 0 (1 = unchanged)");
  const CaseSpec late =
      parse_case(kSteady + "[scenario]\nstart = \"2026-01-09T00:00Z\"\nscale = { traffic = 0.5 }\n",
                 "c.toml", ".");
  try {
    run_case(late, steady_met(72));
    FAIL("a start after the run was accepted");
  } catch (const InputError& e) {
    CHECK(std::string(e.what()) ==
          "c.toml:18: [scenario] start: 2026-01-09T00:00:00Z, outside the run; expected the start "
          "of an hour from "
          "2026-01-05T00:00:00Z to 2026-01-07T23:00:00Z");
  }
}

TEST_CASE("every member of a NetCDF ensemble is read, in the file's order") {
  const std::string nc =
      (std::filesystem::path(LIDBOX_SOURCE_DIR) / "met-demo" / "cindervale-met-ensemble.nc")
          .string();
  const std::string text = R"(
name = "nc"
time_zone = "UTC"
[airshed]
x_side = "10 km"
y_side = "10 km"
[met]
file = ")" + nc + R"("
member = 0
[ensemble]
members = ")" + nc + R"("
[pollutants.PM25]
unit = "ug/m3"
background = "0 ug/m3"
free_troposphere = "0 ug/m3"
)";
  const CaseSpec c = parse_case(text, "c.toml", ".");
  REQUIRE(c.ensemble.has_value());
  CHECK(c.ensemble->netcdf_members);
  const MetSeries det = read_case_met(c);
  const EnsembleMet e = read_ensemble_met(c, det);
  REQUIRE(e.members.size() == 5);  // realization = 0 .. 4 in the file (ncdump)
  CHECK(e.labels[3] == nc + " member 3");
  // Member 0 is the [met] run itself.
  CHECK(e.members[0].mixing_height_m == det.mixing_height_m);
  CHECK(e.members[1].mixing_height_m != det.mixing_height_m);
}
