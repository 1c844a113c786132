// Kinematic-shock prediction from characteristics and detection in computed solutions.
#include "freshet/routing/shock.hpp"

#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <vector>

#include "freshet/routing/kinematic_reach.hpp"
#include "freshet/verification/problems.hpp"
#include "routing_test_support.hpp"

namespace freshet::routing {
namespace {

using geometry::PowerLawFlux;
using testing::burgers;
using testing::cell_center_m;
using testing::options_for;
using testing::wide_manning;

// Burgers' equation (Q = A^2/2, c = A) with A0 = 1 + exp(-((x - x0)/w)^2). Characteristics
// x = xi + A0(xi) t first cross at t_b = -1 / min A0'(xi) (Whitham 1974, Linear and
// Nonlinear Waves, eq. 2.14; LeVeque 2002, Finite Volume Methods for Hyperbolic Problems,
// sec. 11.3). min A0' is at xi* = x0 + w / sqrt(2): A0'(xi*) = -sqrt(2) e^(-1/2) / w, so
// t_b = w e^(1/2) / sqrt(2), and the break is at x_b = xi* + A0(xi*) t_b. The bump (x0 = 3,
// w = 1) is written once in freshet/verification/problems.hpp, shared with `freshet verify`.
const verification::BurgersBump kBump;
double gaussian_bump(double x) { return kBump.initial_area_m2(x); }
const double kBreakTime = kBump.breaking_time_s();
const double kBreakPosition = kBump.breaking_position_m();

TEST(PredictBreaking, FromProfileMatchesExactBurgersBreakingTime) {
  std::vector<double> x, a;
  for (int i = 0; i < 2000; ++i) {
    x.push_back(cell_center_m(i, 0.005));
    a.push_back(gaussian_bump(x.back()));
  }
  const BreakingPrediction p = predict_breaking_from_profile(burgers(), x, a);
  ASSERT_TRUE(p.breaks);
  std::printf("predicted t_b %.6f (exact %.6f), x_b %.6f (exact %.6f)\n", p.time_s, kBreakTime,
              p.position_m, kBreakPosition);
  EXPECT_NEAR(p.time_s, kBreakTime, 1e-4 * kBreakTime);
  EXPECT_NEAR(p.position_m, kBreakPosition, 1e-4 * kBreakPosition);
}

TEST(PredictBreaking, ExpansionOnlyProfileDoesNotBreak) {
  std::vector<double> x, a;
  for (int i = 0; i < 100; ++i) {
    x.push_back(i * 1.0);
    a.push_back(10.0 + 0.1 * i);  // deeper downstream: characteristics diverge
  }
  EXPECT_FALSE(predict_breaking_from_profile(wide_manning(10, 0.03, 1e-3), x, a).breaks);
}

// Inflow rising linearly from Q0 at rate r into a power-law channel Q = alpha A^m:
// c ~ Q^((m-1)/m), dc/dtau = ((m-1)/m) c r / Q, so c^2 / (dc/dtau) = m c Q / ((m-1) r),
// smallest at the foot of the rise: x_b = m c(Q0) Q0 / ((m-1) r), t_b = tau0 + x_b / c(Q0)
// (characteristic crossing, Lighthill & Whitham 1955, Proc. R. Soc. A 229, sec. 2.3).
TEST(PredictBreaking, FromInflowMatchesCharacteristicCrossing) {
  const PowerLawFlux law = wide_manning(30.0, 0.035, 0.002);
  const double q0 = 5.0, rate = 0.05, tau0 = 600.0;
  const PiecewiseLinearSeries inflow({0.0, tau0, tau0 + 1200.0}, {q0, q0, q0 + rate * 1200.0});
  const BreakingPrediction p = predict_breaking_from_inflow(law, inflow, 0.0, 3600.0, 40000);
  const double m = law.exponent();
  const double c0 = law.celerity_m_s(law.area_for_discharge_m2(q0));
  const double x_exact = m * c0 * q0 / ((m - 1.0) * rate);
  const double t_exact = tau0 + x_exact / c0;
  ASSERT_TRUE(p.breaks);
  std::printf("inflow breaking: x_b %.2f m (exact %.2f), t_b %.1f s (exact %.1f)\n", p.position_m,
              x_exact, p.time_s, t_exact);
  EXPECT_NEAR(p.position_m, x_exact, 0.005 * x_exact);
  EXPECT_NEAR(p.time_s, t_exact, 0.005 * t_exact);
  EXPECT_NEAR(p.nearest_position_m, x_exact, 0.005 * x_exact);  // same point for a linear rise
}

// The computed Burgers solution must show a persistent steep front forming within 2% of the
// exact breaking time and position (same references as above). Grid: w / dx = 400.
TEST(DetectShock, BurgersBreakingTimeAndPositionWithinTwoPercent) {
  for (SchemeKind scheme : {SchemeKind::kExplicitUpwind, SchemeKind::kMusclHeun}) {
    const double length = 10.0, dx = 0.0025;
    const int cells = static_cast<int>(length / dx);
    KinematicReach<PowerLawFlux> reach({"burgers", length, cells}, burgers(), options_for(scheme));
    std::vector<double> a0(static_cast<std::size_t>(cells));
    std::vector<double> x(a0.size());
    for (int i = 0; i < cells; ++i) {
      x[static_cast<std::size_t>(i)] = cell_center_m(i, dx);
      a0[static_cast<std::size_t>(i)] = gaussian_bump(x[static_cast<std::size_t>(i)]);
    }
    reach.set_initial_areas(a0);
    const auto inflow = PiecewiseLinearSeries::constant(0.5);  // Q(1) upstream
    const double dt_obs = kBreakTime / 400.0;
    for (int k = 0; k < 600; ++k) {
      (void)reach.advance(k * dt_obs, (k + 1) * dt_obs, inflow, LateralInflow::none());
    }
    const ShockReport& s = reach.shock_report();
    ASSERT_TRUE(s.formed) << to_string(scheme);
    std::printf("[%s] detected t_b %.4f (exact %.4f, %+.2f%%), x_b %.4f (exact %.4f, %+.2f%%)\n",
                std::string(to_string(scheme)).c_str(), s.formation_time_s, kBreakTime,
                100.0 * (s.formation_time_s / kBreakTime - 1.0), s.formation_position_m,
                kBreakPosition, 100.0 * (s.formation_position_m / kBreakPosition - 1.0));
    EXPECT_NEAR(s.formation_time_s, kBreakTime, 0.02 * kBreakTime) << to_string(scheme);
    EXPECT_NEAR(s.formation_position_m, kBreakPosition, 0.02 * kBreakPosition) << to_string(scheme);
    EXPECT_EQ(reach.diagnostics().shocks_found, 1);
  }
}

TEST(DetectShock, RarefactionIsNotReportedAsShock) {
  const PowerLawFlux law = wide_manning(20.0, 0.03, 0.002);
  KinematicReach<PowerLawFlux> reach({"fan", 4000.0, 400}, law);
  std::vector<double> a(400, 40.0);
  std::fill(a.begin(), a.begin() + 50, 10.0);
  reach.set_initial_areas(a);
  const auto inflow = PiecewiseLinearSeries::constant(law.discharge_m3s(10.0));
  for (double t = 0.0; t < 600.0; t += 10.0) (void)reach.advance(t, t + 10.0, inflow, LateralInflow::none());
  EXPECT_FALSE(reach.shock_report().formed);
}

}  // namespace
}  // namespace freshet::routing
