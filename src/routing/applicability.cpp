#include "freshet/routing/applicability.hpp"

#include <cmath>

#include "freshet/core/error.hpp"
#include "freshet/core/units.hpp"

namespace freshet::routing {

WaveApplicability wave_applicability(double time_of_rise_s, double bed_slope,
                                     double mean_velocity_m_s, double flow_depth_m) {
  ProblemList problems("kinematic-wave applicability");
  problems.require_positive("time_of_rise_s", time_of_rise_s);
  problems.require_positive("bed_slope", bed_slope);
  problems.require_positive("mean_velocity_m_s", mean_velocity_m_s);
  problems.require_positive("flow_depth_m", flow_depth_m);
  problems.throw_if_any();

  WaveApplicability a;
  a.kinematic_number = time_of_rise_s * bed_slope * mean_velocity_m_s / flow_depth_m;
  a.diffusion_number =
      time_of_rise_s * bed_slope * std::sqrt(units::kGravity_m_s2 / flow_depth_m);
  a.kinematic_ok = a.kinematic_number >= kKinematicApplicabilityLimit;
  a.diffusion_ok = a.diffusion_number >= kDiffusionApplicabilityLimit;
  return a;
}

WaveChoice choose_wave(const WaveApplicability& a) noexcept {
  if (a.kinematic_ok) return WaveChoice::kKinematic;
  return a.diffusion_ok ? WaveChoice::kDiffusion : WaveChoice::kNeither;
}

}  // namespace freshet::routing
