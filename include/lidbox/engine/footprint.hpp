// The airshed's footprint: a rectangle with sides Lx and Ly, the Lx side pointing along a bearing
// (degrees clockwise from north; 90 = the Lx side runs west-east, the default).
//
//                 north
//                   ^        bearing b of the x side
//                   |       /
//          +--------------+ /
//          |              |/      Lx along bearing b,
//       Ly |   airshed    |       Ly along bearing b - 90
//          |              |
//          +--------------+
//                  Lx
//
// Wind enters through the upwind faces. With the wind's components along the sides
// (wx along the x side, wy along the y side), the volume flow in is Q = H (|wx| Ly + |wy| Lx) and
// the flushing rate is f = Q / V = |wx|/Lx + |wy|/Ly [1/s] (physics note, section 1). A wind along
// a diagonal flushes through two faces; a wind along one side gives the familiar f = u/L.
#pragma once

namespace lidbox {

struct Footprint {
  double x_side_m = 10000.0;
  double y_side_m = 10000.0;
  double x_side_bearing_deg = 90.0;

  [[nodiscard]] double area_m2() const { return x_side_m * y_side_m; }
};

// Precomputed direction cosines of the sides, so the flushing rate costs two multiply-adds.
struct FlushingGeometry {
  double ex_u = 1.0, ex_v = 0.0;  // unit vector along the x side, in (east, north)
  double ey_u = 0.0, ey_v = 1.0;  // unit vector along the y side
  double inv_x = 1e-4, inv_y = 1e-4;
  // Mean of |cos|/Lx + |sin|/Ly over all directions, times 1: (2/pi)(1/Lx + 1/Ly). Used for a wind
  // of exactly zero under the calm floor, whose direction is undefined.
  double isotropic_per_m = 0.0;

  explicit FlushingGeometry(const Footprint& fp);
  FlushingGeometry() = default;

  // f [1/s] for a wind (u towards east, v towards north) [m/s].
  [[nodiscard]] double flushing_rate(double u_m_s, double v_m_s) const;
};

}  // namespace lidbox
