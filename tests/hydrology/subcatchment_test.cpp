#include "freshet/hydrology/subcatchment.hpp"

#include <cmath>
#include <gtest/gtest.h>

#include "freshet/hydrology/composite_loss.hpp"
#include "freshet/hydrology/curve_number.hpp"
#include "freshet/hydrology/green_ampt.hpp"
#include "freshet/hydrology/initial_continuing_loss.hpp"
#include "freshet/hydrology/nrcs_distribution.hpp"

namespace freshet::hydrology {
namespace {

constexpr double kMmPerHour = 1e-3 / 3600.0;

routing::RoutingOptions muscl() {
  routing::RoutingOptions o;
  o.scheme = routing::SchemeKind::kMusclHeun;
  return o;
}

// With no losses and constant rain the subcatchment is one kinematic plane of width
// W = A / L: at equilibrium Q = i A (Wooding 1965), reached at t_e = (L i^(1-m)/alpha)^(1/m).
TEST(Subcatchment, LosslessConstantRainReachesEquilibriumDischargeIA) {
  const double i = 40.0 * kMmPerHour;
  const OverlandPlaneSpec plane{.name = "heron-yard", .length_m = 50.0, .slope = 0.02,
                                .manning_n = 0.05, .cell_count = 100};
  const double t_e = kinematic_plane_equilibrium_time_s(plane.flux(), 50.0, i);
  const auto rain = Hyetograph::from_uniform_intensities(0.0, 2.0 * t_e, {i});
  Subcatchment yard({.name = "heron-yard", .area_m2 = 5000.0, .planes = {plane},
                     .drain = {.kind = DrainKind::node, .target = "heron-pit"}},
                    rain, std::make_unique<InitialContinuingLoss>(InitialContinuingParameters{},
                                                                 "subcatchment 'heron-yard'"),
                    muscl());
  EXPECT_DOUBLE_EQ(yard.width_m(), 100.0);
  SubcatchmentStep s;
  for (double t = 0.0; t < 2.0 * t_e - 1e-9; t += t_e / 20.0) s = yard.advance(t, t + t_e / 20.0);
  EXPECT_NEAR(s.runoff_end_m3s, i * 5000.0, 1e-3 * i * 5000.0);
  EXPECT_EQ(s.lateral_mean_m2s, 0.0);
}

// Volume: rain = losses + runoff + water still on the planes, to round-off, over an NRCS
// Type II storm on a two-plane cascade with an impervious share, stepped at 7 minutes
// (so steps straddle the storm's 6-minute blocks).
TEST(Subcatchment, VolumeBalanceClosesAndReachDrainSpreadsRunoff) {
  const Hyetograph storm = nrcs_24h_storm(NrcsRainType::type_ii, 0.090, 360.0);
  auto pervious = std::make_unique<GreenAmptLoss>(
      GreenAmptParameters{.hydraulic_conductivity_m_s = 3.4 * kMmPerHour,
                          .suction_head_m = 0.1101, .porosity = 0.463,
                          .effective_porosity = 0.434, .initial_effective_saturation = 0.25},
      "subcatchment 'alder'");
  Subcatchment alder(
      {.name = "alder", .area_m2 = 36000.0,
       .planes = {{.name = "alder-roofs", .length_m = 30.0, .slope = 0.03, .manning_n = 0.015,
                   .cell_count = 30},
                  {.name = "alder-lawn", .length_m = 90.0, .slope = 0.015, .manning_n = 0.24,
                   .cell_count = 60}},
       .drain = {.kind = DrainKind::reach, .target = "mill-race", .reach_length_m = 450.0}},
      storm,
      std::make_unique<CompositeLoss>(ImperviousCover{.fraction = 0.3,
                                                      .depression_storage_m = 0.0015},
                                      std::move(pervious), "subcatchment 'alder'"));
  double runoff_m3 = 0.0;
  for (double t = 0.0; t < 30.0 * 3600.0; t += 420.0) {
    const SubcatchmentStep s = alder.advance(t, t + 420.0);
    runoff_m3 += s.runoff_mean_m3s * 420.0;
    EXPECT_NEAR(s.lateral_mean_m2s * 450.0, s.runoff_mean_m3s, 1e-15);
  }
  const SubcatchmentLedger l = alder.ledger();
  EXPECT_NEAR(l.rain_m3, 0.090 * 36000.0, 1e-9);
  EXPECT_NEAR(l.runoff_m3, runoff_m3, 1e-9 * l.rain_m3);
  EXPECT_GT(l.runoff_m3, 0.1 * l.rain_m3);
  EXPECT_NEAR(l.closure_error_m3(), 0.0, 1e-12 * l.rain_m3);
  alder.reset();
  EXPECT_EQ(alder.ledger().rain_m3, 0.0);
  EXPECT_EQ(alder.ledger().storage_m3, 0.0);
}

TEST(Subcatchment, RejectsBadSpecsNamingTheSubcatchment) {
  const auto rain = Hyetograph::from_uniform_intensities(0.0, 600.0, {1e-6});
  try {
    Subcatchment bad({.name = "wren", .area_m2 = -1.0, .planes = {},
                      .drain = {.kind = DrainKind::reach, .target = "", .reach_length_m = 0.0}},
                     rain,
                     std::make_unique<CurveNumberLoss>(CurveNumberParameters{.curve_number = 70},
                                                       "subcatchment 'wren'"));
    FAIL();
  } catch (const InputError& e) {
    ASSERT_EQ(e.problems().size(), 4u);
    EXPECT_EQ(e.problems()[0].to_string(), "subcatchment 'wren', field 'area_m2' = -1: must be > 0");
    EXPECT_EQ(e.problems()[3].to_string(),
              "subcatchment 'wren', field 'drain.reach_length_m' = 0: must be > 0");
  }
}

}  // namespace
}  // namespace freshet::hydrology
