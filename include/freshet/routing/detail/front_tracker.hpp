// Front tracking on one reach [0, L] (detail; see docs/methods-routing.md, "Characteristics").
//
// The state is piecewise constant in x: a list of fronts, ordered downstream, each a jump
// between two areas moving at the Rankine-Hugoniot speed of the piecewise-linear flux Q_pl
// (flux_nodes.hpp). For that flux the entropy solution is exactly such a set of fronts
// (Dafermos 1972; Holden & Risebro 2015, Front Tracking for Hyperbolic Conservation Laws,
// 2nd ed., sec. 2.1-2.2): a Riemann problem between A_l and A_r is solved by the lower convex
// envelope of Q_pl on [A_l, A_r] when A_l < A_r and by the upper concave envelope on
// [A_r, A_l] when A_l > A_r (Oleinik's entropy condition; LeVeque 2002, Finite Volume Methods
// for Hyperbolic Problems, sec. 16.1), each envelope segment one front. When two fronts meet,
// the Riemann problem between their outer states replaces them. Nothing is discretised in x
// or t: collisions are events in time order (a heap), the front that reaches x = L leaves
// through the outlet, and the inlet state changes only when told (set_inlet_area).
//
// Volumes: each front moves at exactly (Q_l - Q_r) / (A_l - A_r), so the storage
// sum(segment length x area) changes by exactly inflow - outflow; both are integrals of
// piecewise-constant fluxes, booked here, so the balance closes to round-off.
//
// Every celerity is >= 0 (Q non-decreasing), so fronts never move upstream.
//
// Shocks of the solution (shocks()): a shock is born where two fronts first collide and one
// falling front (a_left > a_right) comes out; it keeps its identity through later collisions
// (the surviving front carries it: of two shocks that meet, the one with the larger jump goes
// on and the other ends as merged), through lateral-inflow rebuilds (by position) and ends at
// the outlet (exact exit time), or as decayed when an expansion overtakes it and no falling
// front comes out. Its formation is the earliest collision among the fronts it absorbed whose
// outgoing front carried at least kBirthJumpFraction of the discharge behind it (smaller
// collisions are those of node-step fragments, not the breaking).
// Shocks are recorded once their jump in Q reaches kRecordFraction of the largest discharge
// held so far (smaller ones are followed but not kept); the caller samples their path with
// sample_shocks() at its observation times.
#pragma once

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <functional>
#include <limits>
#include <queue>
#include <span>
#include <vector>

#include "freshet/geometry/flux_law.hpp"
#include "freshet/routing/detail/flux_eval.hpp"
#include "freshet/routing/detail/flux_nodes.hpp"
#include "freshet/routing/shock.hpp"

