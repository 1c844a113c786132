// Geodesic lengths and areas on WGS 84 (io/geodesy.hpp) against closed forms of the
// ellipsoid, independent of the geodesic algorithm.
#include "freshet/io/geodesy.hpp"

#include <cmath>
#include <numbers>
#include <vector>

#include <gtest/gtest.h>

namespace freshet::io {
namespace {

// WGS 84 defining constants: NIMA TR8350.2 (2000), World Geodetic System 1984, Table 3.1.
constexpr double kA = 6378137.0;
constexpr double kF = 1.0 / 298.257223563;
constexpr double kPi = std::numbers::pi;

double radians(double deg) { return deg * kPi / 180.0; }

// Snyder (1987), Map Projections: A Working Manual, USGS Professional Paper 1395, eq. 3-12:
// q(phi) = (1 - e^2) [sin phi / (1 - e^2 sin^2 phi) - 1/(2e) ln((1 - e sin phi)/(1 + e sin phi))].
// The area of the ellipsoid between two meridians dlambda apart and the parallels phi1 and
// phi2 is a^2 dlambda (q2 - q1) / 2 (the authalic-latitude area; Snyder eq. 3-11 to 3-13).
double authalic_q(double phi) {
  const double e2 = kF * (2.0 - kF);
  const double e = std::sqrt(e2);
  const double s = std::sin(phi);
  return (1.0 - e2) * (s / (1.0 - e2 * s * s) - std::log((1.0 - e * s) / (1.0 + e * s)) / (2.0 * e));
}

double quadrangle_area_m2(double lon1, double lon2, double lat1, double lat2) {
  return kA * kA * radians(lon2 - lon1) * (authalic_q(radians(lat2)) - authalic_q(radians(lat1))) /
         2.0;
}

// A quadrangle bounded by meridians and parallels. A parallel is not a geodesic, so its sides
// along parallels are divided into `steps` short geodesics: the area between a parallel and a
// geodesic chord of length L at latitude phi is about L^3 tan(phi) / (12 R) (common practice,
// no source), so 2000 steps over 0.2 deg bring the difference far below 1e-9 of the area.
std::vector<LonLat> quadrangle(double lon1, double lon2, double lat1, double lat2, int steps) {
  std::vector<LonLat> ring;
  for (int k = 0; k <= steps; ++k) ring.push_back({lon1 + (lon2 - lon1) * k / steps, lat1});
  for (int k = 0; k <= steps; ++k) ring.push_back({lon2 - (lon2 - lon1) * k / steps, lat2});
  ring.push_back(ring.front());
  return ring;
}

TEST(Geodesy, QuadrangleAreaMatchesTheAuthalicClosedForm) {
  // A 0.2 deg x 0.1 deg catchment-sized quadrangle at 53 deg N, and a 2 x 1 deg one at 35 S.
  struct Case { double lon1, lon2, lat1, lat2; };
  for (const Case c : {Case{-2.2, -2.0, 53.0, 53.1}, Case{147.0, 149.0, -35.5, -34.5}}) {
    const double want = quadrangle_area_m2(c.lon1, c.lon2, c.lat1, c.lat2);
    const double got = geodesic_area_m2(quadrangle(c.lon1, c.lon2, c.lat1, c.lat2, 2000));
    // The target is 0.01 %; the algorithm is accurate to round-off (Karney 2013), and
    // the parallel sides' chords leave < 1e-9 (above): 1e-8 relative.
    EXPECT_NEAR(got, want, 1e-8 * want) << c.lat1;
  }
}

TEST(Geodesy, AreaDoesNotDependOnTheRingsDirectionOrClosingPosition) {
  std::vector<LonLat> ring = quadrangle(10.0, 10.01, 45.0, 45.01, 10);
  const double a = geodesic_area_m2(ring);
  std::vector<LonLat> reversed(ring.rbegin(), ring.rend());
  EXPECT_DOUBLE_EQ(geodesic_area_m2(reversed), a);
  ring.pop_back();
  EXPECT_DOUBLE_EQ(geodesic_area_m2(ring), a);
  EXPECT_EQ(geodesic_area_m2(std::vector<LonLat>{{1.0, 1.0}, {1.0, 2.0}, {1.0, 1.0}}), 0.0);
}

TEST(Geodesy, LengthAlongTheEquatorIsTheArcOfRadiusA) {
  // On the equator the geodesic between points less than (1 - f) 180 deg apart is the
  // equator itself (Karney 2013, sec. 3), so its length is a * dlambda exactly.
  const std::vector<LonLat> line = {{0.0, 0.0}, {0.5, 0.0}, {3.0, 0.0}};
  EXPECT_NEAR(geodesic_length_m(line), kA * radians(3.0), 1e-6);
}

TEST(Geodesy, QuarterMeridianMatchesHelmertsSeries) {
  // Rectifying radius A = a / (1 + n) (1 + n^2/4 + n^4/64 + n^6/256 + ...), n = f / (2 - f)
  // (Helmert 1880, as given by Karney 2011, Transverse Mercator with an accuracy of a few
  // nanometers, J. Geodesy 85, eq. 14; equation number from memory); the quarter meridian is
  // A pi / 2. Terms beyond n^6 are below 1e-20 of it.
  const double n = kF / (2.0 - kF);
  const double rectifying = kA / (1.0 + n) * (1.0 + n * n / 4.0 + std::pow(n, 4) / 64.0 +
                                              std::pow(n, 6) / 256.0);
  const std::vector<LonLat> meridian = {{7.0, 0.0}, {7.0, 30.0}, {7.0, 90.0}};
  EXPECT_NEAR(geodesic_length_m(meridian), rectifying * kPi / 2.0, 1e-6);
}

}  // namespace
}  // namespace freshet::io
