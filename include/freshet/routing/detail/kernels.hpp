// Small numerical kernels shared by the routing schemes (detail; see docs/methods-routing.md).
#pragma once

#include <algorithm>
#include <cmath>
#include <functional>
#include <span>
#include <string>
#include <type_traits>
#include <vector>

#include "freshet/core/time_series.hpp"
#include "freshet/routing/routing_options.hpp"

namespace freshet::routing::detail {

// Calls fn(std::bool_constant<b>{}) so that a run-time flag selects a compiled variant (once
// per step, outside the cell loops).
template <class Fn>
decltype(auto) with_flag(bool b, Fn&& fn) {
  if (b) return fn(std::true_type{});
  return fn(std::false_type{});
}

// Godunov flux for a kinematic wave: with c = dQ/dA >= 0 every wave moves downstream, the
// Riemann solution at a face is the upstream state, so F = Q(A_left) (LeVeque 2002, Finite
// Volume Methods for Hyperbolic Problems, sec. 12.1; no sonic point can occur).
template <class F>
[[nodiscard]] inline double upwind_face_flux(const F& law_left, double area_left_m2) noexcept {
  return law_left.discharge_m3s(area_left_m2);
}

// Conservative update of one cell (LeVeque 2002, eq. 4.4, plus a source):
// A_new = A_old - dt/dx (F_right - F_left) + V_lat/dx.
[[nodiscard]] inline double conservative_update(double area_old_m2, double lambda_s_per_m,
                                                double flux_left_m3s, double flux_right_m3s,
                                                double lateral_area_m2) noexcept {
  return area_old_m2 + lambda_s_per_m * (flux_left_m3s - flux_right_m3s) + lateral_area_m2;
}

// Slope limiters for MUSCL reconstruction (LeVeque 2002, sec. 6.9 and 6.12: minmod, van Leer).
// Both return 0 at extrema and |slope| <= 2 min(|a|, |b|), so half a slope stays between the
// neighbouring cell values (keeps the reconstruction non-negative).
template <Limiter kLimiter>
[[nodiscard]] inline double limited_slope(double backward, double forward) noexcept {
  if (backward * forward <= 0.0) return 0.0;
  if constexpr (kLimiter == Limiter::kMinmod) {
    return std::abs(backward) < std::abs(forward) ? backward : forward;
  } else {
    return 2.0 * backward * forward / (backward + forward);
  }
}

// Largest value of a piecewise-linear series over [t0_s, t1_s] (vertices and end points).
[[nodiscard]] double series_max(const PiecewiseLinearSeries& series, double t0_s, double t1_s);
[[nodiscard]] double series_min(const PiecewiseLinearSeries& series, double t0_s, double t1_s);

// Sorted unique times: t0, every breakpoint strictly inside (t0, t1), t1.
[[nodiscard]] std::vector<double> segment_times(double t0_s, double t1_s,
                                                const std::vector<double>& breakpoints_s);

// Adaptive controlled Runge-Kutta integration (Dormand-Prince 5(4), Boost.Odeint) of
// dy/dt = rhs(y, t) from t0 to exactly t1, y updated in place when ok. The stepper is restarted at
// t0, so the caller integrates segment by segment between forcing breakpoints. (The state
// type of the integrator, an Eigen vector, stays inside kernels.cpp.)
using OdeRhs = std::function<void(std::span<const double> y, std::span<double> dydt, double t)>;
struct OdeSegmentResult {
  bool ok = true;
  long steps = 0;
  long rejected = 0;
  double largest_dt_s = 0.0;
  double last_dt_s = 0.0;
  std::string message;
};
[[nodiscard]] OdeSegmentResult integrate_ode_segment(const OdeRhs& rhs, std::span<double> y,
                                                     double t0_s, double t1_s, double dt_initial_s,
                                                     const RoutingOptions& options);

}  // namespace freshet::routing::detail