namespace freshet::routing::detail {

// One front of a Riemann solution: the area to its right (downstream) and its speed.
struct Wave {
  double area_right_m2 = 0.0;
  double q_right_m3s = 0.0;  // Q_pl(area_right_m2)
  double speed_m_s = 0.0;
};

// Entropy solution of the Riemann problem (a_left | a_right) for Q_pl: the fronts from
// upstream to downstream (speeds non-decreasing), appended to `out` (cleared first). `convex`
// may be passed true only when Q is convex (c never decreases), which skips the envelope.
//
// A fan with more than max_fronts envelope segments is thinned: envelope vertices are kept
// only where Q has moved by at least 1/max_fronts of the jump since the last one kept (the
// ends always), so a fan onto a dry bed, which crosses thousands of geometric nodes, costs
// at most max_fronts fronts. Thinning keeps the envelope's order of speeds (no front
// overtakes another in the fan) and every front still moves at the Rankine-Hugoniot speed of
// its own two states, so volumes stay exact; a thinned fan's states are within 1/max_fronts
// of the jump in Q of the exact fan's.
template <geometry::FluxLaw F>
// q_left and q_right are Q_pl of the two states (known to the caller, so a shock costs no
// flux evaluation).
void solve_riemann(const FluxNodes& nodes, const F& law, bool convex, double a_left,
                   double q_left, double a_right, double q_right, std::size_t max_fronts,
                   std::vector<Wave>& out, std::vector<double>& scratch_a,
                   std::vector<double>& scratch_q) {
  out.clear();
  if (a_left == a_right) return;
  const bool rising = a_left < a_right;  // rising in x: lower convex envelope
  const double lo = std::min(a_left, a_right), hi = std::max(a_left, a_right);
  if ((convex && !rising) || nodes.index_below(lo) == nodes.index_below(hi)) {
    // One linear piece, or the upper envelope of a convex flux (its chord): one front.
    out.push_back({a_right, q_right, (q_left - q_right) / (a_left - a_right)});
    return;
  }
  // Points of Q_pl on [lo, hi]: the two ends and every node strictly between.
  scratch_a.clear();
  scratch_q.clear();
  scratch_a.push_back(lo);
  scratch_q.push_back(rising ? q_left : q_right);
  const long k_first = nodes.index_below(lo) + 1;
  long k_last = nodes.index_below(hi);
  if (nodes.node_area(k_last) >= hi) --k_last;
  const auto samples = static_cast<long>(2 * max_fronts);
  if (k_last - k_first + 1 <= samples) {
    for (long k = k_first; k <= k_last; ++k) {
      scratch_a.push_back(nodes.node_area(k));
      scratch_q.push_back(nodes.node_flux(law, k));
    }
  } else {
    // Too many nodes (a fan onto a dry bed crosses thousands): the nodes nearest below
    // 2 max_fronts discharges evenly spaced over the jump; the envelope of these points is
    // then thinned below.
    const double q_lo = scratch_q.front(), q_hi = rising ? q_right : q_left;
    long previous = k_first - 1;
    for (long j = 1; j < samples; ++j) {
      const double q = q_lo + (q_hi - q_lo) * static_cast<double>(j) / static_cast<double>(samples);
      const long k = std::clamp(nodes.index_below(nodes.area_for_flux(law, q)), k_first, k_last);
      if (k <= previous) continue;
      scratch_a.push_back(nodes.node_area(k));
      scratch_q.push_back(nodes.node_flux(law, k));
      previous = k;
    }
  }
  scratch_a.push_back(hi);
  scratch_q.push_back(rising ? q_right : q_left);
  // Monotone chain (Andrew 1979, Inform. Process. Lett. 9): keep a point while the turn stays
  // convex (lower envelope) or concave (upper envelope); collinear points are dropped, so
  // the speeds of the fan strictly increase downstream.
  std::size_t m = 0;  // envelope length, built in place at the front of the scratch arrays
  for (std::size_t i = 0; i < scratch_a.size(); ++i) {
    while (m >= 2) {
      const double cross =
          (scratch_a[m - 1] - scratch_a[m - 2]) * (scratch_q[i] - scratch_q[m - 2]) -
          (scratch_q[m - 1] - scratch_q[m - 2]) * (scratch_a[i] - scratch_a[m - 2]);
      // Lower envelope: drop the middle point unless it turns left (cross > 0).
      if (rising ? cross <= 0.0 : cross >= 0.0) --m;
      else break;
    }
    scratch_a[m] = scratch_a[i];
    scratch_q[m] = scratch_q[i];
    ++m;
  }
  if (m - 1 > max_fronts) {
    const double q_step = (scratch_q[m - 1] - scratch_q[0]) / static_cast<double>(max_fronts);
    std::size_t kept = 1;
    for (std::size_t i = 1; i + 1 < m; ++i) {
      if (scratch_q[i] - scratch_q[kept - 1] < q_step) continue;
      scratch_a[kept] = scratch_a[i];
      scratch_q[kept] = scratch_q[i];
      ++kept;
    }
    scratch_a[kept] = scratch_a[m - 1];
    scratch_q[kept] = scratch_q[m - 1];
    m = kept + 1;
  }
  auto speed = [&](std::size_t i, std::size_t j) {
    return (scratch_q[j] - scratch_q[i]) / (scratch_a[j] - scratch_a[i]);
  };
  if (rising) {
    for (std::size_t i = 1; i < m; ++i) out.push_back({scratch_a[i], scratch_q[i], speed(i - 1, i)});
  } else {
    for (std::size_t i = m - 1; i-- > 0;) out.push_back({scratch_a[i], scratch_q[i], speed(i, i + 1)});
  }
}

class FrontTracker {
 public:
  FrontTracker() = default;
  // length_m > 0; node_spacing > 0 (see FluxNodes).
  FrontTracker(double length_m, double node_spacing, std::size_t max_fan_fronts)
      : length_m_(length_m), nodes_(node_spacing), max_fan_fronts_(max_fan_fronts) {}

