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

// Robustness (no source needed). A NaN time (a run length that was missing) once made
// upper_bound return end() and the intensity array was read one past its end.
TEST(Hyetograph, NanTimeIsAnErrorNotAReadPastTheEnd) {
  const auto storm = Hyetograph::from_depths({0.0, 600.0, 1200.0}, {0.004, 0.010}, "storm 'kestrel'");
  const double nan = std::nan("");
  try {
    (void)storm.cumulative_depth_m(nan);
    FAIL() << "a NaN time was accepted";
  } catch (const NumericalError& e) {
    EXPECT_STREQ(e.what(), "storm 'kestrel': rain was asked for at a time that is not a number");
  }
  EXPECT_THROW((void)storm.intensity_at_m_s(nan), NumericalError);
  EXPECT_THROW((void)storm.depth_between_m(0.0, nan), NumericalError);
  // Every finite time, however far out, stays inside the table.
  EXPECT_DOUBLE_EQ(storm.cumulative_depth_m(1e308), 0.014);
  EXPECT_DOUBLE_EQ(storm.cumulative_depth_m(-1e308), 0.0);
  EXPECT_DOUBLE_EQ(storm.intensity_at_m_s(std::nextafter(1200.0, 0.0)), 0.010 / 600.0);
}

// Finite inputs whose derived values are not: refused, naming the block.
TEST(Hyetograph, RefusesBlocksWhoseDepthOrIntensityOverflows) {
  const auto what = [](auto build) -> std::string {
    try {
      build();
    } catch (const InputError& e) {
      return e.what();
    }
    return "accepted";
  };
  EXPECT_NE(what([] { (void)Hyetograph::from_intensities({0.0, 3600.0}, {1e306}, "storm 'a'"); })
                .find("storm 'a', field 'depth[1]' = inf m"),
            std::string::npos);
  EXPECT_NE(what([] { (void)Hyetograph::from_depths({0.0, 1e-320}, {1.0}, "storm 'b'"); })
                .find("storm 'b', field 'intensity[1]' = inf m/s"),
            std::string::npos);
  EXPECT_NE(what([] { (void)Hyetograph::from_depths({-1e308, 1e308}, {1.0}, "storm 'c'"); })
                .find("storm 'c', field 'time[2]' = 1e+308: the block from -1e+308 s is too long"),
            std::string::npos);
  EXPECT_NE(what([] { (void)Hyetograph::from_depths({0.0, 1.0, 2.0}, {1e308, 1e308}, "storm 'd'"); })
                .find("storm 'd', field 'depth[2]' = 1e+308 m (total inf m)"),
            std::string::npos);
}

}  // namespace
}  // namespace freshet::hydrology
