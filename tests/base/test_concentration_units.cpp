#include <doctest/doctest.h>

#include "lidbox/base/concentration_units.hpp"
#include "lidbox/base/error.hpp"

using namespace lidbox;

TEST_CASE("the molar volume at 25 degC and 1 atm is 24.465 litres per mole") {
  // Ideal gas law, R = 8.314462618 J/(mol K) (CODATA 2018): 8.314462618*298.15/101325 m3/mol.
  CHECK(molar_volume_m3_mol(kUsReferenceConditions) * 1000.0 == doctest::Approx(24.4654).epsilon(1e-5));
  // EU reference 293 K and 101.3 kPa: 24.049 L/mol (references.md section 4, derived).
  CHECK(molar_volume_m3_mol(kEuReferenceConditions) * 1000.0 == doctest::Approx(24.049).epsilon(1e-4));
}

TEST_CASE("one ppm of carbon monoxide is about 1145 micrograms per cubic metre at 25 degC") {
  // Spot check "1 ppm CO ~ 1145 ug/m3 (25 degC)", references.md section 4 (calculator.academy);
  // M(CO) = 28.01 g/mol. Tolerance 0.1 %: the source rounds with 24.45 L/mol.
  const auto ppm = parse_concentration_unit("ppm", 28.01, kUsReferenceConditions, "test");
  CHECK(ppm.to_g_m3 * 1e6 == doctest::Approx(1145.0).epsilon(1e-3));
  CHECK(ppm.canonical == "ppm");
  CHECK(ppm.is_mixing_ratio);
  // 40 ppb NO2 ~ 75.3 ug/m3 at 25 degC (same source), M = 46.01 g/mol.
  const auto ppb = parse_concentration_unit("ppb", 46.01, kUsReferenceConditions, "test");
  CHECK(40.0 * ppb.to_g_m3 * 1e6 == doctest::Approx(75.3).epsilon(2e-3));
}

TEST_CASE("mass units accept the usual spellings") {
  for (const char* text : {"ug/m3", "µg/m³", "ug m-3", "UG/M3", "μg/m^3"}) {
    const auto u = parse_concentration_unit(text, 0.0, kUsReferenceConditions, "test");
    CHECK(u.to_g_m3 == doctest::Approx(1e-6));
    CHECK(u.canonical == "ug m-3");
  }
  CHECK(parse_concentration_unit("mg/m3", 0.0, kUsReferenceConditions, "t").to_g_m3 == doctest::Approx(1e-3));
}

TEST_CASE("a mixing ratio without a molar mass is refused with the place named") {
  try {
    (void)parse_concentration_unit("ppb", 0.0, kUsReferenceConditions, "case.toml: [pollutant.PM25]");
    FAIL("no error");
  } catch (const InputError& e) {
    CHECK(std::string(e.what()) ==
          "case.toml: [pollutant.PM25]: unit \"ppb\" is a mixing ratio; expected a molar_mass_g_mol "
          "for this pollutant, or a mass unit such as ug/m3");
  }
  CHECK_THROWS_AS((void)parse_concentration_unit("furlongs", 28.0, kUsReferenceConditions, "t"), InputError);
}
