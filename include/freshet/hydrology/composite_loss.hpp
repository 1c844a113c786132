// A subcatchment whose plan area is partly impervious (roofs, paving) and partly pervious.
// The impervious fraction holds rain in its own depression storage until that is full, then
// runs off everything; the pervious rest follows any other LossModel. Loss and excess are
// area-weighted: excess = f_imp * excess_imp + (1 - f_imp) * excess_perv (per unit area of
// the whole subcatchment). Depression storage empties by evaporation at a stated constant
// rate e over every step without rain (none while it rains), so a store S is empty again
// after S / e of dry weather (common practice, no source; 0, the default, never empties it).
//
//   CompositeLoss cover({.fraction = 0.35, .depression_storage_m = 0.002},
//                       std::make_unique<CurveNumberLoss>(CurveNumberParameters{.curve_number = 68.0},
//                                                         "subcatchment 'alder'"),
//                       "subcatchment 'alder'");
#pragma once

#include <memory>
#include <string>

#include "freshet/core/error.hpp"
#include "freshet/hydrology/loss_model.hpp"

namespace freshet::hydrology {

struct ImperviousCover {
  double fraction = 0.0;              // impervious share of the plan area, in [0, 1]
  double depression_storage_m = 0.0;  // depth held on the impervious part (m), >= 0
  double evaporation_m_s = 0.0;       // rate the held depth evaporates in dry steps (m/s), >= 0

  void validate(ProblemList& problems) const;
};

class CompositeLoss final : public LossModel {
 public:
  // `pervious` must not be null. Throws InputError naming `element` for invalid cover.
  CompositeLoss(const ImperviousCover& cover, std::unique_ptr<LossModel> pervious,
                const std::string& element);
  CompositeLoss(const CompositeLoss& other);
  CompositeLoss& operator=(const CompositeLoss&) = delete;
  [[nodiscard]] std::unique_ptr<LossModel> clone() const override;
  [[nodiscard]] std::string_view method() const override { return "impervious + pervious"; }
  [[nodiscard]] const LossModel& pervious() const { return *pervious_; }
  [[nodiscard]] double impervious_storage_filled_m() const { return stored_m_; }

 private:
  LossStep split(double rain_depth_m, double step_s) override;
  void reset_state() override;
  void visit_stores(StateVisitor& v) override {
    v.value("impervious_stored_m", stored_m_);
    StateGroup g(v, "pervious");
    pervious_->visit_state(v);
  }

  ImperviousCover cover_;
  std::unique_ptr<LossModel> pervious_;
  double stored_m_ = 0.0;  // depression storage filled on the impervious part
};

}  // namespace freshet::hydrology
