#include "freshet/hydrology/design_storm.hpp"

#include <algorithm>
#include <cmath>
#include <gtest/gtest.h>

namespace freshet::hydrology {
namespace {

constexpr double kMmPerHour = 1e-3 / 3600.0;  // m/s per mm/h
// Invented IDF formula of a made-up place: i [mm/h] = 2000 / (t [min] + 10)^0.8.
const IdfFormula kFormula{.a = 2000.0, .b_min = 10.0, .c = 0.8};

double formula_intensity_mm_h(double minutes) {
  return kFormula.a / std::pow(minutes + kFormula.b_min, kFormula.c);
}

TEST(IdfCurve, FormulaUsesMinutesAndMillimetresPerHour) {
  const IdfCurve idf = IdfCurve::from_formula(kFormula);
  EXPECT_NEAR(idf.intensity_m_s(3600.0), formula_intensity_mm_h(60.0) * kMmPerHour, 1e-18);
  EXPECT_NEAR(idf.depth_m(1800.0), formula_intensity_mm_h(30.0) * 0.5e-3, 1e-15);
  EXPECT_EQ(idf.depth_m(0.0), 0.0);
}

// Log-log interpolation: between two points the curve is the power law through them, so the
// geometric-mean duration gets the geometric-mean intensity.
TEST(IdfCurve, TableInterpolatesLogLogAndExtrapolatesEndSegments) {
  const IdfCurve idf = IdfCurve::from_table({600.0, 3600.0, 21600.0},
                                            {100 * kMmPerHour, 40 * kMmPerHour, 12 * kMmPerHour});
  EXPECT_NEAR(idf.intensity_m_s(3600.0), 40 * kMmPerHour, 1e-18);
  EXPECT_NEAR(idf.intensity_m_s(std::sqrt(600.0 * 3600.0)), std::sqrt(100.0 * 40.0) * kMmPerHour,
              1e-15);
  const double slope = std::log(12.0 / 40.0) / std::log(6.0);
  EXPECT_NEAR(idf.intensity_m_s(43200.0), 12 * std::pow(2.0, slope) * kMmPerHour, 1e-15);
}

TEST(IdfCurve, RejectsBadFormulaAndTable) {
  try {
    (void)IdfCurve::from_formula({.a = -1.0, .b_min = -2.0, .c = 1.5}, "idf 'T10'");
    FAIL();
  } catch (const InputError& e) {
    ASSERT_EQ(e.problems().size(), 3u);
    EXPECT_EQ(e.problems()[2].to_string(),
              "idf 'T10', field 'c' = 1.5: must be <= 1 (with c > 1 the IDF depth would "
              "decrease with duration)");
  }
  EXPECT_THROW((void)IdfCurve::from_table({600.0}, {1e-5}), InputError);
  EXPECT_THROW((void)IdfCurve::from_table({600.0, 300.0}, {1e-5, 2e-5}), InputError);
  // Depth falls from 600 s x 1e-5 to 1200 s x 4e-6: rejected.
  EXPECT_THROW((void)IdfCurve::from_table({600.0, 1200.0}, {1e-5, 4e-6}), InputError);
}

// Chow, Maidment & Mays (1988) Applied Hydrology sec. 14.4: the k largest blocks form a
// contiguous window around the peak holding the IDF depth for k dt, for every k.
TEST(AlternatingBlock, EveryWindowAroundThePeakHoldsTheIdfDepth) {
  const IdfCurve idf = IdfCurve::from_formula(kFormula);
  for (double ratio : {0.5, 0.3, 0.0, 1.0}) {
    const DesignStormOptions opt{.duration_s = 7200.0, .step_s = 600.0, .peak_ratio = ratio};
    const Hyetograph storm = alternating_block_storm(idf, opt, "storm 'T10-2h'");
    const auto depth = storm.block_depths_m();
    const std::size_t n = depth.size();
    ASSERT_EQ(n, 12u);
    const auto peak = static_cast<std::size_t>(
        std::max_element(depth.begin(), depth.end()) - depth.begin());
    EXPECT_EQ(peak, std::min<std::size_t>(11, static_cast<std::size_t>(ratio * 12)));
    for (std::size_t k = 1; k <= n; ++k) {
      double best = 0.0;
      std::size_t best_start = 0;
      for (std::size_t s = 0; s + k <= n; ++s) {
        double sum = 0.0;
        for (std::size_t j = s; j < s + k; ++j) sum += depth[j];
        if (sum > best) best = sum, best_start = s;
      }
      EXPECT_NEAR(best, idf.depth_m(static_cast<double>(k) * 600.0), 1e-15) << "k=" << k;
      EXPECT_LE(best_start, peak);
      EXPECT_GT(best_start + k, peak);
    }
    EXPECT_NEAR(storm.total_depth_m(), idf.depth_m(7200.0), 1e-15);
  }
}

TEST(AlternatingBlock, NeedsAWholeNumberOfStepsAndAtLeastOne) {
  const IdfCurve idf = IdfCurve::from_formula(kFormula);
  try {
    (void)alternating_block_storm(idf, {.duration_s = 3000.0, .step_s = 700.0}, "storm 'x'");
    FAIL();
  } catch (const InputError& e) {
    EXPECT_EQ(e.problems()[0].to_string(),
              "storm 'x', field 'duration_s' = 3000: must be a whole number of step_s = 700 "
              "for the alternating block method");
  }
  try {
    (void)alternating_block_storm(idf, {.duration_s = 300.0, .step_s = 600.0, .peak_ratio = 2},
                                  "storm 'x'");
    FAIL();
  } catch (const InputError& e) {
    ASSERT_EQ(e.problems().size(), 2u);
    EXPECT_EQ(e.problems()[0].to_string(), "storm 'x', field 'peak_ratio' = 2: must be in [0, 1]");
    EXPECT_EQ(e.problems()[1].to_string(),
              "storm 'x', field 'duration_s' = 300: storm is shorter than one time step "
              "(step_s = 600)");
  }
}

// Keifer & Chu (1957), J. Hydraulics Div. ASCE 83(HY4): for i = a/(t+b)^c the intensity at
// t_b before the peak is a [(1 - c) t_b / r + b] / (t_b / r + b)^(1 + c) (after: t_a/(1 - r)).
double keifer_chu_intensity_mm_h(double minutes_from_peak, double ratio) {
  const double td = minutes_from_peak / ratio;
  return kFormula.a * ((1.0 - kFormula.c) * td + kFormula.b_min) /
         std::pow(td + kFormula.b_min, 1.0 + kFormula.c);
}

// Composite Simpson's rule on [t0, t1] (minutes from the peak, one side of it).
double simpson_depth_m(double t0_min, double t1_min, double ratio) {
  const int n = 2000;
  const double h = (t1_min - t0_min) / n;
  double sum = keifer_chu_intensity_mm_h(t0_min, ratio) + keifer_chu_intensity_mm_h(t1_min, ratio);
  for (int k = 1; k < n; ++k) {
    sum += (k % 2 ? 4.0 : 2.0) * keifer_chu_intensity_mm_h(t0_min + k * h, ratio);
  }
  return sum * h / 3.0 / 60.0 * 1e-3;  // mm/h x min -> m
}

TEST(ChicagoStorm, BlocksIntegrateTheKeiferChuIntensity) {
  const IdfCurve idf = IdfCurve::from_formula(kFormula);
  const double r = 0.4;  // peak at 48 min of 120
  const Hyetograph storm = chicago_storm(idf, {.duration_s = 7200.0, .step_s = 600.0,
                                               .peak_ratio = r}, "storm 'T10-chicago'");
  ASSERT_EQ(storm.block_count(), 12u);
  const auto depth = storm.block_depths_m();
  // Block [50, 60] min lies 2..12 min after the peak; [30, 40] lies 8..18 min before it.
  EXPECT_NEAR(depth[5], simpson_depth_m(2.0, 12.0, 1.0 - r), 1e-9);
  EXPECT_NEAR(depth[3], simpson_depth_m(8.0, 18.0, r), 1e-9);
  // The block holding the peak, [40, 50] min: 8 min before and 2 min after.
  EXPECT_NEAR(depth[4], simpson_depth_m(1e-9, 8.0, r) + simpson_depth_m(1e-9, 2.0, 1.0 - r),
              1e-8);
  EXPECT_NEAR(storm.total_depth_m(), idf.depth_m(7200.0), 1e-15);
}

// Keifer & Chu (1957): the most intense window of any duration t_d containing the peak has
// the IDF average intensity i(t_d). On 1-min blocks with the peak on a block boundary and
// r = 0.4, windows of 5 j blocks split 2j : 3j reach it exactly; others stay below it.
TEST(ChicagoStorm, MostIntenseWindowAroundThePeakMatchesTheIdf) {
  const IdfCurve idf = IdfCurve::from_formula(kFormula);
  const Hyetograph storm = chicago_storm(idf, {.duration_s = 7200.0, .step_s = 60.0,
                                               .peak_ratio = 0.4});
  const auto depth = storm.block_depths_m();
  const std::size_t n = depth.size(), peak = 48;
  for (std::size_t k = 1; k <= n; ++k) {
    double best = 0.0;
    for (std::size_t s = (peak >= k ? peak - k : 0); s <= peak && s + k <= n; ++s) {
      double sum = 0.0;
      for (std::size_t j = s; j < s + k; ++j) sum += depth[j];
      best = std::max(best, sum);
    }
    const double td = 60.0 * static_cast<double>(k);
    const double idf_mean = idf.intensity_m_s(td);
    const double window_mean = best / td;
    if (k % 5 == 0 && k * 2 / 5 <= peak) {
      EXPECT_NEAR(window_mean, idf_mean, 1e-12 * idf_mean) << "k=" << k;
    } else {
      EXPECT_LE(window_mean, idf_mean * (1.0 + 1e-12)) << "k=" << k;
      EXPECT_GE(window_mean, idf_mean * 0.9) << "k=" << k;
    }
  }
}

TEST(ChicagoStorm, AnyStepAndEndPeaks) {
  const IdfCurve idf = IdfCurve::from_table({300.0, 3600.0, 86400.0},
                                            {150 * kMmPerHour, 45 * kMmPerHour, 4 * kMmPerHour});
  for (double r : {0.0, 0.25, 1.0}) {
    const Hyetograph storm = chicago_storm(idf, {.duration_s = 5000.0, .step_s = 700.0,
                                                 .peak_ratio = r, .start_s = 100.0});
    EXPECT_EQ(storm.block_count(), 8u);
    EXPECT_DOUBLE_EQ(storm.end_s(), 5100.0);
    EXPECT_NEAR(storm.total_depth_m(), idf.depth_m(5000.0), 1e-15);
  }
}

}  // namespace
}  // namespace freshet::hydrology
