// Reach model: options, input errors, volume ledger for every scheme, dry reach, steady flow.
#include "freshet/routing/kinematic_reach.hpp"

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>

#include "routing_test_support.hpp"

namespace freshet::routing {
namespace {

using geometry::PowerLawFlux;
using testing::kAllSchemes;
using testing::options_for;
using testing::wide_manning;
using ::testing::HasSubstr;

TEST(RoutingOptions, DefaultsAreValid) {
  EXPECT_TRUE(RoutingOptions{}.validate().empty());
  EXPECT_TRUE(ShockDetectionOptions{}.validate().empty());
}

TEST(RoutingOptions, ReportsEveryBadValueAtOnce) {
  RoutingOptions opt;
  opt.courant_target = 1.5;       // above the limit
  opt.ode_rel_tolerance = 0.0;    // must be > 0
  opt.shock.persistence = 0;      // must be >= 1
  const auto problems = opt.validate();
  ASSERT_EQ(problems.size(), 3u);
  EXPECT_EQ(problems[0].field, "courant_target");
  EXPECT_THAT(problems[0].message, HasSubstr("= 1.5"));
  EXPECT_EQ(problems[1].field, "ode_rel_tolerance");
  EXPECT_EQ(problems[2].field, "persistence");
}

TEST(RoutingOptions, SchemeAndLimiterNamesRoundTrip) {
  for (SchemeKind k : kAllSchemes) EXPECT_EQ(parse_scheme_kind(to_string(k)), k);
  for (Limiter l : {Limiter::kMinmod, Limiter::kVanLeer}) EXPECT_EQ(parse_limiter(to_string(l)), l);
  try {
    (void)parse_scheme_kind("upwind");
    FAIL() << "expected InputError";
  } catch (const InputError& e) {
    EXPECT_THAT(e.what(), HasSubstr("'upwind'"));
    EXPECT_THAT(e.what(), HasSubstr("explicit-upwind, implicit-upwind"));
  }
}

TEST(KinematicReach, RejectsBadSpecListingEveryProblem) {
  RoutingOptions opt;
  opt.min_dt_s = -1.0;
  try {
    KinematicReach<PowerLawFlux> reach({"mill-race", -5.0, 0}, wide_manning(10, 0.03, 1e-3), opt);
    FAIL() << "expected InputError";
  } catch (const InputError& e) {
    ASSERT_EQ(e.problems().size(), 3u) << e.what();
    EXPECT_THAT(e.what(), HasSubstr("reach 'mill-race'"));
    EXPECT_THAT(e.what(), HasSubstr("length_m"));
    EXPECT_THAT(e.what(), HasSubstr("cell_count"));
    EXPECT_THAT(e.what(), HasSubstr("min_dt_s"));
  }
}

TEST(KinematicReach, RejectsNonContiguousAdvanceAndNegativeInflow) {
  KinematicReach<PowerLawFlux> reach({"mill-race", 100.0, 10}, wide_manning(10, 0.03, 1e-3));
  const auto q = PiecewiseLinearSeries::constant(1.0);
  (void)reach.advance(0.0, 10.0, q, LateralInflow::none());
  EXPECT_THROW((void)reach.advance(20.0, 30.0, q, LateralInflow::none()), InputError);
  const PiecewiseLinearSeries negative({0.0, 100.0}, {1.0, -1.0});
  try {
    (void)reach.advance(10.0, 100.0, negative, LateralInflow::none());
    FAIL() << "expected InputError";
  } catch (const InputError& e) {
    EXPECT_THAT(e.what(), HasSubstr("inflow_m3s"));
  }
}

TEST(LateralInflowTest, RejectsBadStationsAndNegativeRates) {
  try {
    LateralInflow bad({0.0, 50.0, 40.0}, {PiecewiseLinearSeries::constant(1e-3),
                                          PiecewiseLinearSeries::constant(-1e-3)});
    FAIL() << "expected InputError";
  } catch (const InputError& e) {
    EXPECT_EQ(e.problems().size(), 2u) << e.what();
  }
}

// A reach keeps its lateral map between advance() calls only while the stretches are the same
// (issue 16): when they change, the volume delivered follows the new stretches exactly
// (rate x stretch length x time: the integral of a constant, no source needed).
TEST(LateralInflowTest, NewStretchesBetweenAdvancesAreFollowed) {
  KinematicReach<PowerLawFlux> reach({"mill-race", 2000.0, 40}, wide_manning(10, 0.03, 1e-3));
  const auto q = PiecewiseLinearSeries::constant(0.0);
  const auto whole = LateralInflow::uniform(2000.0, PiecewiseLinearSeries::constant(1e-3));
  const LateralInflow lower_half({0.0, 1000.0, 2000.0}, {PiecewiseLinearSeries::constant(0.0),
                                                         PiecewiseLinearSeries::constant(1e-3)});
  double expected_m3 = 0.0;
  for (int k = 0; k < 6; ++k) {
    const bool halves = k % 3 == 1;  // whole, half, whole, whole, half, whole
    (void)reach.advance(100.0 * k, 100.0 * (k + 1), q, halves ? lower_half : whole);
    expected_m3 += (halves ? 1000.0 : 2000.0) * 1e-3 * 100.0;
    EXPECT_NEAR(reach.ledger().lateral_m3, expected_m3, 1e-12 * expected_m3) << k;
  }
}

// A hydrograph rising from base flow to a peak and back, and lateral inflow that differs in
// time and along the reach: the forcing of every volume-balance test.
struct Forcing {
  PiecewiseLinearSeries inflow{{0.0, 1800.0, 5400.0}, {2.0, 30.0, 2.0}};
  LateralInflow lateral{{0.0, 800.0, 2000.0},
                        {PiecewiseLinearSeries({0.0, 1200.0, 3600.0}, {0.0, 1e-3, 0.0}),
                         PiecewiseLinearSeries({600.0, 2400.0, 4800.0}, {0.0, 3e-3, 0.0})}};
  // Exact volumes over [0, t] (trapezoids of the piecewise-linear series).
  double lateral_volume_m3 = 800.0 * (0.5 * 1e-3 * 3600.0) + 1200.0 * (0.5 * 3e-3 * 4200.0);
};

// Volume balance inflow + lateral - outflow - change in storage = 0 to 1e-10 of the inflow
// for every scheme (a property of conservative finite volumes, LeVeque 2002, Finite Volume
// Methods for Hyperbolic Problems, sec. 2.6 / 4.1; the tolerance is round-off, not a source).
class VolumeBalance : public ::testing::TestWithParam<SchemeKind> {};

TEST_P(VolumeBalance, ClosesToRoundOffWithTimeAndSpaceVaryingLateralInflow) {
  Forcing f;
  KinematicReach<PowerLawFlux> reach({"test-reach", 2000.0, 100}, wide_manning(20, 0.035, 1e-3),
                                     options_for(GetParam()));
  reach.set_uniform_discharge(2.0);
  double handed_on_m3 = 0.0;
  for (double t = 0.0; t < 7200.0; t += 300.0) {
    const AdvanceResult r = reach.advance(t, t + 300.0, f.inflow, f.lateral);
    ASSERT_TRUE(r.ok()) << r.message;
    handed_on_m3 += r.mean_outflow_m3s * 300.0;
    for (double a : reach.cell_area_m2()) ASSERT_GE(a, 0.0);
  }
  const VolumeLedger& ledger = reach.ledger();
  const double inflow_exact = f.inflow.integral(0.0, 7200.0);
  EXPECT_NEAR(ledger.inflow_m3, inflow_exact, 1e-12 * inflow_exact);
  EXPECT_NEAR(ledger.lateral_m3, f.lateral_volume_m3, 1e-12 * f.lateral_volume_m3);
  EXPECT_NEAR(handed_on_m3, ledger.outflow_m3, 1e-12 * ledger.outflow_m3);
  const RunDiagnostics d = reach.diagnostics();
  EXPECT_LE(std::abs(ledger.balance_error_m3()), 1e-10 * ledger.inflow_m3);
  EXPECT_LE(d.mass_balance_error_rel, 1e-10);
  RecordProperty("relative_balance_error", std::to_string(d.mass_balance_error_rel));
  std::printf("[%s] %s\n", std::string(to_string(GetParam())).c_str(), d.brief_report().c_str());
}

TEST_P(VolumeBalance, DryReachWithNoInflowStaysExactlyDry) {
  KinematicReach<PowerLawFlux> reach({"dry-gulch", 500.0, 50}, wide_manning(5, 0.04, 5e-3),
                                     options_for(GetParam()));
  const AdvanceResult r =
      reach.advance(0.0, 3600.0, PiecewiseLinearSeries::constant(0.0), LateralInflow::none());
  ASSERT_TRUE(r.ok());
  for (double a : reach.cell_area_m2()) EXPECT_EQ(a, 0.0);
  EXPECT_EQ(r.outflow_m3, 0.0);
  EXPECT_EQ(reach.ledger().balance_error_m3(), 0.0);
}

// Steady uniform flow: Q_x = 0 means Q = inflow everywhere and A = Q^-1(inflow), the normal
// depth of Manning's equation (Chow 1959, Open-Channel Hydraulics, ch. 5).
TEST_P(VolumeBalance, SteadyUniformFlowIsReproducedExactly) {
  const PowerLawFlux law = wide_manning(20, 0.035, 1e-3);
  KinematicReach<PowerLawFlux> reach({"steady", 2000.0, 100}, law, options_for(GetParam()));
  reach.set_uniform_discharge(7.5);
  const AdvanceResult r =
      reach.advance(0.0, 1800.0, PiecewiseLinearSeries::constant(7.5), LateralInflow::none());
  const double normal_area = std::pow(7.5 / law.alpha(), 0.6);
  // Characteristics route the piecewise-linear flux through nodes 1e-3 apart, within
  // m (m - 1) spacing^2 / 8 = 1.4e-7 of the law (flux_nodes.hpp): the inlet state differs
  // from the normal area by that much (in area, / m); the grid schemes are exact.
  const double tol = GetParam() == SchemeKind::kCharacteristics ? 1e-7 : 1e-12;
  for (double a : reach.cell_area_m2()) EXPECT_NEAR(a, normal_area, tol * normal_area);
  // The outlet first carries Q_pl of the exact normal area: within the flux error, 1.4e-7.
  const double q_tol = GetParam() == SchemeKind::kCharacteristics ? 2e-7 : 1e-12;
  EXPECT_NEAR(r.mean_outflow_m3s, 7.5, q_tol * 7.5);
}

TEST_P(VolumeBalance, ApproachesSteadyStateFromDryBed) {
  const PowerLawFlux law = wide_manning(20, 0.035, 1e-3);
  KinematicReach<PowerLawFlux> reach({"filling", 2000.0, 100}, law, options_for(GetParam()));
  const auto q_in = PiecewiseLinearSeries::constant(7.5);
  const auto q_lat = LateralInflow::uniform(2000.0, PiecewiseLinearSeries::constant(5e-4));
  AdvanceResult r;
  for (double t = 0.0; t < 14400.0; t += 600.0) r = reach.advance(t, t + 600.0, q_in, q_lat);
  // Steady state with lateral inflow: Q(x) = Q_in + q_lat x, so Q_out = 7.5 + 1.0.
  EXPECT_NEAR(r.mean_outflow_m3s, 8.5, 1e-9 * 8.5);
  const double a_out = std::pow(8.5 / law.alpha(), 0.6);
  EXPECT_NEAR(reach.cell_area_m2().back(), std::pow((8.5 - 0.5 * 20.0 * 5e-4) / law.alpha(), 0.6),
              0.002 * a_out);  // cell-average flux sits at the cell centre: O(dx) off the outlet
}

INSTANTIATE_TEST_SUITE_P(AllSchemes, VolumeBalance, ::testing::ValuesIn(kAllSchemes),
                         [](const auto& param_info) {
                           std::string s(to_string(param_info.param));
                           std::replace(s.begin(), s.end(), '-', '_');
                           return s;
                         });

// Backward Euler upwind is unconditionally stable and positive (LeVeque 2002, sec. 8.4 for
// the linear case); a step onto a dry bed at Courant ~10 must stay non-negative and exact.
TEST(ImplicitUpwind, CourantTenOnDryBedStaysNonNegativeAndConservative) {
  RoutingOptions opt = options_for(SchemeKind::kImplicitUpwind);
  opt.implicit_courant = 10.0;
  KinematicReach<PowerLawFlux> reach({"flash", 1000.0, 200}, wide_manning(10, 0.03, 4e-3), opt);
  const PiecewiseLinearSeries flash({0.0, 60.0, 900.0}, {0.0, 40.0, 0.0});
  for (double t = 0.0; t < 1800.0; t += 120.0) {
    const AdvanceResult r = reach.advance(t, t + 120.0, flash, LateralInflow::none());
    ASSERT_TRUE(r.ok()) << r.message;
    for (double a : reach.cell_area_m2()) ASSERT_GE(a, 0.0);
  }
  const RunDiagnostics d = reach.diagnostics();
  EXPECT_GT(d.max_courant, 8.0);
  EXPECT_LE(d.mass_balance_error_rel, 1e-10);
  RecordProperty("max_courant", std::to_string(d.max_courant));
  std::printf("%s\n", d.brief_report().c_str());
}

TEST(KinematicReach, PerCellLawsRouteSteadyFlowThroughASlopeBreak) {
  // Upper half steep, lower half mild: steady Q gives each cell its own normal area.
  std::vector<PowerLawFlux> laws(40, wide_manning(15, 0.03, 4e-3));
  std::fill(laws.begin() + 20, laws.end(), wide_manning(15, 0.03, 5e-4));
  for (SchemeKind k : testing::kGridSchemes) {
    KinematicReach<PowerLawFlux> reach({"slope-break", 800.0, 40}, laws, options_for(k));
    const auto q_in = PiecewiseLinearSeries::constant(6.0);
    for (double t = 0.0; t < 7200.0; t += 900.0) (void)reach.advance(t, t + 900.0, q_in, LateralInflow::none());
    // The method of lines approaches steady state only to its error tolerance (rel 1e-8).
    const double tol = k == SchemeKind::kMethodOfLines ? 1e-6 : 1e-9;
    EXPECT_NEAR(reach.cell_area_m2()[5], laws[5].area_for_discharge_m2(6.0), tol) << to_string(k);
    EXPECT_NEAR(reach.cell_area_m2()[35], laws[35].area_for_discharge_m2(6.0), tol) << to_string(k);
    EXPECT_LE(reach.diagnostics().mass_balance_error_rel, 1e-10);
    EXPECT_LT(reach.memory_bytes_per_cell(), 64.0 + sizeof(PowerLawFlux));
  }
}

// Front tracking needs one flux law along the reach: per-cell laws are refused with a
// message naming the reach and the scheme, not routed wrongly.
TEST(KinematicReach, CharacteristicsRefusePerCellLawsWithAMessage) {
  std::vector<PowerLawFlux> laws(40, wide_manning(15, 0.03, 4e-3));
  std::fill(laws.begin() + 20, laws.end(), wide_manning(15, 0.03, 5e-4));
  RoutingOptions opt = options_for(SchemeKind::kCharacteristics);
  opt.throw_on_failure = false;
  KinematicReach<PowerLawFlux> reach({"slope-break", 800.0, 40}, laws, opt);
  const AdvanceResult r = reach.advance(0.0, 900.0, PiecewiseLinearSeries::constant(6.0),
                                        LateralInflow::none());
  EXPECT_FALSE(r.ok());
  EXPECT_THAT(r.message, HasSubstr("reach 'slope-break'"));
  EXPECT_THAT(r.message, HasSubstr("one flux law for the whole reach"));
}

TEST(KinematicReach, FailureAfterBoundedRetriesIsAStatusOrNumericalError) {
  RoutingOptions opt;
  opt.min_dt_s = 50.0;  // a flood onto a dry bed needs far smaller explicit steps
  opt.throw_on_failure = false;
  const PiecewiseLinearSeries flood({0.0, 10.0}, {0.0, 500.0});
  KinematicReach<PowerLawFlux> reach({"tiny-cells", 100.0, 100}, wide_manning(10, 0.03, 0.01), opt);
  const AdvanceResult r = reach.advance(0.0, 600.0, flood, LateralInflow::none());
  EXPECT_EQ(r.status, AdvanceStatus::kStepTooSmall);
  EXPECT_THAT(r.message, HasSubstr("reach 'tiny-cells'"));
  EXPECT_THAT(r.message, HasSubstr("explicit-upwind"));
  EXPECT_THAT(r.message, HasSubstr("min_dt_s"));
  EXPECT_LE(reach.ledger().relative_balance_error(), 1e-10);  // the partial run still balances
  opt.throw_on_failure = true;
  KinematicReach<PowerLawFlux> throwing({"tiny-cells", 100.0, 100}, wide_manning(10, 0.03, 0.01), opt);
  EXPECT_THROW((void)throwing.advance(0.0, 600.0, flood, LateralInflow::none()), NumericalError);
}

// The method of lines honours the user's tolerances: tighter tolerances take more steps and
// move the outflow by no more than the looser tolerance allows; both ledgers close.
TEST(MethodOfLines, TolerancesControlStepsAndAccuracy) {
  Forcing f;
  auto run = [&](double rel_tol) {
    RoutingOptions opt = options_for(SchemeKind::kMethodOfLines);
    opt.ode_rel_tolerance = rel_tol;
    opt.ode_abs_tolerance_m2 = rel_tol * 1e-2;
    KinematicReach<PowerLawFlux> reach({"mol", 2000.0, 100}, wide_manning(20, 0.035, 1e-3), opt);
    reach.set_uniform_discharge(2.0);
    std::vector<double> out;
    for (double t = 0.0; t < 7200.0; t += 300.0) out.push_back(reach.advance(t, t + 300.0, f.inflow, f.lateral).mean_outflow_m3s);
    EXPECT_LE(reach.diagnostics().mass_balance_error_rel, 1e-10);
    return std::make_pair(reach.diagnostics().steps_taken, out);
  };
  const auto [loose_steps, loose] = run(1e-4);
  const auto [tight_steps, tight] = run(1e-10);
  EXPECT_GT(tight_steps, loose_steps);
  double worst = 0.0;
  for (std::size_t k = 0; k < loose.size(); ++k) worst = std::max(worst, std::abs(loose[k] - tight[k]) / tight[k]);
  std::printf("method of lines: %ld steps at rel 1e-4, %ld at 1e-10; largest outflow change %.2e\n",
              loose_steps, tight_steps, worst);
  EXPECT_LT(worst, 1e-3);
}

// Two reaches in series, the downstream one fed the upstream one's mean outflow per coupling
// step (the hand-over a network driver uses): the volume that leaves the first enters the
// second exactly, and the two ledgers together close.
TEST(KinematicReach, MeanOutflowHandOverIsVolumeExact) {
  Forcing f;
  KinematicReach<PowerLawFlux> upper({"upper", 2000.0, 100}, wide_manning(20, 0.035, 1e-3));
  KinematicReach<PowerLawFlux> lower({"lower", 1500.0, 60}, wide_manning(25, 0.035, 8e-4),
                                     options_for(SchemeKind::kImplicitUpwind));
  upper.set_uniform_discharge(2.0);
  lower.set_uniform_discharge(2.0);
  for (double t = 0.0; t < 7200.0; t += 300.0) {
    const AdvanceResult r = upper.advance(t, t + 300.0, f.inflow, f.lateral);
    ReachModel& downstream = lower;  // through the run-time interface, as a driver would
    (void)downstream.advance(t, t + 300.0, r.mean_outflow_m3s, LateralInflow::none());
  }
  EXPECT_NEAR(lower.ledger().inflow_m3, upper.ledger().outflow_m3, 1e-12 * upper.ledger().outflow_m3);
  const double total_error = upper.ledger().balance_error_m3() + lower.ledger().balance_error_m3();
  EXPECT_LE(std::abs(total_error), 1e-10 * upper.ledger().inflow_m3);
}

// Grid schemes hold per-cell arrays; the characteristics scheme holds its fronts (which do
// not grow with the cell count) plus the sampling arrays (three doubles per cell).
TEST(KinematicReach, StateMemoryPerCellIsUnder64Bytes) {
  for (SchemeKind k : kAllSchemes) {
    const int cells = k == SchemeKind::kCharacteristics ? 10000 : 1000;
    KinematicReach<PowerLawFlux> reach({"m", 1000.0, cells}, wide_manning(10, 0.03, 1e-3),
                                       options_for(k));
    const auto q = PiecewiseLinearSeries::constant(1.0);
    (void)reach.advance(0.0, 10.0, q, LateralInflow::uniform(1000.0, PiecewiseLinearSeries::constant(1e-4)));
    EXPECT_LT(reach.memory_bytes_per_cell(), 64.0) << to_string(k);
    RecordProperty(std::string(to_string(k)) + "_bytes_per_cell",
                   std::to_string(reach.memory_bytes_per_cell()));
  }
}

}  // namespace
}  // namespace freshet::routing
