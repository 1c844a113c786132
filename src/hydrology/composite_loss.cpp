#include "freshet/hydrology/composite_loss.hpp"

#include <algorithm>
#include <cmath>

namespace freshet::hydrology {

void ImperviousCover::validate(ProblemList& problems) const {
  if (!std::isfinite(fraction)) {
    problems.require_finite("impervious_fraction", fraction);
  } else {
    problems.require(fraction >= 0.0 && fraction <= 1.0, "impervious_fraction", fraction,
                     "must be in [0, 1]");
  }
  problems.require_non_negative("impervious_depression_storage_m", depression_storage_m);
  problems.require_non_negative("impervious_evaporation_m_s", evaporation_m_s);
}

CompositeLoss::CompositeLoss(const ImperviousCover& cover, std::unique_ptr<LossModel> pervious,
                             const std::string& element)
    : cover_(cover), pervious_(std::move(pervious)) {
  FRESHET_ASSERT(pervious_ != nullptr, "CompositeLoss needs a pervious loss model");
  ProblemList problems(element);
  cover_.validate(problems);
  problems.throw_if_any();
}

CompositeLoss::CompositeLoss(const CompositeLoss& other)
    : LossModel(other),
      cover_(other.cover_),
      pervious_(other.pervious_->clone()),
      stored_m_(other.stored_m_) {}

std::unique_ptr<LossModel> CompositeLoss::clone() const {
  return std::make_unique<CompositeLoss>(*this);
}

void CompositeLoss::reset_state() {
  stored_m_ = 0.0;
  pervious_->reset();
}

LossStep CompositeLoss::split(double rain_depth_m, double step_s) {
  if (rain_depth_m <= 0.0) stored_m_ = std::max(0.0, stored_m_ - cover_.evaporation_m_s * step_s);
  const double held = std::min(rain_depth_m, cover_.depression_storage_m - stored_m_);
  stored_m_ += held;
  const LossStep pervious = pervious_->step(rain_depth_m, step_s);
  const double f = cover_.fraction;
  return {f * held + (1.0 - f) * pervious.loss_m,
          f * (rain_depth_m - held) + (1.0 - f) * pervious.excess_m};
}

}  // namespace freshet::hydrology
