// Whether the kinematic (or the diffusion) wave approximation suits a flood wave in a channel.
//
// Ponce, Li & Simons (1978), "Applicability of kinematic and diffusion models", J. Hydraulics
// Div. ASCE 104(HY3), compared kinematic and diffusion waves with dynamic waves in linear
// theory. Written with a hydrograph's time of rise t_r, as in Ponce (1989), Engineering
// Hydrology: Principles and Practices, Prentice Hall:
//
//   kinematic wave applicable when  t_r S0 u0 / d0        >= 85
//   diffusion wave applicable when  t_r S0 (g / d0)^(1/2) >= 15
//
// (S0 bed slope, u0 and d0 reference mean velocity and flow depth). With a wave period of
// T = 2 t_r these are the 1978 paper's T S0 u0/d0 >= 171 and T S0 (g/d0)^(1/2) >= 30.
// Pure function, no I/O:
//
//   auto a = routing::wave_applicability(3 * 3600.0, 0.002, 1.8, 2.4);
//   a.kinematic_number;   // 16.2 -> !a.kinematic_ok (below 85)
#pragma once

namespace freshet::routing {

inline constexpr double kKinematicApplicabilityLimit = 85.0;
inline constexpr double kDiffusionApplicabilityLimit = 15.0;

struct WaveApplicability {
  double kinematic_number = 0.0;  // t_r S0 u0 / d0
  double diffusion_number = 0.0;  // t_r S0 (g / d0)^(1/2)
  bool kinematic_ok = false;      // kinematic_number >= 85
  bool diffusion_ok = false;      // diffusion_number >= 15
};

// Ponce's criteria as a choice of method: the kinematic wave where its number is >= 85, the
// diffusion wave where only the diffusion number is >= 15, neither below both (a dynamic-wave
// model is needed there).
enum class WaveChoice { kKinematic, kDiffusion, kNeither };
[[nodiscard]] WaveChoice choose_wave(const WaveApplicability& a) noexcept;

// Throws InputError unless time_of_rise_s, bed_slope, mean_velocity_m_s and flow_depth_m are
// all finite and positive.
[[nodiscard]] WaveApplicability wave_applicability(double time_of_rise_s, double bed_slope,
                                                   double mean_velocity_m_s,
                                                   double flow_depth_m);

}  // namespace freshet::routing
