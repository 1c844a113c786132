// Volume ledger, step results and run diagnostics of one routed reach.
//
// The ledger is updated with exactly the fluxes the scheme applied, so
//   inflow + lateral - outflow - (storage - initial_storage) = 0
// up to round-off for every scheme (volumes in m3). RunDiagnostics summarises a run:
//   std::cout << reach.diagnostics().brief_report() << '\n';
//   // "explicit-upwind: 1234 steps (2 rejected), max Courant 0.90, balance 3.1e-15 (rel), ..."
#pragma once

#include <string>

#include "freshet/core/volume_ledger.hpp"
#include <string_view>

namespace freshet::routing {

// The reach's volume ledger is the shared freshet::VolumeLedger (core/volume_ledger.hpp):
// inflow through the upstream face, lateral inflow, outflow through the downstream face,
// storage dx * sum of cell areas.
using freshet::VolumeLedger;

enum class AdvanceStatus {
  kOk,
  kStepTooSmall,    // rejected steps drove dt below RoutingOptions::min_dt_s
  kSolverFailed,    // Newton or Runge-Kutta integration failed after retries
};
[[nodiscard]] std::string_view to_string(AdvanceStatus status) noexcept;

// What one advance(t0, t1, ...) call did. Volumes are over [t0, reached_time_s].
struct AdvanceResult {
  AdvanceStatus status = AdvanceStatus::kOk;
  std::string message;       // empty when ok
  double reached_time_s = 0.0;
  double inflow_m3 = 0.0;
  double lateral_m3 = 0.0;
  double outflow_m3 = 0.0;
  // outflow_m3 / (t1 - t0): hand this to the downstream element so that it receives exactly
  // the volume that left.
  double mean_outflow_m3s = 0.0;
  long steps = 0;
  long rejected_steps = 0;
  [[nodiscard]] bool ok() const noexcept { return status == AdvanceStatus::kOk; }
};

struct RunDiagnostics {
  std::string scheme;
  long steps_taken = 0;
  long steps_rejected = 0;
  long cell_updates = 0;             // accepted steps x cells (x stages for MUSCL-Heun)
  double max_courant = 0.0;          // largest dt * c_max / dx of an accepted step
  double mass_balance_error_m3 = 0.0;
  double mass_balance_error_rel = 0.0;
  // Method of lines only: volume moved between neighbouring cells to clear round-off-level
  // negative areas (conservative; reported for transparency, not a source or sink).
  double positivity_transfer_m3 = 0.0;
  int shocks_found = 0;
  int max_fronts = 0;                // characteristics: most fronts held after an advance
  double wall_time_s = 0.0;          // inside advance()

  [[nodiscard]] std::string brief_report() const;
};

}  // namespace freshet::routing
