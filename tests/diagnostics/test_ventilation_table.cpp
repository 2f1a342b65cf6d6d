// Ventilation categories at their edges, in each agency's own unit. The value in m2/s is built
// from the agency's unit with the exact unit definitions (1 ft = 0.3048 m, 1 kt = 1852/3600 m/s)
// and nudged by 1e-9 relative to either side of the edge.
#include <doctest/doctest.h>

#include <cmath>
#include <string>

#include "lidbox/base/error.hpp"
#include "lidbox/diagnostics/ventilation_table.hpp"

using namespace lidbox;

namespace {
constexpr double kKtFt = 0.3048 * 1852.0 / 3600.0;  // m2/s per kt ft (arithmetic: 0.156803)

std::string category(const VentilationTable& t, double m2_s) {
  const int k = t.classify(m2_s);
  return k < 0 ? "" : t.categories[static_cast<std::size_t>(k)].name;
}
double below(double x) {
  return x * (1.0 - 1e-9);
}
double above(double x) {
  return x * (1.0 + 1e-9);
}
}  // namespace

TEST_CASE("one knot foot is 0.156803 m2/s") {
  // arithmetic: 0.3048 m x 0.514444 m/s = 0.1568027 m2/s (0.156803 to six figures)
  const VentilationTable t = load_ventilation_table("nws-blacksburg");
  CHECK(t.in_table_unit(1.0) == doctest::Approx(1.0 / 0.156803).epsilon(1e-5));
  CHECK(t.in_table_unit(kKtFt) == doctest::Approx(1.0).epsilon(1e-12));
}

TEST_CASE("nws-blacksburg categories at their edges in kt ft") {
  // NWS Blacksburg fire-weather page (decisions-references 1.2): 1 <= 28500; 2 to 38000;
  // 3 to 51000; 4 to 95000; 5 above.
  const VentilationTable t = load_ventilation_table("nws-blacksburg");
  CHECK(category(t, below(28500 * kKtFt)) == "1");
  CHECK(category(t, above(28500 * kKtFt)) == "2");
  CHECK(category(t, below(38000 * kKtFt)) == "2");
  CHECK(category(t, above(38000 * kKtFt)) == "3");
  CHECK(category(t, 38001 * kKtFt) == "3");
  CHECK(category(t, above(51000 * kKtFt)) == "4");
  CHECK(category(t, below(95000 * kKtFt)) == "4");
  CHECK(category(t, above(95000 * kKtFt)) == "5");
  CHECK(category(t, std::nan("")).empty());
}

TEST_CASE("utah-clearing-index categories at their edges in hundreds of ft times kt") {
  // NWS Salt Lake City clearing-index page: below 500 poor; 1000 and above reported as 1000+;
  // its worked example: 10000 ft and 8 kt give (10000 / 100) x 8 = 800.
  const VentilationTable t = load_ventilation_table("utah-clearing-index");
  const double example_m2_s = 10000 * 0.3048 * 8 * 1852.0 / 3600.0;
  CHECK(t.in_table_unit(example_m2_s) == doctest::Approx(800.0).epsilon(1e-12));
  CHECK(category(t, example_m2_s) == "500-999 (no name in the source)");
  CHECK(category(t, below(500 * 100 * kKtFt)) == "poor");
  CHECK(category(t, 500 * 100 * kKtFt * (1 + 1e-12)) == "500-999 (no name in the source)");
  CHECK(category(t, below(1000 * 100 * kKtFt)) == "500-999 (no name in the source)");
  CHECK(category(t, above(1000 * 100 * kKtFt)) == "1000+");
}

TEST_CASE("usfs-vcis classes at their edges in m2/s") {
  // Ferguson et al. (2003) PNW-RP-550 class names (SRC); the edges 2350, 4700, 7050 m2/s are
  // from memory (decisions-references 1.2 marks them MEM).
  const VentilationTable t = load_ventilation_table("usfs-vcis");
  CHECK(category(t, 2349.999) == "poor");
  CHECK(category(t, 2350.0) == "marginal");
  CHECK(category(t, 4699.999) == "marginal");
  CHECK(category(t, 4700.0) == "fair");
  CHECK(category(t, 7050.0) == "fair");
  CHECK(category(t, 7050.001) == "good");
}

TEST_CASE("a table whose bounds do not increase is refused at the line of the bound") {
  const std::string text = R"(id = "x"
title = "t"
source = "s"
checked = "PRAC"
unit = "m2/s"
statistic = "mean"
[[category]]
name = "a"
below = 100
[[category]]
name = "b"
below = 50
[[category]]
name = "c"
)";
  CHECK_THROWS_WITH_AS(
      parse_ventilation_table(text, "x.toml"),
      "x.toml:12: [[category]] below: 50; expected a bound above the previous category's 100",
      InputError);
}

TEST_CASE("a table in a unit that is not a ventilation is refused") {
  const std::string text = R"(id = "x"
title = "t"
source = "s"
checked = "PRAC"
unit = "m/s"
statistic = "mean"
[[category]]
name = "a"
below = 1
[[category]]
name = "b"
)";
  CHECK_THROWS_AS(parse_ventilation_table(text, "x.toml"), InputError);
}

TEST_CASE("an unknown table id lists the shipped ones") {
  CHECK_THROWS_WITH_AS(
      load_ventilation_table("nws-blacksbrg"),
      "ventilation table \"nws-blacksbrg\": not a shipped table; expected one of "
      "nws-blacksburg, usfs-vcis, utah-clearing-index or a path to a TOML file (did you mean "
      "\"nws-blacksburg\"?)",
      InputError);
}
