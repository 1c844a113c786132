// Grid convergence to the characteristic solution on a Manning channel: a flood rise routed
// by every finite-volume scheme at 100, 200, 400 and 800 cells, compared with the exact
// solution by characteristics, with the observed order of accuracy reported (LeVeque 2002,
// Finite Volume Methods for Hyperbolic Problems, sec. 8.6: the error of a p-th order method
// on a smooth solution falls as dx^p, and p is observed as log2(E(dx) / E(dx/2))).
//
// The exact solution: before breaking, A(x, t) = A_in(tau) where the characteristic launched
// from the inlet at tau reaches x at t, x = c(tau) (t - tau), c = dQ/dA of the inflow's state
// (Lighthill & Whitham 1955, On kinematic waves I, Proc. R. Soc. A 229, sec. 2; Whitham 1974,
// Linear and Nonlinear Waves, sec. 2.2); ahead of the first characteristic the initial state
// is undisturbed. g(tau) = c(tau) (t - tau) - x decreases in tau while no characteristics
// have crossed, so tau is found by bisection. The rise is a smooth sin^2 with zero slope at
// both ends and slow enough that its characteristics first cross 5.8 reach lengths away
// (asserted beyond 2), so the solution is smooth and first-order schemes are expected to show order
// 1, MUSCL-Heun about 2 (LeVeque 2002, sec. 6.12 and 8.6). The characteristics scheme is
// checked against the same solution: its staircase converges in the node spacing.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <numbers>
#include <string>
#include <vector>

#include "freshet/geometry/section_flux.hpp"
#include "freshet/routing/kinematic_reach.hpp"
#include "freshet/routing/shock.hpp"
#include "routing_test_support.hpp"

