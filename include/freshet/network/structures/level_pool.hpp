// Level-pool (storage) routing of detention basins and culvert ponding areas.
//
// Continuity dS/dt = I(t) - O(h), storage S(h) from a StageStorage and outflow O(h) from an
// outlet relation (a Riser, a CulvertCrossing, any non-decreasing stage -> discharge
// function). Two entry points:
//
//  * LevelPool::advance(t0, t1, mean_inflow): the general step the network driver calls.
//    The upstream element hands over its mean inflow over [t0, t1]; each (sub-)step solves
//    the trapezoidal storage-indication equation
//        S1 + O(h1) dt/2 = S0 + I dt - O(h0) dt/2
//    for the end stage h1 by safeguarded root finding (the left side increases with h1).
//    The step's mean outflow is then defined as I - (S1 - S0)/dt, so the volume ledger
//    inflow - outflow - dS closes to round-off, and when the trapezoidal rule would empty
//    the basin below zero the step ends at S1 = 0 instead (storage is never negative).
//  * route_storage_indication(): the textbook fixed-dt storage-indication table method
//    (Chow, Maidment and Mays 1988, Applied Hydrology, sec. 8.2) on a storage-outflow table.
//
//   LevelPool pool("basin 'north-lea'", basin, [&](double h) { return riser.discharge_m3s(h); });
//   pool.reset(0.0, basin.bottom_stage_m());
//   LevelPoolStep s = pool.advance(0.0, 600.0, 2.5);   // 10-min step, 2.5 m3/s mean inflow
//   s.mean_outflow_m3s;  pool.peaks().peak_stage_m;  pool.ledger().residual_m3();
#pragma once

#include <functional>
#include <limits>
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "freshet/core/state_archive.hpp"
#include "freshet/core/volume_ledger.hpp"
#include "freshet/network/structures/culvert_crossing.hpp"
#include "freshet/network/structures/stage_storage.hpp"

namespace freshet::network::structures {

// Outflow (m3/s) for a pool stage (m): continuous, non-decreasing, >= 0.
using StageDischarge = std::function<double(double stage_m)>;

struct LevelPoolOptions {
  // Longest internal step (s); 0 means one step per advance() call. Smaller sub-steps
  // reduce the trapezoidal rule's error when dt is long against the pool's time constant
  // S/O.
  double max_substep_s = 0.0;
  // Times a failed sub-step may be halved before advance() throws NumericalError.
  int max_halvings = 12;
};

struct LevelPoolState {
  double time_s = 0.0;
  double stage_m = 0.0;
  double storage_m3 = 0.0;
  double outflow_m3s = 0.0;  // O(stage) at time_s
};

// The pool's volume ledger is the shared freshet::VolumeLedger (core/volume_ledger.hpp).
using freshet::VolumeLedger;

// Peaks over the sub-step ends since the last reset, and the time spent above a watched
// stage (e.g. the lowest road crest), with crossings located by linear interpolation.
struct PoolPeaks {
  double peak_stage_m = -std::numeric_limits<double>::infinity();
  double time_of_peak_stage_s = 0.0;
  double peak_outflow_m3s = 0.0;
  double time_of_peak_outflow_s = 0.0;
  double peak_storage_m3 = 0.0;
  double time_above_watch_stage_s = 0.0;
  bool watch_stage_exceeded = false;
};

struct LevelPoolStep {
  double mean_outflow_m3s = 0.0;  // volume-consistent mean over [t0, t1]
  double outflow_volume_m3 = 0.0;
  int substeps = 0;
  bool storage_floor_reached = false;  // a sub-step ended at S = 0 (trapezoid clipped)
};

class LevelPool {
 public:
  LevelPool(std::string name, StageStorage storage, StageDischarge outflow,
            LevelPoolOptions options = {});

  // Starts (or restarts) at time_s with the given stage; clears the ledger and peaks.
  void reset(double time_s, double stage_m);
  // Adds storage to the stage-storage relation (m3 at a stage: continuous, non-decreasing, 0
  // at the relation's bottom stage), e.g. the wedge of a reach the pool backs water into.
  // Call before reset(): the state is not recomputed.
  void add_storage(std::function<double(double stage_m)> storage_m3);
  // Moves volume into (> 0) or out of (< 0) the pool at the current time, counted as inflow,
  // and sets the level that holds the new storage. Throws NumericalError if it would leave
  // less than no water.
  void exchange(double volume_m3);
  // The augmented relation: the StageStorage plus every added storage.
  [[nodiscard]] double total_storage_m3(double stage_m) const;
  // Watches a stage: peaks().time_above_watch_stage_s accumulates the time above it.
  void watch_stage(std::optional<double> stage_m) { watch_stage_m_ = stage_m; }

