// Every shock of a run: two Riemann-type fronts launched by an inflow that steps up twice.
//
// A wide Manning channel, Q = alpha A^(5/3), starts in uniform flow Q0. The inflow steps to Q1
// at t = 0 and to Q2 at t = t2. Each step is a Riemann problem at the inlet with the deeper
// state upstream: a kinematic shock leaves x = 0 at once and moves at the Rankine-Hugoniot
// speed U = (Q_L - Q_R) / (A_L - A_R) (Lighthill & Whitham 1955, On kinematic waves I, Proc.
// R. Soc. A 229, sec. 2.3; LeVeque 2002, Finite Volume Methods for Hyperbolic Problems,
// eq. 11.21), so it reaches the outlet at t_launch + L / U. The second shock is faster
// (c increases with A) and catches the first at x = U1 U2 t2 / (U2 - U1); after that one
// shock joins Q2 to Q0 and moves at (Q2 - Q0) / (A2 - A0) (Whitham 1974, Linear and Nonlinear
// Waves, sec. 2.8, shock interaction: the Rankine-Hugoniot condition across the merged jump).
#include <gtest/gtest.h>

#include <cstdio>
#include <string>

#include "freshet/routing/kinematic_reach.hpp"
#include "freshet/routing/shock.hpp"
#include "routing_test_support.hpp"

