// Percentiles, exceedance and the Kolmogorov-Smirnov significance against their published
// definitions and a reference library.
#include "freshet/uncertainty/ensemble_statistics.hpp"

#include <array>

#include <gtest/gtest.h>

namespace freshet::uncertainty {
namespace {

TEST(EnsembleStatistics, PercentilesFollowHyndmanFanDefinition7) {
  // Hyndman & Fan (1996) definition 7, h = (n - 1) q / 100: for {15, 20, 35, 40, 50},
  // q = 40 gives h = 1.6 and 20 + 0.6 (35 - 20) = 29. Every value below was also computed with
  // numpy 1.24.2, numpy.percentile(a, q) (its default method is the same definition).
  const std::array<double, 5> a = {50.0, 15.0, 40.0, 20.0, 35.0};  // unsorted on purpose
  const std::array<double, 6> q = {0.0, 5.0, 40.0, 50.0, 95.0, 100.0};
  const std::array<double, 6> numpy = {15.0, 16.0, 29.0, 35.0, 48.0, 50.0};
  const std::vector<double> got = percentiles(a, q);
  for (std::size_t i = 0; i < q.size(); ++i) EXPECT_NEAR(got[i], numpy[i], 1e-12) << q[i];

  // Ties and negative values: numpy.percentile(b, [5, 25, 50, 95]) = [-0.65, 1.65, 3.8, 9.06].
  const std::array<double, 8> b = {3.2, -1.0, 7.5, 0.0, 2.2, 9.9, 4.4, 4.4};
  EXPECT_NEAR(percentile(b, 5.0), -0.65, 1e-12);
  EXPECT_NEAR(percentile(b, 25.0), 1.65, 1e-12);
  EXPECT_NEAR(percentile(b, 50.0), 3.8, 1e-12);
  EXPECT_NEAR(percentile(b, 95.0), 9.06, 1e-12);
  // One member: every percentile is that member.
  const std::array<double, 1> one = {2.5};
  EXPECT_EQ(percentile(one, 95.0), 2.5);
}

TEST(EnsembleStatistics, ExceedanceCountsMembersStrictlyAbove) {
  const std::array<double, 5> peaks = {9.0, 10.0, 10.5, 12.0, 8.0};
  EXPECT_DOUBLE_EQ(exceedance_fraction(peaks, 10.0), 0.4);
  EXPECT_DOUBLE_EQ(exceedance_fraction(peaks, 7.0), 1.0);
  EXPECT_DOUBLE_EQ(exceedance_fraction(peaks, 12.0), 0.0);
}

TEST(EnsembleStatistics, KolmogorovTailMatchesItsPublishedCriticalValues) {
  // Asymptotic critical values of sqrt(n) D: 1.36 at the 5 % level and 1.63 at the 1 % level
  // (Massey 1951, The Kolmogorov-Smirnov test for goodness of fit, JASA 46, Table 1; from
  // memory), i.e. Q_KS(1.3581) = 0.05 and Q_KS(1.6276) = 0.01 to the table's digits.
  EXPECT_NEAR(kolmogorov_q(1.3581), 0.05, 2e-4);
  EXPECT_NEAR(kolmogorov_q(1.6276), 0.01, 1e-4);
  EXPECT_DOUBLE_EQ(kolmogorov_q(0.1), 1.0);
  EXPECT_LT(kolmogorov_q(3.0), 1e-7);
}

TEST(EnsembleStatistics, KolmogorovStatisticOfASmallSample) {
  // D for {0.1, 0.4, 0.7} against the uniform on [0, 1]: max over i of i/n - x_i and
  // x_i - (i - 1)/n is max(1/3 - 0.1, 2/3 - 0.4, 1 - 0.7, 0.1, 0.4 - 1/3, 0.7 - 2/3) = 0.3
  // (definition: Press et al. 2007, Numerical Recipes, eq. 14.3.9; computed by hand).
  const std::array<double, 3> x = {0.7, 0.1, 0.4};
  const KsResult ks = kolmogorov_smirnov(x, [](double v) { return v; });
  EXPECT_NEAR(ks.statistic, 0.3, 1e-15);
}

}  // namespace
}  // namespace freshet::uncertainty
