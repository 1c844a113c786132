// Declared parameter distributions: quantile and cumulative distribution agree with each other
// and with closed forms, truncation keeps every value inside its bounds, bad declarations are
// refused with the parameter named.
#include "freshet/uncertainty/distribution.hpp"

#include <cmath>

#include <gtest/gtest.h>

namespace freshet::uncertainty {
namespace {

TEST(Distribution, TriangularQuantileMatchesItsClosedForm) {
  // Triangular distribution on [a, c] with mode b: F(x) = (x - a)^2 / ((c - a)(b - a)) for
  // a <= x <= b, so x(p) = a + sqrt(p (c - a)(b - a)) for p <= (b - a)/(c - a) (Johnson, Kotz &
  // Balakrishnan 1995, Continuous Univariate Distributions vol. 2, ch. 26). Bounds: Manning's n
  // of a clean, straight natural stream on a plain at full stage, minimum 0.025, normal 0.030,
  // maximum 0.033 (Chow 1959, Open-Channel Hydraulics, Table 5-6; from memory).
  const Triangular t{0.025, 0.030, 0.033};
  const double p = 0.3;  // below (b - a)/(c - a) = 0.625
  EXPECT_NEAR(quantile(t, p), 0.025 + std::sqrt(p * 0.008 * 0.005), 1e-14);
  const double p_upper = 0.9;  // above the mode: x = c - sqrt((1 - p)(c - a)(c - b))
  EXPECT_NEAR(quantile(t, p_upper), 0.033 - std::sqrt(0.1 * 0.008 * 0.003), 1e-14);
  EXPECT_DOUBLE_EQ(quantile(t, 0.0), 0.025);
  EXPECT_DOUBLE_EQ(quantile(t, 1.0), 0.033);
}

TEST(Distribution, CdfInvertsQuantileForEveryFamily) {
  const std::vector<Distribution> families = {
      Uniform{60.0, 90.0}, Triangular{0.025, 0.030, 0.033}, Normal{75.0, 5.0},
      Normal{75.0, 5.0, 70.0, 98.0}, LogNormal{0.03, 0.2}, LogNormal{0.03, 0.2, 0.02, 0.05}};
  for (const Distribution& d : families) {
    for (double p : {0.001, 0.05, 0.25, 0.5, 0.75, 0.95, 0.999}) {
      EXPECT_NEAR(cdf(d, quantile(d, p)), p, 1e-12) << describe(d) << " p " << p;
    }
  }
}

TEST(Distribution, NormalQuantilesMatchTheStandardNormalTable) {
  // z(0.975) = 1.959964, z(0.95) = 1.644854 (Abramowitz & Stegun 1964, Handbook of
  // Mathematical Functions, Table 26.5).
  const Normal n{75.0, 5.0};
  EXPECT_NEAR(quantile(n, 0.975), 75.0 + 5.0 * 1.959964, 5e-6);
  EXPECT_NEAR(quantile(n, 0.05), 75.0 - 5.0 * 1.644854, 5e-6);
  // Lognormal: the median of ln(x) is ln(median), so the 50th percentile is the median.
  EXPECT_NEAR(quantile(LogNormal{0.03, 0.2}, 0.5), 0.03, 1e-15);
}

TEST(Distribution, TruncationKeepsValuesInsideTheBounds) {
  const Normal n{75.0, 10.0, 70.0, 85.0};
  for (double p = 0.0; p <= 1.0; p += 0.01) {
    const double x = quantile(n, p);
    EXPECT_GE(x, 70.0);
    EXPECT_LE(x, 85.0);
  }
  // Truncated to the upper half of the normal, the truncated median is the untruncated
  // 75th percentile: 75 + 10 * 0.674490 (Abramowitz & Stegun 1964, Table 26.5).
  EXPECT_NEAR(quantile(Normal{75.0, 10.0, 75.0, kUnbounded}, 0.5), 75.0 + 6.74490, 5e-5);
}

TEST(Distribution, BadDeclarationsAreRefusedNamingTheParameter) {
  const std::vector<Distribution> bad = {
      Uniform{1.0, 1.0},           Uniform{0.0, NAN},          Triangular{0.03, 0.02, 0.04},
      Triangular{0.04, 0.04, 0.03}, Normal{1.0, 0.0},           Normal{1.0, 1.0, 2.0, 1.0},
      Normal{0.0, 1.0, 60.0, 70.0}, LogNormal{-1.0, 0.1},       LogNormal{1.0, 0.1, -1.0, 2.0}};
  for (const Distribution& d : bad) {
    ProblemList problems("uncertainty of reach 'alder-run'");
    check(d, "manning_n", problems);
    ASSERT_FALSE(problems.empty()) << describe(d);
    EXPECT_EQ(problems.problems().front().field, "manning_n");
  }
  ProblemList fine("uncertainty");
  check(Triangular{0.025, 0.030, 0.033}, "manning_n", fine);
  EXPECT_TRUE(fine.empty());
}

}  // namespace
}  // namespace freshet::uncertainty