  [[nodiscard]] const FluxNodes& nodes() const noexcept { return nodes_; }
  [[nodiscard]] double length_m() const noexcept { return length_m_; }
  [[nodiscard]] double time_s() const noexcept { return t_now_; }
  [[nodiscard]] int front_count() const noexcept { return count_; }
  [[nodiscard]] long events() const noexcept { return events_; }
  [[nodiscard]] double inlet_area_m2() const noexcept { return inlet_area_; }
  [[nodiscard]] double outlet_area_m2() const noexcept {
    return tail_ < 0 ? inlet_area_ : pool_[idx(tail_)].area_right_m2;
  }
  [[nodiscard]] double outlet_q_m3s() const noexcept {
    return tail_ < 0 ? inlet_q_ : pool_[idx(tail_)].q_right_m3s;
  }
  [[nodiscard]] std::size_t memory_bytes() const noexcept {
    return pool_.capacity() * sizeof(Front) + free_.capacity() * sizeof(int) +
           heap_storage_bytes_ + (waves_.capacity() + scratch_a_.capacity() +
                                  scratch_q_.capacity()) * sizeof(double);
  }

  // Saves or restores every front, the pending collisions (the heap's own array, so events
  // of equal time come out in the same order), the free list and the recorded shocks.
  void visit_state(StateVisitor& v) {
    StateGroup g(v, "front_tracker");
    v.records("fronts", pool_, &Front::x0_m, &Front::t0_s, &Front::speed_m_s,
              &Front::area_left_m2, &Front::area_right_m2, &Front::q_left_m3s,
              &Front::q_right_m3s, &Front::prev, &Front::next, &Front::generation,
              &Front::alive, &Front::shock, &Front::shock_jump_q, &Front::birth_t_s,
              &Front::birth_x_m);
    std::vector<std::int64_t> free(free_.begin(), free_.end());
    v.integers("free", free);
    free_.assign(free.begin(), free.end());
    v.records("events", HeapAccess::events(heap_), &Event::time_s, &Event::left, &Event::right,
              &Event::left_generation, &Event::right_generation);
    v.value("heap_storage_bytes", heap_storage_bytes_);
    v.value("convex", convex_);
    v.value("head", head_);
    v.value("tail", tail_);
    v.value("count", count_);
    v.value("events_handled", events_);
    v.value("t_now_s", t_now_);
    v.value("inlet_area_m2", inlet_area_);
    v.value("inlet_q_m3s", inlet_q_);
    v.value("inflow_m3", inflow_m3_);
    v.value("outflow_m3", outflow_m3_);
    v.value("q_scale_m3s", q_scale_);
    routing::visit_state(v, "shocks", shocks_);
    v.records("carried", carried_, &Lineage::x_m, &Lineage::shock, &Lineage::birth_t_s,
              &Lineage::birth_x_m, &Lineage::jump_q);
  }

  // Starts over at time t_s from a piecewise-constant profile: areas[k] on
  // [edge_m[k], edge_m[k+1]] (edges increasing from 0 to the length), with the inlet state
  // inlet_area_m2 at x = 0. Neighbouring segments together no longer than merge_length_m are
  // joined, volume-weighted (coalesce), before the Riemann problems are solved.
  template <geometry::FluxLaw F>
  void set_profile(const F& law, double t_s, double inlet_area_m2,
                   std::span<const double> edge_m, std::span<const double> area_m2,
                   double merge_length_m = 0.0) {
    carry_lineages();
    clear(t_s);
    convex_ = celerity_non_decreasing(law);
    inlet_area_ = inlet_area_m2;
    inlet_q_ = nodes_.flux(law, inlet_area_);
    q_scale_ = std::max(q_scale_, inlet_q_);
    std::vector<double> e(edge_m.begin(), edge_m.end()), a(area_m2.begin(), area_m2.end());
    coalesce(e, a, merge_length_m);
    double left = inlet_area_, q_left = inlet_q_;
    for (std::size_t k = 0; k < a.size(); ++k) {
      const double q = a[k] == left ? q_left : nodes_.flux(law, a[k]);
      insert_fan(law, tail_, -1, e[k], left, q_left, a[k], q);
      left = a[k], q_left = q;
      q_scale_ = std::max(q_scale_, q);
    }
    attach_lineages(std::max(merge_length_m, 1e-9 * length_m_));
    for (int f = head_; f >= 0; f = pool_[idx(f)].next) schedule_after(f);
  }

