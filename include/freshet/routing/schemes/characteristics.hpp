// Characteristics: grid-free front tracking of the kinematic wave (Dafermos 1972, J. Math.
// Anal. Appl. 38; Holden & Risebro 2015, Front Tracking for Hyperbolic Conservation Laws,
// 2nd ed.). The reach's state is a set of fronts (detail::FrontTracker), not cells: the flux
// law is replaced by its piecewise-linear interpolant on geometric area nodes
// (detail::FluxNodes, relative spacing RoutingOptions::front_node_spacing), for which the
// entropy solution is exactly a finite set of fronts moving at Rankine-Hugoniot speeds;
// Riemann problems are solved by the convex-hull construction, so non-convex laws (part-full
// pipes, compound sections) are routed correctly. The scheme times itself.
//
// Forcing, all volume-exact:
//   * inflow at x = 0: on each linear piece of the hydrograph between two neighbouring node
//     discharges (or breakpoints) the inlet state is the area of the piece's first discharge
//     for the first half of the piece and of its last for the second half, so the inflow
//     volume is the exact integral (a constant inflow, as a network driver hands over, is
//     one exact state);
//   * lateral inflow: Strang splitting (Strang 1968, SIAM J. Numer. Anal. 5(3)): half of each
//     sub-step's exact volume is added to the profile at its start and half at its end
//     (sub-steps at most RoutingOptions::lateral_split_step_s long), and the fronts are
//     rebuilt from the profile; neighbouring segments together no longer than the merge
//     length are joined, volume-weighted, which bounds the segments by 2 length / merge
//     length + 1 and the fronts by that plus the fans of one rebuild. The splitting error is second order in the sub-step on
//     smooth parts of the solution (first order at fronts).
// Shocks: the reach reports the fronts' own shocks (shock_reports(); formation at the first
// collision, exact outlet arrival, merging and decay), not the grid detector's.
// Sampling: after every advance the reach's cell areas are the exact cell averages of the
// fronts and the face fluxes are Q_pl of the state at each face (face N: the outlet), so
// stations, profiles and the shock detector read the same arrays as for the grid schemes.
// One flux law for the whole reach is required (per-cell laws fail with a message).
#pragma once

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <limits>
#include <string>
#include <string_view>
#include <vector>

#include "freshet/core/error.hpp"
#include "freshet/routing/detail/front_tracker.hpp"
#include "freshet/routing/detail/kernels.hpp"
#include "freshet/routing/schemes/scheme.hpp"

namespace freshet::routing::schemes {

class Characteristics {
 public:
  static constexpr SchemeKind kKind = SchemeKind::kCharacteristics;
  static constexpr std::string_view kName = "characteristics";
  // A front is a jump: in the cell averages it spans at most two cells.
  static int front_cells(const RoutingOptions& /*options*/) { return 2; }

  Characteristics() = default;
  // The fronts need no per-cell scratch; the cells are the reach's sampling arrays.
  Characteristics(const RoutingOptions& options, std::size_t /*cells*/)
      : options_(options) {}

  [[nodiscard]] std::size_t memory_bytes() const noexcept {
    return tracker_.memory_bytes() +
           (switch_q_m3s_.capacity() + edge_m_.capacity() + area_m2_.capacity() +
            switch_time_s_.capacity() + switch_area_m2_.capacity()) * sizeof(double);
  }
  [[nodiscard]] const detail::FrontTracker& tracker() const noexcept { return tracker_; }
  // Hot start: the fronts and the restart they were built from (the other arrays are
  // scratch of one advance()).
  void visit_state(StateVisitor& v) {
    StateGroup g(v, "characteristics");
    // The tracker is built by start() from the reach's length; a restored scheme never
    // starts, so it is built here from the saved length.
    double length_m = tracker_.length_m();
    v.value("length_m", length_m);
    if (!v.saving()) {
      tracker_ = detail::FrontTracker(length_m, options_.front_node_spacing,
                                      static_cast<std::size_t>(options_.front_fan_max_fronts));
    }
    tracker_.visit_state(v);
    v.value("seen_generation", seen_generation_);
    v.value("merge_length_m", merge_length_m_);
  }
  // The shocks of the solution itself, from the fronts (detail::FrontTracker::shocks()), each
  // path sampled at the end of every advance().
  [[nodiscard]] const std::vector<ShockReport>& shock_reports() const noexcept {
    return tracker_.shocks();
  }

