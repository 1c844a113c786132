// Kinematic- and diffusion-wave applicability numbers against a published worked solution.
#include "freshet/routing/applicability.hpp"

#include <gtest/gtest.h>

#include <cmath>

#include "freshet/core/error.hpp"

namespace freshet::routing {
namespace {

// Worked values: V. M. Ponce (2014), San Diego State University, CIV E 445 Applied
// Hydrology, Lab No. 11 solution, applying Ponce (1989), Engineering Hydrology, eq. 9-44
// (kinematic) and eq. 9-60 (diffusion):
//   N = (6 h x 3600 s/h x 0.015 x 1.5 m/s) / (3 m) = 162 > 85  -> kinematic wave;
//   M = 6 h x 3600 s/h x 0.005 x (9.81 m/s2 / 3.0 m)^(1/2) = 195 > 15 -> diffusion wave.
// (The solution uses S0 = 0.015 in the first and 0.005 in the second; both are reproduced.)
TEST(WaveApplicability, ReproducesPublishedWorkedValues) {
  const double six_hours_s = 6.0 * 3600.0;
  const WaveApplicability k = wave_applicability(six_hours_s, 0.015, 1.5, 3.0);
  EXPECT_NEAR(k.kinematic_number, 162.0, 1e-9);
  EXPECT_TRUE(k.kinematic_ok);

  const WaveApplicability d = wave_applicability(six_hours_s, 0.005, 1.5, 3.0);
  EXPECT_NEAR(d.diffusion_number, 195.0, 0.5);  // g = 9.80665 here, 9.81 in the solution
  EXPECT_TRUE(d.diffusion_ok);
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

TEST(WaveApplicability, RejectsNonPositiveOrNonFiniteInput) {
  EXPECT_THROW((void)wave_applicability(0.0, 0.01, 1.0, 1.0), InputError);
  EXPECT_THROW((void)wave_applicability(3600.0, -0.01, 1.0, 1.0), InputError);
  EXPECT_THROW((void)wave_applicability(3600.0, 0.01, 1.0, 0.0), InputError);
  EXPECT_THROW((void)wave_applicability(3600.0, 0.01, std::nan(""), 1.0), InputError);
}

}  // namespace
}  // namespace freshet::routing