  // The inlet state becomes area_m2 (carrying q_m3s = Q_pl(area_m2)) from now on: the
  // Riemann fan between it and the state just downstream of x = 0 starts at the inlet.
  template <geometry::FluxLaw F>
  void set_inlet_area(const F& law, double area_m2, double q_m3s) {
    if (area_m2 == inlet_area_) return;
    const double right = inlet_area_;  // the state just downstream of x = 0
    const double q_right = inlet_q_;
    const int old_head = head_;
    inlet_area_ = area_m2;
    inlet_q_ = q_m3s;
    q_scale_ = std::max(q_scale_, q_m3s);
    (void)insert_fan(law, -1, head_, 0.0, area_m2, q_m3s, right, q_right);
    // Collisions among the new fronts and with the old head; a jump in the inflow large
    // enough is a shock formed at the inlet now.
    for (int f = head_; f >= 0 && f != old_head; f = pool_[idx(f)].next) {
      schedule_after(f);
      record_if_large(pool_[idx(f)]);
    }
  }

  // Moves every front to t_s (>= time_s()), resolving collisions and outlet exits in time
  // order. Returns nothing; the inflow and outflow volumes over the interval are added to
  // inflow_m3() and outflow_m3().
  template <geometry::FluxLaw F>
  void advance_to(const F& law, double t_s) {
    while (true) {
      const double t_exit = exit_time();
      const Event* e = next_collision();
      const double t_col = e ? e->time_s : std::numeric_limits<double>::infinity();
      if (std::min(t_exit, t_col) > t_s) break;
      if (t_exit <= t_col) {
        pass_time(std::max(t_exit, t_now_));
        remove_tail();
      } else {
        const Event ev = *e;
        heap_.pop();
        pass_time(std::max(ev.time_s, t_now_));
        collide(law, ev.left);
      }
      ++events_;
    }
    pass_time(t_s);
  }

  // Every shock recorded since the tracker was built, in order of formation (set_profile keeps
  // them: a rebuild carries each live shock to the front at its position).
  [[nodiscard]] const std::vector<ShockReport>& shocks() const noexcept { return shocks_; }
  static constexpr double kRecordFraction = 0.01;  // our choice, no source
  // A collision is the birth of a shock only when the falling front that comes out of it
  // carries a jump of at least this share of the discharge behind it (our choice, no source).
  // The inflow enters as node steps (about m x front_node_spacing of Q each, 0.17 % at the
  // default spacing and m = 5/3) and, at the ends of every advance(), as fractions of one;
  // those fragments, nearly equal in speed, collide long before the characteristics of the
  // inflow cross (P1: 856 s, 912 m against 1159 s, 1235 m), and such a collision is not the
  // breaking. With the floor the first shock of P1 forms within 0.3 % of the crossing.
  static constexpr double kBirthJumpFraction = 0.01;

  // Adds a path sample at time_s() to every recorded shock still in the reach, with the
  // Rankine-Hugoniot speed of the exact law `law` between its two states (the front itself
  // moves at that of Q_pl), and refits each one's path speed.
  template <geometry::FluxLaw F>
  void sample_shocks(const F& law) {
    for (int f = head_; f >= 0; f = pool_[idx(f)].next) {
      const Front& fr = pool_[idx(f)];
      if (fr.shock < 0) continue;
      ShockReport& r = shocks_[static_cast<std::size_t>(fr.shock)];
      const double rh = (law.discharge_m3s(fr.area_left_m2) - law.discharge_m3s(fr.area_right_m2)) /
                        (fr.area_left_m2 - fr.area_right_m2);
      if (!r.path.empty() && r.path.back().time_s == t_now_) continue;
      r.path.push_back({t_now_, clamp_x(position(fr, t_now_)), fr.area_left_m2,
                        fr.area_right_m2, rh});
      fit_path(r, fr.speed_m_s);
    }
  }

  // Volumes through the inlet and the outlet since the tracker was built (m3; set_profile
  // does not reset them).
  [[nodiscard]] double inflow_m3() const noexcept { return inflow_m3_; }
  [[nodiscard]] double outflow_m3() const noexcept { return outflow_m3_; }

  // The profile now: areas[k] on [edges[k], edges[k+1]], from 0 to the length (fronts at
  // one position give zero-length segments).
  void profile(std::vector<double>& edge_m, std::vector<double>& area_m2) const {
    edge_m.assign(1, 0.0);
    area_m2.clear();
    double left = inlet_area_;
    for (int f = head_; f >= 0; f = pool_[idx(f)].next) {
      const Front& fr = pool_[idx(f)];
      edge_m.push_back(clamp_x(position(fr, t_now_)));
      area_m2.push_back(left);
      left = fr.area_right_m2;
    }
    edge_m.push_back(length_m_);
    area_m2.push_back(left);
  }

