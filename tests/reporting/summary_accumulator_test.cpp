// The per-station summary accumulator and the comparison of two stations.
// Reference values: a triangular hydrograph rising linearly from 0 at t = 0 to Qp at tp and
// falling linearly to 0 at tb has volume Qp tb / 2 and its centroid (first moment over area)
// at t = (0 + tp + tb) / 3, the centroid of a triangle (Beer and Johnston, Vector Mechanics
// for Engineers: Statics, centroids of common shapes; any statics text).
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>

#include "freshet/reporting/summary.hpp"

namespace freshet::reporting {
namespace {

constexpr double kPeak = 12.0, kPeakTime = 2700.0, kBase = 10800.0;

double triangle_q(double t) {
  if (t <= kPeakTime) return kPeak * t / kPeakTime;
  return std::max(0.0, kPeak * (kBase - t) / (kBase - kPeakTime));
}

TEST(SummaryAccumulator, TriangleVolumeCentroidAndPeakMatchGeometry) {
  SummaryAccumulator acc;
  for (int k = 0; k <= 240; ++k) {  // 60 s samples over 4 h; 2700 and 10800 are sample times
    const double t = 60.0 * k;
    acc.add_sample(t, triangle_q(t), 100.0 + 0.1 * triangle_q(t));
  }
  EXPECT_NEAR(acc.volume_m3(), 0.5 * kPeak * kBase, 1e-9 * kPeak * kBase);
  EXPECT_NEAR(acc.centroid_time_s(), (kPeakTime + kBase) / 3.0, 1e-9 * kBase);
  EXPECT_EQ(acc.peak_discharge_m3s(), kPeak);
  EXPECT_EQ(acc.peak_time_s(), kPeakTime);
  EXPECT_DOUBLE_EQ(acc.peak_stage_m(), 100.0 + 0.1 * kPeak);
  const auto s = acc.station_summary("mill", "Mill Lane", 1000.0);
  EXPECT_NEAR(s.centroid_lag_s, (kPeakTime + kBase) / 3.0 - 1000.0, 1e-9 * kBase);
}

// A flat-topped hydrograph peaks where the top is first reached, even when round-off makes
// later samples of the plateau larger in the last digits; a real rise still moves the peak.
TEST(SummaryAccumulator, PeakTimeOfAPlateauIsWhereItIsFirstReached) {
  SummaryAccumulator acc;
  acc.add_sample(0.0, 0.2);
  acc.add_sample(60.0, 0.7027);
  acc.add_sample(120.0, 0.7027 * (1.0 + 3e-13));
  acc.add_sample(180.0, 0.7027 * (1.0 + 8e-13));
  acc.add_sample(240.0, 0.5);
  EXPECT_EQ(acc.peak_time_s(), 60.0);
  EXPECT_EQ(acc.peak_discharge_m3s(), 0.7027 * (1.0 + 8e-13));  // the value is the largest
  acc.add_sample(300.0, 0.71);
  EXPECT_EQ(acc.peak_time_s(), 300.0);

  // A pipe at capacity creeping up by 1e-8 m3/s a step for 300 steps (3.8e-5 relative in
  // all) keeps the time its top was reached.
  SummaryAccumulator pipe;
  pipe.add_sample(0.0, 0.01);
  for (int k = 1; k <= 300; ++k) pipe.add_sample(60.0 * k, 0.08057 + 1e-8 * k);
  EXPECT_EQ(pipe.peak_time_s(), 60.0);
  EXPECT_NEAR(pipe.peak_discharge_m3s(), 0.08057 + 3e-6, 1e-15);
}

TEST(SummaryAccumulator, HandedInVolumesTakePrecedence) {
  SummaryAccumulator acc;
  acc.add_sample(0.0, 0.0);
  acc.add_sample(600.0, 1.0);
  acc.add_interval_volume(0.0, 600.0, 250.0);
  EXPECT_EQ(acc.volume_m3(), 250.0);
  EXPECT_EQ(acc.centroid_time_s(), 300.0);  // one interval: its midpoint
}

TEST(SummaryAccumulator, EmptyAccumulatorReportsNotApplicable) {
  SummaryAccumulator acc;
  EXPECT_TRUE(std::isnan(acc.peak_discharge_m3s()));
  EXPECT_TRUE(std::isnan(acc.volume_m3()));
  EXPECT_TRUE(std::isnan(acc.centroid_time_s()));
}

}  // namespace
}  // namespace freshet::reporting
