// The breaking watch (routing/breaking_watch.hpp) against the closed form of the first
// crossing of characteristics launched by an inflow hydrograph (Whitham 1974, Linear and
// Nonlinear Waves, sec. 2.1-2.2): the characteristic launched at tau travels x = c (t - tau),
// neighbours cross at x = c^2 / (dc/dtau), t = tau + c / (dc/dtau), and the wave breaks at the
// earliest such t. (The time is tau + c / (dc/dtau); c^2 / (dc/dtau) is the distance.)
#include "freshet/routing/breaking_watch.hpp"

#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <limits>

#include "freshet/geometry/section_flux.hpp"

namespace freshet::routing {
namespace {

using geometry::RectangularFlux;

// The P1 channel: rectangular, 50 m wide, Manning n 0.035, bed slope 0.001.
RectangularFlux p1_channel() { return {50.0, 0.035, 0.001}; }

// c(Q) = dQ/dA at the normal area of Q.
double celerity_of_q(const RectangularFlux& law, double q) {
  return law.celerity_m_s(law.area_for_discharge_m2(q));
}

struct Crossing {
  double time_s = std::numeric_limits<double>::infinity();
  double chainage_m = 0.0;
};

// The closed form, minimised over launch times tau on [a, b] every `step_s` (dc/dtau by a
// central difference of c(Q(tau)) over +-1e-3 s, far below the hydrograph's time scale).
template <class Inflow>
Crossing closed_form_first_crossing(const RectangularFlux& law, const Inflow& q_of, double a,
                                    double b, double step_s) {
  Crossing best;
  for (double tau = a; tau <= b; tau += step_s) {
    const double h = 1e-3;
    const double c = celerity_of_q(law, q_of(tau));
    const double dc = (celerity_of_q(law, q_of(tau + h)) - celerity_of_q(law, q_of(tau - h))) / (2 * h);
    if (!(dc > 0.0)) continue;
    const double t = tau + c / dc;
    if (t < best.time_s) best = {t, c * c / dc};
  }
  return best;
}

// P1 (a 20 km rectangular channel, 50 m wide, n 0.035, S0 0.001; triangular inflow
// 20 -> 500 -> 20 m3/s over 6 h): on a linear rise c(tau) is concave for Manning's law
// (c ~ Q^0.4), so the first crossing is at the start of the rise, tau -> 0+:
// x_b = c^2 / (dc/dtau), t_b = c / (dc/dtau) there (1.24 km, 19.3 min). The watch,
// fed the hydrograph as a network hands it (linear between coupling-step ends, 60 s steps),
// finds it within 1 % (its launches are graded towards the start of each linear piece; the
// crossing of the characteristics launched at tau and tau + h is within h of the limit).
TEST(BreakingWatch, LinearRiseOnAManningChannelBreaksAtItsStartAsTheClosedFormSays) {
  const RectangularFlux law = p1_channel();
  const PiecewiseLinearSeries inflow({0.0, 10800.0, 21600.0}, {20.0, 500.0, 20.0});
  auto q_of = [&](double t) { return inflow.value_at(t); };
  const Crossing exact = closed_form_first_crossing(law, q_of, 1e-2, 10799.0, 0.5);
  BreakingWatch watch(geometry::SectionFlux{law}, 20000.0);
  watch.start(0.0, 20.0, law.area_for_discharge_m2(20.0));
  for (double t = 0.0; t < 21600.0; t += 60.0) {
    watch.advance(t, t + 60.0, inflow.value_at(t), inflow.value_at(t + 60.0), 0.0);
  }
  const PredictedBreaking& p = watch.result();
  std::printf("P1 breaking: watch %.1f s at %.1f m; closed form %.1f s at %.1f m; %zu "
              "characteristics held\n", p.time_s, p.chainage_m, exact.time_s, exact.chainage_m,
              watch.characteristics());
  ASSERT_TRUE(p.breaks);
  EXPECT_NEAR(p.time_s, exact.time_s, 0.01 * exact.time_s);
  EXPECT_NEAR(p.chainage_m, exact.chainage_m, 0.01 * exact.chainage_m);
  EXPECT_FALSE(p.onto_dry_bed);
  // The whole hydrograph in one call: the same crossing.
  BreakingWatch once(geometry::SectionFlux{law}, 20000.0);
  once.start(0.0, 20.0, law.area_for_discharge_m2(20.0));
  once.advance(0.0, 21600.0, inflow, 0.0);
  EXPECT_NEAR(once.result().time_s, exact.time_s, 0.01 * exact.time_s);
  EXPECT_NEAR(once.result().chainage_m, exact.chainage_m, 0.01 * exact.chainage_m);
}

// A smooth rise, Q = 50 + 450 sin^2(pi tau / 4 h) for tau in [0, 2 h]: c(tau) is convex at
// first, so the first crossing comes from inside the rise; the closed form's minimum over
// tau (Whitham 1974, sec. 2.2) against the watch fed 10 s coupling steps: within 1 %. The
// watch is exact for the inflow as the reach receives it, linear between step ends; each
// kink of that line breaks a little early, by about Q''/(2 Q') dt of c/c' (2 % at 60 s here,
// 0.4 % at 10 s).
TEST(BreakingWatch, SmoothRiseBreaksWhereTheClosedFormIsEarliest) {
  const RectangularFlux law = p1_channel();
  const double pi = std::acos(-1.0), rise = 7200.0;
  auto q_of = [&](double t) {
    const double s = std::sin(pi * std::clamp(t, 0.0, rise) / (2.0 * rise));
    return 50.0 + 450.0 * s * s;
  };
  const Crossing exact = closed_form_first_crossing(law, q_of, 0.0, rise, 1.0);
  BreakingWatch watch(geometry::SectionFlux{law}, 50000.0);
  watch.start(0.0, 50.0, law.area_for_discharge_m2(50.0));
  for (double t = 0.0; t < 3.0 * rise; t += 10.0) {
    watch.advance(t, t + 10.0, q_of(t), q_of(t + 10.0), 0.0);
  }
  const PredictedBreaking& p = watch.result();
  std::printf("smooth rise: watch %.1f s at %.1f m (launched %.0f s); closed form %.1f s at "
              "%.1f m\n", p.time_s, p.chainage_m, p.launch_time_s, exact.time_s, exact.chainage_m);
  ASSERT_TRUE(p.breaks);
  EXPECT_GT(p.launch_time_s, 600.0);  // from inside the rise, not its start
  EXPECT_NEAR(p.time_s, exact.time_s, 0.01 * exact.time_s);
  EXPECT_NEAR(p.chainage_m, exact.chainage_m, 0.01 * exact.chainage_m);
}

// The same P1 wave on a reach shorter than x_b leaves it before it breaks, and on the long
// reach a run that ends before t_b sees no breaking either: the report must say so.
TEST(BreakingWatch, NoBreakingInsideAShortReachOrBeforeTheRunEnds) {
  const RectangularFlux law = p1_channel();
  const PiecewiseLinearSeries inflow({0.0, 10800.0, 21600.0}, {20.0, 500.0, 20.0});
  auto q_of = [&](double t) { return inflow.value_at(t); };
  const Crossing exact = closed_form_first_crossing(law, q_of, 1e-2, 10799.0, 0.5);
  BreakingWatch short_reach(geometry::SectionFlux{law}, 0.9 * exact.chainage_m);
  short_reach.start(0.0, 20.0, law.area_for_discharge_m2(20.0));
  short_reach.advance(0.0, 21600.0, inflow, 0.0);
  EXPECT_TRUE(short_reach.result().watched);
  EXPECT_FALSE(short_reach.result().breaks);
  BreakingWatch short_run(geometry::SectionFlux{law}, 20000.0);
  short_run.start(0.0, 20.0, law.area_for_discharge_m2(20.0));
  short_run.advance(0.0, 0.95 * exact.time_s, inflow, 0.0);
  EXPECT_FALSE(short_run.result().breaks);
  short_run.advance(0.95 * exact.time_s, 1.05 * exact.time_s, inflow, 0.0);
  EXPECT_TRUE(short_run.result().breaks);
}

// A plane under uniform excess from a dry start (Wooding 1965, J. Hydrol. 3; Singh 1996,
// Kinematic Wave Modeling in Water Resources, ch. 5): the solution is continuous (rising
// limb alpha (i t)^m, equilibrium, recession), so its characteristics never cross; nor
// under an excess that rises and falls.
TEST(BreakingWatch, PlaneUnderUniformExcessNeverBreaks) {
  const geometry::PowerLawFlux sheet{1.0, 5.0 / 3.0};
  BreakingWatch watch(geometry::SectionFlux{sheet}, 100.0);
  watch.start(0.0, 0.0, 0.0);
  for (double t = 0.0; t < 7200.0; t += 30.0) {
    const double excess = 50e-3 / 3600.0 * (t < 3600.0 ? t / 3600.0 : (t < 5400.0 ? 1.0 : 0.0));
    watch.advance(t, t + 30.0, 0.0, 0.0, excess);
  }
  EXPECT_TRUE(watch.result().watched);
  EXPECT_FALSE(watch.result().breaks);
}

}  // namespace
}  // namespace freshet::routing
