// Green-Ampt infiltration with ponding under variable rainfall (Green & Ampt 1911; Mein &
// Larson 1973, "Modeling infiltration during a steady rain", Water Resour. Res. 9(2);
// Chow, Maidment & Mays 1988, Applied Hydrology, sec. 4.3-4.4).
//
//   f = K (1 + psi dtheta / F)                       infiltration capacity (CMM eq. 4.3.7)
//   K t = F - psi dtheta ln(1 + F / (psi dtheta))     ponded from t = 0 (CMM eq. 4.3.6)
//   F_p = K psi dtheta / (i - K), t_p = F_p / i       ponding under constant i > K (eq. 4.4.2)
//   dtheta = (1 - S_e) theta_e                        moisture deficit (CMM eq. 4.3.9)
// Within a step of constant intensity i, CMM sec. 4.4: ponded at the start (f <= i) -> the
// ponded equation from F_t; otherwise infiltrate at i, and if F reaches F_p inside the step,
// continue ponded from F_p for the rest of it. F is found by safeguarded Newton.
// Recovery in dry spells (optional, constant k_r > 0; our rule, common practice, no source):
// over a step without rain the wetted depth the capacity depends on drains away
// exponentially, F := F e^(-k_r dt), the form of Horton's recovery curve applied to F, so
// after a long dry spell the soil is back at its initial moisture deficit (F -> 0). It is not
// a redistribution model: the wetting front is not tracked while it moves down. With
// k_r = 0 (the default) the soil does not recover.
// Typical parameters by soil texture: Rawls, Brakensiek & Miller (1983), "Green-Ampt
// infiltration parameters from soils data", J. Hydraulic Eng. 109(1) (CMM Table 4.3.1).
//
//   GreenAmptParameters silt_loam{.hydraulic_conductivity_m_s = 0.65e-2 / 3600.0,
//                                 .suction_head_m = 0.1668, .porosity = 0.501,
//                                 .effective_porosity = 0.486,
//                                 .initial_effective_saturation = 0.3};
//   GreenAmptLoss soil(silt_loam, "subcatchment 'alder'");
#pragma once

#include <string>
#include <string_view>

#include "freshet/core/error.hpp"
#include "freshet/hydrology/loss_model.hpp"

namespace freshet::hydrology {

struct GreenAmptParameters {
  double hydraulic_conductivity_m_s = 0.0;   // K, saturated (m/s), > 0
  double suction_head_m = 0.0;               // psi, wetting-front suction head (m), > 0
  double porosity = 0.0;                     // eta = theta_s, in (0, 1)
  double effective_porosity = 0.0;           // theta_e = eta - theta_r, in (0, eta]
  double initial_effective_saturation = 0.0; // S_e = (theta_i - theta_r) / theta_e, in [0, 1)
  double recovery_rate_per_s = 0.0;          // k_r (1/s), >= 0; 0: no recovery in dry spells

  // Problems for: K or psi <= 0; porosities outside (0, 1) or theta_e > eta; S_e outside
  // [0, 1) (S_e >= 1 means theta_i >= theta_s: no deficit to fill).
  void validate(ProblemList& problems) const;
  [[nodiscard]] double moisture_deficit() const;        // dtheta = (1 - S_e) theta_e
  [[nodiscard]] double suction_deficit_m() const;       // psi dtheta (m)
};

// Infiltration capacity f (m/s) once F (m) has infiltrated (infinite at F = 0).
double green_ampt_capacity_m_s(const GreenAmptParameters& p, double cumulative_m);
// F (m) after `time_s` of ponded infiltration starting from F = 0 (CMM eq. 4.3.6). Throws
// NumericalError naming `element` when the iteration fails (K t beyond the double range).
double green_ampt_ponded_infiltration_m(const GreenAmptParameters& p, double time_s,
                                        std::string_view element = "Green-Ampt soil");
// Ponding time (s) under constant intensity from a dry start; +inf when i <= K.
double green_ampt_ponding_time_s(const GreenAmptParameters& p, double intensity_m_s);

class GreenAmptLoss final : public LossModel {
 public:
  // Throws InputError naming `element` for invalid parameters (all problems at once); a
  // step whose infiltration iteration fails throws NumericalError naming it.
  GreenAmptLoss(const GreenAmptParameters& parameters, const std::string& element);
  [[nodiscard]] std::unique_ptr<LossModel> clone() const override;
  [[nodiscard]] std::string_view method() const override { return "Green-Ampt"; }
  // F: the infiltrated depth that sets the capacity (less what dry spells recovered).
  [[nodiscard]] double cumulative_infiltration_m() const { return infiltrated_m_; }

 private:
  LossStep split(double rain_depth_m, double step_s) override;
  void reset_state() override { infiltrated_m_ = 0.0; }
  void visit_stores(StateVisitor& v) override { v.value("infiltrated_m", infiltrated_m_); }

  GreenAmptParameters parameters_;
  std::string element_;         // named in a numerical failure
  double infiltrated_m_ = 0.0;  // F
};

}  // namespace freshet::hydrology