namespace freshet::routing {
namespace {

using geometry::RectangularFlux;
using testing::options_for;

// Rectangular 50 m, n 0.035, S0 0.001 (the P1 channel), 10 km; 100 -> 200 m3/s over 3 h.
constexpr double kLength_m = 10000.0, kRise_s = 10800.0, kQ0 = 100.0, kQ1 = 200.0;
const RectangularFlux kLaw(50.0, 0.035, 0.001);

double inflow_m3s(double tau_s) {
  if (tau_s <= 0.0) return kQ0;
  if (tau_s >= kRise_s) return kQ1;
  const double s = std::sin(0.5 * std::numbers::pi * tau_s / kRise_s);
  return kQ0 + (kQ1 - kQ0) * s * s;
}

PiecewiseLinearSeries inflow_series() {  // sampled every 10 s (linear between: 1e-5 relative)
  std::vector<double> t, q;
  for (double s = 0.0; s <= kRise_s + 1e-9; s += 10.0) t.push_back(s), q.push_back(inflow_m3s(s));
  return PiecewiseLinearSeries(t, q);
}

double celerity_at(double tau_s) {
  return kLaw.celerity_m_s(kLaw.area_for_discharge_m2(inflow_m3s(tau_s)));
}

double exact_area_m2(double x_m, double t_s) {
  auto g = [&](double tau) { return celerity_at(tau) * (t_s - tau) - x_m; };
  if (g(0.0) <= 0.0) return kLaw.area_for_discharge_m2(kQ0);
  double lo = 0.0, hi = t_s;
  for (int k = 0; k < 60; ++k) {
    const double mid = 0.5 * (lo + hi);
    (g(mid) > 0.0 ? lo : hi) = mid;
  }
  return kLaw.area_for_discharge_m2(inflow_m3s(0.5 * (lo + hi)));
}

// Exact cell averages by 3-point Gauss-Legendre quadrature (Abramowitz & Stegun 1964, 25.4.29).
double exact_cell_average_m2(double x0, double x1, double t_s) {
  const double mid = 0.5 * (x0 + x1), half = 0.5 * (x1 - x0), g = std::sqrt(0.6);
  return (5.0 * exact_area_m2(mid - g * half, t_s) + 8.0 * exact_area_m2(mid, t_s) +
          5.0 * exact_area_m2(mid + g * half, t_s)) / 18.0;
}

// Relative L1 error of the cell areas at t = kRise_s (the rise fills the reach).
double l1_error(const RoutingOptions& opt, int cells) {
  KinematicReach<RectangularFlux> reach({"smooth-rise", kLength_m, cells}, kLaw, opt);
  reach.set_uniform_discharge(kQ0);
  const PiecewiseLinearSeries inflow = inflow_series();
  for (double t = 0.0; t < kRise_s; t += 600.0) {
    (void)reach.advance(t, t + 600.0, inflow, LateralInflow::none());
  }
  const double dx = kLength_m / cells;
  double err = 0.0, norm = 0.0;
  for (int i = 0; i < cells; ++i) {
    const double exact = exact_cell_average_m2(i * dx, (i + 1) * dx, kRise_s);
    err += std::abs(reach.cell_area_m2()[static_cast<std::size_t>(i)] - exact) * dx;
    norm += exact * dx;
  }
  return err / norm;
}

TEST(GridConvergence, TheRiseBreaksFarBeyondTheReach) {
  const BreakingPrediction b = predict_breaking_from_inflow(kLaw, inflow_series(), 0.0, kRise_s);
  ASSERT_TRUE(b.breaks);
  std::printf("first crossing %.0f m (%.2f reach lengths) at %.0f s\n", b.position_m,
              b.position_m / kLength_m, b.time_s);
  EXPECT_GT(b.position_m, 2.0 * kLength_m);
}

struct OrderCase {
  SchemeKind scheme;
  double order_min, order_max;
};

class GridConvergence : public ::testing::TestWithParam<OrderCase> {};

TEST_P(GridConvergence, ObservedOrderAgainstTheCharacteristicSolution) {
  const OrderCase c = GetParam();
  RoutingOptions opt = options_for(c.scheme);
  opt.implicit_courant = 0.9;  // refinement at a fixed Courant number
  double e[4];
  const int cells[4] = {100, 200, 400, 800};
  for (int k = 0; k < 4; ++k) e[k] = l1_error(opt, cells[k]);
  const double p1 = std::log2(e[0] / e[1]), p2 = std::log2(e[1] / e[2]), p3 = std::log2(e[2] / e[3]);
  std::printf("[%s] relative L1 errors %.3e %.3e %.3e %.3e (100..800 cells); observed order "
              "%.2f %.2f %.2f\n", std::string(to_string(c.scheme)).c_str(), e[0], e[1], e[2],
              e[3], p1, p2, p3);
  RecordProperty("observed_order", std::to_string(p3));
  EXPECT_GE(p3, c.order_min);
  EXPECT_LE(p3, c.order_max);
  EXPECT_LT(e[3], e[0]);
}

INSTANTIATE_TEST_SUITE_P(
    Schemes, GridConvergence,
    ::testing::Values(OrderCase{SchemeKind::kExplicitUpwind, 0.85, 1.15},
                      OrderCase{SchemeKind::kImplicitUpwind, 0.85, 1.15},
                      OrderCase{SchemeKind::kMethodOfLines, 0.85, 1.15},
                      OrderCase{SchemeKind::kMusclHeun, 1.6, 2.4}),
    [](const auto& param_info) {
      std::string s(to_string(param_info.param.scheme));
      std::replace(s.begin(), s.end(), '-', '_');
      return s;
    });

// The characteristics scheme's staircase against the same solution: its error falls with the
// node spacing (a state is resolved to one node: about m x spacing in discharge,
// docs/methods-routing.md), read at 800 sampling cells.
TEST(GridConvergence, CharacteristicsConvergeInTheNodeSpacing) {
  RoutingOptions opt = options_for(SchemeKind::kCharacteristics);
  double previous = 1.0;
  for (double spacing : {1e-2, 1e-3, 1e-4}) {
    opt.front_node_spacing = spacing;
    const double e = l1_error(opt, 800);
    std::printf("[characteristics] node spacing %.0e: relative L1 error %.3e\n", spacing, e);
    EXPECT_LT(e, spacing);
    EXPECT_LT(e, 0.5 * previous);
    previous = e;
  }
}

}  // namespace
}  // namespace freshet::routing
