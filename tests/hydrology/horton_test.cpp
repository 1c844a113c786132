#include "freshet/hydrology/horton.hpp"

#include <cmath>
#include <string>
#include <gtest/gtest.h>

#include "freshet/core/error.hpp"

namespace freshet::hydrology {
namespace {

constexpr double kMmPerHour = 1e-3 / 3600.0;
constexpr double kHour = 3600.0;

// Invented soil: f0 = 75 mm/h, fc = 10 mm/h, k = 4 /h.
HortonParameters soil() {
  return {.initial_capacity_m_s = 75.0 * kMmPerHour,
          .final_capacity_m_s = 10.0 * kMmPerHour,
          .decay_rate_per_s = 4.0 / kHour};
}

// Horton (1940); Chow, Maidment & Mays (1988) eq. 4.2.13: under rain heavier than f0 the
// soil ponds at once and F(t) = fc t + (f0 - fc)(1 - e^(-kt))/k.
TEST(Horton, HeavyRainFollowsTheIntegratedHortonEquation) {
  HortonLoss loss(soil(), "subcatchment 'alder'");
  const double i = 100.0 * kMmPerHour, dt = 300.0;
  for (int s = 1; s <= 24; ++s) {
    loss.step(i * dt, dt);
    const double t = s * dt;
    const double expected = 10.0 * kMmPerHour * t +
                            65.0 * kMmPerHour * (1.0 - std::exp(-4.0 * t / kHour)) / (4.0 / kHour);
    EXPECT_NEAR(loss.cumulative_infiltration_m(), expected, 1e-15) << "t=" << t;
  }
}

// Under i < f0 (30 mm/h) nothing runs off until the capacity has fallen to i, i.e. until
// F = F(tau_p) with fc + (f0 - fc) e^(-k tau_p) = i; then F follows F(tau_p + t - t_p), where
// t_p = F(tau_p) / i. Independent of how the rain is cut into steps.
TEST(Horton, ModerateRainPondsWhenCapacityFallsToTheIntensity) {
  const double i = 30.0 * kMmPerHour;
  const double k = 4.0 / kHour;
  const double tau_p = std::log(65.0 / 20.0) / k;
  auto big_f = [&](double tau) {
    return 10.0 * kMmPerHour * tau + 65.0 * kMmPerHour * (1.0 - std::exp(-k * tau)) / k;
  };
  const double t_p = big_f(tau_p) / i;
  for (int steps : {1, 9, 90}) {
    HortonLoss loss(soil(), "subcatchment 'alder'");
    const double dt = 1.5 * kHour / steps;
    for (int s = 0; s < steps; ++s) loss.step(i * dt, dt);
    EXPECT_NEAR(loss.cumulative_infiltration_m(), big_f(tau_p + 1.5 * kHour - t_p), 1e-14)
        << steps << " steps";
    EXPECT_NEAR(loss.ledger().loss_m, loss.cumulative_infiltration_m(), 1e-15);
  }
}

// The cumulative form: a dry spell does not restore capacity, and capacity only falls as F
// grows, so a storm cut by a gap infiltrates like the same rain without the gap.
TEST(Horton, IntermittentRainTracksCapacityByCumulativeInfiltration) {
  HortonLoss gap(soil(), "subcatchment 'alder'");
  HortonLoss none(soil(), "subcatchment 'alder'");
  const double burst = 50.0 * kMmPerHour * 600.0;
  gap.step(burst, 600.0);
  const double before = gap.capacity_m_s();
  gap.step(0.0, 7200.0);
  EXPECT_DOUBLE_EQ(gap.capacity_m_s(), before);
  gap.step(burst, 600.0);
  none.step(burst, 600.0);
  none.step(burst, 600.0);
  EXPECT_NEAR(gap.cumulative_infiltration_m(), none.cumulative_infiltration_m(), 1e-15);
  EXPECT_LT(gap.capacity_m_s(), before);
}

TEST(Horton, RejectsInconsistentRates) {
  try {
    HortonLoss loss({.initial_capacity_m_s = 1e-6, .final_capacity_m_s = 2e-6,
                     .decay_rate_per_s = 0.0},
                    "subcatchment 'alder'");
    FAIL();
  } catch (const InputError& e) {
    ASSERT_EQ(e.problems().size(), 2u);
    EXPECT_EQ(e.problems()[0].to_string(),
              "subcatchment 'alder', field 'initial_capacity_m_s' = 1e-06: must be >= "
              "final_capacity_m_s = 2e-06");
    EXPECT_EQ(e.problems()[1].to_string(),
              "subcatchment 'alder', field 'decay_rate_per_s' = 0: must be > 0");
  }
  EXPECT_THROW(HortonLoss({.initial_capacity_m_s = 1e-6, .final_capacity_m_s = -1e-7,
                           .decay_rate_per_s = 1e-3}, "subcatchment 'alder'"),
               InputError);
}

// A valid but pathological soil: f_c = 1e308 m/s, f_0 = 1.7e308 m/s, k = 1 /s. Seeking the
// equivalent time of F = 1.7e308 m doubles the bracket until F(tau) overflows to infinity
// (IEEE 754 binary64: largest finite value about 1.8e308), where no root can be bracketed.
// The failure is a NumericalError naming the element, quantity and value, not an abort.
TEST(Horton, OverflowingIterationIsANumericalErrorNamingTheSoil) {
  const HortonParameters p{
      .initial_capacity_m_s = 1.7e308, .final_capacity_m_s = 1e308, .decay_rate_per_s = 1.0};
  try {
    (void)p.equivalent_time_s(1.7e308, "subcatchment 'alder'");
    FAIL() << "no NumericalError";
  } catch (const NumericalError& e) {
    const std::string what = e.what();
    EXPECT_NE(what.find("subcatchment 'alder': Horton equivalent time (s) did not converge for "
                        "cumulative infiltration F = 1.7e+308 m"),
              std::string::npos)
        << what;
  }
}

}  // namespace
}  // namespace freshet::hydrology
