// The vectorisable e^y - 1 against numpy and the C library.
#include <doctest/doctest.h>

#include <cmath>
#include <cstdio>
#include <random>
#include <vector>

#include "lidbox/base/exponential.hpp"

using namespace lidbox;

namespace {

// Distance in units in the last place of b.
double ulps(double a, double b) {
  const double step = std::nextafter(std::fabs(b), INFINITY) - std::fabs(b);
  return std::fabs(a - b) / step;
}

}  // namespace

TEST_CASE("expm1_nonpositive gives numpy.expm1's values to within 3 ulp") {
  // Check values: numpy 1.24 (Debian 12 python3-numpy), repr(float(np.expm1(y))).
  const std::vector<std::pair<double, double>> cases = {
      {-1e-10, -9.999999999500001e-11},
      {-1e-4, -9.999500016666251e-05},
      {-0.1, -0.09516258196404043},
      {-0.34657359027997264, -0.2928932188134525},  // -ln2 / 2, the edge of the reduction
      {-0.5, -0.3934693402873666},
      {-1.0, -0.6321205588285577},
      {-2.5, -0.9179150013761012},
      {-10.0, -0.9999546000702375},
      {-36.0, -0.9999999999999998},
      {-39.9, -1.0},
      {-45.0, -1.0},
      {-700.0, -1.0},
  };
  for (const auto& point : cases) {
    const double y = point.first;  // a plain variable: clang 14 cannot capture a binding
    CAPTURE(y);
    CHECK(ulps(expm1_nonpositive(y), point.second) <= 3.0);
  }
  CHECK(expm1_nonpositive(0.0) == 0.0);
  CHECK(expm1_nonpositive(-INFINITY) == -1.0);
}

TEST_CASE("expm1_nonpositive stays within 3 ulp of the C library over twelve decades") {
  // Reference: glibc's expm1 (Debian 12 libm, correctly rounded to within 1 ulp by its
  // documentation). Seeded property test over y = -e^s, s uniform in [-28, 6.5].
  const unsigned seed = 20261202;
  std::printf("expm1_nonpositive property test seed %u\n", seed);
  std::mt19937_64 gen(seed);
  std::uniform_real_distribution<double> s(-28.0, 6.5);
  double worst = 0.0, worst_y = 0.0;
  for (int i = 0; i < 200000; ++i) {
    const double y = -std::exp(s(gen));
    const double d = ulps(expm1_nonpositive(y), std::expm1(y));
    if (d > worst) {
      worst = d;
      worst_y = y;
    }
  }
  CAPTURE(worst_y);
  CHECK(worst <= 3.0);
}

TEST_CASE("the array form gives the inline form's doubles, in place too") {
  std::vector<double> y, out(1000), in_place;
  for (int i = 0; i < 1000; ++i) y.push_back(-0.037 * i - 1e-5);
  in_place = y;
  expm1_nonpositive(y.data(), out.data(), y.size());
  expm1_nonpositive(in_place.data(), in_place.data(), in_place.size());
  for (std::size_t i = 0; i < y.size(); ++i) {
    CAPTURE(y[i]);
    CHECK(out[i] == expm1_nonpositive(y[i]));
    CHECK(in_place[i] == out[i]);
  }
}
