#include "freshet/hydrology/initial_continuing_loss.hpp"

#include <algorithm>

namespace freshet::hydrology {

void InitialContinuingParameters::validate(ProblemList& problems) const {
  problems.require_non_negative("initial_loss_m", initial_loss_m);
  problems.require_non_negative("continuing_loss_m_s", continuing_loss_m_s);
}

InitialContinuingLoss::InitialContinuingLoss(const InitialContinuingParameters& parameters,
                                             const std::string& element)
    : parameters_(parameters), remaining_initial_m_(parameters.initial_loss_m) {
  ProblemList problems(element);
  parameters_.validate(problems);
  problems.throw_if_any();
}

std::unique_ptr<LossModel> InitialContinuingLoss::clone() const {
  return std::make_unique<InitialContinuingLoss>(*this);
}

LossStep InitialContinuingLoss::split(double rain_depth_m, double step_s) {
  if (rain_depth_m <= 0.0) return {};
  const double initial = std::min(rain_depth_m, remaining_initial_m_);
  remaining_initial_m_ -= initial;
  const double rest_m = rain_depth_m - initial;
  // Time still left in the step once the initial loss is satisfied at intensity rain / step.
  const double rest_s = step_s * (rest_m / rain_depth_m);
  const double continuing = std::min(rest_m, parameters_.continuing_loss_m_s * rest_s);
  return {initial + continuing, rest_m - continuing};
}

}  // namespace freshet::hydrology
