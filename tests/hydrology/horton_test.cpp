#include "freshet/hydrology/horton.hpp"

#include <cmath>
#include <string>
#include <utility>
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

// Recovery in dry spells: f_0 - f(t) = (f_0 - f(t_w)) e^(-k_d (t - t_w)) (Bedient, Huber &
// Vieux, Hydrology and Floodplain Analysis, ch. 2; Akan 1993, Urban Stormwater Hydrology; the
// exponential recovery form, from memory). A dry spell cut into any number of steps gives the
// capacity of the closed form (the exponential is a semigroup), to round-off.
HortonParameters recovering_soil(double recovery_per_h) {
  HortonParameters p = soil();
  p.recovery_rate_per_s = recovery_per_h / kHour;
  return p;
}

TEST(HortonRecovery, DrySpellFollowsTheExponentialRecoveryCurve) {
  const double f0 = 75.0 * kMmPerHour, kd = 0.1 / kHour, dry_s = 24.0 * kHour;
  for (int dry_steps : {1, 7, 288}) {
    HortonLoss loss(recovering_soil(0.1), "subcatchment 'alder'");
    loss.step(100.0 * kMmPerHour * 0.3 * kHour, 0.3 * kHour);  // ponds at once: i > f0
    const double f1 = loss.capacity_m_s();
    for (int s = 0; s < dry_steps; ++s) loss.step(0.0, dry_s / dry_steps);
    const double expected = f0 - (f0 - f1) * std::exp(-kd * dry_s);
    EXPECT_NEAR(loss.capacity_m_s(), expected, 1e-12 * f0) << dry_steps << " dry steps";
    EXPECT_NEAR(loss.ledger().closure_error_m(), 0.0, 1e-15);
  }
}

// Two heavy bursts (100 mm/h > f0 for 0.3 h: ponded throughout) a gap D apart. The first
// infiltrates F(T); after the gap the soil is at the equivalent time tau' of the recovered
// capacity, 1 - e^(-k tau') = (1 - e^(-k T)) e^(-k_d D), and the second infiltrates
// F(tau' + T) - F(tau'), F(t) = f_c t + (f_0 - f_c)(1 - e^(-k t))/k (Horton 1940; Chow,
// Maidment & Mays 1988 eq. 4.2.14). As D grows the second burst's excess tends to the first's.
TEST(HortonRecovery, SecondBurstStartsFromTheRecoveredCapacity) {
  const HortonParameters p = recovering_soil(0.1);
  const double k = p.decay_rate_per_s, burst_s = 0.3 * kHour;
  const double rain = 100.0 * kMmPerHour * burst_s;
  auto big_f = [&](double t) {
    return 10.0 * kMmPerHour * t + 65.0 * kMmPerHour * (1.0 - std::exp(-k * t)) / k;
  };
  const double first_excess = rain - big_f(burst_s);
  double previous_excess = rain;
  for (double gap_h : {6.0, 24.0, 72.0, 14.0 * 24.0}) {
    HortonLoss loss(p, "subcatchment 'alder'");
    EXPECT_NEAR(loss.excess_depth_m(rain, burst_s), first_excess, 1e-15);
    loss.step(0.0, gap_h * kHour);
    const double tau = -std::log(1.0 - (1.0 - std::exp(-k * burst_s)) *
                                           std::exp(-p.recovery_rate_per_s * gap_h * kHour)) / k;
    const double second = loss.excess_depth_m(rain, burst_s);
    EXPECT_NEAR(second, rain - (big_f(tau + burst_s) - big_f(tau)), 1e-14) << gap_h << " h";
    EXPECT_LT(second, previous_excess) << "a longer gap recovers more";
    previous_excess = second;
  }
  // e^(-0.1 x 336) = 2.6e-15 of the first burst's loss of capacity remains after 14 days.
  EXPECT_NEAR(previous_excess, first_excess, 1e-12);
}

// The record of issue 20: 30 mm bursts (30 mm/h for 1 h) 24 h apart. Without recovery the
// second burst finds the capacity the first left and runs off far more; with k_d = 0.1 /h
// (95 % recovered in a day: e^(-2.4) = 0.09 left) it comes close to the first, and after a
// week it is the first's to 1e-9 m. Checks the ordering the closed forms imply.
TEST(HortonRecovery, BurstsADayApartRunOffAlikeOnlyWithRecovery) {
  const double rain = 30e-3, burst_s = kHour;
  auto two_bursts = [&](double recovery_per_h, double gap_h) {
    HortonLoss loss(recovering_soil(recovery_per_h), "subcatchment 'alder'");
    const double a = loss.excess_depth_m(rain, burst_s);
    loss.step(0.0, gap_h * kHour);
    return std::pair{a, loss.excess_depth_m(rain, burst_s)};
  };
  const auto [first, kept] = two_bursts(0.0, 24.0);
  const auto [first_again, recovered] = two_bursts(0.1, 24.0);
  const auto [first_week, week] = two_bursts(0.1, 7 * 24.0);
  EXPECT_EQ(first, first_again);
  EXPECT_EQ(first, first_week);
  EXPECT_GT(kept, first + 5e-3);
  EXPECT_GT(recovered, first);
  EXPECT_LT(recovered - first, 0.2 * (kept - first));
  EXPECT_NEAR(week, first, 1e-9);
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
  EXPECT_THROW(HortonLoss({.initial_capacity_m_s = 1e-6, .final_capacity_m_s = 1e-7,
                           .decay_rate_per_s = 1e-3, .recovery_rate_per_s = -1e-5},
                          "subcatchment 'alder'"),
               InputError);
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