  // Storage now, sum of segment length x area (m3).
  [[nodiscard]] double storage_m3() const {
    double sum = 0.0, x = 0.0, left = inlet_area_;
    for (int f = head_; f >= 0; f = pool_[idx(f)].next) {
      const Front& fr = pool_[idx(f)];
      const double xf = clamp_x(position(fr, t_now_));
      sum += (xf - x) * left;
      x = xf, left = fr.area_right_m2;
    }
    return sum + (length_m_ - x) * left;
  }

  // Exact averages over `cells` equal cells (areas), and Q_pl at each face i dx (of the
  // state just upstream of the face; face 0 the inlet state).
  void cell_averages(std::span<double> cell_area_m2, std::span<double> face_q_m3s) const {
    const std::size_t n = cell_area_m2.size();
    const double dx = length_m_ / static_cast<double>(n);
    std::size_t cell = 0;
    double cell_start = 0.0, cell_end = n == 1 ? length_m_ : dx;
    double x = 0.0, volume = 0.0;  // volume of the current cell up to x
    face_q_m3s[0] = inlet_q_;
    // The segment [x, x_end] of `area`: close every cell it covers to its end, keep the rest.
    auto segment = [&](double x_end, double area, double q) {
      while (x_end >= cell_end && cell < n) {
        volume += (cell_end - x) * area;
        cell_area_m2[cell] = volume / (cell_end - cell_start);
        face_q_m3s[cell + 1] = q;
        volume = 0.0;
        x = cell_start = cell_end;
        ++cell;
        cell_end = cell + 1 >= n ? length_m_ : dx * static_cast<double>(cell + 1);
      }
      if (x_end > x) volume += (x_end - x) * area, x = x_end;
    };
    double left = inlet_area_, q_left = inlet_q_;
    for (int f = head_; f >= 0; f = pool_[idx(f)].next) {
      const Front& fr = pool_[idx(f)];
      segment(clamp_x(position(fr, t_now_)), left, q_left);
      left = fr.area_right_m2, q_left = fr.q_right_m3s;
    }
    segment(length_m_, left, q_left);
  }


 private:
  struct Front {
    double x0_m = 0.0, t0_s = 0.0, speed_m_s = 0.0;
    double area_left_m2 = 0.0, area_right_m2 = 0.0;
    double q_left_m3s = 0.0, q_right_m3s = 0.0;  // Q_pl of the two states
    int prev = -1, next = -1;
    std::uint32_t generation = 0;
    bool alive = false;
    // Shock lineage: the recorded shock it carries (-1: none), and where and when the
    // earliest collision among the fronts it absorbed happened (NaN: none).
    int shock = -1;
    double shock_jump_q = 0.0;  // the jump of the front that handed the shock on
    double birth_t_s = std::numeric_limits<double>::quiet_NaN();
    double birth_x_m = std::numeric_limits<double>::quiet_NaN();
    [[nodiscard]] double jump_q() const noexcept { return q_left_m3s - q_right_m3s; }
    [[nodiscard]] bool falling() const noexcept { return area_left_m2 > area_right_m2; }
  };
  // What a front hands on to the front that replaces it (collisions, rebuilds).
  struct Lineage {
    double x_m = 0.0;
    int shock = -1;
    double birth_t_s = std::numeric_limits<double>::quiet_NaN();
    double birth_x_m = std::numeric_limits<double>::quiet_NaN();
    double jump_q = 0.0;
  };
  struct Event {
    double time_s = 0.0;
    int left = -1, right = -1;
    std::uint32_t left_generation = 0, right_generation = 0;
    bool operator>(const Event& o) const noexcept { return time_s > o.time_s; }
  };
  using EventHeap = std::priority_queue<Event, std::vector<Event>, std::greater<>>;
  // The heap's array (a protected member of std::priority_queue), for saving it as it is.
  struct HeapAccess : EventHeap {
    static std::vector<Event>& events(EventHeap& heap) { return heap.*(&HeapAccess::c); }
  };