  template <geometry::FluxLaw F>
  AdvanceResult advance(detail::ReachState<F>& s, double t0, double t1,
                        const PiecewiseLinearSeries& inflow, const LateralInflow& lateral) {
    AdvanceResult r;
    r.reached_time_s = t0;
    if (!s.uniform()) {
      return fail(r, "needs one flux law for the whole reach (one law per cell was given)");
    }
    const F& law = s.laws.front();
    if (s.generation != seen_generation_) start(s, law, t0);
    if (!inlet_schedule(law, inflow, t0, t1, r)) return r;
    const double in0 = tracker_.inflow_m3(), out0 = tracker_.outflow_m3();
    const long events0 = tracker_.events();
    std::size_t next_switch = 0;
    auto transport_to = [&](double t) {
      for (; next_switch < switch_time_s_.size() && switch_time_s_[next_switch] <= t;
           ++next_switch) {
        tracker_.advance_to(law, switch_time_s_[next_switch]);
        tracker_.set_inlet_area(law, switch_area_m2_[next_switch], switch_q_m3s_[next_switch]);
      }
      tracker_.advance_to(law, t);
    };
    if (lateral.is_none() || t1 == t0) {
      transport_to(t1);
    } else {
      const double steps = std::ceil((t1 - t0) / options_.lateral_split_step_s);
      const int n = std::max(1, static_cast<int>(steps));
      const double h = (t1 - t0) / n;
      auto tau = [&](int j) { return j == n ? t1 : t0 + h * j; };
      for (int j = 0; j <= n; ++j) {
        // Strang: half of the sub-step before tau_j and half of the one after it.
        double before = 0.0, after = 0.0;
        if (j > 0) before = 0.5;
        if (j < n) after = 0.5;
        if (j > 0) transport_to(tau(j));
        r.lateral_m3 += add_lateral(law, lateral, j > 0 ? tau(j - 1) : tau(j), tau(j), before,
                                    j < n ? tau(j + 1) : tau(j), after);
      }
    }
    r.inflow_m3 = tracker_.inflow_m3() - in0;
    r.outflow_m3 = tracker_.outflow_m3() - out0;
    r.steps = tracker_.events() - events0;
    r.reached_time_s = t1;
    s.ledger.inflow_m3 += r.inflow_m3;
    s.ledger.lateral_m3 += r.lateral_m3;
    s.ledger.outflow_m3 += r.outflow_m3;
    write_cells(s);
    return r;
  }

 private:
  static AdvanceResult& fail(AdvanceResult& r, const std::string& why) {
    r.status = AdvanceStatus::kSolverFailed;
    r.message = std::string(kName) + " " + why;
    return r;
  }

  // Fronts from the reach's cell areas (after construction or a new initial state).
  template <geometry::FluxLaw F>
  void start(const detail::ReachState<F>& s, const F& law, double t0) {
    const std::size_t n = s.n();
    const double length = s.dx_m * static_cast<double>(n);
    tracker_ = detail::FrontTracker(length, options_.front_node_spacing,
                                    static_cast<std::size_t>(options_.front_fan_max_fronts));
    edge_m_.resize(n + 1);
    for (std::size_t i = 0; i < n; ++i) edge_m_[i] = s.dx_m * static_cast<double>(i);
    edge_m_[n] = length;
    tracker_.set_profile(law, t0, s.area_m2.front(), edge_m_, s.area_m2);
    edge_m_.clear();
    edge_m_.shrink_to_fit();  // the profile scratch is sized by fronts, not cells, from here
    merge_length_m_ = options_.front_merge_length_m > 0.0 ? options_.front_merge_length_m
                                                          : kAutomaticMergeFraction * length;
    seen_generation_ = s.generation;
  }

