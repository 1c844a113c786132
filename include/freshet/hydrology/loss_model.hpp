// Losses: what part of the rain on a subcatchment becomes rainfall excess (runoff).
//
// A LossModel is stateful: it is fed the rain of consecutive steps, in order, and returns for
// each the loss (infiltration, depression storage, initial loss; m) and the excess (m) over
// that step. Rain is taken as uniform within a step. reset() returns it to its initial
// state. Every model keeps a ledger of cumulative rain, loss and excess, which closes
// (rain = loss + excess) to round-off. Depths are per unit plan area of the subcatchment.
// Models: curve_number.hpp, green_ampt.hpp, horton.hpp, initial_continuing_loss.hpp, and
// composite_loss.hpp for an impervious fraction beside a pervious model.
//
//   CurveNumberLoss soil({.curve_number = 80.0}, "subcatchment 'alder'");
//   double q = soil.excess_depth_m(0.010, 600.0);  // excess of 10 mm falling in 10 minutes
//   Hyetograph excess = rainfall_excess(storm, soil); // the whole storm, block by block
#pragma once

#include <memory>
#include <string_view>

#include "freshet/hydrology/hyetograph.hpp"

#include "freshet/core/state_archive.hpp"

namespace freshet::hydrology {

struct LossStep {
  double loss_m = 0.0;    // rain retained over the step (m)
  double excess_m = 0.0;  // rainfall excess over the step (m)
};

struct LossLedger {
  double rain_m = 0.0;    // cumulative rain fed in (m)
  double loss_m = 0.0;    // cumulative loss (m)
  double excess_m = 0.0;  // cumulative rainfall excess (m)
  [[nodiscard]] double closure_error_m() const { return rain_m - loss_m - excess_m; }
};

class LossModel {
 public:
  virtual ~LossModel() = default;

  // Rain depth `rain_depth_m` >= 0 falling uniformly over the next `step_s` > 0 seconds.
  LossStep step(double rain_depth_m, double step_s);
  // As step(), returning only the excess depth (m).
  double excess_depth_m(double rain_depth_m, double step_s) { return step(rain_depth_m, step_s).excess_m; }
  // Back to the state before the first step; clears the ledger.
  void reset();
  [[nodiscard]] const LossLedger& ledger() const noexcept { return ledger_; }
  // Hot start: the ledger and the method's stores (core/state_archive.hpp).
  void visit_state(StateVisitor& v);

  [[nodiscard]] virtual std::unique_ptr<LossModel> clone() const = 0;
  // Short name of the method, e.g. "curve number".
  [[nodiscard]] virtual std::string_view method() const = 0;

 protected:
  LossModel() = default;
  LossModel(const LossModel&) = default;
  LossModel& operator=(const LossModel&) = default;
  // The split of one step's rain, advancing the model's state.
  virtual LossStep split(double rain_depth_m, double step_s) = 0;
  virtual void reset_state() = 0;
  virtual void visit_stores(StateVisitor& v) = 0;

 private:
  LossLedger ledger_;
};

// Feeds every block of `rain` to `model` (from its current state) and returns the excess as
// a hyetograph on the same blocks.
Hyetograph rainfall_excess(const Hyetograph& rain, LossModel& model);

}  // namespace freshet::hydrology
