// Schemes against exact kinematic-wave solutions: Riemann problems (shock and rarefaction),
// smooth solutions before breaking (observed order of accuracy), and a hydrograph routed
// along a wide channel (exact solution by characteristics).
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <vector>

#include "freshet/core/root_finding.hpp"
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

// Wide Manning channel 20 m wide, n = 0.03, S = 0.002 (invented), and the Riemann problems on
// it: written once in freshet/verification/problems.hpp, shared with `freshet verify`.
const PowerLawFlux kManning = verification::wide_channel();
using verification::kFanProblem;
using verification::kShockProblem;

// Riemann problem with the deeper state upstream: a kinematic shock at the Rankine-Hugoniot
// speed U = (Q_L - Q_R) / (A_L - A_R) (Lighthill & Whitham 1955, On kinematic waves I,
// Proc. R. Soc. A 229, sec. 2.3 "kinematic shock waves"; LeVeque 2002, eq. 11.21).
class RiemannShock : public ::testing::TestWithParam<SchemeKind> {};

TEST_P(RiemannShock, MovesAtRankineHugoniotSpeed) {
  const double a_left = kShockProblem.a_left_m2, x_jump = kShockProblem.x_jump_m;
  const double length = kShockProblem.length_m;
  const int cells = 800;
  const double dx = length / cells;
  RoutingOptions opt = options_for(GetParam());
  opt.implicit_courant = 1.0;  // accuracy: at larger Courant the implicit front smears widely
  KinematicReach<PowerLawFlux> reach({"riemann", length, cells}, kManning, opt);
  reach.set_initial_areas(kShockProblem.initial_areas_m2(cells));
  const double q_left = kManning.discharge_m3s(a_left);
  const double u_exact = kShockProblem.shock_speed_m_s(kManning);
  const auto inflow = PiecewiseLinearSeries::constant(q_left);
  const double t_end = 800.0;
  for (double t = 0.0; t < t_end; t += 20.0) (void)reach.advance(t, t + 20.0, inflow, LateralInflow::none());
  const ShockReport& shock = reach.shock_report();
  ASSERT_TRUE(shock.formed);
  EXPECT_NEAR(shock.speed_m_s, u_exact, 0.01 * u_exact);
  EXPECT_NEAR(shock.rankine_hugoniot_m_s, u_exact, 0.01 * u_exact);
  const double x_exact = x_jump + u_exact * t_end;
  EXPECT_NEAR(shock.path.back().position_m, x_exact, dx);
  std::printf("[%s] U exact %.5f, fitted %.5f (%.3f%%), final position %.2f vs %.2f m (dx %.1f)\n",
              std::string(to_string(GetParam())).c_str(), u_exact, shock.speed_m_s,
              100.0 * (shock.speed_m_s / u_exact - 1.0), shock.path.back().position_m, x_exact, dx);
  RecordProperty("speed_rel_error", std::to_string(shock.speed_m_s / u_exact - 1.0));
  RecordProperty("position_error_m", std::to_string(shock.path.back().position_m - x_exact));
}

TEST_P(RiemannShock, ReportsArrivalAtTheOutlet) {
  const double x_jump = kShockProblem.x_jump_m, length = kShockProblem.length_m;
  const int cells = 400;
  RoutingOptions opt = options_for(GetParam());
  opt.implicit_courant = 1.0;
  KinematicReach<PowerLawFlux> reach({"riemann", length, cells}, kManning, opt);
  reach.set_initial_areas(kShockProblem.initial_areas_m2(cells));
  const double q_left = kManning.discharge_m3s(kShockProblem.a_left_m2);
  const double u_exact = kShockProblem.shock_speed_m_s(kManning);
  const auto inflow = PiecewiseLinearSeries::constant(q_left);
  for (double t = 0.0; t < 1500.0; t += 10.0) (void)reach.advance(t, t + 10.0, inflow, LateralInflow::none());
  const ShockReport& shock = reach.shock_report();
  ASSERT_TRUE(shock.reached_outlet);
  const double arrival_exact = (length - x_jump) / u_exact;
  EXPECT_NEAR(shock.outlet_arrival_time_s, arrival_exact, 0.01 * arrival_exact);
}