  static constexpr double kParallel = 1e-12;
  static std::size_t idx(int f) noexcept { return static_cast<std::size_t>(f); }
  static double position(const Front& f, double t) noexcept {
    return f.x0_m + f.speed_m_s * (t - f.t0_s);
  }
  [[nodiscard]] double clamp_x(double x) const noexcept { return std::clamp(x, 0.0, length_m_); }

  void clear(double t_s) {
    pool_.clear();
    free_.clear();
    heap_ = {};
    head_ = tail_ = -1;
    count_ = 0;
    t_now_ = t_s;
  }

  int allocate() {
    int f;
    if (!free_.empty()) {
      f = free_.back();
      free_.pop_back();
    } else {
      f = static_cast<int>(pool_.size());
      pool_.emplace_back();
    }
    Front& fr = pool_[idx(f)];
    ++fr.generation;
    fr.alive = true;
    fr.shock = -1;
    fr.shock_jump_q = 0.0;
    fr.birth_t_s = fr.birth_x_m = std::numeric_limits<double>::quiet_NaN();
    ++count_;
    return f;
  }
  void release(int f) {
    Front& fr = pool_[idx(f)];
    fr.alive = false;
    ++fr.generation;
    free_.push_back(f);
    --count_;
  }
  void unlink(int f) {
    const Front& fr = pool_[idx(f)];
    if (fr.prev >= 0) pool_[idx(fr.prev)].next = fr.next;
    else head_ = fr.next;
    if (fr.next >= 0) pool_[idx(fr.next)].prev = fr.prev;
    else tail_ = fr.prev;
    release(f);
  }

  // Inserts the Riemann fan (left | right) at x between fronts `prev` and `next` (-1: the
  // ends); returns the first new front (-1 when left == right).
  template <geometry::FluxLaw F>
  int insert_fan(const F& law, int prev, int next, double x, double left, double q_left,
                 double right, double q_right) {
    solve_riemann(nodes_, law, convex_, left, q_left, right, q_right, max_fan_fronts_, waves_,
                  scratch_a_, scratch_q_);
    int first = -1;
    double a_left = left;
    for (const Wave& w : waves_) {
      const int f = allocate();
      Front& fr = pool_[idx(f)];
      fr.x0_m = x, fr.t0_s = t_now_, fr.speed_m_s = w.speed_m_s;
      fr.area_left_m2 = a_left, fr.area_right_m2 = w.area_right_m2;
      fr.q_left_m3s = q_left, fr.q_right_m3s = w.q_right_m3s;
      fr.prev = prev, fr.next = next;
      if (prev >= 0) pool_[idx(prev)].next = f;
      else head_ = f;
      if (next >= 0) pool_[idx(next)].prev = f;
      else tail_ = f;
      if (first < 0) first = f;
      prev = f;
      a_left = w.area_right_m2, q_left = w.q_right_m3s;
    }
    return first;
  }

  // Schedules the collision of front f with the next one downstream, if they approach.
  void schedule_after(int f) {
    if (f < 0) return;
    const Front& a = pool_[idx(f)];
    if (a.next < 0) return;
    const Front& b = pool_[idx(a.next)];
    // Fronts whose speeds differ by round-off only are parallel (no event).
    if (!(a.speed_m_s - b.speed_m_s > kParallel * a.speed_m_s)) return;
    const double gap = std::max(position(b, t_now_) - position(a, t_now_), 0.0);
    heap_.push({t_now_ + gap / (a.speed_m_s - b.speed_m_s), f, a.next, a.generation,
                b.generation});
    heap_storage_bytes_ = std::max(heap_storage_bytes_, heap_.size() * sizeof(Event));
  }

  // The earliest collision still valid (stale events are dropped), or nullptr.
  const Event* next_collision() {
    while (!heap_.empty()) {
      const Event& e = heap_.top();
      const Front& a = pool_[idx(e.left)];
      const Front& b = pool_[idx(e.right)];
      if (a.alive && b.alive && a.generation == e.left_generation &&
          b.generation == e.right_generation && a.next == e.right) {
        return &e;
      }
      heap_.pop();
    }
    return nullptr;
  }

  [[nodiscard]] double exit_time() const noexcept {
    if (tail_ < 0) return std::numeric_limits<double>::infinity();
    const Front& f = pool_[idx(tail_)];
    const double x = position(f, t_now_);
    if (x >= length_m_) return t_now_;
    if (!(f.speed_m_s > 0.0)) return std::numeric_limits<double>::infinity();
    return t_now_ + (length_m_ - x) / f.speed_m_s;
  }

