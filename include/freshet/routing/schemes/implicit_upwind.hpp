// Implicit conservative upwind scheme, backward Euler:
//   A_i + dt/dx Q_i(A_i) = A_i^n + dt/dx F_i + V_lat,i / dx,
// solved cell by cell downstream because F_i = Q_{i-1}(A_{i-1}) is already known (the upwind
// Jacobian is lower bidiagonal). Unconditionally stable and positive (A in [0, rhs]); the
// Courant number (implicit_courant) only controls accuracy. First order.
#pragma once

#include <algorithm>
#include <cmath>
#include <span>
#include <string_view>
#include <vector>

#include "freshet/core/root_finding.hpp"
#include "freshet/routing/detail/kernels.hpp"
#include "freshet/routing/schemes/scheme.hpp"

namespace freshet::routing::schemes {

class ImplicitUpwind {
 public:
  static constexpr SchemeKind kKind = SchemeKind::kImplicitUpwind;
  static constexpr std::string_view kName = "implicit-upwind";
  static constexpr int kCellUpdatesPerStep = 1;
  // Backward Euler smears a shock over about 8 (1 + Courant) cells (docs/methods-routing.md).
  static int front_cells(const RoutingOptions& options) {
    return static_cast<int>(std::lround(8.0 * (1.0 + std::min(options.implicit_courant, 50.0))));
  }

  ImplicitUpwind() = default;
  ImplicitUpwind(const RoutingOptions& options, std::size_t cells)
      : courant_(options.implicit_courant), newton_max_iterations_(options.newton_max_iterations),
        next_(cells, 0.0), guess_celerity_(cells, 0.0) {}

  [[nodiscard]] double target_courant() const noexcept { return courant_; }
  [[nodiscard]] bool accepts(double /*courant*/) const noexcept { return true; }
  [[nodiscard]] std::vector<double>& candidate_m2() noexcept { return next_; }
  [[nodiscard]] std::size_t memory_bytes() const noexcept {
    return (next_.capacity() + guess_celerity_.capacity()) * sizeof(double);
  }

  template <geometry::FluxLaw F>
  StepResult step(const detail::ReachState<F>& s, std::span<double> faces, const StepInput& in) {
    return detail::with_flag(s.uniform(), [&](auto u) {
      return detail::with_flag(s.has_lateral(), [&](auto l) {
        return sweep<decltype(u)::value, decltype(l)::value>(s, faces, in);
      });
    });
  }

 private:
  // Pass 1, independent per cell (so evaluations overlap): the Newton guess, extrapolated
  // linearly in time from the state before the last step when the candidate still holds it,
  // and Q, c there (Q is the predicted face flux). Pass 2, downstream: the cell equations,
  // each needing the flux just found upstream; the faces become the corrected fluxes.
  template <bool kUniform, bool kLateral, geometry::FluxLaw F>
  StepResult sweep(const detail::ReachState<F>& s, std::span<double> faces, const StepInput& in) {
    const std::size_t cells = s.n();
    const double lambda = in.dt_s / s.dx_m;
    const double inv_dx = 1.0 / s.dx_m;
    const std::vector<double>& area = s.area_m2;
    for (std::size_t i = 0; i < cells; ++i) {
      const double guess =
          in.follows_accepted_step ? std::max(0.0, 2.0 * area[i] - next_[i]) : area[i];
      next_[i] = guess;
      detail::flux_and_celerity(s.laws[kUniform ? 0 : i], guess, faces[i + 1], guess_celerity_[i]);
    }
    double flux_left = in.inflow_m3 / in.dt_s;
    faces[0] = flux_left;
    double c_max = 0.0;
    for (std::size_t i = 0; i < cells; ++i) {
      const F& law_i = s.laws[kUniform ? 0 : i];
      double rhs = area[i] + lambda * flux_left;
      if constexpr (kLateral) rhs += s.lateral_m3[i] * inv_dx;
      double a_new = 0.0, flux_right = 0.0, c = 0.0;
      if (!solve_cell(law_i, lambda, rhs, next_[i], faces[i + 1], guess_celerity_[i], a_new,
                      flux_right, c)) {
        return {};
      }
      next_[i] = a_new;
      faces[i + 1] = flux_right;
      c_max = std::max(c_max, c);
      flux_left = flux_right;
    }
    return {true, c_max, in.dt_s * faces[cells]};
  }

  // Safeguarded Newton for the cell equation g(A) = A + lambda Q(A) - rhs = 0 on [0, rhs] (g
  // is increasing, g(0) <= 0 <= g(rhs)), starting from `guess` where Q and c are already
  // known. Newton steps leaving the shrinking bracket are replaced by bisection (Press et al.
  // 2007, Numerical Recipes 3rd ed., sec. 9.4); if the loop does not converge, core's
  // solve_bracketed_newton finishes the job. A Newton step smaller than 1e-6 A is accepted
  // without a further evaluation (quadratic convergence leaves an error near 1e-12 A); the
  // flux is returned as (rhs - A) / lambda, so the cell balance holds exactly whatever A is.
  template <geometry::FluxLaw F>
  bool solve_cell(const F& law_i, double lambda, double rhs, double guess, double q, double c,
                  double& area, double& flux, double& celerity) const {
    if (!(rhs > 0.0)) {
      area = 0.0, flux = 0.0, celerity = law_i.celerity_m_s(0.0);
      return true;
    }
    double lo = 0.0, hi = rhs, x = guess;
    if (!(x >= 0.0 && x <= rhs)) {
      x = std::clamp(guess, 0.0, rhs);
      detail::flux_and_celerity(law_i, x, q, c);
    }
    bool converged = false;
    for (int it = 0; it < newton_max_iterations_; ++it) {
      const double g = x + lambda * q - rhs;
      if (g == 0.0) { converged = true; break; }
      (g > 0.0 ? hi : lo) = x;
      double x_new = x - g / (1.0 + lambda * c);
      if (!(x_new > lo && x_new < hi)) x_new = 0.5 * (lo + hi);
      const bool small_step = std::abs(x_new - x) <= 1e-6 * x_new;
      x = x_new;
      if (small_step) { converged = true; break; }
      detail::flux_and_celerity(law_i, x, q, c);
    }
    if (!converged) {
      auto fdf = [&](double y, double& g, double& dg) {
        detail::flux_and_celerity(law_i, y, q, c);
        g = y + lambda * q - rhs;
        dg = 1.0 + lambda * c;
      };
      const RootResult root = solve_bracketed_newton(fdf, 0.0, rhs);
      if (!root.converged) return false;
      x = root.x;
    }
    area = std::clamp(x, 0.0, rhs);
    flux = (rhs - area) / lambda;
    celerity = c;
    return true;
  }

  double courant_ = 10.0;
  int newton_max_iterations_ = 60;
  // N: the state at the other time level: the new state while a step is solved (first the
  // Newton guesses, then the solutions); after an accepted step, the state before it.
  std::vector<double> next_;
  std::vector<double> guess_celerity_;  // N: c at the Newton guesses of the step being solved
};

}  // namespace freshet::routing::schemes
