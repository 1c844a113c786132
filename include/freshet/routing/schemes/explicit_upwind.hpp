// Explicit conservative upwind (Godunov) scheme, forward Euler (LeVeque 2002, Finite Volume
// Methods for Hyperbolic Problems, eq. 4.4 with the upwind flux, sec. 4.8):
//   A_i^{n+1} = A_i^n - dt/dx (Q_i(A_i^n) - Q_{i-1}(A_{i-1}^n)) + V_lat,i / dx.
// First order; stable for Courant dt c_max / dx <= 1. One flux evaluation per cell per step.
#pragma once

#include <algorithm>
#include <span>
#include <string_view>
#include <vector>

#include "freshet/routing/detail/kernels.hpp"
#include "freshet/routing/schemes/scheme.hpp"

namespace freshet::routing::schemes {

class ExplicitUpwind {
 public:
  static constexpr SchemeKind kKind = SchemeKind::kExplicitUpwind;
  static constexpr std::string_view kName = "explicit-upwind";
  static constexpr int kCellUpdatesPerStep = 1;
  // A captured shock is smeared over about 4 cells (docs/methods-routing.md).
  static int front_cells(const RoutingOptions& /*options*/) { return 4; }

  ExplicitUpwind() = default;
  ExplicitUpwind(const RoutingOptions& options, std::size_t cells)
      : courant_target_(options.courant_target), courant_limit_(options.courant_limit),
        next_(cells, 0.0) {}

  [[nodiscard]] double target_courant() const noexcept { return courant_target_; }
  [[nodiscard]] bool accepts(double courant) const noexcept { return courant <= courant_limit_; }
  [[nodiscard]] std::vector<double>& candidate_m2() noexcept { return next_; }
  [[nodiscard]] std::size_t memory_bytes() const noexcept {
    return next_.capacity() * sizeof(double);
  }

  template <geometry::FluxLaw F>
  StepResult step(const detail::ReachState<F>& s, std::span<double> faces, const StepInput& in) {
    return detail::with_flag(s.uniform(), [&](auto u) {
      return detail::with_flag(s.has_lateral(), [&](auto l) {
        return sweep<decltype(u)::value, decltype(l)::value>(s, faces, in.dt_s, in.inflow_m3);
      });
    });
  }

 private:
  // No allocation, no virtual call in the loop.
  template <bool kUniform, bool kLateral, geometry::FluxLaw F>
  StepResult sweep(const detail::ReachState<F>& s, std::span<double> faces, double dt,
                   double inflow_m3) {
    const std::size_t cells = s.n();
    const double lambda = dt / s.dx_m;
    const double inv_dx = 1.0 / s.dx_m;
    const double* a = s.area_m2.data();
    const double* lat = s.lateral_m3.data();
    double* next = next_.data();
    double* face = faces.data();
    double flux_left = inflow_m3 / dt;
    face[0] = flux_left;
    double a_min = 0.0, a_max = 0.0, c_max = 0.0;
    for (std::size_t i = 0; i < cells; ++i) {
      const F& law_i = s.laws[kUniform ? 0 : i];
      const double flux_right = detail::upwind_face_flux(law_i, a[i]);
      const double lateral_area = kLateral ? lat[i] * inv_dx : 0.0;
      const double a_new = detail::conservative_update(a[i], lambda, flux_left, flux_right, lateral_area);
      face[i + 1] = flux_right;
      next[i] = a_new;
      a_min = std::min(a_min, a_new);
      a_max = std::max(a_max, a_new);
      if constexpr (!kUniform) c_max = std::max(c_max, law_i.celerity_m_s(a_new));
      flux_left = flux_right;
    }
    if constexpr (kUniform) c_max = s.celerity_bound(a_max, next_);
    return {a_min >= 0.0, c_max, dt * face[cells]};
  }

  double courant_target_ = 0.9;
  double courant_limit_ = 1.0;
  std::vector<double> next_;  // N: the new state of the step being tried
};

}  // namespace freshet::routing::schemes
