// The work and memory of a run, estimated before anything is allocated or routed, and the
// budget a run must fit. A basin file with 2e9 cells, or a run of 1e12 hours, would otherwise
// exhaust memory or run for years; such a run is refused with the estimate and the setting
// that lifts the limit.
//
//   RunEstimate e = estimate_run({.cells = 2400, .elements = 12}, clock);
//   if (auto why = exceeds(e, RunBudget{})) ... // refuse, quoting *why
#pragma once

#include <optional>
#include <string>

#include "freshet/network/driver.hpp"

namespace freshet::network {

// Upper bound on the bytes a routing cell holds while a run is in memory: 56 B of per-cell
// arrays with lateral inflow (docs/performance.md, "Memory per cell"), plus the method of
// lines' stage vectors (about 9 doubles per cell) while it integrates.
inline constexpr double kBytesPerCell = 128.0;

// What a network holds, counted as doubles so that absurd sizes are judged before any
// conversion to an integer.
struct RunSize {
  double cells = 0.0;     // routing cells of every reach and overland plane
  double elements = 0.0;  // elements of the network
};

struct RunEstimate {
  double coupling_steps = 0.0;  // of the whole run
  // (cells + elements) x coupling steps: every cell is updated, and every element advanced, at
  // least once per coupling step (the adaptive schemes take more), so this is a lower bound.
  double cell_steps = 0.0;
  double memory_bytes = 0.0;    // cells x kBytesPerCell
};

// The limits of one run; the defaults suit a desktop (about 5 min of routing at the lowest
// rate measured in docs/performance.md, 2 GiB of routing state).
struct RunBudget {
  double max_cell_steps = 1e10;
  double max_memory_bytes = 2048.0 * 1024.0 * 1024.0;
};

// Pure: no I/O, no allocation. Infinite or NaN fields for sizes or clocks that are.
[[nodiscard]] RunEstimate estimate_run(const RunSize& size, const ClockOptions& clock);

// Which limits the estimate breaks (an estimate that is not a finite number breaks both).
[[nodiscard]] bool exceeds_work(const RunEstimate& estimate, const RunBudget& budget);
[[nodiscard]] bool exceeds_memory(const RunEstimate& estimate, const RunBudget& budget);

}  // namespace freshet::network
