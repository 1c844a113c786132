// Shock reports on flood hydrographs routed through a reach with the network's coupling step:
// a rising limb that breaks near the inlet must be reported, one whose characteristics cross
// only beyond the outlet must not. The breaking point is the exact one from characteristics
// launched at the inlet, x_b = min over tau of c^2 / (dc/dtau) (Whitham 1974, Linear and
// Nonlinear Waves, sec. 2.8; predict_breaking_from_inflow, checked in shock_test.cpp).
#include <gtest/gtest.h>

#include <string>

#include "freshet/routing/kinematic_reach.hpp"
#include "freshet/routing/shock.hpp"
#include "routing_test_support.hpp"

namespace freshet::routing {
namespace {

using geometry::PowerLawFlux;
using testing::options_for;
using testing::wide_manning;

struct RouteOutcome {
  int formed = 0;
  bool reached_outlet = false;
};

RouteOutcome route(const PowerLawFlux& law, const PiecewiseLinearSeries& inflow, double length_m,
          int cells, SchemeKind scheme, double coupling_s, double end_s) {
  KinematicReach<PowerLawFlux> reach({"reach", length_m, cells}, law, options_for(scheme));
  reach.set_uniform_discharge(inflow.value_at(0.0));
  for (double t = 0.0; t < end_s; t += coupling_s) {
    const AdvanceResult r = reach.advance(t, t + coupling_s, inflow, LateralInflow::none());
    EXPECT_TRUE(r.ok()) << r.message;
  }
  RouteOutcome out;
  for (const ShockReport& s : reach.shock_reports()) {
    if (!s.formed) continue;
    ++out.formed;
    out.reached_outlet = out.reached_outlet || s.reached_outlet;
  }
  return out;
}

// A 1500 m channel, b 20 m, S 0.02, n 0.035 (wide), fed 1 -> 40 -> 1 m3/s (rise 10-20 min):
// the rise breaks within the first tenth of the reach, and the shock reaches the outlet.
// Reported with 10 s coupling steps. KNOWN GAP (docs/cautions.md): with 60 s steps the
// detector misses this shock on these grids, because the captured front has the rest of the
// rising limb right behind it and fails the steepness test at every observation; the
// hydrograph itself is right. The 60 s results are recorded, not asserted.
TEST(ShockReporting, AFrontBreakingNearTheInletIsReported) {
  const PowerLawFlux law = wide_manning(20.0, 0.035, 0.02);
  const PiecewiseLinearSeries inflow({0.0, 600.0, 1200.0, 3600.0, 10800.0},
                                     {1.0, 1.0, 40.0, 1.0, 1.0});
  const BreakingPrediction b = predict_breaking_from_inflow(law, inflow, 0.0, 3600.0);
  ASSERT_TRUE(b.breaks);
  ASSERT_LT(b.position_m, 0.1 * 1500.0);
  for (SchemeKind scheme : {SchemeKind::kExplicitUpwind, SchemeKind::kMusclHeun}) {
    for (int cells : {60, 150}) {
      const RouteOutcome r = route(law, inflow, 1500.0, cells, scheme, 10.0, 3600.0);
      EXPECT_GE(r.formed, 1) << to_string(scheme) << ", " << cells << " cells, 10 s";
      EXPECT_TRUE(r.reached_outlet) << to_string(scheme) << ", " << cells << " cells, 10 s";
      const RouteOutcome coarse = route(law, inflow, 1500.0, cells, scheme, 60.0, 3600.0);
      RecordProperty(std::string(to_string(scheme)) + "_" + std::to_string(cells) +
                         "_cells_60s_shocks",
                     coarse.formed);
    }
  }
}

// A slow rise on a base flow (5 -> 8 m3/s over 3 h) whose characteristics cross only far
// beyond a 2 km reach: no shock may be reported.
TEST(ShockReporting, ACompressionThatBreaksBeyondTheOutletIsNotReported) {
  const PowerLawFlux law = wide_manning(20.0, 0.035, 0.002);
  const PiecewiseLinearSeries inflow({0.0, 600.0, 11400.0, 22200.0, 30000.0},
                                     {5.0, 5.0, 8.0, 5.0, 5.0});
  const BreakingPrediction b = predict_breaking_from_inflow(law, inflow, 0.0, 22200.0);
  ASSERT_TRUE(b.breaks);
  ASSERT_GT(b.position_m, 3.0 * 2000.0);
  for (SchemeKind scheme : {SchemeKind::kExplicitUpwind, SchemeKind::kMusclHeun}) {
    for (int cells : {40, 200}) {
      for (double coupling_s : {10.0, 60.0, 300.0}) {
        EXPECT_EQ(route(law, inflow, 2000.0, cells, scheme, coupling_s, 20000.0).formed, 0)
            << to_string(scheme) << ", " << cells << " cells, " << coupling_s << " s";
      }
    }
  }
}

}  // namespace
}  // namespace freshet::routing
