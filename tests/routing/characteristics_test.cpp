// The characteristics scheme (grid-free front tracking, schemes/characteristics.hpp) against
// exact solutions of the kinematic wave: Riemann problems on a Manning channel (shock and
// rarefaction), a non-convex Riemann problem in a part-full pipe, a triangular flood wave on a
// long channel (P1), and its volume balance.
#include "freshet/routing/schemes/characteristics.hpp"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <vector>

#include "freshet/geometry/section_flux.hpp"
#include "freshet/hydrology/overland_plane.hpp"
#include "freshet/routing/kinematic_reach.hpp"
#include "freshet/routing/shock.hpp"
#include "freshet/verification/problems.hpp"
#include "routing_test_support.hpp"

namespace freshet::routing {
namespace {

using geometry::RectangularFlux;
using geometry::TabulatedFlux;

RoutingOptions characteristics_options(double node_spacing = 1e-3) {
  RoutingOptions opt;
  opt.scheme = SchemeKind::kCharacteristics;
  opt.front_node_spacing = node_spacing;
  return opt;
}

// The P1 channel: rectangular, 50 m wide, Manning n 0.035, bed slope 0.001.
RectangularFlux p1_channel() { return {50.0, 0.035, 0.001}; }

// Where the single front of a Riemann problem is, from the one cell average that lies
// between the two plateaus: the average is A_r + (A_l - A_r) (front - cell start) / dx.
double front_position_m(std::span<const double> area, double dx, double a_left, double a_right) {
  for (std::size_t i = 0; i < area.size(); ++i) {
    if (area[i] != a_left) {
      return dx * (static_cast<double>(i) + (area[i] - a_right) / (a_left - a_right));
    }
  }
  return dx * static_cast<double>(area.size());
}

// Shock: a channel at Q_r = 50 m3/s receives Q_l = 300 m3/s from t = 0. The entropy solution
// is one front moving at the Rankine-Hugoniot speed U = (Q_l - Q_r) / (A_l - A_r)
// (Lighthill & Whitham 1955, On kinematic waves I, Proc. R. Soc. A 229, sec. 2.3). With node
// spacing 1e-6 the piecewise-linear flux is within ~1e-13 of Manning's law at the two states
// (flux_nodes.hpp), so the front speed must match U to 1e-9, relative.
TEST(Characteristics, ShockMovesAtTheRankineHugoniotSpeed) {
  const RectangularFlux law = p1_channel();
  const double q_l = 300.0, q_r = 50.0, length = 20000.0;
  const int cells = 400;
  KinematicReach<RectangularFlux> reach({"riemann-shock", length, cells}, law,
                                        characteristics_options(1e-6));
  reach.set_uniform_discharge(q_r);
  const double a_l = law.area_for_discharge_m2(q_l), a_r = law.area_for_discharge_m2(q_r);
  const double u = (q_l - q_r) / (a_l - a_r);
  const double t = 3000.0;
  (void)reach.advance(0.0, t, PiecewiseLinearSeries::constant(q_l), LateralInflow::none());
  const auto area = reach.cell_area_m2();
  // Plateaus are the inlet area for Q_l and the initial area (to the law's inversion).
  const double x = front_position_m(area, length / cells, area.front(), area.back());
  std::printf("shock: front at %.9f m after %.0f s, speed %.12f m/s, U = %.12f m/s\n", x, t,
              x / t, u);
  EXPECT_NEAR(area.front(), a_l, 1e-10 * a_l);
  EXPECT_EQ(area.back(), a_r);
  EXPECT_NEAR(x / t, u, 1e-9 * u);
  EXPECT_LE(std::abs(reach.ledger().balance_error_m3()), 1e-12 * reach.ledger().inflow_m3);
}

// Rarefaction: the channel at Q_r = 300 m3/s receives Q_l = 50 m3/s from t = 0. The exact
// solution is the centred fan c(A) = x / t between c(A_l) t and c(A_r) t (LeVeque 2002,
// Finite Volume Methods for Hyperbolic Problems, sec. 11.2; Whitham 1974, Linear and
// Nonlinear Waves, sec. 2.2). Front tracking replaces it by a staircase whose states are
// neighbouring vertices of the flux envelope, so at every face the computed discharge lies
// between the exact discharges one vertex either side (the stated error: one node, about
// 5/3 x spacing in discharge, or 1/front_fan_max_fronts of the jump when the fan is thinned).
TEST(Characteristics, RarefactionStaircaseIsWithinOneNodeOfTheExactFan) {
  const RectangularFlux law = p1_channel();
  const double q_l = 50.0, q_r = 300.0, length = 20000.0, t = 2400.0;
  const int cells = 2000;
  RoutingOptions opt = characteristics_options();
  opt.front_fan_max_fronts = 100000;  // no thinning: the node error alone
  KinematicReach<RectangularFlux> reach({"riemann-fan", length, cells}, law, opt);
  reach.set_uniform_discharge(q_r);
  (void)reach.advance(0.0, t, PiecewiseLinearSeries::constant(q_l), LateralInflow::none());
  const double a_l = law.area_for_discharge_m2(q_l), a_r = law.area_for_discharge_m2(q_r);
  const double c_l = law.celerity_m_s(a_l), c_r = law.celerity_m_s(a_r);
  const double node_q_step = 5.0 / 3.0 * opt.front_node_spacing * 1.01;
  const double thinning_q = (q_r - q_l) / opt.front_fan_max_fronts;
  double worst_rel = 0.0;
  int in_fan = 0;
  for (int i = 1; i < cells; ++i) {
    const double x = length * i / cells;
    double q_exact;
    if (x <= c_l * t) q_exact = q_l;
    else if (x >= c_r * t) q_exact = q_r;
    else {  // c(A) = x / t, c increasing in A for the rectangle: bisection
      double lo = a_l, hi = a_r;
      for (int k = 0; k < 200; ++k) {
        const double mid = 0.5 * (lo + hi);
        (law.celerity_m_s(mid) < x / t ? lo : hi) = mid;
      }
      q_exact = law.discharge_m3s(0.5 * (lo + hi));
      ++in_fan;
    }
    const double q = reach.face_flux_m3s()[static_cast<std::size_t>(i)];
    const double bound = std::max(node_q_step * q_exact, thinning_q) + 1e-9 * q_exact;
    EXPECT_LE(std::abs(q - q_exact), bound) << "x = " << x;
    worst_rel = std::max(worst_rel, std::abs(q - q_exact) / q_exact);
  }
  std::printf("rarefaction: %d faces in the fan, worst |dQ|/Q %.2e (bound %.2e)\n", in_fan,
              worst_rel, node_q_step);
  EXPECT_GT(in_fan, 100);
  EXPECT_LE(std::abs(reach.ledger().balance_error_m3()), 1e-12 * reach.ledger().inflow_m3);
}

// Non-convex flux: a part-full pipe (D = 1.2 m, n 0.013, S0 0.005), whose Q(A) is convex
// low in the pipe and concave near the crown. A nearly full pipe (h/D = 0.92) upstream of a
// shallow flow (h/D = 0.15): the entropy solution follows the upper concave envelope of Q
// on [A_r, A_l] (Oleinik's condition; LeVeque 2002, sec. 16.1): a fan from A_l down to the
// tangent point A*, then a shock from A* to A_r moving at c(A*) = (Q(A*) - Q(A_r)) /
// (A* - A_r). A* is found here by bisection on that tangency condition with the law itself,
// independently of the node envelope the scheme builds.
TEST(Characteristics, NonConvexPipeRiemannProblemFollowsTheConcaveEnvelope) {
  const geometry::FlowSection pipe = geometry::make_flow_section(
      geometry::CircularSpec{1.2, 0.013}, 0.005);
  const auto& law = std::get<TabulatedFlux>(pipe.flux);
  const double full_area = 3.14159265358979 * 0.36;
  auto area_at_depth_ratio = [&](double r) {  // segment area of a circle, D = 1.2 m
    const double theta = 2.0 * std::acos(1.0 - 2.0 * r);
    return 0.125 * 1.44 * (theta - std::sin(theta));
  };
  const double a_l = area_at_depth_ratio(0.92), a_r = area_at_depth_ratio(0.15);
  ASSERT_LT(a_l, law.capacity_area_m2());
  ASSERT_LT(a_l, full_area);
  auto tangency = [&](double a) {
    return (law.discharge_m3s(a) - law.discharge_m3s(a_r)) / (a - a_r) - law.celerity_m_s(a);
  };
  double lo = 0.5 * (a_l + a_r), hi = a_l;  // chord slope - c changes sign once in the concave part
  ASSERT_LT(tangency(lo), 0.0);
  ASSERT_GT(tangency(hi), 0.0);
  for (int k = 0; k < 200; ++k) {
    const double mid = 0.5 * (lo + hi);
    (tangency(mid) < 0.0 ? lo : hi) = mid;
  }
  const double a_star = 0.5 * (lo + hi);
  const double shock_speed = law.celerity_m_s(a_star);

  const detail::FluxNodes nodes(1e-3);
  std::vector<detail::Wave> waves;
  std::vector<double> sa, sq;
  detail::solve_riemann(nodes, law, false, a_l, nodes.flux(law, a_l), a_r, nodes.flux(law, a_r),
                        1u << 20, waves, sa, sq);
  ASSERT_GE(waves.size(), 2u);
  for (std::size_t i = 1; i < waves.size(); ++i) {
    EXPECT_GE(waves[i].speed_m_s, waves[i - 1].speed_m_s);  // an admissible fan: no overtaking
  }
  const detail::Wave& shock = waves.back();
  const double a_star_ft = waves[waves.size() - 2].area_right_m2;
  std::printf("pipe: A* %.6f m2 (front tracking %.6f), shock %.6f m/s (c(A*) %.6f), %zu fronts\n",
              a_star, a_star_ft, shock.speed_m_s, shock_speed, waves.size());
  EXPECT_EQ(shock.area_right_m2, a_r);
  EXPECT_NEAR(a_star_ft, a_star, 2e-3 * a_star);           // within two nodes of the tangent
  EXPECT_NEAR(shock.speed_m_s, shock_speed, 1e-5 * shock_speed);
  // The fan states between A_l and A* all lie on the concave part (c falls with A there).
  for (std::size_t i = 0; i + 1 < waves.size(); ++i) {
    EXPECT_GT(waves[i].area_right_m2, a_star_ft * (1 - 1e-12));
  }
}

// Breaking of a smooth hump under Burgers' equation u_t + u u_x = 0, u(x, 0) = exp(-x^2):
// characteristics x = xi + u0(xi) t first cross at t_b = -1 / min u0' = sqrt(e / 2), from
// xi* = 1 / sqrt(2), at x_b = xi* + u0(xi*) t_b = sqrt(2) (Whitham 1974, Linear and Nonlinear
// Waves, sec. 2.1, eq. 2.14). The breaking predictor on a profile sampled every 1e-4.
TEST(Characteristics, BurgersHumpBreaksAtSqrtHalfEAndSqrtTwo) {
  std::vector<double> x, u;
  for (int i = 0; i <= 60000; ++i) {
    x.push_back(-2.0 + 1e-4 * i);
    u.push_back(std::exp(-x.back() * x.back()));
  }
  const BreakingPrediction p = predict_breaking_from_profile(testing::burgers(), x, u);
  ASSERT_TRUE(p.breaks);
  const double t_b = std::sqrt(std::exp(1.0) / 2.0), x_b = std::sqrt(2.0);
  std::printf("Burgers hump: t_b %.9f (exact %.9f), x_b %.9f (exact %.9f)\n", p.time_s, t_b,
              p.position_m, x_b);
  EXPECT_NEAR(p.time_s, t_b, 1e-6);
  EXPECT_NEAR(p.position_m, x_b, 1e-6);
}

// P1: a 20 km rectangular channel (50 m, n 0.035, S0 0.001) with a triangular inflow
// 20 -> 500 -> 20 m3/s over 6 h (peak at 3 h). By characteristics (Lighthill & Whitham 1955,
// sec. 2) the peak discharge travels unchanged at c(A_500) = dQ/dA as long as the shock
// formed on the rising limb stays ahead of it, so it reaches x = L at
//   t = 3 h + L / c(A_500) = 10800 s + 20000 m / 3.45993 m/s = 16580.5 s = 276.34 min,
// with c = dQ/dA of Manning's law for the rectangle (normal depth 4.52 m at 500 m3/s).
// 500 m3/s is still the outlet peak: integrating the rising-limb shock (speed [Q]/[A],
// upstream state from the characteristic that meets it) puts it at 20 km at 209.7 min with
// 258 m3/s behind it, long before the peak characteristic could catch it. The
// scheme carries the inflow's peak state exactly (it is a breakpoint of the hydrograph), so
// the outlet peak must equal 500 m3/s to round-off and arrive within the sampling step (6 s)
// plus the duration of the peak state at the inlet (both halves of the last node step).
TEST(Characteristics, P1TriangularFloodPeakArrivesUndiminishedByCharacteristics) {
  const RectangularFlux law = p1_channel();
  const double length = 20000.0;
  const PiecewiseLinearSeries inflow({0.0, 10800.0, 21600.0}, {20.0, 500.0, 20.0});
  KinematicReach<RectangularFlux> reach({"P1", length, 200}, law, characteristics_options());
  reach.set_uniform_discharge(20.0);
  const double c_peak = law.celerity_m_s(law.area_for_discharge_m2(500.0));
  const double t_exact = 10800.0 + length / c_peak;
  double q_max = 0.0, t_first = 0.0, t_last = 0.0;
  const double dt = 6.0;
  for (double t = 0.0; t < 21600.0 + 7200.0; t += dt) {
    (void)reach.advance(t, t + dt, inflow, LateralInflow::none());
    const double q = reach.face_flux_m3s().back();
    if (q > q_max * (1 + 1e-12)) q_max = q, t_first = t + dt;
    if (q >= q_max * (1 - 1e-12)) t_last = t + dt;
  }
  const double t_peak = 0.5 * (t_first + t_last);
  const VolumeLedger& ledger = reach.ledger();
  std::printf("P1: c(500) = %.6f m/s, exact arrival %.2f s = %.2f min; outlet peak %.9f m3/s at "
              "%.1f s (%.1f min, plateau %.0f-%.0f s); %d fronts at most; balance %.2e m3 of %.3e\n",
              c_peak, t_exact, t_exact / 60.0, q_max, t_peak, t_peak / 60.0, t_first, t_last,
              reach.diagnostics().max_fronts, ledger.balance_error_m3(), ledger.inflow_m3);
  EXPECT_NEAR(q_max, 500.0, 1e-9 * 500.0);
  EXPECT_NEAR(t_peak, t_exact, 10.0);
  EXPECT_NEAR(ledger.inflow_m3, inflow.integral(0.0, 28800.0), 1e-12 * ledger.inflow_m3);
  EXPECT_LE(std::abs(ledger.balance_error_m3()), 1e-12 * ledger.inflow_m3);
}

// Overland plane under constant excess (Wooding 1965, J. Hydrol. 3; Eagleson 1970, Dynamic
// Hydrology, ch. 12; Singh 1996, Kinematic Wave Modeling in Water Resources, ch. 5), the
// plane of freshet/verification/problems.hpp: L = 100 m, alpha = 1 m^(1/3)/s, m = 5/3,
// excess 50 mm/h from a dry start. Full equilibrium then recession (rain for 1.6 t_e) and
// partial equilibrium (rain for t_e / 2), the outlet discharge (the last face) sampled every
// 30 s to 4 t_e against hydrology::kinematic_plane_outflow_m2s: within 0.1 % at every sample
// where the exact value exceeds 1e-3 of the peak (below that, within 1e-6 of the peak). The
// excess enters by Strang splitting in 10 s sub-steps, segments are merged below 1 cm (with
// the defaults, 30 s and 10 cm, the worst error is 0.17 %); measured worst errors 0.076 % (full)
// and 0.086 % (partial equilibrium), both in the recession, where the staircase left by the
// splitting and the merging of short segments reaches the outlet.
TEST(Characteristics, OverlandPlaneMatchesWoodingWithinATenthOfAPercent) {
  const geometry::PowerLawFlux sheet{1.0, 5.0 / 3.0};
  const double excess = verification::kTestPlaneExcess_m_s, length = 100.0;
  for (double rain_fraction : {1.6, 0.5}) {
    RoutingOptions opt = characteristics_options();
    opt.lateral_split_step_s = 10.0;   // t_e / 140 (default 30 s)
    opt.front_merge_length_m = 0.01;   // 1e-4 L (default 1e-3 L)
    KinematicReach<geometry::PowerLawFlux> plane({"plane", length, 50}, sheet, opt);
    const double t_e = hydrology::kinematic_plane_equilibrium_time_s(sheet, length, excess);
    const double rain_end = rain_fraction * t_e;
    const double peak = hydrology::kinematic_plane_outflow_m2s(sheet, length, excess, rain_end,
                                                               std::min(rain_end, t_e));
    double worst = 0.0;
    for (double t = 0.0; t < 4.0 * t_e - 1e-9;) {
      double t1 = t + 30.0;
      if (t < rain_end && t1 > rain_end) t1 = rain_end;
      const LateralInflow rain = LateralInflow::uniform(
          length, PiecewiseLinearSeries::constant(t < rain_end ? excess : 0.0));
      (void)plane.advance(t, t1, PiecewiseLinearSeries::constant(0.0), rain);
      const double exact = hydrology::kinematic_plane_outflow_m2s(sheet, length, excess, rain_end, t1);
      const double error = std::abs(plane.face_flux_m3s().back() - exact);
      if (exact > 1e-3 * peak) {
        EXPECT_LE(error, 1e-3 * exact) << "t = " << t1 << " s, rain " << rain_fraction << " t_e";
        worst = std::max(worst, error / exact);
      } else {
        EXPECT_LE(error, 1e-6 * peak) << "t = " << t1 << " s";
      }
      t = t1;
    }
    const VolumeLedger& l = plane.ledger();
    std::printf("plane, rain %.1f t_e: worst relative error %.2e, %d fronts at most; balance "
                "%.2e m3\n", rain_fraction, worst, plane.diagnostics().max_fronts,
                l.balance_error_m3());
    EXPECT_NEAR(l.lateral_m3, excess * rain_end * length, 1e-12);
    EXPECT_LE(std::abs(l.balance_error_m3()), 1e-12 * l.lateral_m3);
  }
}

}  // namespace
}  // namespace freshet::routing

