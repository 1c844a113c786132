// The run estimate and budget (network/run_budget.hpp): plain arithmetic on counts, no
// source needed; the budget's defaults are our own (docs/basin-file.md, [study]).
#include "freshet/network/run_budget.hpp"

#include <cmath>
#include <limits>

#include <gtest/gtest.h>

namespace freshet::network {
namespace {

TEST(RunEstimate, CountsCellsAndElementsOverEveryCouplingStep) {
  // 6 h at 5-min outputs and 60 s steps: 72 x 5 = 360 coupling steps.
  const ClockOptions clock{0.0, 6 * 3600.0, 300.0, 60.0};
  const RunEstimate e = estimate_run({.cells = 1000.0, .elements = 12.0}, clock);
  EXPECT_EQ(e.coupling_steps, 360.0);
  EXPECT_EQ(e.cell_steps, 1012.0 * 360.0);
  EXPECT_EQ(e.memory_bytes, 1000.0 * kBytesPerCell);
  EXPECT_FALSE(exceeds_work(e, RunBudget{}));
  EXPECT_FALSE(exceeds_memory(e, RunBudget{}));
}

TEST(RunEstimate, AbsurdRunsBreakTheBudgetBeforeAnythingIsAllocated) {
  const ClockOptions day{0.0, 86400.0, 300.0, 60.0};
  // 2e9 cells: 256 GB of state, far beyond 2 GiB.
  EXPECT_TRUE(exceeds_memory(estimate_run({.cells = 2e9, .elements = 3.0}, day), RunBudget{}));
  // 1e12 h of run with 60 s steps: 6e13 coupling steps x 100 cells.
  const ClockOptions forever{0.0, 1e12 * 3600.0, 300.0, 60.0};
  const RunEstimate e = estimate_run({.cells = 97.0, .elements = 3.0}, forever);
  EXPECT_DOUBLE_EQ(e.cell_steps, 100.0 * 6e13);
  EXPECT_TRUE(exceeds_work(e, RunBudget{}));
  // Lifting the limit is a setting, not a rebuild.
  EXPECT_FALSE(exceeds_work(e, RunBudget{.max_cell_steps = 1e16}));
  // Counts that are not numbers break both limits (a NaN must never pass as "small").
  const RunEstimate nan = estimate_run({.cells = std::nan(""), .elements = 1.0}, day);
  EXPECT_TRUE(exceeds_work(nan, RunBudget{}));
  EXPECT_TRUE(exceeds_memory(nan, RunBudget{}));
}

}  // namespace
}  // namespace freshet::network
