// The contract every routing scheme meets (see DEVELOPERS.md, "Adding a routing scheme").
//
// A scheme is a small type that owns its scratch arrays (one meaning each) and provides:
//   static constexpr SchemeKind kKind;              // its enumerator in SchemeKind
//   static constexpr std::string_view kName;        // its name in study files and reports
//   static int front_cells(const RoutingOptions&);  // cells over which it smears a shock
//   S(const RoutingOptions&, std::size_t cells);    // allocates its scratch
//   std::size_t memory_bytes() const;               // bytes of its per-cell scratch
// and then either steps under a Courant limit, driven by the reach's time loop
// (KinematicReach<F>::march: choose dt, step, accept or halve and retry):
//   double target_courant() const;                  // dt = target x dx / c_max
//   bool accepts(double courant_after) const;       // dt c_max(new state) / dx acceptable?
//   static constexpr int kCellUpdatesPerStep;       // counted in RunDiagnostics
//   std::vector<double>& candidate_m2();            // N: the new state a step writes
//   template <F> StepResult step(const detail::ReachState<F>&, std::span<double> faces, const StepInput&);
// (on acceptance the reach swaps its areas with candidate_m2(), so after an accepted step
// the candidate holds the state before it), or integrates a whole advance() itself:
//   template <F> AdvanceResult advance(detail::ReachState<F>&, double t0_s, double t1_s,
//                                      const PiecewiseLinearSeries& inflow_m3s,
//                                      const LateralInflow& lateral);
// booking its volumes in the state's ledger. Either way the ledger receives exactly the
// fluxes the scheme applied, so the volume balance closes to round-off.
#pragma once

#include <concepts>
#include <cstddef>
#include <span>
#include <string_view>
#include <vector>

#include "freshet/core/time_series.hpp"
#include "freshet/routing/detail/reach_state.hpp"
#include "freshet/routing/diagnostics.hpp"
#include "freshet/routing/lateral_inflow.hpp"
#include "freshet/routing/routing_options.hpp"

namespace freshet::routing::schemes {

// The forcing of one step [t_s, t_s + dt_s]; lateral volumes per cell are in the state.
struct StepInput {
  double t_s = 0.0;
  double dt_s = 0.0;
  double inflow_m3 = 0.0;                         // exact inflow volume over the step
  const PiecewiseLinearSeries* inflow_m3s = nullptr;
  // The previous attempt in this advance() was accepted: candidate_m2() holds the state
  // before the current one (a scheme may extrapolate from it).
  bool follows_accepted_step = false;
};

// What one attempted step did; on success the new state is in candidate_m2() and the applied
// face fluxes in the faces passed to step().
struct StepResult {
  bool ok = false;                 // false: a negative area or a failed solve; retried
  double c_max_after_m_s = 0.0;    // celerity bound of the new state
  double outflow_m3 = 0.0;
};

template <class S>
concept Scheme = requires(const S& s, const RoutingOptions& o) {
  { S::kKind } -> std::convertible_to<SchemeKind>;
  { S::kName } -> std::convertible_to<std::string_view>;
  { S::front_cells(o) } -> std::same_as<int>;
  { s.memory_bytes() } -> std::same_as<std::size_t>;
} && std::constructible_from<S, const RoutingOptions&, std::size_t>;

template <class S, class F>
concept SteppingScheme =
    Scheme<S> && requires(S& s, const detail::ReachState<F>& state, std::span<double> faces,
                          const StepInput& in, double courant) {
      { s.target_courant() } -> std::same_as<double>;
      { s.accepts(courant) } -> std::same_as<bool>;
      { S::kCellUpdatesPerStep } -> std::convertible_to<int>;
      { s.candidate_m2() } -> std::same_as<std::vector<double>&>;
      { s.step(state, faces, in) } -> std::same_as<StepResult>;
    };

template <class S, class F>
concept SelfTimedScheme =
    Scheme<S> && requires(S& s, detail::ReachState<F>& state, const PiecewiseLinearSeries& q,
                          const LateralInflow& lateral) {
      { s.advance(state, 0.0, 1.0, q, lateral) } -> std::same_as<AdvanceResult>;
    };

}  // namespace freshet::routing::schemes
