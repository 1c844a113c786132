// A flood hydrograph routed along a wide channel, against the exact kinematic solution by
// characteristics; and reaches built at run time from geometry sections.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <vector>

#include "freshet/core/units.hpp"
#include "freshet/routing/detail/celerity_envelope.hpp"
#include "freshet/routing/detail/flux_eval.hpp"
#include "freshet/routing/kinematic_reach.hpp"
#include "freshet/routing/make_reach.hpp"
#include "routing_test_support.hpp"

namespace freshet::routing {
namespace {

using geometry::PowerLawFlux;
using testing::options_for;
using testing::wide_manning;

// Channel: rectangular, 200 ft wide, bed slope 0.01, Manning's n = 0.035, 15 000 ft long,
// treated as wide (P ~ B), as in Chow, Maidment & Mays (1988), Applied Hydrology, sec. 9.6,
// Example 9.6.1 (channel data from memory, not checked against the book). The book's inflow
// hydrograph and tabulated outflows are NOT used: its scheme differs from ours and the
// numbers are not at hand. Instead an invented triangular hydrograph is routed and compared
// with the exact solution by characteristics (Lighthill & Whitham 1955, Proc. R. Soc. A 229):
// Q(L, t) = Q_in(tau) with t = tau + L / c(Q_in(tau)), valid while no shock forms in [0, L]
// (checked below with the crossing distance of the rising limb).
constexpr double kFt = 0.3048;
const double kWidth = 200.0 * kFt, kLength = 15000.0 * kFt;
const PowerLawFlux kChannel = wide_manning(kWidth, 0.035, 0.01);
const PiecewiseLinearSeries kInflow({0.0, 1800.0, 5400.0, 12600.0},
                                    {28.3, 28.3, 141.6, 28.3});  // 1000 -> 5000 cfs, invented

double celerity_of_inflow(double tau) {
  return kChannel.celerity_m_s(kChannel.area_for_discharge_m2(kInflow.value_at(tau)));
}

// Exact outflow: solve tau + L / c(tau) = t by bisection (tau + L/c is increasing while
// L < c^2 / (dc/dtau), i.e. before characteristics cross).
double exact_outflow(double t) {
  double lo = t - kLength / celerity_of_inflow(0.0) - 1.0, hi = t;
  for (int it = 0; it < 200; ++it) {
    const double mid = 0.5 * (lo + hi);
    (mid + kLength / celerity_of_inflow(mid) < t ? lo : hi) = mid;
  }
  return kInflow.value_at(0.5 * (lo + hi));
}

double exact_mean_outflow(double t0, double t1) {  // composite Simpson, 16 panels
  const int m = 16;
  const double h = (t1 - t0) / m;
  double s = exact_outflow(t0) + exact_outflow(t1);
  for (int k = 1; k < m; ++k) s += (k % 2 ? 4.0 : 2.0) * exact_outflow(t0 + k * h);
  return s * h / 3.0 / (t1 - t0);
}

struct HydrographCase {
  SchemeKind scheme;
  double peak_tolerance_rel;  // |peak - exact| / exact peak
  double l1_tolerance_rel;    // sum |Q - Q_exact| / sum Q_exact
};

class ExactHydrograph : public ::testing::TestWithParam<HydrographCase> {};

TEST_P(ExactHydrograph, OutflowMatchesCharacteristicSolution) {
  const HydrographCase c = GetParam();
  const BreakingPrediction crossing = predict_breaking_from_inflow(kChannel, kInflow, 0.0, 12600.0);
  ASSERT_TRUE(crossing.breaks);
  ASSERT_GT(crossing.position_m, kLength);  // no shock inside the reach: exact solution holds
  RoutingOptions opt = options_for(c.scheme);
  opt.implicit_courant = 2.0;
  KinematicReach<PowerLawFlux> reach({"chow-channel", kLength, 300}, kChannel, opt);
  reach.set_uniform_discharge(28.3);
  double peak = 0.0, peak_exact = 0.0, l1 = 0.0, total = 0.0;
  const double dt = 60.0;
  for (double t = 0.0; t < 16200.0; t += dt) {
    const AdvanceResult r = reach.advance(t, t + dt, kInflow, LateralInflow::none());
    const double q_exact = exact_mean_outflow(t, t + dt);
    peak = std::max(peak, r.mean_outflow_m3s);
    peak_exact = std::max(peak_exact, q_exact);
    l1 += std::abs(r.mean_outflow_m3s - q_exact);
    total += q_exact;
  }
  const double peak_err = std::abs(peak / peak_exact - 1.0), l1_err = l1 / total;
  std::printf("[%s] outflow peak %.3f vs exact %.3f m3/s (%.3f%%), L1 %.3e; crossing distance "
              "%.0f m > L = %.0f m\n",
              std::string(to_string(c.scheme)).c_str(), peak, peak_exact, 100.0 * peak_err, l1_err,
              crossing.position_m, kLength);
  RecordProperty("peak_rel_error", std::to_string(peak_err));
  RecordProperty("l1_rel_error", std::to_string(l1_err));
  EXPECT_LT(peak_err, c.peak_tolerance_rel);
  EXPECT_LT(l1_err, c.l1_tolerance_rel);
  EXPECT_LE(reach.diagnostics().mass_balance_error_rel, 1e-10);
}

// Tolerances reflect each scheme's numerical diffusion on this grid (dx = 15.2 m): first-order
// schemes round the hydrograph's corners (the peak most), the second-order scheme much less.
INSTANTIATE_TEST_SUITE_P(
    Schemes, ExactHydrograph,
    ::testing::Values(HydrographCase{SchemeKind::kExplicitUpwind, 0.005, 0.002},
                      HydrographCase{SchemeKind::kImplicitUpwind, 0.02, 0.005},
                      HydrographCase{SchemeKind::kMethodOfLines, 0.01, 0.003},
                      HydrographCase{SchemeKind::kMusclHeun, 0.001, 1e-4}),
    [](const auto& param_info) {
      std::string s(to_string(param_info.param.scheme));
      std::replace(s.begin(), s.end(), '-', '_');
      return s;
    });

// Run-time dispatch from geometry sections: the steady state of each reach satisfies Manning's
// equation Q = (1/n) A R^(2/3) S^(1/2) (Chow 1959, Open-Channel Hydraulics, eq. 5-6) at the
// depth found by geometry's own normal-depth solver, and the ledger closes.
TEST(MakeReach, SteadyFlowInRealSectionsIsNormalDepth) {
  const double slope = 0.002, q = 12.0;
  const std::vector<std::pair<geometry::SectionSpec, double>> cases = {
      {geometry::RectangularSpec{10.0, 0.03}, 0.03},
      {geometry::TrapezoidalSpec{3.0, 2.0, 2.0, 0.03}, 0.03},
      {geometry::CircularSpec{3.0, 0.013}, 0.013},
      {geometry::TriangularSpec{2.0, 2.0, 0.035}, 0.035}};
  for (const auto& [spec, n] : cases) {
    const geometry::FlowSection s = geometry::make_flow_section(spec, slope);
    for (SchemeKind k : {SchemeKind::kExplicitUpwind, SchemeKind::kImplicitUpwind}) {
      auto reach = make_reach({"section-reach", 1000.0, 100}, s.flux, options_for(k));
      const PiecewiseLinearSeries inflow({0.0, 600.0, 1200.0}, {2.0, q, q});
      for (double t = 0.0; t < 7200.0; t += 600.0) (void)reach->advance(t, t + 600.0, inflow, LateralInflow::none());
      const double depth = s.depth_m(reach->cell_area_m2().back());
      const double area = s.section->area_m2(depth);
      const double manning_q =
          area * std::pow(s.section->hydraulic_radius_m(depth), 2.0 / 3.0) * std::sqrt(slope) / n;
      const double normal = *geometry::normal_depth_m(*s.section, slope, q);
      EXPECT_NEAR(manning_q, q, 1e-5 * q) << spec.index() << " " << to_string(k);
      EXPECT_NEAR(depth, normal, 1e-5 * normal) << spec.index() << " " << to_string(k);
      EXPECT_LE(reach->diagnostics().mass_balance_error_rel, 1e-10);
    }
  }
}

// Cross-implementation agreement: the law-specific fast paths used in the inner loops give
// the same Q and c as the law's own members (and the rectangle's celerity, claimed monotone
// by the analysis in flux_eval.hpp, is non-decreasing on a fine grid of areas).
TEST(FluxEvaluation, FastPathsAgreeWithTheLaws) {
  const PowerLawFlux law = wide_manning(12.0, 0.03, 0.004);
  for (double a : {0.0, 1e-6, 0.3, 7.0, 250.0}) {
    double q = 0.0, c = 0.0;
    detail::flux_and_celerity(law, a, q, c);
    EXPECT_NEAR(q, law.discharge_m3s(a), 1e-14 * (1.0 + q));
    EXPECT_NEAR(c, law.celerity_m_s(a), 1e-13 * (1.0 + c));
  }
  const geometry::RectangularFlux rect(4.0, 0.02, 0.01);
  ASSERT_TRUE(detail::celerity_non_decreasing(rect));
  double c_prev = 0.0;
  for (double a = 1e-4; a < 1e4; a *= 1.01) {
    const double c = rect.celerity_m_s(a);
    EXPECT_GE(c, c_prev * (1.0 - 1e-12)) << a;
    c_prev = c;
  }
}

// A part-full circular pipe's celerity falls towards the crown (and is 0 above the capacity
// area), so the reach bounds max_i c(A_i) with a running-maximum envelope: check that the
// bound is never below the celerity of any smaller area (the property the Courant check needs).
TEST(CelerityEnvelope, BoundsEverySmallerAreaForAPipe) {
  const auto pipe = geometry::make_section(geometry::CircularSpec{1.2, 0.013});
  const auto law = geometry::TabulatedFlux::from_section(*pipe, 0.005);
  ASSERT_FALSE(detail::celerity_non_decreasing(law));
  const detail::CelerityEnvelope envelope(law);
  double running_max = 0.0, worst = 0.0;
  const double full_area = 0.25 * 3.14159265358979 * 1.2 * 1.2;
  for (double a = 1e-6; a < 1.5 * full_area; a *= 1.001) {
    const double c = law.celerity_m_s(a);
    running_max = std::max(running_max, c);
    const double bound = envelope.bound(law, a, c);
    worst = std::min(worst, bound / running_max - 1.0);
  }
  std::printf("pipe celerity envelope: worst relative shortfall %.2e\n", -worst);
  EXPECT_GE(worst, 0.0);  // the table carries a 1e-3 margin for c between its nodes
  EXPECT_GT(envelope.memory_bytes(), 0U);  // c falls towards the crown: the table is kept
}

// A trapezoid's celerity rises at every node of the table, so the envelope keeps no table
// and evaluates c at the node below instead: the same bound as the running maximum of c over
// the nodes (computed here directly), bit for bit, and never below c of a smaller area.
TEST(CelerityEnvelope, RisingCelerityKeepsNoTableAndGivesTheRunningMaximum) {
  const geometry::TrapezoidalFlux law(2.0, 2.0, 2.0, 0.035, 0.005);
  const detail::CelerityEnvelope envelope(law);
  EXPECT_EQ(envelope.memory_bytes(), 0U);
  EXPECT_FALSE(envelope.empty());
  double running_max = 0.0;
  for (double a = 1e-6; a < 1e5; a *= 1.003) {
    const double c = law.celerity_m_s(a);
    running_max = std::max(running_max, c);
    // The node strictly below a, as the envelope finds it, and 1.001 c there.
    const int j = static_cast<int>(std::ceil(16.0 * std::log2(a))) + 16 * 25 - 1;
    const double node_c = law.celerity_m_s(std::exp2(static_cast<double>(j - 16 * 25) / 16.0));
    const double bound = envelope.bound(law, a, c);
    EXPECT_EQ(bound, std::max(c, detail::CelerityEnvelope::kSamplingMargin * node_c)) << a;
    EXPECT_GE(bound, running_max) << a;
  }
}

// Breaking driven by the inflow hydrograph: a smooth (raised-cosine) rise from base flow,
// sampled every 1 s. The computed solution's detected formation point against the first
// crossing of characteristics launched from the inlet, t_b = min tau + c / (dc/dtau) at
// x_b = c^2 / (dc/dtau) (Lighthill & Whitham 1955, Proc. R. Soc. A 229, sec. 2.3; the
// prediction is tested alone in shock_test.cpp). Fine sampling matters: each convex kink of a
// piecewise-linear rise starts a crossing slightly earlier than the smooth curve would (with
// 10 s samples 17 s and 20 m earlier here), which the computed solution does not resolve.
TEST(DetectShock, InflowDrivenBreakingMatchesCharacteristicCrossing) {
  const PowerLawFlux law = wide_manning(30.0, 0.035, 0.002);
  const double q0 = 5.0, q_peak = 95.0, rise_s = 1800.0;
  std::vector<double> times{0.0}, values{q0};
  for (double t = 0.0; t <= rise_s; t += 1.0) {
    times.push_back(300.0 + t);
    values.push_back(q0 + (q_peak - q0) * 0.5 * (1.0 - std::cos(3.14159265358979 * t / rise_s)));
  }
  const PiecewiseLinearSeries inflow(times, values);
  const BreakingPrediction p = predict_breaking_from_inflow(law, inflow, 0.0, 2400.0, 40000);
  ASSERT_TRUE(p.breaks);
  const double length = 12000.0;
  KinematicReach<PowerLawFlux> reach({"rising", length, 3000}, law, options_for(SchemeKind::kMusclHeun));
  reach.set_uniform_discharge(q0);
  for (double t = 0.0; t < 4000.0; t += 10.0) (void)reach.advance(t, t + 10.0, inflow, LateralInflow::none());
  const ShockReport& s = reach.shock_report();
  ASSERT_TRUE(s.formed);
  std::printf("inflow-driven breaking: predicted x %.0f m t %.0f s; detected x %.0f m t %.0f s\n",
              p.position_m, p.time_s, s.formation_position_m, s.formation_time_s);
  EXPECT_NEAR(s.formation_position_m, p.position_m, 0.02 * p.position_m);
  EXPECT_NEAR(s.formation_time_s, p.time_s, 0.02 * p.time_s);
}

}  // namespace
}  // namespace freshet::routing
