#include "freshet/network/structures/level_pool.hpp"

#include <algorithm>
#include <cmath>

#include "bracketed_solve.hpp"
#include "freshet/core/error.hpp"

namespace freshet::network::structures {

LevelPool::LevelPool(std::string name, StageStorage storage, StageDischarge outflow,
                     LevelPoolOptions options)
    : name_(std::move(name)),
      storage_(std::move(storage)),
      outflow_(std::move(outflow)),
      options_(options) {
  ProblemList p(name_);
  p.require_non_negative("max_substep_s", options_.max_substep_s);
  p.require(options_.max_halvings >= 0, "max_halvings", options_.max_halvings, "must be >= 0");
  if (!outflow_) p.add("outflow", "is empty: a level pool needs an outlet relation");
  p.throw_if_any();
  // An empty pool cannot discharge: an outlet below the storage relation's lowest stage would
  // report outflow from no water (and start the elements below with flow that never fell).
  const double bottom = storage_.bottom_stage_m();
  const double empty_outflow_m3s = outflow_(bottom);
  if (!(empty_outflow_m3s == 0.0)) {
    p.add("outflow", "= " + format_value(empty_outflow_m3s) + " m3/s at the storage relation's "
                     "lowest stage " + format_value(bottom) + " m: an outlet lies below the "
                     "empty pool; extend the storage relation down to the lowest outlet "
                     "(storage 0 there)");
    p.throw_if_any();
  }
  reset(0.0, storage_.bottom_stage_m());
}

void LevelPool::visit_state(StateVisitor& v) {
  StateGroup g(v, "pool");
  v.value("time_s", state_.time_s);
  v.value("stage_m", state_.stage_m);
  v.value("storage_m3", state_.storage_m3);
  v.value("outflow_m3s", state_.outflow_m3s);
  freshet::visit_state(v, "ledger", ledger_);
  v.value("peak_stage_m", peaks_.peak_stage_m);
  v.value("time_of_peak_stage_s", peaks_.time_of_peak_stage_s);
  v.value("peak_outflow_m3s", peaks_.peak_outflow_m3s);
  v.value("time_of_peak_outflow_s", peaks_.time_of_peak_outflow_s);
  v.value("peak_storage_m3", peaks_.peak_storage_m3);
  v.value("time_above_watch_stage_s", peaks_.time_above_watch_stage_s);
  v.value("watch_stage_exceeded", peaks_.watch_stage_exceeded);
}

void LevelPool::reset(double time_s, double stage_m) {
  ProblemList p(name_);
  p.require_finite("initial_time_s", time_s);
  p.require_finite("initial_stage_m", stage_m);
  p.throw_if_any();
  const double h = std::max(stage_m, storage_.bottom_stage_m());
  state_ = {time_s, h, total_storage_m3(h), outflow_(h)};
  ledger_ = VolumeLedger{};
  ledger_.initial_storage_m3 = ledger_.storage_m3 = state_.storage_m3;
  peaks_ = {};
  peaks_.peak_stage_m = h;
  peaks_.time_of_peak_stage_s = time_s;
  peaks_.peak_outflow_m3s = state_.outflow_m3s;
  peaks_.time_of_peak_outflow_s = time_s;
  peaks_.peak_storage_m3 = state_.storage_m3;
}

void LevelPool::add_storage(std::function<double(double)> storage_m3) {
  FRESHET_ASSERT(static_cast<bool>(storage_m3), "level pool: added storage must be callable");
  added_storage_.push_back(std::move(storage_m3));
}

double LevelPool::total_storage_m3(double stage_m) const {
  double s = storage_.storage_m3(stage_m);
  for (const auto& extra : added_storage_) s += extra(stage_m);
  return s;
}

void LevelPool::exchange(double volume_m3) {
  if (volume_m3 == 0.0) return;
  const double target = state_.storage_m3 + volume_m3;
  if (!(target >= 0.0)) {
    throw NumericalError(name_ + ": at t = " + format_value(state_.time_s) + " s a reach asked " +
                         format_value(-volume_m3) + " m3 back from a pool holding " +
                         format_value(state_.storage_m3) + " m3");
  }
  const double bottom = storage_.bottom_stage_m();
  auto g = [&](double h) { return total_storage_m3(h) - target; };
  const LevelPoolState before = state_;
  double h = bottom;
  if (g(bottom) < 0.0) {
    const double base = std::max(state_.stage_m, bottom);
    double hi = base + 0.01;
    for (int k = 0; g(hi) < 0.0; ++k) {
      if (k > 80 || !std::isfinite(hi)) {
        throw NumericalError(name_ + ": no level holds " + format_value(target) + " m3");
      }
      hi = base + 0.01 * std::ldexp(1.0, k + 1);
    }
    const RootResult r = detail::solve_monotone(g, bottom, hi, 1e-14);
    if (!r.converged || !std::isfinite(r.x)) {
      throw NumericalError(name_ + ": the level holding " + format_value(target) +
                           " m3 was not found");
    }
    h = r.x;
  }
  // The storage is the target itself, not S(h): the ledger keeps exactly what was moved.
  state_.stage_m = h;
  state_.storage_m3 = target;
  state_.outflow_m3s = outflow_(h);
  ledger_.inflow_m3 += volume_m3;
  ledger_.storage_m3 = target;
  record(before, state_);
}

bool LevelPool::try_substep(double dt_s, double inflow_m3s, LevelPoolState& next,
                            bool& floored) const {
  const double rhs = state_.storage_m3 + dt_s * (inflow_m3s - 0.5 * state_.outflow_m3s);
  auto g = [&](double h) { return total_storage_m3(h) + 0.5 * dt_s * outflow_(h) - rhs; };
  const double bottom = storage_.bottom_stage_m();
  next.time_s = state_.time_s + dt_s;
  floored = rhs < 0.0;
  if (g(bottom) >= 0.0) {  // the trapezoid would end at or below an empty basin
    next.stage_m = bottom;
  } else {
    const double base = std::max(state_.stage_m, bottom);
    double hi = base + 0.01;
    for (int k = 0; g(hi) < 0.0; ++k) {
      if (k > 80 || !std::isfinite(hi)) return false;
      hi = base + 0.01 * std::ldexp(1.0, k + 1);
    }
    const RootResult r = detail::solve_monotone(g, bottom, hi, 1e-14);
    if (!r.converged || !std::isfinite(r.x)) return false;
    next.stage_m = r.x;
  }
  next.storage_m3 = total_storage_m3(next.stage_m);
  next.outflow_m3s = outflow_(next.stage_m);
  return std::isfinite(next.outflow_m3s) && next.outflow_m3s >= 0.0;
}

bool LevelPool::advance_span(double t_s, double dt_s, double inflow_m3s, int depth,
                             LevelPoolStep& step) {
  LevelPoolState next;
  bool floored = false;
  state_.time_s = t_s;
  if (try_substep(dt_s, inflow_m3s, next, floored)) {
    record(state_, next);
    const double outflow_volume = inflow_m3s * dt_s - (next.storage_m3 - state_.storage_m3);
    ledger_.inflow_m3 += inflow_m3s * dt_s;
    ledger_.outflow_m3 += outflow_volume;
    ledger_.storage_m3 = next.storage_m3;
    step.outflow_volume_m3 += outflow_volume;
    step.storage_floor_reached = step.storage_floor_reached || floored;
    ++step.substeps;
    state_ = next;
    return true;
  }
  if (depth >= options_.max_halvings) return false;
  return advance_span(t_s, 0.5 * dt_s, inflow_m3s, depth + 1, step) &&
         advance_span(t_s + 0.5 * dt_s, 0.5 * dt_s, inflow_m3s, depth + 1, step);
}

LevelPoolStep LevelPool::advance(double t0_s, double t1_s, double mean_inflow_m3s) {
  FRESHET_ASSERT(t1_s > t0_s, "level pool: t1 must follow t0");
  ProblemList p(name_);
  p.require_non_negative("mean_inflow_m3s", mean_inflow_m3s);
  p.throw_if_any();
  const double dt = t1_s - t0_s;
  int n = 1;
  if (options_.max_substep_s > 0.0) n = static_cast<int>(std::ceil(dt / options_.max_substep_s - 1e-9));
  n = std::max(n, 1);
  LevelPoolStep step;
  for (int k = 0; k < n; ++k) {
    const double ta = t0_s + dt * k / n, tb = (k + 1 == n) ? t1_s : t0_s + dt * (k + 1) / n;
    if (!advance_span(ta, tb - ta, mean_inflow_m3s, 0, step))
      throw NumericalError(name_ + ": level-pool step from t = " + format_value(ta) +
                           " s did not converge after " + std::to_string(options_.max_halvings) +
                           " halvings (max_halvings)");
  }
  state_.time_s = t1_s;
  step.mean_outflow_m3s = step.outflow_volume_m3 / dt;
  return step;
}

void LevelPool::record(const LevelPoolState& before, const LevelPoolState& after) {
  if (after.stage_m > peaks_.peak_stage_m) {
    peaks_.peak_stage_m = after.stage_m;
    peaks_.time_of_peak_stage_s = after.time_s;
  }
  if (after.outflow_m3s > peaks_.peak_outflow_m3s) {
    peaks_.peak_outflow_m3s = after.outflow_m3s;
    peaks_.time_of_peak_outflow_s = after.time_s;
  }
  peaks_.peak_storage_m3 = std::max(peaks_.peak_storage_m3, after.storage_m3);
  if (!watch_stage_m_) return;
  const double w = *watch_stage_m_, h0 = before.stage_m, h1 = after.stage_m;
  const double dt = after.time_s - before.time_s;
  if (h0 > w || h1 > w) peaks_.watch_stage_exceeded = true;
  if (h0 > w && h1 > w) peaks_.time_above_watch_stage_s += dt;
  else if (h0 > w) peaks_.time_above_watch_stage_s += dt * (h0 - w) / (h0 - h1);
  else if (h1 > w) peaks_.time_above_watch_stage_s += dt * (h1 - w) / (h1 - h0);
}

DetentionReport detention_report(const LevelPool& pool) {
  const PoolPeaks& pk = pool.peaks();
  return {pk.peak_stage_m,   pk.time_of_peak_stage_s, pk.peak_outflow_m3s,
          pk.time_of_peak_outflow_s, pk.peak_storage_m3, pool.ledger().balance_error_m3()};
}

LevelPool make_crossing_pool(const CulvertCrossing& crossing, StageStorage ponding,
                             LevelPoolOptions options) {
  LevelPool pool(crossing.name(), std::move(ponding),
                 [xing = crossing](double h) { return xing.discharge_m3s(h); }, options);
  if (crossing.road()) pool.watch_stage(crossing.road()->lowest_crest_stage_m());
  return pool;
}

CrossingReport crossing_report(const CulvertCrossing& crossing, const LevelPool& pool) {
  const PoolPeaks& pk = pool.peaks();
  CrossingReport r;
  r.peak_headwater_stage_m = pk.peak_stage_m;
  r.peak_headwater_depth_m = pk.peak_stage_m - crossing.culvert().spec().inlet_invert_stage_m;
  r.time_of_peak_headwater_s = pk.time_of_peak_stage_s;
  r.barrel_discharge_at_peak_m3s = crossing.barrel_discharge_m3s(pk.peak_stage_m);
  r.overtopping_discharge_at_peak_m3s = crossing.overtopping_discharge_m3s(pk.peak_stage_m);
  r.peak_outflow_m3s = r.barrel_discharge_at_peak_m3s + r.overtopping_discharge_at_peak_m3s;
  if (crossing.road()) {
    r.road_overtopped = pk.watch_stage_exceeded;
    r.overtopping_duration_s = pk.time_above_watch_stage_s;
  }
  r.control_at_peak = crossing.barrel_headwater(pk.peak_stage_m).control;
  r.stage_beyond_rating = crossing.beyond_rating(pk.peak_stage_m);
  r.mass_balance_residual_m3 = pool.ledger().balance_error_m3();
  return r;
}

}  // namespace freshet::network::structures
