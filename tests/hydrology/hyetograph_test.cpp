#include "freshet/hydrology/hyetograph.hpp"

#include <cmath>
#include <gtest/gtest.h>

#include "freshet/core/error.hpp"

namespace freshet::hydrology {
namespace {

// Block arithmetic of a hyetograph (depth = intensity x block length): plain geometry.
TEST(Hyetograph, DepthsAreExactOverAnyInterval) {
  const auto storm = Hyetograph::from_depths({0.0, 600.0, 1200.0, 2400.0},
                                             {0.004, 0.010, 0.006}, "storm 'kestrel'");
  EXPECT_EQ(storm.block_count(), 3u);
  EXPECT_DOUBLE_EQ(storm.total_depth_m(), 0.020);
  EXPECT_DOUBLE_EQ(storm.intensities_m_s()[1], 0.010 / 600.0);
  EXPECT_DOUBLE_EQ(storm.intensities_m_s()[2], 0.006 / 1200.0);
  EXPECT_DOUBLE_EQ(storm.cumulative_depth_m(-5.0), 0.0);
  EXPECT_DOUBLE_EQ(storm.cumulative_depth_m(900.0), 0.004 + 0.005);
  EXPECT_DOUBLE_EQ(storm.cumulative_depth_m(1e9), 0.020);
  // Half of block 1 plus half of block 2 (first 300 s of the 1200-s block 3 = 1/4 of it).
  EXPECT_NEAR(storm.depth_between_m(300.0, 1500.0), 0.002 + 0.010 + 0.0015, 1e-15);
  EXPECT_DOUBLE_EQ(storm.intensity_at_m_s(600.0), 0.010 / 600.0);
  EXPECT_DOUBLE_EQ(storm.intensity_at_m_s(2400.0), 0.0);
  EXPECT_DOUBLE_EQ(storm.peak_intensity_m_s(), 0.010 / 600.0);
  const PiecewiseLinearSeries mass = storm.cumulative_depth_series();
  EXPECT_DOUBLE_EQ(mass.value_at(1800.0), storm.cumulative_depth_m(1800.0));
}

TEST(Hyetograph, UniformBlocksFromIntensities) {
  const auto storm = Hyetograph::from_uniform_intensities(3600.0, 300.0, {1e-6, 3e-6});
  EXPECT_DOUBLE_EQ(storm.start_s(), 3600.0);
  EXPECT_DOUBLE_EQ(storm.end_s(), 4200.0);
  EXPECT_DOUBLE_EQ(storm.duration_s(), 600.0);
  EXPECT_NEAR(storm.total_depth_m(), 300.0 * 4e-6, 1e-18);
}

TEST(Hyetograph, RejectsNegativeNanAndNonIncreasingTimesAllAtOnce) {
  try {
    (void)Hyetograph::from_intensities({0.0, 60.0, 60.0, 50.0}, {1e-6, -1e-6, std::nan("")},
                                       "subcatchment 'alder' rain");
    FAIL() << "expected InputError";
  } catch (const InputError& e) {
    ASSERT_EQ(e.problems().size(), 4u);
    EXPECT_EQ(e.problems()[0].to_string(),
              "subcatchment 'alder' rain, field 'time[3]' = 60: times must strictly increase "
              "(previous 60)");
    EXPECT_EQ(e.problems()[2].to_string(),
              "subcatchment 'alder' rain, field 'intensity[2]' = -1e-06: must be >= 0");
    EXPECT_EQ(e.problems()[3].to_string(),
              "subcatchment 'alder' rain, field 'intensity[3]' = nan: must be a finite number");
  }
}

TEST(Hyetograph, RejectsMismatchedSizesAndEmptyStorms) {
  EXPECT_THROW((void)Hyetograph::from_depths({0.0, 60.0}, {0.001, 0.002}), InputError);
  EXPECT_THROW((void)Hyetograph::from_depths({0.0}, {}), InputError);
  EXPECT_THROW((void)Hyetograph::from_uniform_intensities(0.0, 0.0, {1e-6}), InputError);
}

}  // namespace
}  // namespace freshet::hydrology
