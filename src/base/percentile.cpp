#include "lidbox/base/percentile.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <string>

#include "lidbox/base/error.hpp"

namespace lidbox {

double percentile_linear(std::vector<double>& x, double q) {
  if (!(q >= 0.0 && q <= 100.0)) {
    throw InternalError("percentile_linear at q = " + std::to_string(q));
  }
  if (x.empty()) return std::numeric_limits<double>::quiet_NaN();
  std::sort(x.begin(), x.end());
  const double h = static_cast<double>(x.size() - 1) * q / 100.0;
  const auto lo = static_cast<std::size_t>(std::floor(h));
  if (lo + 1 >= x.size()) return x.back();
  const double t = h - static_cast<double>(lo);
  const double a = x[lo], b = x[lo + 1];
  return t < 0.5 ? a + (b - a) * t : b - (b - a) * (1.0 - t);
}

}  // namespace lidbox
