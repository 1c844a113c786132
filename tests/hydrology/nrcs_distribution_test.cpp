#include "freshet/hydrology/nrcs_distribution.hpp"

#include <gtest/gtest.h>

#include "freshet/core/error.hpp"

namespace freshet::hydrology {
namespace {

constexpr double kHour = 3600.0;
const NrcsRainType kAll[] = {NrcsRainType::type_i, NrcsRainType::type_ia,
                             NrcsRainType::type_ii, NrcsRainType::type_iii};

// Properties of every NRCS 24-hour distribution (USDA SCS 1986, TR-55 Appendix B): a mass
// curve from 0 at 0 h to 1 at 24 h, never decreasing.
TEST(NrcsDistribution, MassCurvesRunFromZeroToOneMonotonically) {
  for (NrcsRainType type : kAll) {
    EXPECT_EQ(nrcs_cumulative_fraction(type, 0.0), 0.0);
    EXPECT_EQ(nrcs_cumulative_fraction(type, 24.0 * kHour), 1.0);
    double previous = 0.0;
    for (double h = 0.0; h <= 24.0; h += 0.05) {
      const double f = nrcs_cumulative_fraction(type, h * kHour);
      EXPECT_GE(f, previous) << to_string(type) << " at " << h << " h";
      previous = f;
    }
  }
}

// TR-55 (1986) Type II: 0.663 of the depth has fallen by 12.0 h and 0.357 by 11.75 h, so its
// steepest quarter hour is 11.75-12.0 h. Type III: 0.500 at 12.0 h.
TEST(NrcsDistribution, KnownOrdinatesAndSteepestQuarterHour) {
  EXPECT_DOUBLE_EQ(nrcs_cumulative_fraction(NrcsRainType::type_ii, 12.0 * kHour), 0.663);
  EXPECT_DOUBLE_EQ(nrcs_cumulative_fraction(NrcsRainType::type_ii, 11.75 * kHour), 0.357);
  EXPECT_DOUBLE_EQ(nrcs_cumulative_fraction(NrcsRainType::type_iii, 12.0 * kHour), 0.500);

  const Hyetograph storm = nrcs_24h_storm(NrcsRainType::type_ii, 0.127, 0.25 * kHour);
  const auto depth = storm.block_depths_m();
  const auto peak = std::max_element(depth.begin(), depth.end()) - depth.begin();
  EXPECT_EQ(peak, 47);  // block [11.75, 12.0] h
  EXPECT_NEAR(depth[47], 0.127 * (0.663 - 0.357), 1e-15);
}

TEST(NrcsDistribution, StormHoldsTheDesignDepthForAnyStep) {
  for (NrcsRainType type : kAll) {
    for (double step : {360.0, 0.1 * kHour, 7.0 * kHour, 24.0 * kHour}) {
      const Hyetograph storm = nrcs_24h_storm(type, 0.1016, step, "storm 'T25'", 1800.0);
      EXPECT_NEAR(storm.total_depth_m(), 0.1016, 1e-16);
      EXPECT_DOUBLE_EQ(storm.end_s(), 1800.0 + 24.0 * kHour);
    }
  }
}

TEST(NrcsDistribution, NamesRoundTripAndBadInputIsRejected) {
  for (NrcsRainType type : kAll) EXPECT_EQ(parse_nrcs_rain_type(to_string(type)), type);
  EXPECT_FALSE(parse_nrcs_rain_type("type2").has_value());
  try {
    (void)nrcs_24h_storm(NrcsRainType::type_i, -0.01, 25.0 * kHour, "storm 'T2'");
    FAIL();
  } catch (const InputError& e) {
    ASSERT_EQ(e.problems().size(), 2u);
    EXPECT_EQ(e.problems()[1].to_string(),
              "storm 'T2', field 'step_s' = 90000: the 24-hour storm is shorter than one time "
              "step");
  }
}

}  // namespace
}  // namespace freshet::hydrology
