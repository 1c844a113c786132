#include "freshet/hydrology/green_ampt.hpp"

#include <cmath>
#include <string>
#include <gtest/gtest.h>

#include "freshet/verification/problems.hpp"

namespace freshet::hydrology {
namespace {

constexpr double kCm = 0.01;
constexpr double kHour = 3600.0;

// Silt loam as in Chow, Maidment & Mays (1988), Applied Hydrology, Examples 4.3.1 and 4.4.1:
// K = 0.65 cm/h, psi = 16.7 cm, theta_e = 0.486, S_e = 0.3 (dtheta = 0.340); porosity 0.501
// (Rawls, Brakensiek & Miller 1983). Written once in freshet/verification/problems.hpp,
// shared with `freshet verify`.
using verification::silt_loam;

// CMM 1988 Example 4.3.1 (from memory): after 1 h of ponding F = 3.17 cm, f = 1.81 cm/h
// (evaluating eq. 4.3.7 at F = 3.167 cm gives 1.816 cm/h; the text rounds).
TEST(GreenAmpt, PondedInfiltrationMatchesChowExample4_3_1) {
  const GreenAmptParameters p = silt_loam();
  EXPECT_NEAR(p.moisture_deficit(), 0.340, 0.0005);
  const double f_cm = green_ampt_ponded_infiltration_m(p, kHour) / kCm;
  EXPECT_NEAR(f_cm, verification::kSiltLoamPondedDepthAfter1h_cm, 0.005);
  EXPECT_NEAR(green_ampt_capacity_m_s(p, f_cm * kCm) * kHour / kCm, 1.81, 0.01);
}

// CMM 1988 Example 4.4.1 (from memory): t_p = 0.17 h under 5 cm/h, 10.5 h under 1 cm/h.
TEST(GreenAmpt, PondingTimeMatchesChowExample4_4_1) {
  const GreenAmptParameters p = silt_loam();
  EXPECT_NEAR(green_ampt_ponding_time_s(p, 5.0 * kCm / kHour) / kHour,
              verification::kSiltLoamPondingTimeUnder5cmh_h, 0.005);
  EXPECT_NEAR(green_ampt_ponding_time_s(p, 1.0 * kCm / kHour) / kHour, 10.5, 0.06);
  EXPECT_TRUE(std::isinf(green_ampt_ponding_time_s(p, 0.5 * kCm / kHour)));
}

// Mein & Larson (1973), CMM eq. 4.4.6: under constant i, F = i t until t_p, then
// F - F_p - psi dtheta ln((F + psi dtheta)/(F_p + psi dtheta)) = K (t - t_p). The stepped
// model must satisfy that equation whatever the steps, ponding falling inside a step.
TEST(GreenAmpt, SteppedConstantRainFollowsMeinLarsonForAnyStep) {
  const GreenAmptParameters p = silt_loam();
  const double i = 5.0 * kCm / kHour, k = p.hydraulic_conductivity_m_s;
  const double a = p.suction_deficit_m();
  const double fp = k * a / (i - k), tp = fp / i;
  for (int steps : {1, 7, 120}) {
    GreenAmptLoss soil(p, "subcatchment 'alder'");
    const double dt = 2.0 * kHour / steps;
    for (int s = 0; s < steps; ++s) soil.step(i * dt, dt);
    const double f = soil.cumulative_infiltration_m();
    const double residual = f - fp - a * std::log((f + a) / (fp + a)) - k * (2.0 * kHour - tp);
    EXPECT_NEAR(residual, 0.0, 1e-14) << steps << " steps";
    EXPECT_NEAR(soil.ledger().loss_m, f, 1e-15);
    EXPECT_NEAR(soil.ledger().closure_error_m(), 0.0, 1e-15);
  }
}

// Before ponding all rain infiltrates; light rain (i < K) never runs off.
TEST(GreenAmpt, NoExcessBeforePondingOrUnderLightRain) {
  GreenAmptLoss soil(silt_loam(), "subcatchment 'alder'");
  const double i = 5.0 * kCm / kHour;
  EXPECT_EQ(soil.excess_depth_m(i * 0.1 * kHour, 0.1 * kHour), 0.0);  // 0.1 h < t_p = 0.17 h
  EXPECT_GT(soil.excess_depth_m(i * 0.1 * kHour, 0.1 * kHour), 0.0);
  GreenAmptLoss light(silt_loam(), "subcatchment 'alder'");
  for (int s = 0; s < 48; ++s) EXPECT_EQ(light.excess_depth_m(0.6 * kCm, kHour), 0.0);
}

// Recovery in dry spells, our rule F := F e^(-k_r dt) (common practice, no source): a dry
// spell cut into any steps leaves F_w e^(-k_r D) (the exponential composes). A heavy burst
// (5 cm/h on silt loam, ponded at once once F > F_p) after the gap then follows Mein & Larson
// (1973), CMM eq. 4.4.6, from the recovered F_0: ponded from F_0 when f(F_0) <= i, i.e.
// F - F_0 - psi dtheta ln((F + psi dtheta)/(F_0 + psi dtheta)) = K t, and after a long gap
// it runs off as the first burst did.
TEST(GreenAmptRecovery, DrySpellDrainsTheWettedDepthExponentially) {
  GreenAmptParameters p = silt_loam();
  p.recovery_rate_per_s = 0.05 / kHour;
  const double i = 5.0 * kCm / kHour, burst_s = 2.0 * kHour;
  for (int dry_steps : {1, 9, 240}) {
    GreenAmptLoss soil(p, "subcatchment 'alder'");
    const double first = soil.excess_depth_m(i * burst_s, burst_s);
    const double f_w = soil.cumulative_infiltration_m();
    for (int s = 0; s < dry_steps; ++s) soil.step(0.0, 10.0 * kHour / dry_steps);
    const double f0 = f_w * std::exp(-0.5);
    EXPECT_NEAR(soil.cumulative_infiltration_m(), f0, 1e-15) << dry_steps << " dry steps";
    ASSERT_LE(green_ampt_capacity_m_s(p, f0), i);  // the next burst ponds at once
    soil.step(i * burst_s, burst_s);
    const double f = soil.cumulative_infiltration_m();
    const double a = p.suction_deficit_m(), k = p.hydraulic_conductivity_m_s;
    EXPECT_NEAR(f - f0 - a * std::log((f + a) / (f0 + a)) - k * burst_s, 0.0, 1e-14);
    EXPECT_NEAR(soil.ledger().closure_error_m(), 0.0, 1e-15);
    soil.step(0.0, 30.0 * 24.0 * kHour);  // e^(-36) of F is left
    EXPECT_NEAR(soil.excess_depth_m(i * burst_s, burst_s), first, 1e-12);
  }
  p.recovery_rate_per_s = -1e-6;
  EXPECT_THROW(GreenAmptLoss(p, "subcatchment 'alder'"), InputError);
}

TEST(GreenAmpt, RejectsPhysicallyImpossibleSoils) {
  try {
    GreenAmptLoss soil({.hydraulic_conductivity_m_s = 0.0, .suction_head_m = -0.1,
                        .porosity = 1.2, .effective_porosity = 0.4,
                        .initial_effective_saturation = 1.0},
                       "subcatchment 'alder'");
    FAIL();
  } catch (const InputError& e) {
    ASSERT_EQ(e.problems().size(), 4u);
    EXPECT_EQ(e.problems()[0].to_string(),
              "subcatchment 'alder', field 'hydraulic_conductivity_m_s' = 0: must be > 0");
    EXPECT_EQ(e.problems()[2].to_string(),
              "subcatchment 'alder', field 'porosity' = 1.2: must be in (0, 1)");
    EXPECT_EQ(e.problems()[3].to_string(),
              "subcatchment 'alder', field 'initial_effective_saturation' = 1: must be in "
              "[0, 1) (initial moisture below saturation, theta_i < theta_s)");
  }
  GreenAmptParameters p = silt_loam();
  p.effective_porosity = 0.6;
  EXPECT_THROW(GreenAmptLoss(p, "subcatchment 'alder'"), InputError);
}

// A valid but pathological soil: K = 1e300 m/s over 1e10 s makes K t overflow the double
// range (IEEE 754 binary64: largest finite value about 1.8e308), so the ponded equation has
// no finite root. The failure is a NumericalError naming the element, quantity and value,
// not an abort.
TEST(GreenAmpt, OverflowingIterationIsANumericalErrorNamingTheSoil) {
  GreenAmptParameters p = silt_loam();
  p.hydraulic_conductivity_m_s = 1e300;
  try {
    (void)green_ampt_ponded_infiltration_m(p, 1e10, "subcatchment 'alder'");
    FAIL() << "no NumericalError";
  } catch (const NumericalError& e) {
    const std::string what = e.what();
    EXPECT_NE(what.find("subcatchment 'alder': Green-Ampt ponded infiltration increment (m) "
                        "did not converge for K t = inf m from F = 0 m over 1e+10 s"),
              std::string::npos)
        << what;
  }
}

}  // namespace
}  // namespace freshet::hydrology
