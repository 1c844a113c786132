// Manning's normal depth of a rectangular channel, for the study tests that check routed
// depths against it.
#pragma once

#include <cmath>

namespace freshet::study::testing {

// Q = (1/n) A R^(2/3) S^(1/2), A = b y, R = b y / (b + 2 y) (SI; Manning's formula, Chow 1959,
// Open-Channel Hydraulics, eq. 5-6 and sec. 6-2 normal depth; from memory), solved for y by
// plain bisection, independent of freshet's root finders.
inline double manning_normal_depth_rectangular(double q_m3s, double b_m, double n,
                                               double slope) {
  const auto q_of = [&](double y) {
    const double a = b_m * y;
    return a * std::pow(a / (b_m + 2.0 * y), 2.0 / 3.0) * std::sqrt(slope) / n;
  };
  double lo = 0.0;
  double hi = 100.0;
  for (int k = 0; k < 200; ++k) {
    const double mid = 0.5 * (lo + hi);
    (q_of(mid) < q_m3s ? lo : hi) = mid;
  }
  return 0.5 * (lo + hi);
}

}  // namespace freshet::study::testing
