#include <doctest/doctest.h>

#include "lidbox/base/error.hpp"
#include "lidbox/base/units.hpp"

#include <numbers>

using namespace lidbox;

TEST_CASE("units of the met file convert with the factors of the SI brochure") {
  // 1 ft = 0.3048 m and 1 international knot = 1852/3600 m/s (BIPM SI Brochure, 9th ed., Table 8/
  // non-SI units); 1 mile = 1609.344 m (international yard and pound agreement, 1959).
  CHECK(unit_conversion("ft", "m", "length", "t")(1000.0) == doctest::Approx(304.8));
  CHECK(unit_conversion("km", "m", "length", "t")(1.5) == doctest::Approx(1500.0));
  CHECK(unit_conversion("kt", "m/s", "speed", "t")(10.0) == doctest::Approx(5.144444444));
  CHECK(unit_conversion("mph", "m/s", "speed", "t")(10.0) == doctest::Approx(4.4704));
  CHECK(unit_conversion("km/h", "m/s", "speed", "t")(36.0) == doctest::Approx(10.0));
  CHECK(unit_conversion("°C", "K", "temperature", "t")(20.0) == doctest::Approx(293.15));
  CHECK(unit_conversion("degF", "K", "temperature", "t")(32.0) == doctest::Approx(273.15));
  CHECK(unit_conversion("hPa", "Pa", "pressure", "t")(1013.25) == doctest::Approx(101325.0));
}

TEST_CASE("an unconvertible unit names the place and the quantity") {
  try {
    (void)unit_conversion("kg", "m/s", "speed", "met.csv: column \"wind_speed [kg]\"");
    FAIL("no error");
  } catch (const InputError& e) {
    CHECK(std::string(e.what()) ==
          "met.csv: column \"wind_speed [kg]\": unit \"kg\" cannot be converted to \"m/s\"; "
          "expected a unit of speed convertible to \"m/s\"");
  }
  CHECK_THROWS_AS((void)unit_conversion("blargh", "m", "length", "t"), InputError);
  CHECK_THROWS_AS((void)unit_conversion("", "m", "length", "t"), InputError);
}

TEST_CASE("directions accept degrees and radians but not dimensionless units") {
  CHECK(direction_unit_to_degrees("deg", "t")(90.0) == doctest::Approx(90.0));
  CHECK(direction_unit_to_degrees("°", "t")(90.0) == doctest::Approx(90.0));
  CHECK(direction_unit_to_degrees("rad", "t")(std::numbers::pi) == doctest::Approx(180.0));
  CHECK_THROWS_AS((void)direction_unit_to_degrees("ppb", "t"), InputError);
}

TEST_CASE("a rate is not accepted where a time is expected") {
  // UDUNITS-2 treats reciprocal units as convertible (1/h -> s as 3600/x); lidbox refuses that.
  CHECK_THROWS_AS((void)unit_conversion("1/h", "s", "time", "t"), InputError);
  CHECK(unit_conversion("%/h", "1/s", "rate", "t")(100.0) == doctest::Approx(1.0 / 3600.0));
  CHECK(unit_conversion("t/h", "g/s", "mass rate", "t")(3.6) == doctest::Approx(1000.0));
}