  // Books the inlet and outlet fluxes (constant between events) up to t.
  void pass_time(double t) {
    if (t <= t_now_) return;
    const double dt = t - t_now_;
    inflow_m3_ += inlet_q_ * dt;
    outflow_m3_ += outlet_q_m3s() * dt;
    t_now_ = t;
  }

  void remove_tail() {
    const int f = tail_;
    if (const int s = pool_[idx(f)].shock; s >= 0) {
      ShockReport& r = shocks_[static_cast<std::size_t>(s)];
      r.reached_outlet = true;
      r.outlet_arrival_time_s = t_now_;
    }
    unlink(f);
  }

  template <geometry::FluxLaw F>
  void collide(const F& law, int f) {
    const Front& a = pool_[idx(f)];
    const int g = a.next;
    const Front& b = pool_[idx(g)];
    const double x = clamp_x(0.5 * (position(a, t_now_) + position(b, t_now_)));
    const double left = a.area_left_m2, right = b.area_right_m2;
    const double q_left = a.q_left_m3s, q_right = b.q_right_m3s;
    const int prev = a.prev, next = b.next;
    const Lineage la = lineage_of(a, x), lb = lineage_of(b, x);
    unlink(f);
    unlink(g);
    const int first = insert_fan(law, prev, next, x, left, q_left, right, q_right);
    // The falling front with the largest jump carries the shock on; a collision is a birth.
    Front* main = nullptr;
    for (int h = first; h >= 0 && h != next; h = pool_[idx(h)].next) {
      Front& fr = pool_[idx(h)];
      if (fr.falling() && (!main || fr.jump_q() > main->jump_q())) main = &fr;
    }
    Lineage born = la;
    born.shock = -1;
    if (std::isnan(born.birth_t_s) && main &&
        main->jump_q() >= kBirthJumpFraction * main->q_left_m3s) {
      born.birth_t_s = t_now_, born.birth_x_m = x;
    }
    inherit(main, born);
    inherit(main, la);
    inherit(main, lb);
    if (main) record_if_large(*main);
    // New neighbours: prev with the first new front (or with next), each new front, the last.
    schedule_after(prev);
    for (int h = first; h >= 0 && h != next; h = pool_[idx(h)].next) schedule_after(h);
  }

  [[nodiscard]] Lineage lineage_of(const Front& f, double x) const {
    return {x, f.shock, f.birth_t_s, f.birth_x_m, f.jump_q()};
  }

  // Hands lineage l to front `to` (nullptr: nothing carries it on, so its shock decayed): the
  // earlier birth; of two shocks, the one with the larger jump goes on, the other merged.
  void inherit(Front* to, const Lineage& l) {
    if (!to) {
      end_shock(l.shock, false);
      return;
    }
    if (!std::isnan(l.birth_t_s) && !(to->birth_t_s <= l.birth_t_s)) {
      to->birth_t_s = l.birth_t_s, to->birth_x_m = l.birth_x_m;
    }
    if (l.shock < 0 || l.shock == to->shock) return;
    if (to->shock >= 0 && !(l.jump_q > to->shock_jump_q)) {
      end_shock(l.shock, true);
      return;
    }
    end_shock(to->shock, true);
    to->shock = l.shock;
    to->shock_jump_q = l.jump_q;
  }

  void end_shock(int s, bool merged) {
    if (s < 0) return;
    ShockReport& r = shocks_[static_cast<std::size_t>(s)];
    if (r.ended || r.reached_outlet) return;
    r.ended = true;
    r.merged = merged;
    r.end_time_s = t_now_;
  }

  // A falling front whose jump has reached kRecordFraction of the largest discharge held is
  // recorded, formed at its birth.
  void record_if_large(Front& fr) {
    if (fr.shock >= 0 || !fr.falling() || !(fr.jump_q() >= kRecordFraction * q_scale_) ||
        !(fr.jump_q() > 0.0)) {
      return;
    }
    ShockReport r;
    r.formed = true;
    const bool born = !std::isnan(fr.birth_t_s);
    r.formation_time_s = born ? fr.birth_t_s : t_now_;
    r.formation_position_m = born ? fr.birth_x_m : clamp_x(position(fr, t_now_));
    r.speed_m_s = fr.speed_m_s;
    fr.shock = static_cast<int>(shocks_.size());
    fr.shock_jump_q = fr.jump_q();
    shocks_.push_back(std::move(r));
  }

