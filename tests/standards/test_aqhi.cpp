#include <doctest/doctest.h>

#include <cmath>
#include <string>

#include "lidbox/standards/aqhi.hpp"

using namespace lidbox;

TEST_CASE("the AQHI formula and its categories") {
  // Closed form of the AQHI equation (Mieczyslaw 2017): NO2 20 ppb, O3 30 ppb, PM2.5 10 ug/m3.
  const double expected =
      (1000.0 / 10.4) * ((std::exp(0.000871 * 20) - 1) + (std::exp(0.000537 * 30) - 1) +
                         (std::exp(0.000487 * 10) - 1));
  CHECK(aqhi_value(20, 30, 10) == doctest::Approx(expected));
  CHECK(expected == doctest::Approx(3.7207).epsilon(1e-4));  // by hand, 4 decimals
  CHECK(aqhi_rounded(expected) == 4);
  CHECK(std::string(aqhi_category(4)) == "Moderate");
  CHECK(std::string(aqhi_category(3)) == "Low");
  CHECK(std::string(aqhi_category(10)) == "High");
  CHECK(std::string(aqhi_category(11)) == "Very High");
  CHECK(aqhi_rounded(0.2) == 1);  // at least 1 (from memory)
}

TEST_CASE("hourly AQHI uses trailing 3-hour means") {
  const UtcSeconds t0 = 0;
  NamedSeries s;
  s["NO2"] = HourlySeries{t0, {10, 20, 30, 40}, "ppb"};
  s["O3"] = HourlySeries{t0, {30, 30, 30, 30}, "ppb"};
  s["PM2.5"] = HourlySeries{t0, {10, 10, 10, 10}, "ug m-3"};
  const auto h = hourly_aqhi(s);
  // Windows [0,3) and [1,4) are the ones inside the series with all three hours; the windows
  // running past the end are left out. The first uses NO2 mean 20 (closed form).
  REQUIRE(h.size() == 2);
  CHECK(h[0].end_utc == 3 * kSecondsPerHour);
  CHECK(h[0].no2_ppb == doctest::Approx(20.0));
  CHECK(h[0].value == doctest::Approx(aqhi_value(20, 30, 10)));
  CHECK(h[1].no2_ppb == doctest::Approx(30.0));
}