  // The inlet states over [t0, t1] (see the file comment): switch_time_s_[i] is when the
  // inlet state becomes switch_area_m2_[i]. False (with the reason in r) when a discharge
  // exceeds what the section conveys.
  template <geometry::FluxLaw F>
  bool inlet_schedule(const F& law, const PiecewiseLinearSeries& inflow, double t0, double t1,
                      AdvanceResult& r) {
    const detail::FluxNodes& nodes = tracker_.nodes();
    switch_time_s_.clear();
    switch_area_m2_.clear();
    switch_q_m3s_.clear();
    auto area_of = [&](double q) {
      const double a = nodes.area_for_flux(law, q);
      if (std::isnan(a)) {
        fail(r, "cannot route an inflow of " + format_value(q) +
                    " m3/s: more than the section conveys (a kinematic wave cannot store it)");
      }
      return a;
    };
    const double q_start = inflow.value_at(t0);
    const double a_start = area_of(q_start);
    if (std::isnan(a_start)) return false;
    switch_time_s_.push_back(t0);
    switch_area_m2_.push_back(a_start);
    switch_q_m3s_.push_back(q_start);
    const std::vector<double> breaks(inflow.times_s().begin(), inflow.times_s().end());
    const std::vector<double> times = detail::segment_times(t0, t1, breaks);
    for (std::size_t p = 0; p + 1 < times.size(); ++p) {
      const double ta = times[p], tb = times[p + 1];
      const double qa = inflow.value_at(ta), qb = inflow.value_at(tb);
      if (qa == qb) continue;
      const double a_end = area_of(qb);
      if (std::isnan(a_end)) return false;
      // Node discharges strictly between qa and qb, in time order.
      crossing_q_.clear();
      crossing_a_.clear();
      const double a_lo = std::min(switch_area_m2_.back(), a_end);
      const double a_hi = std::max(switch_area_m2_.back(), a_end);
      for (long k = nodes.index_below(a_lo) + 1; nodes.node_area(k) < a_hi; ++k) {
        const double q = nodes.node_flux(law, k);
        if (q <= std::min(qa, qb) || q >= std::max(qa, qb)) continue;
        if (!crossing_q_.empty() && q == crossing_q_.back()) continue;
        crossing_q_.push_back(q);
        crossing_a_.push_back(nodes.node_area(k));
      }
      if (qb < qa) {
        std::reverse(crossing_q_.begin(), crossing_q_.end());
        std::reverse(crossing_a_.begin(), crossing_a_.end());
      }
      crossing_q_.push_back(qb);
      crossing_a_.push_back(a_end);
      double t_prev = ta;
      for (std::size_t i = 0; i < crossing_q_.size(); ++i) {
        const double t_cross =
            i + 1 == crossing_q_.size() ? tb : ta + (crossing_q_[i] - qa) / (qb - qa) * (tb - ta);
        switch_time_s_.push_back(0.5 * (t_prev + t_cross));
        switch_area_m2_.push_back(crossing_a_[i]);
        switch_q_m3s_.push_back(crossing_q_[i]);
        t_prev = t_cross;
      }
    }
    return true;
  }

  // Adds `before` x the lateral volume of [ta, tb] and `after` x that of [tb, tc] to the
  // profile at time tb (= now), rebuilds the fronts and returns the volume added (m3).
  template <geometry::FluxLaw F>
  double add_lateral(const F& law, const LateralInflow& lateral, double ta, double tb,
                     double before, double tc, double after) {
    const std::vector<double>& station = lateral.station_m();
    const auto& rate = lateral.rate_m2s();
    stretch_area_m2_.resize(rate.size());
    for (std::size_t k = 0; k < rate.size(); ++k) {
      stretch_area_m2_[k] = before * rate[k].integral(ta, tb) + after * rate[k].integral(tb, tc);
    }
    tracker_.profile(edge_m_, area_m2_);
    new_edge_m_.assign(1, 0.0);
    new_area_m2_.clear();
    double added_m3 = 0.0;
    std::size_t k = 0;  // stretch holding the current position (k == count: beyond the last)
    for (std::size_t seg = 0; seg < area_m2_.size(); ++seg) {
      double x = edge_m_[seg];
      const double x_end = edge_m_[seg + 1];
      do {  // one piece per stretch the segment overlaps (zero-length segments: one piece)
        while (k < rate.size() && station[k + 1] <= x) ++k;
        const bool inside = k < rate.size();
        const double stop = inside ? std::min(x_end, station[k + 1]) : x_end;
        const double add = inside ? stretch_area_m2_[k] : 0.0;
        new_area_m2_.push_back(area_m2_[seg] + add);
        new_edge_m_.push_back(stop);
        added_m3 += add * (stop - x);
        x = stop;
      } while (x < x_end);
    }
    new_edge_m_.back() = tracker_.length_m();
    tracker_.set_profile(law, tracker_.time_s(), tracker_.inlet_area_m2(), new_edge_m_,
                         new_area_m2_, merge_length_m_);
    return added_m3;
  }

  template <geometry::FluxLaw F>
  void write_cells(detail::ReachState<F>& s) {
    tracker_.cell_averages(s.area_m2, s.face_flux_m3s);
    tracker_.sample_shocks(s.laws.front());
    s.diag.cell_updates += static_cast<long>(s.n());
    s.diag.max_fronts = std::max(s.diag.max_fronts, tracker_.front_count());
  }

  // Merge length when RoutingOptions::front_merge_length_m is 0: this fraction of the reach.
  static constexpr double kAutomaticMergeFraction = 1e-3;

  RoutingOptions options_;
  detail::FrontTracker tracker_;
  std::uint64_t seen_generation_ = std::numeric_limits<std::uint64_t>::max();
  double merge_length_m_ = 0.0;
  std::vector<double> switch_time_s_, switch_area_m2_, switch_q_m3s_;  // inlet states
  std::vector<double> crossing_q_, crossing_a_;      // node crossings of one hydrograph piece
  std::vector<double> edge_m_, area_m2_;             // profile scratch (lateral rebuilds)
  std::vector<double> new_edge_m_, new_area_m2_;
  std::vector<double> stretch_area_m2_;              // lateral area added per stretch
};

}  // namespace freshet::routing::schemes
