#include "lidbox/engine/footprint.hpp"

#include <cmath>
#include <numbers>

namespace lidbox {

FlushingGeometry::FlushingGeometry(const Footprint& fp) {
  const double b = fp.x_side_bearing_deg * (std::numbers::pi / 180.0);
  // A bearing b points to (east, north) = (sin b, cos b); the y side is at bearing b - 90.
  ex_u = std::sin(b);
  ex_v = std::cos(b);
  ey_u = -std::cos(b);
  ey_v = std::sin(b);
  inv_x = 1.0 / fp.x_side_m;
  inv_y = 1.0 / fp.y_side_m;
  isotropic_per_m = (2.0 / std::numbers::pi) * (inv_x + inv_y);
}

double FlushingGeometry::flushing_rate(double u, double v) const {
  const double wx = u * ex_u + v * ex_v;
  const double wy = u * ey_u + v * ey_v;
  return std::fabs(wx) * inv_x + std::fabs(wy) * inv_y;
}

}  // namespace lidbox
