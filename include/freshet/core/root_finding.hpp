// Safeguarded scalar root finding for monotone functions.
//
// Used wherever a hydraulic relation must be inverted without a closed form: depth from
// area, normal depth from discharge, area from discharge, headwater from discharge.
// Newton steps are taken while they stay inside the current bracket and shrink it fast
// enough; otherwise the method bisects, so convergence is guaranteed once a bracket exists
// (Press et al. 2007, Numerical Recipes, 3rd ed., sec. 9.4, "rtsafe").
#pragma once

#include <cmath>
#include <limits>

namespace freshet {

struct RootResult {
  double x = std::numeric_limits<double>::quiet_NaN();
  int iterations = 0;
  bool converged = false;
};

struct RootOptions {
  double x_tolerance_rel = 1e-14;  // stop when the bracket is this small relative to |x|
  double x_tolerance_abs = 1e-300; // ... or this small in absolute terms
  int max_iterations = 200;
};

// Finds x in [lo, hi] with f(x) = 0, where f(lo) and f(hi) differ in sign (or one is zero).
// `fdf(x, f, df)` sets f(x) and f'(x). Returns converged = false when no bracket is given.
template <class FdF>
RootResult solve_bracketed_newton(FdF&& fdf, double lo, double hi, RootOptions opt = {}) {
  RootResult r;
  double f_lo = 0.0, f_hi = 0.0, d = 0.0;
  fdf(lo, f_lo, d);
  fdf(hi, f_hi, d);
  if (f_lo == 0.0) return {lo, 0, true};
  if (f_hi == 0.0) return {hi, 0, true};
  if ((f_lo > 0.0) == (f_hi > 0.0) || !std::isfinite(f_lo) || !std::isfinite(f_hi)) return r;
  if (f_lo > 0.0) std::swap(lo, hi);  // orient so that f(lo) < 0 < f(hi)

  double x = 0.5 * (lo + hi);
  double dx_old = std::abs(hi - lo);
  double dx = dx_old;
  double f = 0.0, df = 0.0;
  fdf(x, f, df);
  for (int it = 1; it <= opt.max_iterations; ++it) {
    r.iterations = it;
    const bool newton_leaves_bracket = ((x - hi) * df - f) * ((x - lo) * df - f) > 0.0;
    const bool newton_too_slow = std::abs(2.0 * f) > std::abs(dx_old * df);
    dx_old = dx;
    if (newton_leaves_bracket || newton_too_slow || df == 0.0) {
      dx = 0.5 * (hi - lo);
      x = lo + dx;
    } else {
      dx = f / df;
      x -= dx;
    }
    const double tol = std::max(opt.x_tolerance_rel * std::abs(x), opt.x_tolerance_abs);
    if (std::abs(dx) <= tol || f == 0.0) {
      r.x = x;
      r.converged = true;
      return r;
    }
    fdf(x, f, df);
    if (f == 0.0) return {x, it, true};
    if (f < 0.0) lo = x; else hi = x;
  }
  r.x = x;
  return r;
}

// Grows `hi` geometrically from `start` until g(hi) >= target, for increasing g. Returns
// the first bracket end found, or NaN after `max_doublings`.
template <class G>
double expand_upper_bracket(G&& g, double target, double start, int max_doublings = 200) {
  double hi = start;
  for (int i = 0; i < max_doublings; ++i) {
    if (g(hi) >= target) return hi;
    hi *= 2.0;
  }
  return std::numeric_limits<double>::quiet_NaN();
}

// For increasing g with g(0) <= target <= g(hi): halves `hi` while g(hi / 2) >= target and
// returns the lower end (hi / 2 where g < target, or 0 once hi / 2 underflows). A root far
// below hi (the depth of a nearly dry section, 1e-160 m in a 1 m pipe) is then bracketed within
// a factor of 2, where solve_bracketed_newton converges in a few steps; from [0, hi] it would
// need more than its iteration limit. Inversions call it when a first solve on [0, hi] has not
// converged, so ordinary roots keep the bracket (and the last bits) they always had.
template <class G>
double tighten_bracket_below(G&& g, double target, double& hi) {
  for (double half = 0.5 * hi; half > 0.0; half = 0.5 * hi) {
    if (!(g(half) >= target)) return half;
    hi = half;
  }
  return 0.0;
}

}  // namespace freshet
