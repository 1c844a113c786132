// Initial and continuing loss: the first `initial_loss_m` of rain is retained, after which
// rain is lost at up to `continuing_loss_m_s` (common practice, e.g. Australian Rainfall and
// Runoff; Chow, Maidment & Mays 1988, sec. 5.1 for the phi-index, its constant-rate part).
// Within a step of constant intensity i, the initial loss is filled first (taking
// IL_remaining / i seconds); the continuing loss applies to the rest of the step only, so
// the result does not depend on how a constant rain is cut into steps.
//
//   InitialContinuingLoss loss({.initial_loss_m = 0.015, .continuing_loss_m_s = 2.5e-3 / 3600},
//                              "subcatchment 'alder'");
#pragma once

#include <string>

#include "freshet/core/error.hpp"
#include "freshet/hydrology/loss_model.hpp"

namespace freshet::hydrology {

struct InitialContinuingParameters {
  double initial_loss_m = 0.0;       // IL (m), >= 0
  double continuing_loss_m_s = 0.0;  // CL (m/s), >= 0

  void validate(ProblemList& problems) const;
};

class InitialContinuingLoss final : public LossModel {
 public:
  InitialContinuingLoss(const InitialContinuingParameters& parameters,
                        const std::string& element);
  [[nodiscard]] std::unique_ptr<LossModel> clone() const override;
  [[nodiscard]] std::string_view method() const override { return "initial and continuing loss"; }
  [[nodiscard]] double remaining_initial_loss_m() const { return remaining_initial_m_; }

 private:
  LossStep split(double rain_depth_m, double step_s) override;
  void reset_state() override { remaining_initial_m_ = parameters_.initial_loss_m; }
  void visit_stores(StateVisitor& v) override { v.value("remaining_initial_m", remaining_initial_m_); }

  InitialContinuingParameters parameters_;
  double remaining_initial_m_ = 0.0;
};

}  // namespace freshet::hydrology
