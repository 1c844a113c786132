// The ensemble summary: percentiles of each member quantity, exceedance as the fraction of
// members strictly above a threshold, and the convergence table's member counts.
#include "freshet/uncertainty/ensemble_summary.hpp"

#include <gtest/gtest.h>

#include <cmath>
#include <limits>
#include <vector>

namespace freshet::uncertainty {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

MemberPeaks ten_members() {
  MemberPeaks m;
  m.id = "a";
  for (int k = 1; k <= 10; ++k) {
    m.peak_discharge_m3s.push_back(k);
    m.peak_stage_m.push_back(100.0 + 0.1 * k);
    m.peak_time_s.push_back(600.0 * (11 - k));
    m.outflow_volume_m3.push_back(1000.0 * k);
  }
  return m;
}

TEST(EnsembleSummary, PercentilesExceedanceAndConvergenceOfAHandWorkedSample) {
  // 1..10: numpy.percentile([1..10], [5, 50, 95]) = 1.45, 5.5, 9.55 (Hyndman & Fan 1996
  // definition 7: h = (n - 1) q / 100, so 0.45, 4.5 and 8.55 positions from the first).
  const std::vector<MemberPeaks> stations{ten_members()};
  const std::vector<Threshold> thresholds{{"crest", "a", PeakQuantity::stage, 100.7},
                                          {"pipe", "a", PeakQuantity::discharge, 10.0}};
  const EnsembleSummary s = summarize_ensemble(stations, {5.0, 50.0, 95.0}, thresholds);
  ASSERT_EQ(s.stations.size(), 1u);
  const auto& q = s.stations[0].values[index(PeakQuantity::discharge)];
  EXPECT_NEAR(q[0], 1.45, 1e-12);
  EXPECT_NEAR(q[1], 5.5, 1e-12);
  EXPECT_NEAR(q[2], 9.55, 1e-12);
  EXPECT_NEAR(s.stations[0].values[index(PeakQuantity::time)][1], 3300.0, 1e-9);
  // Stages 100.8, 100.9 and 101.0 are above 100.7 (100.7 itself is not: strictly above):
  // 3 of 10, standard error sqrt(0.3 x 0.7 / 10) = 0.14491.
  ASSERT_EQ(s.exceedances.size(), 2u);
  EXPECT_EQ(s.exceedances[0].exceeded, 3u);
  EXPECT_DOUBLE_EQ(s.exceedances[0].probability, 0.3);
  EXPECT_NEAR(s.exceedances[0].standard_error, 0.144914, 1e-6);
  EXPECT_EQ(s.exceedances[1].exceeded, 0u);  // no member above the largest peak
  // 10 members: 10/8 = 1 is dropped, then 2, 5, 10; the first 2 members' median is 1.5.
  EXPECT_EQ(convergence_sizes(10), (std::vector<std::size_t>{2, 5, 10}));
  ASSERT_EQ(s.convergence.size(), 3u * kPeakQuantities);
  EXPECT_EQ(s.convergence[0].members, 2u);
  EXPECT_EQ(s.convergence[0].quantity, PeakQuantity::discharge);
  EXPECT_NEAR(s.convergence[0].values[1], 1.5, 1e-12);
  EXPECT_NEAR(s.convergence.back().values[1], 5500.0, 1e-9);  // volume, all 10 members
}

TEST(EnsembleSummary, AStationWithoutStageHasNoStageBandsOrExceedance) {
  MemberPeaks m = ten_members();
  m.peak_stage_m.assign(10, kNaN);
  const EnsembleSummary s =
      summarize_ensemble({m}, {50.0}, {{"crest", "a", PeakQuantity::stage, 1.0}});
  EXPECT_TRUE(std::isnan(s.stations[0].values[index(PeakQuantity::stage)][0]));
  EXPECT_TRUE(std::isnan(s.exceedances[0].probability));
  EXPECT_EQ(convergence_sizes(16), (std::vector<std::size_t>{2, 4, 8, 16}));
  EXPECT_EQ(convergence_sizes(3), (std::vector<std::size_t>{3}));
}

}  // namespace
}  // namespace freshet::uncertainty
