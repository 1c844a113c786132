// Lengths and areas on the WGS 84 ellipsoid from longitude and latitude in degrees (the
// coordinates of GeoJSON, RFC 7946 sec. 4), by PROJ's geodesic routines, which implement
// Karney (2013), Algorithms for geodesics, J. Geodesy 87(1), 43-55: lines follow geodesics
// (shortest paths on the ellipsoid) between their vertices, and a ring's area is that of the
// ellipsoid's surface enclosed by geodesic edges. No map projection is involved.
//
//   std::vector<io::LonLat> ring = {{-2.0, 53.0}, {-1.99, 53.0}, {-1.99, 53.01}, {-2.0, 53.0}};
//   double a = io::geodesic_area_m2(ring);       // m2
//   double l = io::geodesic_length_m(ring);      // m, along the three edges
#pragma once

#include <span>

namespace freshet::io {

struct LonLat {
  double longitude_deg = 0.0;  // east, [-180, 180]
  double latitude_deg = 0.0;   // north, [-90, 90]
};

// Length along the geodesics between consecutive points (m); 0 for fewer than two points.
[[nodiscard]] double geodesic_length_m(std::span<const LonLat> points);
// Distance along the geodesic between two points (m).
[[nodiscard]] double geodesic_distance_m(LonLat a, LonLat b);
// Area enclosed by a ring with geodesic edges (m2, >= 0 whichever way it turns). A closing
// point equal to the first is optional. Fewer than three distinct points enclose 0.
[[nodiscard]] double geodesic_area_m2(std::span<const LonLat> ring);

}  // namespace freshet::io