  // Least-squares speed of the path (the front's own speed until there are two samples) and
  // the mean Rankine-Hugoniot speed of the samples.
  static void fit_path(ShockReport& r, double front_speed_m_s) {
    const std::size_t n = r.path.size();
    double st = 0.0, sx = 0.0, stt = 0.0, stx = 0.0, rh = 0.0;
    for (const ShockSample& p : r.path) {
      st += p.time_s, sx += p.position_m, stt += p.time_s * p.time_s;
      stx += p.time_s * p.position_m, rh += p.rankine_hugoniot_m_s;
    }
    const double nn = static_cast<double>(n);
    const double det = nn * stt - st * st;
    r.speed_m_s = n >= 2 && det > 0.0 ? (nn * stx - st * sx) / det : front_speed_m_s;
    r.rankine_hugoniot_m_s = rh / nn;
  }

  // Before a rebuild: the lineages of the fronts that carry one.
  void carry_lineages() {
    carried_.clear();
    for (int f = head_; f >= 0; f = pool_[idx(f)].next) {
      const Front& fr = pool_[idx(f)];
      if (fr.shock >= 0 || !std::isnan(fr.birth_t_s)) {
        carried_.push_back(lineage_of(fr, clamp_x(position(fr, t_now_))));
      }
    }
  }

  // After a rebuild: each carried lineage goes to the falling front nearest its position
  // (within `tolerance_m`: segments joined by coalesce move a jump by at most the merge
  // length); a shock with no falling front there has decayed. New large falling fronts are
  // recorded.
  void attach_lineages(double tolerance_m) {
    int f = head_;
    for (const Lineage& l : carried_) {
      while (f >= 0 && position(pool_[idx(f)], t_now_) < l.x_m - tolerance_m) f = pool_[idx(f)].next;
      Front* best = nullptr;
      for (int h = f; h >= 0; h = pool_[idx(h)].next) {
        Front& fr = pool_[idx(h)];
        const double x = position(fr, t_now_);
        if (x > l.x_m + tolerance_m) break;
        if (fr.falling() && (!best || std::abs(x - l.x_m) < std::abs(position(*best, t_now_) - l.x_m))) {
          best = &fr;
        }
      }
      inherit(best, l);
    }
    carried_.clear();
    for (int h = head_; h >= 0; h = pool_[idx(h)].next) record_if_large(pool_[idx(h)]);
  }

  // Folds a segment into its upstream neighbour, volume-weighted, when the two together are
  // no longer than merge_length_m (so no state is smeared over more than that), and joins
  // zero-length segments and equal neighbours. Any two neighbours left are together longer
  // than merge_length_m: at most 2 length / merge_length_m + 1 segments remain.
  static void coalesce(std::vector<double>& edge, std::vector<double>& area, double merge_length_m) {
    std::size_t out = 0;
    for (std::size_t k = 1; k < area.size(); ++k) {
      const double len = edge[k + 1] - edge[k];
      const double prev_len = edge[out + 1] - edge[out];
      if (area[k] == area[out] || len <= 0.0 || prev_len + len <= merge_length_m) {
        const double total = prev_len + len;
        if (total > 0.0 && area[k] != area[out]) {
          area[out] = (area[out] * prev_len + area[k] * len) / total;
        }
        edge[out + 1] = edge[k + 1];
      } else {
        ++out;
        area[out] = area[k];
        edge[out] = edge[k];
        edge[out + 1] = edge[k + 1];
      }
    }
    area.resize(area.empty() ? 0 : out + 1);
    edge.resize(area.size() + 1);
  }

  double length_m_ = 0.0;
  FluxNodes nodes_;
  std::size_t max_fan_fronts_ = 64;
  bool convex_ = false;
  std::vector<Front> pool_;
  std::vector<int> free_;
  EventHeap heap_;
  std::size_t heap_storage_bytes_ = 0;
  int head_ = -1, tail_ = -1, count_ = 0;
  long events_ = 0;
  double t_now_ = 0.0;
  double inlet_area_ = 0.0, inlet_q_ = 0.0;
  double inflow_m3_ = 0.0, outflow_m3_ = 0.0;
  std::vector<Wave> waves_;
  std::vector<double> scratch_a_, scratch_q_;
  double q_scale_ = 0.0;               // largest discharge held so far
  std::vector<ShockReport> shocks_;    // recorded shocks, in order of formation
  std::vector<Lineage> carried_;       // lineages across a rebuild
};

}  // namespace freshet::routing::detail
