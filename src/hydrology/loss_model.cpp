#include "freshet/hydrology/loss_model.hpp"

#include <cmath>
#include <vector>

#include "freshet/core/error.hpp"

namespace freshet::hydrology {

LossStep LossModel::step(double rain_depth_m, double step_s) {
  FRESHET_ASSERT(rain_depth_m >= 0.0 && std::isfinite(rain_depth_m),
                 "rain depth must be finite and >= 0 (validate the hyetograph first)");
  FRESHET_ASSERT(step_s > 0.0 && std::isfinite(step_s), "loss step must be > 0");
  const LossStep s = split(rain_depth_m, step_s);
  ledger_.rain_m += rain_depth_m;
  ledger_.loss_m += s.loss_m;
  ledger_.excess_m += s.excess_m;
  return s;
}

void LossModel::visit_state(StateVisitor& v) {
  StateGroup g(v, "losses");
  v.value("rain_m", ledger_.rain_m);
  v.value("loss_m", ledger_.loss_m);
  v.value("excess_m", ledger_.excess_m);
  visit_stores(v);
}

void LossModel::reset() {
  ledger_ = LossLedger{};
  reset_state();
}

Hyetograph rainfall_excess(const Hyetograph& rain, LossModel& model) {
  const auto times = rain.boundary_times_s();
  const auto depths = rain.block_depths_m();
  std::vector<double> excess(depths.size());
  for (std::size_t k = 0; k < depths.size(); ++k) {
    excess[k] = model.step(depths[k], times[k + 1] - times[k]).excess_m;
  }
  return Hyetograph::from_depths(std::vector<double>(times.begin(), times.end()),
                                 std::move(excess), "rainfall excess");
}

}  // namespace freshet::hydrology
