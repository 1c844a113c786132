// Second-order TVD scheme: MUSCL reconstruction with a limited slope (van Leer 1979; LeVeque
// 2002, sec. 6.9) and SSP-RK2 (Heun; Shu & Osher 1988, J. Comput. Phys. 77; Gottlieb, Shu &
// Tadmor 2001, SIAM Rev. 43): A* = A + dt L(A); A^{n+1} = (A + A* + dt L(A*)) / 2. TVD and
// positive for Courant <= 1/2; second order where the solution is smooth.
#pragma once

#include <algorithm>
#include <span>
#include <string_view>
#include <vector>

#include "freshet/routing/detail/kernels.hpp"
#include "freshet/routing/schemes/scheme.hpp"

namespace freshet::routing::schemes {

class MusclHeun {
 public:
  static constexpr SchemeKind kKind = SchemeKind::kMusclHeun;
  static constexpr std::string_view kName = "muscl-heun";
  static constexpr int kCellUpdatesPerStep = 2;  // two stages
  // A captured shock is smeared over about 4 cells (docs/methods-routing.md).
  static int front_cells(const RoutingOptions& /*options*/) { return 4; }

  MusclHeun() = default;
  MusclHeun(const RoutingOptions& options, std::size_t cells)
      : courant_target_(options.tvd_courant_target), courant_limit_(options.tvd_courant_limit),
        limiter_(options.limiter), next_(cells, 0.0), stage_(cells, 0.0) {}

  [[nodiscard]] double target_courant() const noexcept { return courant_target_; }
  [[nodiscard]] bool accepts(double courant) const noexcept { return courant <= courant_limit_; }
  [[nodiscard]] std::vector<double>& candidate_m2() noexcept { return next_; }
  [[nodiscard]] std::size_t memory_bytes() const noexcept {
    return (next_.capacity() + stage_.capacity()) * sizeof(double);
  }

  template <geometry::FluxLaw F>
  StepResult step(const detail::ReachState<F>& s, std::span<double> faces, const StepInput& in) {
    return detail::with_flag(s.uniform(), [&](auto u) {
      if (limiter_ == Limiter::kMinmod) return heun<decltype(u)::value, Limiter::kMinmod>(s, faces, in);
      return heun<decltype(u)::value, Limiter::kVanLeer>(s, faces, in);
    });
  }

 private:
  // MUSCL face fluxes: A at the downstream side of cell i is A_i + slope_i / 2; the upwind
  // flux of that value is the face flux. Ghosts: the inflow area upstream, zero gradient
  // downstream.
  template <bool kUniform, Limiter kLimiter, geometry::FluxLaw F>
  static void muscl_fluxes(const detail::ReachState<F>& s, const double* a, double a_ghost,
                           double flux_in, double* face) {
    const std::size_t cells = s.n();
    face[0] = flux_in;
    double a_prev = a_ghost;
    for (std::size_t i = 0; i < cells; ++i) {
      const double a_next = i + 1 < cells ? a[i + 1] : a[i];
      const double slope = detail::limited_slope<kLimiter>(a[i] - a_prev, a_next - a[i]);
      face[i + 1] = detail::upwind_face_flux(s.laws[kUniform ? 0 : i], a[i] + 0.5 * slope);
      a_prev = a[i];
    }
  }

  // Boundary and lateral forcing use their exact step means in both stages, so the applied
  // face fluxes (stage average) carry the exact volumes.
  template <bool kUniform, Limiter kLimiter, geometry::FluxLaw F>
  StepResult heun(const detail::ReachState<F>& s, std::span<double> faces, const StepInput& in) {
    const std::size_t cells = s.n();
    const double dt = in.dt_s;
    const double lambda = dt / s.dx_m;
    const bool lat = s.has_lateral();
    const double flux_in = in.inflow_m3 / dt;
    const F& law0 = s.laws.front();
    const std::vector<double>& area = s.area_m2;
    double* face = faces.data();
    muscl_fluxes<kUniform, kLimiter>(s, area.data(),
                                     law0.area_for_discharge_m2(in.inflow_m3s->value_at(in.t_s)),
                                     flux_in, face);
    double a_min = 0.0;
    for (std::size_t i = 0; i < cells; ++i) {
      const double lateral_area = lat ? s.lateral_m3[i] / s.dx_m : 0.0;
      stage_[i] = detail::conservative_update(area[i], lambda, face[i], face[i + 1], lateral_area);
      a_min = std::min(a_min, stage_[i]);
    }
    if (a_min < 0.0) return {};
    // Stage 2, reconstructing from the stage areas on the fly; the faces become the mean of
    // the two stages' fluxes.
    double a_prev = law0.area_for_discharge_m2(in.inflow_m3s->value_at(in.t_s + dt));
    double flux_left = flux_in, a_max = 0.0, c_max = 0.0;
    for (std::size_t i = 0; i < cells; ++i) {
      const F& law_i = s.laws[kUniform ? 0 : i];
      const double a_next = i + 1 < cells ? stage_[i + 1] : stage_[i];
      const double slope = detail::limited_slope<kLimiter>(stage_[i] - a_prev, a_next - stage_[i]);
      const double flux_right = detail::upwind_face_flux(law_i, stage_[i] + 0.5 * slope);
      const double lateral_area = lat ? s.lateral_m3[i] / s.dx_m : 0.0;
      const double a2 = detail::conservative_update(stage_[i], lambda, flux_left, flux_right, lateral_area);
      face[i] = 0.5 * (face[i] + flux_left);
      next_[i] = 0.5 * (area[i] + a2);
      a_min = std::min(a_min, next_[i]);
      a_max = std::max(a_max, next_[i]);
      if constexpr (!kUniform) c_max = std::max(c_max, law_i.celerity_m_s(next_[i]));
      a_prev = stage_[i];
      flux_left = flux_right;
    }
    face[cells] = 0.5 * (face[cells] + flux_left);
    if constexpr (kUniform) c_max = s.celerity_bound(a_max, next_);
    return {a_min >= 0.0, c_max, dt * face[cells]};
  }

  double courant_target_ = 0.45;
  double courant_limit_ = 0.5;
  Limiter limiter_ = Limiter::kVanLeer;
  std::vector<double> next_;   // N: the new state of the step being tried
  std::vector<double> stage_;  // N: the first Runge-Kutta stage A*
};

}  // namespace freshet::routing::schemes