namespace freshet::routing {
namespace {

// The shocks of the characteristics scheme come from its fronts. A channel at Q_r = 50 m3/s
// receives Q_l = 300 m3/s from t = 0: one shock formed at the inlet at t = 0, moving at the
// Rankine-Hugoniot speed U = [Q]/[A] (Lighthill & Whitham 1955, sec. 2.3), reaching the
// outlet at L / U. Node spacing 1e-6: Q_pl is within ~1e-13 of Manning's law at the states.
TEST(CharacteristicsShocks, ARiemannShockIsRecordedWithItsRankineHugoniotSpeedAndArrival) {
  const RectangularFlux law = p1_channel();
  const double q_l = 300.0, q_r = 50.0, length = 20000.0;
  KinematicReach<RectangularFlux> reach({"riemann-shock", length, 400}, law,
                                        characteristics_options(1e-6));
  reach.set_uniform_discharge(q_r);
  const double a_l = law.area_for_discharge_m2(q_l), a_r = law.area_for_discharge_m2(q_r);
  const double u = (q_l - q_r) / (a_l - a_r);
  for (double t = 0.0; t < 1.2 * length / u; t += 300.0) {
    (void)reach.advance(t, t + 300.0, PiecewiseLinearSeries::constant(q_l), LateralInflow::none());
  }
  ASSERT_EQ(reach.shock_reports().size(), 1u);
  const ShockReport& s = reach.shock_reports().front();
  std::printf("front shock: formed %.3f s at %.3f m, speed %.9f (RH %.9f, exact %.9f), outlet "
              "%.3f s (exact %.3f), %zu samples\n", s.formation_time_s, s.formation_position_m,
              s.speed_m_s, s.rankine_hugoniot_m_s, u, s.outlet_arrival_time_s, length / u,
              s.path.size());
  EXPECT_EQ(s.formation_time_s, 0.0);
  EXPECT_EQ(s.formation_position_m, 0.0);
  EXPECT_NEAR(s.speed_m_s, u, 1e-9 * u);
  EXPECT_NEAR(s.rankine_hugoniot_m_s, u, 1e-9 * u);
  ASSERT_TRUE(s.reached_outlet);
  EXPECT_NEAR(s.outlet_arrival_time_s, length / u, 1e-6 * length / u);
}

// P1's rising limb (20 -> 500 m3/s over 3 h): the fronts' shock forms where the
// characteristics of the inflow first cross, t_b = tau + c / (dc/dtau), x_b = c^2 / (dc/dtau)
// at the foot of the rise (Whitham 1974, sec. 2.1-2.2): 1158.7 s, 1235 m (closed form in
// breaking_watch_test.cpp); within 1 % with node spacing 1e-3 (the inflow enters as node
// steps; the first collision whose front carries 1 % of the discharge behind it is the
// discrete breaking, FrontTracker::kBirthJumpFraction).
TEST(CharacteristicsShocks, P1ShockFormsWhereTheCharacteristicsFirstCross) {
  const RectangularFlux law = p1_channel();
  const PiecewiseLinearSeries inflow({0.0, 10800.0, 21600.0}, {20.0, 500.0, 20.0});
  KinematicReach<RectangularFlux> reach({"P1", 20000.0, 200}, law, characteristics_options());
  reach.set_uniform_discharge(20.0);
  for (double t = 0.0; t < 21600.0; t += 60.0) {
    (void)reach.advance(t, t + 60.0, inflow, LateralInflow::none());
  }
  ASSERT_FALSE(reach.shock_reports().empty());
  const ShockReport& s = reach.shock_reports().front();
  std::printf("P1 front shock: formed %.1f s at %.1f m; speed %.4f (RH %.4f); outlet %d at %.1f s;"
              " %zu shocks\n", s.formation_time_s, s.formation_position_m, s.speed_m_s,
              s.rankine_hugoniot_m_s, s.reached_outlet, s.outlet_arrival_time_s,
              reach.shock_reports().size());
  EXPECT_NEAR(s.formation_time_s, 1158.7, 0.01 * 1158.7);
  EXPECT_NEAR(s.formation_position_m, 1235.2, 0.01 * 1235.2);
  EXPECT_TRUE(s.reached_outlet);
}

}  // namespace
}  // namespace freshet::routing
