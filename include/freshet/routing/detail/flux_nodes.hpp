// The piecewise-linear flux of front tracking (detail; see docs/methods-routing.md).
//
// Front tracking (Dafermos 1972, J. Math. Anal. Appl. 38; Holden & Risebro 2015, Front
// Tracking for Hyperbolic Conservation Laws, 2nd ed., ch. 2) solves A_t + Q(A)_x = 0 exactly
// for a piecewise-linear flux. FluxNodes interpolates a flux law Q(A) linearly between area
// nodes
//   A_0 = 0 (dry),  A_k = kFirstNodeArea_m2 (1 + spacing)^(k-1),  k = 1, 2, ...
// a geometric grid with no upper end: node k is computed from its index when needed, so no
// table is kept and any depth is covered. The interpolant Q_pl passes through Q(A_k) exactly
// and is non-decreasing wherever Q is. Its error: for a power law Q = alpha A^m the chord
// between neighbouring nodes is within m |m - 1| ln(1 + spacing)^2 / 8 of Q, relative (1.4e-7
// at the default spacing 1e-3 and m = 5/3); below A_1 = 1e-8 m2 the chord from the origin is
// used (an absolute error below Q(A_1), negligible for any channel or sheet).
//
//   FluxNodes nodes(1e-3);
//   double q = nodes.flux(law, 12.5);            // Q_pl(12.5 m2)
//   double a = nodes.area_for_flux(law, q);      // 12.5 m2 back (to round-off)
#pragma once

#include <algorithm>
#include <cmath>
#include <limits>

#include "freshet/geometry/flux_law.hpp"

namespace freshet::routing::detail {

class FluxNodes {
 public:
  static constexpr double kFirstNodeArea_m2 = 1e-8;

  FluxNodes() = default;
  explicit FluxNodes(double spacing) : log_ratio_(std::log1p(spacing)) {}

  [[nodiscard]] double log_ratio() const noexcept { return log_ratio_; }

  [[nodiscard]] double node_area(long k) const noexcept {
    return k <= 0 ? 0.0 : kFirstNodeArea_m2 * std::exp(static_cast<double>(k - 1) * log_ratio_);
  }
  template <geometry::FluxLaw F>
  [[nodiscard]] double node_flux(const F& law, long k) const noexcept {
    return k <= 0 ? 0.0 : law.discharge_m3s(node_area(k));
  }

  // The largest k with node_area(k) <= area_m2 (0 for areas below the first node).
  [[nodiscard]] long index_below(double area_m2) const noexcept {
    if (!(area_m2 >= kFirstNodeArea_m2)) return 0;
    long k = 1 + static_cast<long>(std::floor(std::log(area_m2 / kFirstNodeArea_m2) / log_ratio_));
    while (node_area(k + 1) <= area_m2) ++k;
    while (k > 0 && node_area(k) > area_m2) --k;
    return k;
  }

  // Q_pl(A): exact at the nodes, linear between them.
  template <geometry::FluxLaw F>
  [[nodiscard]] double flux(const F& law, double area_m2) const noexcept {
    const long k = index_below(area_m2);
    const double a0 = node_area(k);
    const double q0 = node_flux(law, k);
    if (area_m2 == a0) return q0;
    const double a1 = node_area(k + 1);
    return q0 + (node_flux(law, k + 1) - q0) * (area_m2 - a0) / (a1 - a0);
  }

  // The smallest A with Q_pl(A) = q (q >= 0); NaN when no area conveys q (above the capacity
  // of a closed conduit, whose Q is held constant above its peak).
  template <geometry::FluxLaw F>
  [[nodiscard]] double area_for_flux(const F& law, double q_m3s) const {
    if (!(q_m3s > 0.0)) return 0.0;
    const double guess = law.area_for_discharge_m2(q_m3s);
    long k = index_below(guess);
    const double give_up_area = 1e3 * std::max(guess, 1.0);
    double qk = node_flux(law, k);
    while (k > 0 && qk > q_m3s) qk = node_flux(law, --k);
    while (true) {
      if (qk == q_m3s) {
        while (k > 0 && node_flux(law, k - 1) == q_m3s) --k;
        return node_area(k);
      }
      const double qn = node_flux(law, k + 1);
      if (q_m3s < qn) {
        const double a0 = node_area(k);
        return a0 + (node_area(k + 1) - a0) * (q_m3s - qk) / (qn - qk);
      }
      ++k, qk = qn;
      if (node_area(k) > give_up_area) return std::numeric_limits<double>::quiet_NaN();
    }
  }

  // Speed of a front joining areas a and b (a != b): the Rankine-Hugoniot speed of Q_pl.
  template <geometry::FluxLaw F>
  [[nodiscard]] double front_speed(const F& law, double a, double b) const noexcept {
    return (flux(law, a) - flux(law, b)) / (a - b);
  }

 private:
  double log_ratio_ = std::log1p(1e-3);
};

}  // namespace freshet::routing::detail
