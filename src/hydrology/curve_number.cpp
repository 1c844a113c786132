#include "freshet/hydrology/curve_number.hpp"

#include <cmath>

#include "freshet/core/units.hpp"

namespace freshet::hydrology {

void CurveNumberParameters::validate(ProblemList& problems) const {
  if (!std::isfinite(curve_number)) {
    problems.require_finite("curve_number", curve_number);
  } else {
    problems.require(curve_number > 30.0 && curve_number <= 100.0, "curve_number", curve_number,
                     "must be in (30, 100]");
  }
  if (!std::isfinite(initial_abstraction_ratio)) {
    problems.require_finite("initial_abstraction_ratio", initial_abstraction_ratio);
  } else {
    problems.require(initial_abstraction_ratio >= 0.0 && initial_abstraction_ratio < 1.0,
                     "initial_abstraction_ratio", initial_abstraction_ratio,
                     "must be in [0, 1)");
  }
  if (convert_storage_for_ratio_0_05) {
    problems.require(initial_abstraction_ratio == 0.05, "initial_abstraction_ratio",
                     initial_abstraction_ratio,
                     "must be 0.05 when convert_storage_for_ratio_0_05 is set");
  }
}

double CurveNumberParameters::retention_m() const {
  const double s_in = 1000.0 / curve_number - 10.0;  // TR-55 eq. 2-4, inches
  // Hawkins et al. (2002): S_0.05 = 1.33 S_0.2^1.15, S in inches (from memory).
  const double s = convert_storage_for_ratio_0_05 ? 1.33 * std::pow(s_in, 1.15) : s_in;
  return s * units::kMetresPerInch;
}

double CurveNumberParameters::initial_abstraction_m() const {
  return initial_abstraction_ratio * retention_m();
}

double curve_number_runoff_m(const CurveNumberParameters& parameters, double rain_m) {
  const double s = parameters.retention_m();
  const double surplus = rain_m - parameters.initial_abstraction_ratio * s;
  if (surplus <= 0.0) return 0.0;
  return surplus * surplus / (surplus + s);  // TR-55 eq. 2-3
}

CurveNumberLoss::CurveNumberLoss(const CurveNumberParameters& parameters,
                                 const std::string& element)
    : parameters_(parameters) {
  ProblemList problems(element);
  parameters_.validate(problems);
  problems.throw_if_any();
}

std::unique_ptr<LossModel> CurveNumberLoss::clone() const {
  return std::make_unique<CurveNumberLoss>(*this);
}

LossStep CurveNumberLoss::split(double rain_depth_m, double /*step_s*/) {
  const double p_old = rain_m_;
  const double p_new = rain_m_ + rain_depth_m;
  const double q_old = curve_number_runoff_m(parameters_, p_old);
  const double q_new = curve_number_runoff_m(parameters_, p_new);
  rain_m_ = p_new;
  // Loss as the change of the cumulative retention P - Q, so the ledger telescopes.
  return {(p_new - q_new) - (p_old - q_old), q_new - q_old};
}

}  // namespace freshet::hydrology