INSTANTIATE_TEST_SUITE_P(Schemes, RiemannShock,
                         ::testing::Values(SchemeKind::kExplicitUpwind, SchemeKind::kImplicitUpwind,
                                           SchemeKind::kMethodOfLines, SchemeKind::kMusclHeun),
                         [](const auto& param_info) {
                           std::string s(to_string(param_info.param));
                           std::replace(s.begin(), s.end(), '-', '_');
                           return s;
                         });

// Riemann problem with the shallower state upstream: a centred rarefaction fan, c(A) = x / t
// between c(A_L) t and c(A_R) t (Lighthill & Whitham 1955; LeVeque 2002, sec. 11.10).
double rarefaction_l1_error(SchemeKind scheme, int cells, double* fan_width_out = nullptr) {
  const double a_left = kFanProblem.a_left_m2, a_right = kFanProblem.a_right_m2;
  const double x_jump = kFanProblem.x_jump_m, length = kFanProblem.length_m, t_end = 600.0;
  const double dx = length / cells;
  KinematicReach<PowerLawFlux> reach({"fan", length, cells}, kManning, options_for(scheme));
  reach.set_initial_areas(kFanProblem.initial_areas_m2(cells));
  const auto inflow = PiecewiseLinearSeries::constant(kManning.discharge_m3s(a_left));
  (void)reach.advance(0.0, t_end, inflow, LateralInflow::none());
  double err = 0.0;
  for (int i = 0; i < cells; ++i) {
    const double xi = (cell_center_m(i, dx) - x_jump) / t_end;
    err += std::abs(reach.cell_area_m2()[static_cast<std::size_t>(i)] - kFanProblem.rarefaction_area_m2(kManning, xi)) * dx;
  }
  const double fan_width = (kManning.celerity_m_s(a_right) - kManning.celerity_m_s(a_left)) * t_end;
  if (fan_width_out) *fan_width_out = fan_width;
  return err / ((a_right - a_left) * fan_width);
}

TEST(Rarefaction, MatchesExactFanAndConvergesUnderRefinement) {
  for (SchemeKind k : {SchemeKind::kExplicitUpwind, SchemeKind::kMusclHeun}) {
    const double coarse = rarefaction_l1_error(k, 400);
    const double fine = rarefaction_l1_error(k, 1600);
    std::printf("[%s] rarefaction relative L1 error: %.3e (dx 10 m), %.3e (dx 2.5 m)\n",
                std::string(to_string(k)).c_str(), coarse, fine);
    EXPECT_LT(fine, 0.01) << to_string(k);
    EXPECT_LT(fine, 0.5 * coarse) << to_string(k);
  }
}

// Smooth data before breaking: the exact solution of A_t + Q(A)_x = 0 is A = A0(x - c(A) t)
// (method of characteristics; Whitham 1974, Linear and Nonlinear Waves, eq. 2.9), solved here
// by a safeguarded Newton iteration per point. Burgers' flux Q = A^2/2, c = A.
double bump(double x) { return 1.0 + 0.5 * std::exp(-std::pow(x - 3.0, 2)); }
double bump_slope(double x) { return -(x - 3.0) * std::exp(-std::pow(x - 3.0, 2)); }

double characteristic_solution(double x, double t) {
  auto fdf = [&](double a, double& f, double& df) {
    f = a - bump(x - a * t);
    df = 1.0 + bump_slope(x - a * t) * t;
  };
  const RootResult r = solve_bracketed_newton(fdf, 1.0 - 1e-12, 1.5 + 1e-12);
  return r.x;
}

// Exact cell average by 3-point Gauss-Legendre quadrature (Abramowitz & Stegun 1964, 25.4.29).
double exact_cell_average(double x0, double x1, double t) {
  const double mid = 0.5 * (x0 + x1), half = 0.5 * (x1 - x0), g = std::sqrt(0.6);
  return (5.0 * characteristic_solution(mid - g * half, t) +
          8.0 * characteristic_solution(mid, t) +
          5.0 * characteristic_solution(mid + g * half, t)) / 18.0;
}

