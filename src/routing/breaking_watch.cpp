#include "freshet/routing/breaking_watch.hpp"

#include <algorithm>
#include <cmath>

#include "freshet/core/error.hpp"

namespace freshet::routing {

BreakingWatch::BreakingWatch(geometry::SectionFlux flux, double length_m, double max_launch_step_s)
    : flux_(std::move(flux)), length_m_(length_m), max_step_s_(max_launch_step_s) {
  FRESHET_ASSERT(length_m > 0.0 && max_launch_step_s > 0.0,
                 "a breaking watch needs a positive length and launch step");
  result_.length_m = length_m;
}

void visit_state(StateVisitor& v, std::string_view name, PredictedBreaking& p) {
  StateGroup g(v, name);
  v.value("watched", p.watched);
  v.value("breaks", p.breaks);
  v.value("time_s", p.time_s);
  v.value("chainage_m", p.chainage_m);
  v.value("launch_time_s", p.launch_time_s);
  v.value("discharge_behind_m3s", p.discharge_behind_m3s);
  v.value("discharge_ahead_m3s", p.discharge_ahead_m3s);
  v.value("onto_dry_bed", p.onto_dry_bed);
  v.value("from_zero_inflow", p.from_zero_inflow);
  v.value("length_m", p.length_m);
  v.value("watched_from_s", p.watched_from_s);
  v.value("watched_to_s", p.watched_to_s);
}

void BreakingWatch::visit_state(StateVisitor& v, std::string_view name) {
  StateGroup g(v, name);
  v.value("t_now_s", t_now_);
  v.value("done", done_);
  v.records("characteristics", chars_, &Characteristic::x_m, &Characteristic::area_m2,
            &Characteristic::celerity_m_s, &Characteristic::launch_time_s,
            &Characteristic::launch_discharge_m3s);
  routing::visit_state(v, "result", result_);
  v.value("fastest_celerity_m_s", fastest_m_s_);
}

void BreakingWatch::start(double t_s, double inflow_m3s, double initial_area_m2) {
  chars_.clear();
  done_ = false;
  result_ = PredictedBreaking{};
  result_.length_m = length_m_;
  result_.watched_from_s = result_.watched_to_s = t_s;
  t_now_ = t_s;
  // The rear of the initial state: every characteristic of a uniform initial state moves
  // with it (the same area, the same gain from a uniform lateral inflow), so it stands for
  // them all.
  chars_.push_back({0.0, initial_area_m2, geometry::celerity_m_s(flux_, initial_area_m2), t_s,
                    inflow_m3s});
  fastest_m_s_ = chars_.back().celerity_m_s;
}

void BreakingWatch::reset() {
  chars_.clear();
  done_ = false;
  result_ = PredictedBreaking{};
  result_.length_m = length_m_;
  t_now_ = std::numeric_limits<double>::quiet_NaN();
  fastest_m_s_ = 0.0;
}

void BreakingWatch::advance(double t0_s, double t1_s, const PiecewiseLinearSeries& inflow_m3s,
                            double lateral_m2s) {
  double a = t0_s;
  for (double t : inflow_m3s.times_s()) {
    if (t <= a || t >= t1_s) continue;
    advance(a, t, inflow_m3s.value_at(a), inflow_m3s.value_at(t), lateral_m2s);
    a = t;
  }
  advance(a, t1_s, inflow_m3s.value_at(a), inflow_m3s.value_at(t1_s), lateral_m2s);
}

void BreakingWatch::advance(double t0_s, double t1_s, double inflow_t0_m3s,
                            double inflow_t1_m3s, double lateral_m2s) {
  if (std::isnan(t_now_)) start(t0_s, inflow_t0_m3s, geometry::area_for_discharge_m2(flux_, inflow_t0_m3s));
  result_.watched = true;
  if (done_) {
    fastest_m_s_ = std::max(fastest_m_s_, geometry::celerity_m_s(
                                              flux_, geometry::area_for_discharge_m2(flux_, inflow_t1_m3s)));
  }
  if (done_ || !(t1_s > t0_s)) {
    t_now_ = std::max(t_now_, t1_s);
    result_.watched_to_s = t_now_;
    return;
  }
  // Launch times: the start of the piece; on a rise or fall, times graded towards it (the
  // first crossing of a piecewise-linear rise is nearest its start), then every max_step_s.
  const double span = t1_s - t0_s;
  const double first = std::min(span, max_step_s_);
  launch_times_.assign(1, t0_s);
  if (inflow_t0_m3s != inflow_t1_m3s) {
    for (double f : {1.0 / 256.0, 1.0 / 64.0, 1.0 / 16.0, 1.0 / 4.0}) {
      launch_times_.push_back(t0_s + f * first);
    }
    for (double t = t0_s + first; t < t1_s - 1e-9 * span; t += max_step_s_) {
      launch_times_.push_back(t);
    }
  }
  launch_times_.push_back(t1_s);
  auto inflow_at = [&](double t) {
    return inflow_t0_m3s + (inflow_t1_m3s - inflow_t0_m3s) * (t - t0_s) / span;
  };
  for (std::size_t j = 0; j + 1 < launch_times_.size() && !done_; ++j) {
    launch(launch_times_[j], inflow_at(launch_times_[j]));
    move_to(launch_times_[j + 1], lateral_m2s);
  }
  t_now_ = t1_s;
  result_.watched_to_s = t1_s;
}

void BreakingWatch::launch(double t_s, double discharge_m3s) {
  const double area = geometry::area_for_discharge_m2(flux_, discharge_m3s);
  const std::size_t n = chars_.size();
  if (n > 0 && chars_[n - 1].area_m2 == area) {
    // The same state as the last one: it moves with it. An identical one still at the inlet
    // adds nothing; otherwise the last becomes the interior of an equal run and goes (a
    // later characteristic overtakes the run's rear first, and the run's front is kept).
    if (chars_[n - 1].x_m == 0.0) return;
    if (n > 1 && chars_[n - 2].area_m2 == area) chars_.pop_back();
  }
  chars_.push_back({0.0, area, geometry::celerity_m_s(flux_, area), t_s, discharge_m3s});
  fastest_m_s_ = std::max(fastest_m_s_, chars_.back().celerity_m_s);
}

// Moves every characteristic to t_s: x += c(A) dt, with A gaining lateral_m2s x dt (the
// midpoint rule for the position, second order in dt), then looks for crossings.
void BreakingWatch::move_to(double t_s, double lateral_m2s) {
  const double h = t_s - t_now_;
  if (!(h > 0.0)) return;
  x_before_.resize(chars_.size());
  for (std::size_t k = 0; k < chars_.size(); ++k) {
    Characteristic& c = chars_[k];
    x_before_[k] = c.x_m;
    if (lateral_m2s > 0.0) {
      c.x_m += geometry::celerity_m_s(flux_, c.area_m2 + 0.5 * lateral_m2s * h) * h;
      c.area_m2 += lateral_m2s * h;
      c.celerity_m_s = geometry::celerity_m_s(flux_, c.area_m2);
    } else {
      c.x_m += c.celerity_m_s * h;
    }
  }
  check_crossings(t_now_, t_s);
  t_now_ = t_s;
  // Characteristics past the outlet can only be overtaken downstream of it.
  std::size_t gone = 0;
  while (gone < chars_.size() && chars_[gone].x_m > length_m_) ++gone;
  chars_.erase(chars_.begin(), chars_.begin() + static_cast<std::ptrdiff_t>(gone));
}

// The earliest crossing of neighbours over [t0_s, t1_s] inside the reach, the gap between
// them taken linear in time over the step (exact for straight characteristics).
void BreakingWatch::check_crossings(double t0_s, double t1_s) {
  double best_t = std::numeric_limits<double>::infinity();
  for (std::size_t k = 0; k + 1 < chars_.size(); ++k) {
    const double gap_after = chars_[k].x_m - chars_[k + 1].x_m;
    if (!(gap_after < 0.0)) continue;
    const double gap_before = std::max(0.0, x_before_[k] - x_before_[k + 1]);
    const double theta = gap_before / (gap_before - gap_after);
    const double t = t0_s + theta * (t1_s - t0_s);
    const double x = x_before_[k] + theta * (chars_[k].x_m - x_before_[k]);
    if (x > length_m_ || !(t < best_t)) continue;
    best_t = t;
    result_.breaks = true;
    result_.time_s = t;
    result_.chainage_m = x;
    result_.launch_time_s = chars_[k + 1].launch_time_s;
    result_.discharge_behind_m3s = chars_[k + 1].launch_discharge_m3s;
    result_.discharge_ahead_m3s = chars_[k].launch_discharge_m3s;
    result_.onto_dry_bed = !(chars_[k].area_m2 > 1e-12 * chars_[k + 1].area_m2);
    result_.from_zero_inflow = !(chars_[k].launch_discharge_m3s > 0.0);
  }
  if (result_.breaks) done_ = true;
}

// ---- ReachBreakingOutlook ------------------------------------------------------------------

namespace detail {

void ReachBreakingOutlook::visit_state(StateVisitor& v) {
  StateGroup g(v, "breaking_outlook");
  watch_.visit_state(v, "watch");
  routing::visit_state(v, "profile", profile_);
  routing::visit_state(v, "prediction", outlook_.prediction);
  v.value("exact", outlook_.exact);
  v.value("resolvable", outlook_.resolvable);
  v.value("time_in_view_s", outlook_.time_in_view_s);
  v.value("longest_interval_s", outlook_.longest_interval_s);
  v.value("cells_needed", outlook_.cells_needed);
}

void ReachBreakingOutlook::restart(double t_s, double inflow_m3s, double inlet_area_m2,
                                   const BreakingPrediction& from_profile) {
  watch_.start(t_s, inflow_m3s, inlet_area_m2);
  outlook_ = BreakingOutlook{};
  profile_ = PredictedBreaking{};
  if (from_profile.breaks && from_profile.position_m <= length_m_) {
    profile_.watched = profile_.breaks = true;
    profile_.time_s = t_s + from_profile.time_s;
    profile_.chainage_m = from_profile.position_m;
    profile_.length_m = length_m_;
  }
  update();
}

void ReachBreakingOutlook::advance(double t0_s, double t1_s,
                                   const PiecewiseLinearSeries& inflow_m3s, bool lateral) {
  watch_.advance(t0_s, t1_s, inflow_m3s, 0.0);
  outlook_.longest_interval_s = std::max(outlook_.longest_interval_s, t1_s - t0_s);
  if (lateral) outlook_.exact = false;
  update();
}

double ReachBreakingOutlook::earliest_birth_s() const noexcept {
  if (!outlook_.exact) return -std::numeric_limits<double>::infinity();
  return outlook_.prediction.breaks ? outlook_.prediction.time_s
                                    : std::numeric_limits<double>::infinity();
}

// The earlier of the watch's and the profile's breaking, then whether the grid can show it.
void ReachBreakingOutlook::update() {
  BreakingOutlook& o = outlook_;
  const PredictedBreaking& w = watch_.result();
  o.prediction = profile_.breaks && !(w.breaks && w.time_s < profile_.time_s) ? profile_ : w;
  const double dx = length_m_ / std::max(1, cells_);
  o.cells_needed = 2 * options_.plateau_cells + 2;
  if (!o.prediction.breaks) {
    o.resolvable = cells_ >= o.cells_needed;
    o.time_in_view_s = std::numeric_limits<double>::quiet_NaN();
    return;
  }
  const double c_max = watch_.fastest_celerity_m_s();
  const double view_end_m = length_m_ - (options_.plateau_cells + 1) * dx;
  o.time_in_view_s = c_max > 0.0 ? std::max(0.0, view_end_m - o.prediction.chainage_m) / c_max
                                 : std::numeric_limits<double>::infinity();
  o.resolvable = cells_ >= o.cells_needed &&
                 o.time_in_view_s >= options_.persistence * o.longest_interval_s;
}

}  // namespace detail
}  // namespace freshet::routing
