// Kinematic- and diffusion-wave applicability numbers: the closed forms on invented data, and
// the criteria of Ponce, Li & Simons (1978), "Applicability of kinematic and diffusion
// models", J. Hydraulics Div. ASCE 104(HY3), 353-360.
#include "freshet/routing/applicability.hpp"
#include "freshet/routing/routing_options.hpp"

#include <gtest/gtest.h>

#include <cmath>

#include "freshet/core/error.hpp"
#include "freshet/verification/problems.hpp"

namespace freshet::routing {
namespace {

// Closed forms on an invented reach (t_r = 3 h, S0 = 0.002, u0 = 1.8 m/s, d0 = 2.4 m), in the
// time-of-rise form of Ponce (1989), Engineering Hydrology, Prentice Hall:
//   N = t_r S0 u0 / d0 = 10800 x 0.002 x 1.8 / 2.4 = 16.2
//   M = t_r S0 (g / d0)^(1/2) = 21.6 x (9.80665 / 2.4)^(1/2) = 43.662487 (g standard gravity)
// Expected values evaluated separately in double precision; a slip in either form (a wave
// period 2 t_r in place of t_r, u0 and d0 swapped, g left out) moves them by far more than
// the tolerance.
TEST(WaveApplicability, ClosedFormsOnAnInventedReach) {
  const WaveApplicability a = wave_applicability(3.0 * 3600.0, 0.002, 1.8, 2.4);
  EXPECT_NEAR(a.kinematic_number, 16.2, 1e-9);
  EXPECT_NEAR(a.diffusion_number, 43.662487, 1e-6);
  EXPECT_FALSE(a.kinematic_ok);  // 16.2 < 85
  EXPECT_TRUE(a.diffusion_ok);   // 43.7 >= 15
}

// The 1978 paper states the criteria with the wave period T: T S0 u0/d0 >= 171 (kinematic)
// and T S0 (g/d0)^(1/2) >= 30 (diffusion). On the same invented reach, the time of rise that
// puts the wave on each boundary with T = 2 t_r must give freshet's t_r numbers 85.5 and 15
// (the reach and the kinematic boundary: freshet/verification/problems.hpp, PonceReach).
TEST(WaveApplicability, MatchesThePaperCriteriaWithAWavePeriodOfTwiceTheRise) {
  const verification::PonceReach reach;
  const double s0 = reach.bed_slope, u0 = reach.velocity_m_s, d0 = reach.depth_m;
  const double kinematic_boundary_s = reach.kinematic_boundary_rise_s();
  EXPECT_NEAR(wave_applicability(kinematic_boundary_s, s0, u0, d0).kinematic_number,
              reach.kinematic_period_number / 2.0, 1e-9);
  EXPECT_TRUE(wave_applicability(kinematic_boundary_s, s0, u0, d0).kinematic_ok);
  const double diffusion_boundary_s = 30.0 / (s0 * std::sqrt(9.80665 / d0)) / 2.0;
  EXPECT_NEAR(wave_applicability(diffusion_boundary_s, s0, u0, d0).diffusion_number, 15.0, 1e-9);
}

// The thresholds are the 1978 paper's T S0 u0/d0 >= 171 and T S0 (g/d0)^(1/2) >= 30 with
// T = 2 t_r, rounded down as in Ponce (1989): a wave just under 85 fails, at 85 it passes.
TEST(WaveApplicability, ThresholdsSeparateKinematicDiffusionAndDynamicWaves) {
  // t_r S0 u0/d0 = 3600 * 0.001 * 1.0 / 0.05 = 72 (< 85); diffusion 3600*0.001*14.0 = 50.4.
  const WaveApplicability flat = wave_applicability(3600.0, 0.001, 1.0, 0.05);
  EXPECT_FALSE(flat.kinematic_ok);
  EXPECT_TRUE(flat.diffusion_ok);

  // A fast wave on a very flat, deep channel: neither approximation holds.
  const WaveApplicability tidal = wave_applicability(600.0, 0.0001, 1.0, 4.0);
  EXPECT_FALSE(tidal.kinematic_ok);
  EXPECT_FALSE(tidal.diffusion_ok);

  EXPECT_TRUE(wave_applicability(85.0, 1.0, 1.0, 1.0).kinematic_ok);
  EXPECT_FALSE(wave_applicability(84.999, 1.0, 1.0, 1.0).kinematic_ok);
}

// The choice of method follows the two criteria (Ponce 1989): kinematic where its number holds
// (whatever the diffusion number), diffusion where only the diffusion number holds, neither
// below both. The scheme registry knows which scheme routes which wave.
TEST(WaveApplicability, ChoosesTheWaveFromTheTwoCriteria) {
  EXPECT_EQ(choose_wave(wave_applicability(85.0, 1.0, 1.0, 1.0)), WaveChoice::kKinematic);
  EXPECT_EQ(choose_wave(wave_applicability(3600.0, 0.001, 1.0, 0.05)), WaveChoice::kDiffusion);
  EXPECT_EQ(choose_wave(wave_applicability(600.0, 0.0001, 1.0, 4.0)), WaveChoice::kNeither);
  EXPECT_TRUE(routes_diffusion_wave(SchemeKind::kMuskingumCunge));
  EXPECT_FALSE(routes_diffusion_wave(SchemeKind::kMusclHeun));
  EXPECT_FALSE(routes_diffusion_wave(SchemeKind::kCharacteristics));
}

TEST(WaveApplicability, RejectsNonPositiveOrNonFiniteInput) {
  EXPECT_THROW((void)wave_applicability(0.0, 0.01, 1.0, 1.0), InputError);
  EXPECT_THROW((void)wave_applicability(3600.0, -0.01, 1.0, 1.0), InputError);
  EXPECT_THROW((void)wave_applicability(3600.0, 0.01, 1.0, 0.0), InputError);
  EXPECT_THROW((void)wave_applicability(3600.0, 0.01, std::nan(""), 1.0), InputError);
}

}  // namespace
}  // namespace freshet::routing