  // Advances from state().time_s == t0_s to t1_s > t0_s with the mean inflow over the
  // interval (m3/s, >= 0). Throws NumericalError after max_halvings failed halvings.
  LevelPoolStep advance(double t0_s, double t1_s, double mean_inflow_m3s);

  [[nodiscard]] const LevelPoolState& state() const noexcept { return state_; }
  [[nodiscard]] const VolumeLedger& ledger() const noexcept { return ledger_; }
  [[nodiscard]] const PoolPeaks& peaks() const noexcept { return peaks_; }
  [[nodiscard]] const StageStorage& storage() const noexcept { return storage_; }
  [[nodiscard]] double outflow_m3s(double stage_m) const { return outflow_(stage_m); }
  [[nodiscard]] const std::string& name() const noexcept { return name_; }
  // Hot start: the level, storage and outflow now, the ledger and the peaks.
  void visit_state(StateVisitor& v);

 private:
  // One trapezoidal sub-step; false when the root finder fails (the caller halves dt).
  bool try_substep(double dt_s, double inflow_m3s, LevelPoolState& next, bool& floored) const;
  bool advance_span(double t_s, double dt_s, double inflow_m3s, int depth, LevelPoolStep& step);
  void record(const LevelPoolState& before, const LevelPoolState& after);

  std::string name_;
  StageStorage storage_;
  StageDischarge outflow_;
  LevelPoolOptions options_;
  LevelPoolState state_;
  VolumeLedger ledger_;
  PoolPeaks peaks_;
  std::optional<double> watch_stage_m_;
  std::vector<std::function<double(double)>> added_storage_;
};

// Textbook storage-indication routing with a fixed interval dt (Chow, Maidment and Mays
// 1988, Applied Hydrology, sec. 8.2): with the storage-outflow table (S_k, O_k) tabulate
// 2S/dt + O against O; for each interval
//   2 S_{j+1}/dt + O_{j+1} = I_j + I_{j+1} + 2 S_j/dt - O_j,
// and O_{j+1} follows by linear interpolation in the table. `inflow_m3s` are the inflows at
// t = 0, dt, 2dt, ...; the result has the outflows at the same times, starting from the
// storage whose tabulated outflow is `initial_outflow_m3s`. Throws InputError on a bad
// table (sizes, non-finite, storage or outflow decreasing, fewer than 2 rows, dt <= 0).
[[nodiscard]] std::vector<double> route_storage_indication(std::span<const double> storage_m3,
                                                           std::span<const double> outflow_m3s,
                                                           double dt_s,
                                                           std::span<const double> inflow_m3s,
                                                           double initial_outflow_m3s);

struct DetentionReport {
  double peak_stage_m = 0.0;
  double time_of_peak_stage_s = 0.0;
  double peak_outflow_m3s = 0.0;
  double time_of_peak_outflow_s = 0.0;
  double peak_storage_m3 = 0.0;
  double mass_balance_residual_m3 = 0.0;
};
[[nodiscard]] DetentionReport detention_report(const LevelPool& pool);

struct CrossingReport {
  double peak_headwater_stage_m = 0.0;
  double peak_headwater_depth_m = 0.0;  // above the culvert inlet invert
  double time_of_peak_headwater_s = 0.0;
  double peak_outflow_m3s = 0.0;        // barrels + road, at the peak stage
  double barrel_discharge_at_peak_m3s = 0.0;
  double overtopping_discharge_at_peak_m3s = 0.0;
  bool road_overtopped = false;
  double overtopping_duration_s = 0.0;
  Control control_at_peak = Control::inlet;
  bool stage_beyond_rating = false;     // the peak exceeded the tabulated rating
  double mass_balance_residual_m3 = 0.0;
};

// A level pool whose outflow is the crossing's rating, watching the lowest road crest.
[[nodiscard]] LevelPool make_crossing_pool(const CulvertCrossing& crossing, StageStorage ponding,
                                           LevelPoolOptions options = {});
[[nodiscard]] CrossingReport crossing_report(const CulvertCrossing& crossing,
                                             const LevelPool& pool);

}  // namespace freshet::network::structures