namespace freshet::routing {
namespace {

using geometry::PowerLawFlux;
using testing::options_for;
using testing::wide_manning;

constexpr double kQ0 = 5.0, kQ1 = 20.0, kQ2 = 80.0;  // m3/s: base, first and second steps
constexpr double kLength = 6000.0;
constexpr int kCells = 1200;  // dx = 5 m
const PowerLawFlux kLaw = wide_manning(30.0, 0.035, 0.002);

double rankine_hugoniot(double q_left, double q_right) {
  return (q_left - q_right) /
         (kLaw.area_for_discharge_m2(q_left) - kLaw.area_for_discharge_m2(q_right));
}

// Routes the two-step inflow (each step a 1 s ramp) to t_end_s, observing every 10 s.
RoutingOptions scheme_options(SchemeKind scheme) {
  RoutingOptions opt = options_for(scheme);
  opt.implicit_courant = 1.0;  // accuracy: at larger Courant the implicit front smears widely
  return opt;
}

std::vector<ShockReport> route_two_steps(SchemeKind scheme, double t2_s, double t_end_s) {
  KinematicReach<PowerLawFlux> reach({"two-steps", kLength, kCells}, kLaw, scheme_options(scheme));
  reach.set_uniform_discharge(kQ0);
  const PiecewiseLinearSeries inflow({0.0, 1.0, t2_s, t2_s + 1.0}, {kQ0, kQ1, kQ1, kQ2});
  for (double t = 0.0; t < t_end_s; t += 10.0) {
    (void)reach.advance(t, t + 10.0, inflow, LateralInflow::none());
  }
  EXPECT_EQ(reach.diagnostics().shocks_found, static_cast<int>(reach.shock_reports().size()));
  EXPECT_EQ(&reach.shock_report(), &reach.shock_reports().front());
  return reach.shock_reports();
}

void expect_arrives(const ShockReport& s, double launch_s, double speed_exact, const char* what,
                    SchemeKind scheme) {
  const std::string label = std::string(what) + " " + std::string(to_string(scheme));
  const double arrival_exact = launch_s + kLength / speed_exact;
  std::printf("[%s] formed t %.1f s x %.1f m; fitted %.4f m/s, mean RH %.4f m/s, exact RH %.4f "
              "(%+.3f%%); arrival %.1f s (exact %.1f, %+.3f%%)\n",
              label.c_str(), s.formation_time_s, s.formation_position_m, s.speed_m_s,
              s.rankine_hugoniot_m_s, speed_exact, 100.0 * (s.speed_m_s / speed_exact - 1.0),
              s.outlet_arrival_time_s, arrival_exact,
              100.0 * (s.outlet_arrival_time_s / arrival_exact - 1.0));
  EXPECT_TRUE(s.formed) << label;
  EXPECT_FALSE(s.ended) << label;
  EXPECT_NEAR(s.speed_m_s, speed_exact, 0.01 * speed_exact) << label;
  // The mean of the sampled plateau states' speeds: 2% (the implicit front is widest).
  EXPECT_NEAR(s.rankine_hugoniot_m_s, speed_exact, 0.02 * speed_exact) << label;
  ASSERT_TRUE(s.reached_outlet) << label;
  EXPECT_NEAR(s.outlet_arrival_time_s, arrival_exact, 0.01 * arrival_exact) << label;
  // Born at the inlet when its step arrives (the first sample lies a few cells downstream).
  EXPECT_GE(s.formation_time_s, launch_s - 1.0) << label;
  EXPECT_LT(s.formation_position_m, 0.05 * kLength) << label;
}

class TwoShocks : public ::testing::TestWithParam<SchemeKind> {};

// Long gap: the first shock has left through the outlet before the second step arrives.
TEST_P(TwoShocks, InSequenceBothDetectedAtRankineHugoniotSpeed) {
  const double u1 = rankine_hugoniot(kQ1, kQ0), u2 = rankine_hugoniot(kQ2, kQ1);
  const double t2 = kLength / u1 + 400.0;
  const auto shocks = route_two_steps(GetParam(), t2, t2 + kLength / u2 + 600.0);
  ASSERT_EQ(shocks.size(), 2u);
  expect_arrives(shocks[0], 0.0, u1, "first", GetParam());
  expect_arrives(shocks[1], t2, u2, "second", GetParam());
}

// Both shocks in the reach at once, the second too late to catch the first inside it.
TEST_P(TwoShocks, OverlappingInTheReachBothTracked) {
  const double u1 = rankine_hugoniot(kQ1, kQ0), u2 = rankine_hugoniot(kQ2, kQ1);
  const double t2 = 0.6 * kLength / u1;
  ASSERT_GT(u1 * u2 * t2 / (u2 - u1), 1.2 * kLength);  // catch-up point beyond the outlet
  const auto shocks = route_two_steps(GetParam(), t2, t2 + kLength / u2 + 600.0);
  ASSERT_EQ(shocks.size(), 2u);
  expect_arrives(shocks[0], 0.0, u1, "first", GetParam());
  expect_arrives(shocks[1], t2, u2, "second", GetParam());
}

// The second shock overtakes the first inside the reach: the first ends there (not at the
// outlet) and the merged shock reaches the outlet at the time the merged jump's
// Rankine-Hugoniot speed gives.
TEST_P(TwoShocks, OvertakingShockMergesAndReachesTheOutlet) {
  const double u1 = rankine_hugoniot(kQ1, kQ0), u2 = rankine_hugoniot(kQ2, kQ1);
  const double u12 = rankine_hugoniot(kQ2, kQ0);
  const double t2 = 1000.0;
  const double t_meet = u2 * t2 / (u2 - u1), x_meet = u1 * t_meet;
  ASSERT_LT(x_meet, 0.6 * kLength);
  const double arrival_exact = t_meet + (kLength - x_meet) / u12;
  const auto shocks = route_two_steps(GetParam(), t2, arrival_exact + 600.0);
  ASSERT_EQ(shocks.size(), 2u);
  const ShockReport &first = shocks[0], &second = shocks[1];
  std::printf("[%s] merge: first ended at %.1f s (exact meeting %.1f s); merged arrival %.1f s "
              "(exact %.1f, %+.3f%%)\n",
              std::string(to_string(GetParam())).c_str(), first.end_time_s, t_meet,
              second.outlet_arrival_time_s, arrival_exact,
              100.0 * (second.outlet_arrival_time_s / arrival_exact - 1.0));
  EXPECT_TRUE(first.ended);
  EXPECT_FALSE(first.reached_outlet);
  // The first shock's search window (plateau_cells either side of its predicted position)
  // takes in the second's larger drop once the two are within two windows of each other;
  // its last own sample lies at most one observation (10 s) before that.
  const double window_m = resolved_shock_options(scheme_options(GetParam())).plateau_cells *
                          kLength / kCells;
  EXPECT_LE(first.end_time_s, t_meet);
  EXPECT_GE(first.end_time_s, t_meet - 2.0 * window_m / (u2 - u1) - 10.0);
  EXPECT_NEAR(first.speed_m_s, u1, 0.01 * u1);
  ASSERT_TRUE(second.reached_outlet);
  EXPECT_NEAR(second.outlet_arrival_time_s, arrival_exact, 0.01 * arrival_exact);
  const ShockSample& last = second.path.back();  // after the merge: the outer states
  EXPECT_NEAR(last.rankine_hugoniot_m_s, u12, 0.01 * u12);
}

INSTANTIATE_TEST_SUITE_P(Schemes, TwoShocks,
                         ::testing::Values(SchemeKind::kExplicitUpwind, SchemeKind::kMusclHeun,
                                           SchemeKind::kImplicitUpwind),
                         [](const auto& param_info) {
                           std::string s(to_string(param_info.param));
                           for (char& ch : s) ch = ch == '-' ? '_' : ch;
                           return s;
                         });

}  // namespace
}  // namespace freshet::routing
