#include <doctest/doctest.h>

#include <cstdio>
#include <cstdlib>
#include <random>
#include <string>

#include "lidbox/base/text.hpp"
#include "lidbox/base/time.hpp"
#include "lidbox/met/csv_met.hpp"

using namespace lidbox;

namespace {

// A decimal in one of the spellings a met file may use: plain, with a sign, an exponent or
// leading zeros.
std::string random_decimal(std::mt19937_64& rng) {
  std::uniform_real_distribution<double> mag(0.0, 4000.0);
  std::uniform_int_distribution<int> form(0, 6), digits(0, 9);
  const double v = mag(rng);
  char buf[64];
  switch (form(rng)) {
    case 0:
      std::snprintf(buf, sizeof buf, "%.0f", v);
      break;
    case 1:
      std::snprintf(buf, sizeof buf, "%.*f", digits(rng), v);
      break;
    case 2:
      std::snprintf(buf, sizeof buf, "%.17g", v);
      break;
    case 3:
      std::snprintf(buf, sizeof buf, "%.6e", v);
      break;
    case 4:
      std::snprintf(buf, sizeof buf, "+%.3f", v);
      break;
    case 5:
      std::snprintf(buf, sizeof buf, "000%.2f", v);
      break;
    default:
      std::snprintf(buf, sizeof buf, "%.20f", v / 1e6);  // longer than the quick path takes
      break;
  }
  return buf;
}

}  // namespace

TEST_CASE("met CSV numbers and times read as the C library's strtod and the ISO 8601 parser") {
  // Reference: the C library's strtod (correctly rounded decimal conversion) for every cell, and
  // lidbox's general ISO 8601 parser for every time; seeded random spellings of the numbers, and
  // records that start in 1899, 1999 and 2199 so that the quick time reader's limits are crossed.
  const unsigned seed = 20261202;
  MESSAGE("seed " << seed);
  std::mt19937_64 rng(seed);
  std::uniform_int_distribution<int> coin(0, 1);
  int mismatches = 0;
  for (const int year : {1899, 1999, 2199}) {
    std::string text = "time,mixing_height [m],wind_speed [m/s],wind_from [deg],x [1]\n";
    std::vector<double> height, extra;
    std::vector<UtcSeconds> stamps;
    UtcSeconds t = utc_seconds_from_civil(CivilTime{year, 12, 31, 0, 0, 0});
    for (int row = 0; row < 1000; ++row, t += kSecondsPerHour) {
      stamps.push_back(t);
      const std::string h = random_decimal(rng);
      std::string x = random_decimal(rng);
      if (x[0] != '+' && coin(rng)) x = "-" + x;
      height.push_back(std::strtod(h.c_str(), nullptr));
      extra.push_back(std::strtod(x.c_str(), nullptr));
      text += format_utc(t) + "," + h + ",2.5,180," + x + "\n";
    }
    const MetSeries m = parse_met_csv(text, CsvMetOptions{}, "m.csv");
    CHECK(m.first_stamp_utc == parse_iso8601(format_utc(stamps.front()), nullptr, "t"));
    REQUIRE(m.size() == stamps.size());
    REQUIRE(m.extra.size() == 1);
    for (std::size_t i = 0; i < stamps.size(); ++i) {
      if (m.stamp(i) != parse_iso8601(format_utc(stamps[i]), nullptr, "t") ||
          m.mixing_height_m[i] != height[i] || m.extra[0].values[i] != extra[i]) {
        ++mismatches;
      }
    }
  }
  CHECK(mismatches == 0);
}
