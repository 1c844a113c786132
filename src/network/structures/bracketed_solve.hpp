// Private helper of the structures kernels: root of a monotone scalar function without a
// hand-coded derivative. Wraps freshet::solve_bracketed_newton (rtsafe, Press et al. 2007,
// Numerical Recipes, 3rd ed., sec. 9.4) with a one-sided finite-difference slope; the
// safeguard bisects whenever that slope misleads, so a bracket always converges.
#pragma once

#include <cmath>

#include "freshet/core/root_finding.hpp"

namespace freshet::network::structures::detail {

// Solves g(x) = 0 on [lo, hi] for non-decreasing g with g(lo) <= 0 <= g(hi).
template <class G>
RootResult solve_monotone(G&& g, double lo, double hi, double x_tolerance_rel = 1e-13) {
  auto fdf = [&](double x, double& f, double& df) {
    f = g(x);
    const double h = 1e-7 * std::max(std::abs(x), std::abs(hi - lo)) + 1e-300;
    df = (g(x + h) - f) / h;
  };
  RootOptions opt;
  opt.x_tolerance_rel = x_tolerance_rel;
  opt.x_tolerance_abs = 1e-14 * std::abs(hi - lo);
  opt.max_iterations = 300;
  return solve_bracketed_newton(fdf, lo, hi, opt);
}

}  // namespace freshet::network::structures::detail
