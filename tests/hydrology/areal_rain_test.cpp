// Weighted gauge mixes and the TP-29 areal reduction factor (hydrology/areal_rain.hpp).
#include "freshet/hydrology/areal_rain.hpp"

#include <gtest/gtest.h>

#include <cmath>

#include "freshet/core/error.hpp"

namespace freshet::hydrology {
namespace {

TEST(MixHyetographs, DepthsAreTheWeightedSumsOverTheUnionOfBlocks) {
  // Gauge A: 6 mm over [0, 600], 0 over [600, 1200]. Gauge B: 3 mm over [300, 900].
  // Weights 0.7 / 0.3. Worked by hand over the union boundaries 0, 300, 600, 900, 1200:
  //   [0,300]:   0.7 * 3 + 0.3 * 0   = 2.1 mm
  //   [300,600]: 0.7 * 3 + 0.3 * 1.5 = 2.55 mm
  //   [600,900]: 0.7 * 0 + 0.3 * 1.5 = 0.45 mm
  //   [900,1200]: 0 mm;  total 5.1 mm = 0.7 * 6 + 0.3 * 3.
  const auto a = Hyetograph::from_depths({0.0, 600.0, 1200.0}, {6e-3, 0.0}, "a");
  const auto b = Hyetograph::from_depths({300.0, 900.0}, {3e-3}, "b");
  const auto mix = mix_hyetographs({{0.7, &a}, {0.3, &b}}, "mix");
  ASSERT_EQ(mix.block_count(), 4u);
  EXPECT_NEAR(mix.block_depths_m()[0], 2.1e-3, 1e-15);
  EXPECT_NEAR(mix.block_depths_m()[1], 2.55e-3, 1e-15);
  EXPECT_NEAR(mix.block_depths_m()[2], 0.45e-3, 1e-15);
  EXPECT_NEAR(mix.block_depths_m()[3], 0.0, 1e-18);
  EXPECT_NEAR(mix.total_depth_m(), 5.1e-3, 1e-15);
  EXPECT_THROW(mix_hyetographs({{-0.1, &a}}, "mix"), InputError);
}

TEST(Tp29ArealReduction, ClosedFormValuesAndShape) {
  // Leclerc & Schaake (1972) fit to the TP-29 curves, from memory:
  // ARF = 1 - exp(-1.1 t^0.25) + exp(-1.1 t^0.25 - 0.01 A), t in h, A in mi2.
  // Worked by hand: t = 24 h, A = 400 mi2: 1.1 * 24^0.25 = 2.4347; exp(-2.4347) = 0.08763,
  // exp(-6.4347) = 0.00161 -> 0.9140 (the 24-hour curve reads about 0.91 at 400 mi2).
  // t = 1 h, A = 100 mi2: exp(-1.1) = 0.33287, exp(-2.1) = 0.12246 -> 0.7896.
  const double mi2 = 1609.344 * 1609.344;
  EXPECT_NEAR(tp29_areal_reduction_factor(400.0 * mi2, 24.0 * 3600.0), 0.9140, 5e-4);
  EXPECT_NEAR(tp29_areal_reduction_factor(100.0 * mi2, 3600.0), 0.7896, 5e-4);
  EXPECT_DOUBLE_EQ(tp29_areal_reduction_factor(0.0, 3600.0), 1.0);  // a point: no reduction
  // Larger areas reduce more; longer storms less.
  EXPECT_LT(tp29_areal_reduction_factor(200.0 * mi2, 3600.0),
            tp29_areal_reduction_factor(100.0 * mi2, 3600.0));
  EXPECT_GT(tp29_areal_reduction_factor(100.0 * mi2, 6.0 * 3600.0),
            tp29_areal_reduction_factor(100.0 * mi2, 3600.0));
  EXPECT_TRUE(tp29_range_problem(100.0 * mi2, 3600.0).empty());
  EXPECT_FALSE(tp29_range_problem(401.0 * mi2, 3600.0).empty());
  EXPECT_FALSE(tp29_range_problem(100.0 * mi2, 20.0 * 60.0).empty());
  EXPECT_FALSE(tp29_range_problem(100.0 * mi2, 25.0 * 3600.0).empty());
}

}  // namespace
}  // namespace freshet::hydrology
