#include "freshet/network/run_budget.hpp"

namespace freshet::network {

RunEstimate estimate_run(const RunSize& size, const ClockOptions& clock) {
  RunEstimate e;
  e.coupling_steps = clock.coupling_step_count();
  e.cell_steps = (size.cells + size.elements) * e.coupling_steps;
  e.memory_bytes = size.cells * kBytesPerCell;
  return e;
}

bool exceeds_work(const RunEstimate& estimate, const RunBudget& budget) {
  return !(estimate.cell_steps <= budget.max_cell_steps);
}

bool exceeds_memory(const RunEstimate& estimate, const RunBudget& budget) {
  return !(estimate.memory_bytes <= budget.max_memory_bytes);
}

}  // namespace freshet::network
