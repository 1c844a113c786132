// Cube root for the flux laws' cell loops: inline, no library call, and within 1 ulp of the
// exact cube root (measured 0.95 ulp at worst against the extended-precision cbrtl; glibc's
// double cbrt measured 3.3 ulp at worst on the same arguments; tests/core/fast_cbrt_test.cpp).
//
// Manning's law in cube-root form, Q = k A (A/P)^(2/3) = k A cbrt((A/P)^2), spends most of a
// network run in the cube root; glibc's cbrt splits and rebuilds its argument (frexp,
// scalbn) on every call, about a third of a whole run (issue 16).
//
//   double r = freshet::cbrt_fast(27.0);   // 3.0
//
// Method: an initial guess from the exponent bits (the exponent divided by 3, as in the
// classic bit-level square-root estimates; about 3 % off), two Halley steps
// t <- t (t^3 + 2x) / (2 t^3 + x) (cubic convergence: 3e-2 -> 1e-5 -> 1e-15) and a third in
// correction form t <- t - t (t^3 - x) / (2 t^3 + x), whose small correction adds less than
// half an ulp to the rounding of t (the ratio is taken first so t (t^3 - x) cannot overflow).
// Arguments outside [2^-1000, 2^1000] (zero, subnormals,
// infinities, NaN, negatives) go to std::cbrt.
#pragma once

#include <bit>
#include <cmath>
#include <cstdint>

namespace freshet {

[[nodiscard]] inline double cbrt_fast(double x) noexcept {
  if (!(x >= 0x1p-1000 && x <= 0x1p1000)) return std::cbrt(x);
  const std::uint64_t bits = std::bit_cast<std::uint64_t>(x) / 3 + 0x2A9F7893782DA1CEull;
  double t = std::bit_cast<double>(bits);
  for (int i = 0; i < 2; ++i) {
    const double t3 = t * t * t;
    t *= (t3 + 2.0 * x) / (2.0 * t3 + x);
  }
  const double t3 = t * t * t;
  return t - t * ((t3 - x) / (2.0 * t3 + x));
}

}  // namespace freshet