double smooth_l1_error(SchemeKind scheme, int cells, double t_end,
                       Limiter limiter = Limiter::kVanLeer) {
  const double length = 12.0, dx = length / cells;
  RoutingOptions opt = options_for(scheme);
  opt.limiter = limiter;
  opt.implicit_courant = 0.9;  // convergence under refinement at a fixed Courant number
  KinematicReach<PowerLawFlux> reach({"smooth", length, cells}, burgers(), opt);
  std::vector<double> a0(static_cast<std::size_t>(cells));
  for (int i = 0; i < cells; ++i) a0[static_cast<std::size_t>(i)] = exact_cell_average(i * dx, (i + 1) * dx, 0.0);
  reach.set_initial_areas(a0);
  (void)reach.advance(0.0, t_end, PiecewiseLinearSeries::constant(0.5), LateralInflow::none());
  double err = 0.0;
  for (int i = 0; i < cells; ++i) {
    err += std::abs(reach.cell_area_m2()[static_cast<std::size_t>(i)] -
                    exact_cell_average(i * dx, (i + 1) * dx, t_end)) * dx;
  }
  return err;
}

struct OrderCase {
  SchemeKind scheme;
  double order_min, order_max;
};

class SmoothConvergence : public ::testing::TestWithParam<OrderCase> {};

// Expected orders: 1 for first-order upwind, 2 for MUSCL with SSP-RK2 in smooth regions
// (LeVeque 2002, sec. 8.1 and 6.12; limiter clipping at the single extremum costs little in L1).
TEST_P(SmoothConvergence, ObservedOrderMatchesTheScheme) {
  const OrderCase c = GetParam();
  const double t_end = 1.0;  // breaking time is -1/min A0' = 2.33 (Whitham 1974, eq. 2.14)
  const double e1 = smooth_l1_error(c.scheme, 200, t_end);
  const double e2 = smooth_l1_error(c.scheme, 400, t_end);
  const double e3 = smooth_l1_error(c.scheme, 800, t_end);
  const double p12 = std::log2(e1 / e2), p23 = std::log2(e2 / e3);
  std::printf("[%s] L1 errors %.3e %.3e %.3e; observed order %.3f, %.3f\n",
              std::string(to_string(c.scheme)).c_str(), e1, e2, e3, p12, p23);
  RecordProperty("observed_order", std::to_string(p23));
  EXPECT_GE(p23, c.order_min);
  EXPECT_LE(p23, c.order_max);
}

// The minmod limiter clips more than van Leer's near the extremum, so its L1 error is larger,
// but it is still second order in a smooth region (LeVeque 2002, sec. 6.12 and fig. 6.3).
TEST(SmoothConvergenceMinmod, MusclHeunWithMinmodIsSecondOrder) {
  const double e1 = smooth_l1_error(SchemeKind::kMusclHeun, 200, 1.0, Limiter::kMinmod);
  const double e2 = smooth_l1_error(SchemeKind::kMusclHeun, 400, 1.0, Limiter::kMinmod);
  const double e3 = smooth_l1_error(SchemeKind::kMusclHeun, 800, 1.0, Limiter::kMinmod);
  const double p23 = std::log2(e2 / e3);
  std::printf("[muscl-heun, minmod] L1 errors %.3e %.3e %.3e; observed order %.3f, %.3f\n", e1,
              e2, e3, std::log2(e1 / e2), p23);
  RecordProperty("observed_order", std::to_string(p23));
  EXPECT_GE(p23, 1.6);
}

INSTANTIATE_TEST_SUITE_P(
    Schemes, SmoothConvergence,
    ::testing::Values(OrderCase{SchemeKind::kExplicitUpwind, 0.8, 1.2},
                      OrderCase{SchemeKind::kImplicitUpwind, 0.8, 1.2},
                      OrderCase{SchemeKind::kMethodOfLines, 0.8, 1.2},
                      OrderCase{SchemeKind::kMusclHeun, 1.6, 2.4}),
    [](const auto& param_info) {
      std::string s(to_string(param_info.param.scheme));
      std::replace(s.begin(), s.end(), '-', '_');
      return s;
    });

}  // namespace
}  // namespace freshet::routing
