// cbrt_fast against the C library's cube root (ISO C 7.12.7.1 cbrt, cbrtl): within 1 ulp of
// the exact root, taken from the extended-precision cbrtl (x87 long double, 11 more bits than
// double, so its rounding error is far below the tolerance); identical to std::cbrt where the
// library answers (zero, subnormals, infinities, NaN, negatives); exact on perfect cubes.
#include "freshet/core/fast_cbrt.hpp"

#include <gtest/gtest.h>

#include <cmath>
#include <limits>
#include <random>

namespace freshet {
namespace {

// |a - exact| in units of the spacing of doubles at the exact root.
double ulps_from_exact(double a, double x) {
  const long double exact = std::cbrt(static_cast<long double>(x));
  const double near = static_cast<double>(exact);
  const double ulp = std::nextafter(near, INFINITY) - near;
  return static_cast<double>(std::abs(static_cast<long double>(a) - exact)) / ulp;
}

TEST(FastCbrt, WithinOneUlpOfTheExactRootOverTheWholeRange) {
  std::mt19937_64 rng(16);
  std::uniform_real_distribution<double> exponent(-1000.0, 1000.0), mantissa(1.0, 2.0);
  double worst = 0.0;
  for (int i = 0; i < 300'000; ++i) {
    const double x = std::ldexp(mantissa(rng), static_cast<int>(exponent(rng)));
    worst = std::max(worst, ulps_from_exact(cbrt_fast(x), x));
  }
  // Flow ratios A/P and their squares: every value of (A/P)^2 from 1e-12 to 1e4 on a fine grid.
  for (double x = 1e-12; x < 1e4; x *= 1.0 + 1e-5) {
    worst = std::max(worst, ulps_from_exact(cbrt_fast(x), x));
  }
  RecordProperty("worst_ulps", std::to_string(worst));
  EXPECT_LE(worst, 1.0);
}

TEST(FastCbrt, ExactOnPerfectCubes) {
  for (int k = 1; k <= 100000; ++k) {
    const double kd = k;
    ASSERT_EQ(cbrt_fast(kd * kd * kd), kd) << k;
  }
  EXPECT_EQ(cbrt_fast(0.125), 0.5);
  EXPECT_LE(ulps_from_exact(cbrt_fast(0x1p-999), 0x1p-999), 1.0);  // exact root 2^-333
}

TEST(FastCbrt, OutsideItsRangeItIsTheLibrary) {
  const double cases[] = {0.0, -0.0, -8.0, 1e-310, 0x1p-1001, 0x1p1001,
                          std::numeric_limits<double>::max(), INFINITY};
  for (double x : cases) EXPECT_EQ(cbrt_fast(x), std::cbrt(x)) << x;
  EXPECT_TRUE(std::isnan(cbrt_fast(std::nan(""))));
}

}  // namespace
}  // namespace freshet
