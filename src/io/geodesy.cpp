// Geodesic lengths and areas on WGS 84 through PROJ's C geodesic API (geodesic.h), Karney
// (2013). The ellipsoid's defining constants: NIMA TR8350.2 (2000), World Geodetic System
// 1984, Table 3.1 (a = 6378137 m, 1/f = 298.257223563).
#include "freshet/io/geodesy.hpp"

#include <cmath>
#include <vector>

#include <geodesic.h>

namespace freshet::io {

namespace {

const geod_geodesic& wgs84() {
  static const geod_geodesic g = [] {
    geod_geodesic e{};
    geod_init(&e, 6378137.0, 1.0 / 298.257223563);
    return e;
  }();
  return g;
}

}  // namespace

double geodesic_distance_m(LonLat a, LonLat b) {
  double s12 = 0.0;
  geod_inverse(&wgs84(), a.latitude_deg, a.longitude_deg, b.latitude_deg, b.longitude_deg, &s12,
               nullptr, nullptr);
  return s12;
}

double geodesic_length_m(std::span<const LonLat> points) {
  double total_m = 0.0;
  for (std::size_t i = 1; i < points.size(); ++i) {
    total_m += geodesic_distance_m(points[i - 1], points[i]);
  }
  return total_m;
}

double geodesic_area_m2(std::span<const LonLat> ring) {
  std::size_t n = ring.size();
  if (n > 1 && ring.front().longitude_deg == ring.back().longitude_deg &&
      ring.front().latitude_deg == ring.back().latitude_deg) {
    --n;  // geod_polygonarea closes the ring itself
  }
  if (n < 3) return 0.0;
  std::vector<double> lats(n);
  std::vector<double> lons(n);
  for (std::size_t i = 0; i < n; ++i) {
    lats[i] = ring[i].latitude_deg;
    lons[i] = ring[i].longitude_deg;
  }
  double area_m2 = 0.0;
  double perimeter_m = 0.0;
  geod_polygonarea(&wgs84(), lats.data(), lons.data(), static_cast<int>(n), &area_m2,
                   &perimeter_m);
  return std::fabs(area_m2);
}

}  // namespace freshet::io
