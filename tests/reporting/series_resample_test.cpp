// Volume-preserving resampling. Reference volumes are areas of triangles and trapezoids
// (elementary geometry: area = base * height / 2), and the exact integral of a piecewise-linear
// function is the trapezoid rule over its breakpoints.
#include "freshet/reporting/series_resample.hpp"

#include <gtest/gtest.h>

#include <cmath>
#include <algorithm>
#include <vector>
#include <random>
#include <optional>

#include "freshet/core/error.hpp"

namespace freshet::reporting {
namespace {

// Triangular hydrograph: 0 at t = 0, peak 12 m3/s at 47 min, 0 again at 3 h 13 min; the
// breakpoints are deliberately off the 5-minute output grid.
PiecewiseLinearSeries triangle() {
  return PiecewiseLinearSeries({0.0, 2820.0, 11580.0}, {0.0, 12.0, 0.0});
}

// The same triangle on a base flow of 1.5 m3/s. With zero flow at both ends and breakpoints off
// the grid, exact interval volumes would be over-determined (see series_resample.hpp); a base
// flow leaves room for the small alternating correction.
PiecewiseLinearSeries triangle_on_base_flow() {
  return PiecewiseLinearSeries({0.0, 2820.0, 11580.0}, {1.5, 13.5, 1.5});
}

double relative(double a, double b) { return std::abs(a - b) / std::abs(b); }

TEST(Resample, IntervalVolumesAreKeptExactly) {
  const auto q = triangle_on_base_flow();
  const double dt = 300.0;
  const std::size_t n = 48;  // 4 h, past the end of the triangle
  const auto r = resample_preserving_volume(q, 0.0, dt, n, ResampleMethod::interval_volumes);
  const double exact = 0.5 * 11580.0 * 12.0 + 1.5 * 14400.0;  // triangle + base-flow rectangle
  EXPECT_LT(relative(r.integral(0.0, static_cast<double>(n) * dt), exact), 1e-12);
  for (std::size_t k = 0; k < n; ++k) {
    const double t0 = static_cast<double>(k) * dt, t1 = t0 + dt;
    EXPECT_NEAR(r.integral(t0, t1), q.integral(t0, t1), 1e-12 * exact) << "interval " << k;
  }
  double ripple = 0.0;  // largest departure from the original point values
  for (std::size_t k = 0; k <= n; ++k) {
    ripple = std::max(ripple, std::abs(r.values()[k] - q.value_at(r.times_s()[k])));
  }
  EXPECT_LT(ripple, 0.1 * 12.0);  // bound on the alternating correction: common practice, no source
}

TEST(Resample, ZeroAtBothEndsWithOffGridBreakpointsIsOverDetermined) {
  EXPECT_THROW(resample_preserving_volume(triangle(), 0.0, 300.0, 48,
                                          ResampleMethod::interval_volumes),
               InputError);
}

TEST(Resample, ScaledSamplesKeepTheTotalVolume) {
  const auto q = triangle();
  const auto r = resample_preserving_volume(q, 0.0, 600.0, 24, ResampleMethod::scaled_samples);
  EXPECT_LT(relative(r.integral(0.0, 24 * 600.0), 0.5 * 11580.0 * 12.0), 1e-12);
}

TEST(Resample, ASeriesAlreadyOnTheGridIsReproduced) {
  const PiecewiseLinearSeries q({0.0, 60.0, 120.0, 180.0}, {1.0, 4.0, 2.0, 3.0});
  const auto r = resample_preserving_volume(q, 0.0, 60.0, 3, ResampleMethod::interval_volumes);
  for (std::size_t k = 0; k < 4; ++k) EXPECT_NEAR(r.values()[k], q.values()[k], 1e-14);
}

TEST(Resample, SpikeInsideOneIntervalCannotBeResampled) {
  // 0 except a 2-minute spike inside [1800, 3600] s: with zero volume on both neighbours, the
  // exact interval volumes would need a negative value, and every 30-minute sample is zero.
  const PiecewiseLinearSeries q({0.0, 2400.0, 2460.0, 2520.0, 7200.0}, {0.0, 0.0, 5.0, 0.0, 0.0});
  EXPECT_THROW(resample_preserving_volume(q, 0.0, 1800.0, 4, ResampleMethod::interval_volumes),
               InputError);
  EXPECT_THROW(resample_preserving_volume(q, 0.0, 1800.0, 4, ResampleMethod::scaled_samples),
               InputError);
}

TEST(Resample, SpikeOnANodeSpreadsOverTheTwoAdjacentIntervals) {
  // Spike of volume 0.5 * 120 s * 5 m3/s = 300 m3 centred on the node t = 3600 s: the
  // interval-volume solution is a triangle of base 3600 s and height 2 * 300 / 3600 m3/s.
  const PiecewiseLinearSeries q({0.0, 3540.0, 3600.0, 3660.0, 7200.0}, {0.0, 0.0, 5.0, 0.0, 0.0});
  const auto r = resample_preserving_volume(q, 0.0, 1800.0, 4, ResampleMethod::interval_volumes);
  const std::vector<double> expected{0.0, 0.0, 600.0 / 3600.0, 0.0, 0.0};
  for (std::size_t k = 0; k < 5; ++k) EXPECT_NEAR(r.values()[k], expected[k], 1e-15) << k;
  const auto s = resample_preserving_volume(q, 0.0, 1800.0, 4, ResampleMethod::scaled_samples);
  EXPECT_LT(relative(s.integral(0.0, 7200.0), 300.0), 1e-12);
}

// Local correction on the triangle on base flow (a 10-minute grid misses the peak at 47 min):
// the total volume is the triangle plus the base-flow rectangle, the base flow before the
// rise and after the recession is left exactly as it was, and the samples around the peak
// are raised towards it (plain sampling would read the peak at 40 or 50 min).
TEST(Resample, LocalCorrectionKeepsVolumeAndBaseFlowAndRaisesAnOffGridPeak) {
  const auto q = triangle_on_base_flow();
  const double dt = 600.0;
  const std::size_t n = 24;  // 4 h
  const auto r = resample_preserving_volume(q, 0.0, dt, n, ResampleMethod::local_correction);
  const double exact = 0.5 * 11580.0 * 12.0 + 1.5 * 14400.0;
  EXPECT_LT(relative(r.integral(0.0, static_cast<double>(n) * dt), exact), 1e-12);
  // Linear between nodes on [0, 2400] and [12000, 14400]: untouched (0 and the last nodes).
  for (std::size_t k : {0u, 1u, 2u, 3u, 21u, 22u, 23u, 24u}) {
    EXPECT_NEAR(r.values()[k], q.value_at(r.times_s()[k]), 1e-12) << "node " << k;
  }
  double sampled_peak = 0.0, corrected_peak = 0.0;
  for (std::size_t k = 0; k <= n; ++k) {
    sampled_peak = std::max(sampled_peak, q.value_at(r.times_s()[k]));
    corrected_peak = std::max(corrected_peak, r.values()[k]);
  }
  EXPECT_GT(corrected_peak, sampled_peak);
  EXPECT_LT(corrected_peak, 13.5);
}

TEST(Resample, LocalCorrectionNeverGoesNegative) {
  // A 2-minute spike inside one 30-minute interval between zero flows: both of the
  // interval's nodes are zero, so they share its 300 m3 equally, 150 m3 each over a
  // trapezoid weight of 1800 s.
  const PiecewiseLinearSeries inside({0.0, 2400.0, 2460.0, 2520.0, 7200.0},
                                     {0.0, 0.0, 5.0, 0.0, 0.0});
  const auto r = resample_preserving_volume(inside, 0.0, 1800.0, 4,
                                            ResampleMethod::local_correction);
  EXPECT_LT(relative(r.integral(0.0, 7200.0), 300.0), 1e-12);
  const std::vector<double> expected{0.0, 150.0 / 1800.0, 150.0 / 1800.0, 0.0, 0.0};
  for (std::size_t k = 0; k < 5; ++k) EXPECT_NEAR(r.values()[k], expected[k], 1e-15) << k;
  // The same spike centred on a node: the samples count it as a 3600 s wide triangle (9000 m3
  // instead of 300 m3). The zero neighbours keep zero; the node takes the whole excess back
  // and ends at 600 / 3600 m3/s, the triangle the exact interval volumes also give.
  const PiecewiseLinearSeries on_node({0.0, 3540.0, 3600.0, 3660.0, 7200.0},
                                      {0.0, 0.0, 5.0, 0.0, 0.0});
  const auto c = resample_preserving_volume(on_node, 0.0, 1800.0, 4,
                                            ResampleMethod::local_correction);
  const std::vector<double> triangle{0.0, 0.0, 600.0 / 3600.0, 0.0, 0.0};
  for (std::size_t k = 0; k < 5; ++k) EXPECT_NEAR(c.values()[k], triangle[k], 1e-15) << k;
  // A rise from zero flow (convex: the samples overstate the first interval): the zero node
  // stays zero instead of going negative.
  const PiecewiseLinearSeries rise({0.0, 1500.0, 1800.0, 3600.0}, {0.0, 0.0, 6.0, 6.0});
  const auto d = resample_preserving_volume(rise, 0.0, 1800.0, 2,
                                            ResampleMethod::local_correction);
  EXPECT_EQ(d.values()[0], 0.0);
  for (double value : d.values()) EXPECT_GE(value, 0.0);
  EXPECT_LT(relative(d.integral(0.0, 3600.0), rise.integral(0.0, 3600.0)), 1e-12);
}

// Invariants on 200 random hydrographs (seeded): the total volume is exact, no value is
// negative, and no value rises above the original's largest value over the node's two
// intervals, so an exported peak never exceeds the routed one.
TEST(Resample, LocalCorrectionInvariantsOnRandomHydrographs) {
  std::mt19937 rng(20261202);
  std::uniform_real_distribution<double> unit(0.0, 1.0);
  int checked = 0;
  for (int trial = 0; trial < 200; ++trial) {
    std::vector<double> t{0.0}, q{unit(rng) * 2.0};
    while (t.back() < 7200.0) {
      t.push_back(t.back() + 30.0 + 600.0 * unit(rng));
      q.push_back(unit(rng) < 0.2 ? 0.0 : 20.0 * std::pow(unit(rng), 2.0));
    }
    const PiecewiseLinearSeries series(t, q);
    const double dt = 300.0 + 300.0 * std::floor(3.0 * unit(rng));
    const auto n = static_cast<std::size_t>(7200.0 / dt);
    std::optional<PiecewiseLinearSeries> r;
    try {
      r = resample_preserving_volume(series, 0.0, dt, n, ResampleMethod::local_correction);
    } catch (const InputError&) {
      continue;  // not enough room under the caps: the export falls back to another form
    }
    ++checked;
    const double end = static_cast<double>(n) * dt;
    const double volume = series.integral(0.0, end);
    EXPECT_NEAR(r->integral(0.0, end), volume, 1e-9 * volume) << "trial " << trial;
    for (std::size_t k = 0; k <= n; ++k) {
      const double tk = static_cast<double>(k) * dt;
      // A piecewise-linear function peaks at a breakpoint or at an end of the window.
      const double a = std::max(0.0, tk - dt), b = std::min(end, tk + dt);
      double cap = std::max(series.value_at(a), series.value_at(b));
      for (std::size_t i = 0; i < t.size(); ++i) {
        if (t[i] >= a && t[i] <= b) cap = std::max(cap, q[i]);
      }
      EXPECT_GE(r->values()[k], 0.0) << "trial " << trial << " node " << k;
      EXPECT_LE(r->values()[k], cap + 1e-9 * (1.0 + cap)) << "trial " << trial << " node " << k;
    }
  }
  EXPECT_GT(checked, 150) << "the caps should rarely leave too little room";
  RecordProperty("random_hydrographs_checked", checked);
}

}  // namespace
}  // namespace freshet::reporting
