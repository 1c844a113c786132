// NRCS curve number loss (USDA SCS 1986, "Urban Hydrology for Small Watersheds", TR-55,
// 2nd ed., ch. 2, eqs. 2-1 to 2-4; NEH Part 630 ch. 10).
//
//   S = 25400 / CN - 254           potential maximum retention (mm) [S = 1000/CN - 10 in]
//   Ia = lambda S                   initial abstraction, lambda = 0.2 by default
//   Q = (P - Ia)^2 / (P - Ia + S)   cumulative runoff for cumulative rain P > Ia, else 0
// Step by step, the excess of a step is Q(P_new) - Q(P_old) and its loss the rest, so the
// storm's excess does not depend on the step.
// With lambda = 0.05, Hawkins et al. (2002, "Runoff curve number method: examination of the
// initial abstraction ratio", ASCE Federal Interagency Hydrologic Modeling Conference) give
// S_0.05 = 1.33 S_0.2^1.15 (inches) to keep the handbook CN; set
// convert_storage_for_ratio_0_05 to apply it (coefficients from memory). Otherwise Ia is
// simply lambda S.
//
//   CurveNumberLoss soil({.curve_number = 75.0}, "subcatchment 'alder'");
//   curve_number_runoff_m({.curve_number = 75.0}, 0.1016);  // 4.0 in of rain -> 1.67 in
#pragma once

#include <string>

#include "freshet/core/error.hpp"
#include "freshet/hydrology/loss_model.hpp"

namespace freshet::hydrology {

struct CurveNumberParameters {
  double curve_number = 0.0;                    // CN, dimensionless, in (30, 100]
  double initial_abstraction_ratio = 0.2;       // lambda, in [0, 1)
  bool convert_storage_for_ratio_0_05 = false;  // Hawkins et al. 2002; needs lambda = 0.05

  void validate(ProblemList& problems) const;
  [[nodiscard]] double retention_m() const;             // S (m)
  [[nodiscard]] double initial_abstraction_m() const;   // Ia = lambda S (m)
};

// Cumulative runoff Q (m) for cumulative rain P (m).
double curve_number_runoff_m(const CurveNumberParameters& parameters, double rain_m);

class CurveNumberLoss final : public LossModel {
 public:
  // Throws InputError naming `element` (e.g. "subcatchment 'alder'") for invalid parameters.
  CurveNumberLoss(const CurveNumberParameters& parameters, const std::string& element);
  [[nodiscard]] std::unique_ptr<LossModel> clone() const override;
  [[nodiscard]] std::string_view method() const override { return "curve number"; }
  [[nodiscard]] double cumulative_rain_m() const { return rain_m_; }

 private:
  LossStep split(double rain_depth_m, double step_s) override;
  void reset_state() override { rain_m_ = 0.0; }

  CurveNumberParameters parameters_;
  double rain_m_ = 0.0;
};

}  // namespace freshet::hydrology
