// A reach routed by the kinematic wave equation  A_t + Q(A)_x = q_lat(x, t), for a flux law F
// known at compile time (any geometry::FluxLaw, uniform along the reach or one law per cell).
//
// The reach owns the state (detail::ReachState<F>: cell areas, face fluxes, lateral forcing,
// ledger), its clock and its shock detector; the scheme chosen in RoutingOptions is one of the
// types registered in schemes/registry.hpp, visited once per advance(). Schemes that step
// under a Courant limit are driven by the time loop here (march: choose dt, step, accept or
// halve and retry, land exactly on t1); a scheme that times itself integrates the whole
// interval. See reach_model.hpp for the run-time interface and docs/methods-routing.md.
//
//   using freshet::geometry::PowerLawFlux;
//   KinematicReach<PowerLawFlux> reach({"mill-race", 1500.0, 300}, PowerLawFlux{0.9, 5.0/3.0});
//   reach.set_uniform_discharge(2.0);
//   AdvanceResult r = reach.advance(0.0, 600.0, inflow_m3s, LateralInflow::none());
//   double q_down = r.mean_outflow_m3s;   // volume-exact handover downstream
//
// Units: metres, seconds, m2 (areas), m3/s (fluxes), m2/s (lateral inflow per unit length).
#pragma once

#include <algorithm>
#include <chrono>
#include <cmath>
#include <limits>
#include <span>
#include <string>
#include <utility>
#include <variant>
#include <vector>

#include "freshet/core/error.hpp"
#include "freshet/core/time_series.hpp"
#include "freshet/geometry/flux_law.hpp"
#include "freshet/routing/detail/kernels.hpp"
#include "freshet/routing/detail/reach_state.hpp"
#include "freshet/routing/reach_model.hpp"
#include "freshet/routing/schemes/registry.hpp"

namespace freshet::routing {

namespace detail {
std::vector<Problem> validate_laws_count(std::size_t laws, int cells);
std::string reach_label(const ReachSpec& spec);
std::vector<Problem> validate_advance(double t0_s, double t1_s, double reach_time_s,
                                      const PiecewiseLinearSeries& inflow_m3s);
// The run counters of RunDiagnostics (not the wall time, which is not state).
void visit_counters(StateVisitor& v, RunDiagnostics& d);
}  // namespace detail

template <geometry::FluxLaw F>
class KinematicReach final : public ReachModel {
 public:
  // One flux law for the whole reach. Throws InputError listing every bad spec/option value.
  // `shape` (the section and bed slope) is read only by the diffusion-wave scheme.
  KinematicReach(ReachSpec spec, F law, RoutingOptions options = {}, ChannelShape shape = {})
      : KinematicReach(std::move(spec), std::vector<F>{std::move(law)}, std::move(options),
                       std::move(shape)) {}
  // One law per cell (size cell_count), or a single law.
  KinematicReach(ReachSpec spec, std::vector<F> laws, RoutingOptions options = {},
                 ChannelShape shape = {});

  using ReachModel::advance;
  AdvanceResult advance(double t0_s, double t1_s, const PiecewiseLinearSeries& inflow_m3s,
                        const LateralInflow& lateral) override;
  void set_initial_areas(std::span<const double> area_m2) override;
  void set_uniform_discharge(double discharge_m3s) override;

  [[nodiscard]] const ReachSpec& spec() const noexcept override { return spec_; }
  [[nodiscard]] const RoutingOptions& options() const noexcept override { return opt_; }
  [[nodiscard]] double cell_width_m() const noexcept override { return state_.dx_m; }
  [[nodiscard]] std::span<const double> cell_area_m2() const noexcept override {
    return state_.area_m2;
  }
  [[nodiscard]] std::span<const double> face_flux_m3s() const noexcept override {
    return state_.face_flux_m3s;
  }
  [[nodiscard]] double cell_discharge_m3s(int cell) const override {
    const auto i = static_cast<std::size_t>(cell);
    return law(i).discharge_m3s(state_.area_m2.at(i));
  }
  [[nodiscard]] double time_s() const noexcept override { return time_s_; }
  [[nodiscard]] const VolumeLedger& ledger() const noexcept override { return state_.ledger; }
  [[nodiscard]] RunDiagnostics diagnostics() const override;
  // The grid detector's shocks, or the fronts' own with the characteristics scheme.
  [[nodiscard]] const ShockReport& shock_report() const noexcept override {
    const std::vector<ShockReport>& all = shock_reports();
    return all.empty() ? no_shock_ : all.front();
  }
  [[nodiscard]] const std::vector<ShockReport>& shock_reports() const noexcept override {
    if (const auto* c = std::get_if<schemes::Characteristics>(&scheme_)) return c->shock_reports();
    return detector_.reports();
  }
  [[nodiscard]] const BreakingOutlook& breaking_outlook() const noexcept override {
    return breaking_.outlook();
  }
  [[nodiscard]] double memory_bytes_per_cell() const noexcept override;
  void visit_state(StateVisitor& v) override;
  [[nodiscard]] const F& law(std::size_t cell) const noexcept { return state_.law(cell); }

 private:
  [[nodiscard]] std::size_t n() const noexcept { return state_.n(); }
  void restart_ledger();
  template <class S>
  AdvanceResult run(S& scheme, double t0, double t1, const PiecewiseLinearSeries& inflow,
                    const LateralInflow& lateral);
  template <class S>
  AdvanceResult march(S& scheme, double t0, double t1, const PiecewiseLinearSeries& inflow,
                      const LateralInflow& lateral);
  [[nodiscard]] double choose_dt(double courant, double t, double t1,
                                 const PiecewiseLinearSeries& inflow) const;
  template <class S>
  void accept_step(S& scheme, const schemes::StepResult& s, double dt, double lateral_m3,
                   const schemes::StepInput& in, AdvanceResult& r);
  void finish_advance(double t0, AdvanceResult& r);
  void observe_shock(double t);

  ReachSpec spec_;
  RoutingOptions opt_;
  detail::ReachState<F> state_;
  schemes::AnyScheme scheme_;
  double time_s_ = std::numeric_limits<double>::quiet_NaN();
  double dt_cap_ = std::numeric_limits<double>::infinity();  // shrinks after rejections
  ShockDetector detector_;
  bool detect_shocks_ = true;  // the options' choice, off for a scheme whose waves do not break
  detail::ReachBreakingOutlook breaking_;
  BreakingPrediction profile_breaking_;  // of the initial state, relative to its start
  ShockReport no_shock_;
};

// ---------------------------------------------------------------------------------------------
// Implementation (templates).

template <geometry::FluxLaw F>
KinematicReach<F>::KinematicReach(ReachSpec spec, std::vector<F> laws, RoutingOptions options,
                                  ChannelShape shape)
    : spec_(std::move(spec)), opt_(std::move(options)) {
  ProblemList problems(detail::reach_label(spec_));
  problems.append(spec_.validate());
  problems.append(opt_.validate());
  problems.append(detail::validate_laws_count(laws.size(), spec_.cell_count));
  problems.throw_if_any();
  const auto cells = static_cast<std::size_t>(spec_.cell_count);
  state_ = detail::ReachState<F>(std::move(laws), spec_.length_m / spec_.cell_count, cells);
  state_.shape = std::move(shape);
  scheme_ = schemes::make_scheme(opt_.scheme, opt_, cells);
  const ShockDetectionOptions shock = resolved_shock_options(opt_);
  detect_shocks_ = shock.enabled;
  detector_ = ShockDetector(shock, state_.dx_m, spec_.cell_count);
  breaking_ = detail::ReachBreakingOutlook(geometry::SectionFlux{law(0)}, spec_.length_m,
                                          spec_.cell_count, shock);
  state_.diag.scheme = std::string(to_string(opt_.scheme));
  restart_ledger();
}

template <geometry::FluxLaw F>
void KinematicReach<F>::set_initial_areas(std::span<const double> area_m2) {
  ProblemList problems(detail::reach_label(spec_));
  if (area_m2.size() != n()) {
    problems.add("initial_area_m2", "has " + std::to_string(area_m2.size()) +
                                        " values: must have one per cell (" +
                                        std::to_string(n()) + ")");
  } else {
    for (std::size_t i = 0; i < n(); ++i) {
      problems.require_non_negative("initial_area_m2[" + std::to_string(i + 1) + "]", area_m2[i]);
    }
  }
  problems.throw_if_any();
  std::copy(area_m2.begin(), area_m2.end(), state_.area_m2.begin());
  restart_ledger();
  std::vector<double> x_m(n());
  for (std::size_t i = 0; i < n(); ++i) x_m[i] = (static_cast<double>(i) + 0.5) * state_.dx_m;
  profile_breaking_ = predict_breaking_from_profile(law(0), x_m, state_.area_m2);
}

template <geometry::FluxLaw F>
void KinematicReach<F>::set_uniform_discharge(double discharge_m3s) {
  ProblemList problems(detail::reach_label(spec_));
  problems.require_non_negative("initial_discharge_m3s", discharge_m3s);
  problems.throw_if_any();
  for (std::size_t i = 0; i < n(); ++i) {
    state_.area_m2[i] = law(i).area_for_discharge_m2(discharge_m3s);
  }
  restart_ledger();
}

template <geometry::FluxLaw F>
void KinematicReach<F>::restart_ledger() {
  state_.ledger = VolumeLedger{};
  ++state_.generation;
  state_.ledger.initial_storage_m3 = state_.ledger.storage_m3 = state_.storage_m3();
  std::vector<double>& face = state_.face_flux_m3s;
  for (std::size_t i = 0; i < n(); ++i) face[i + 1] = law(i).discharge_m3s(state_.area_m2[i]);
  face[0] = face[1];
  time_s_ = std::numeric_limits<double>::quiet_NaN();
  state_.c_max_m_s = state_.current_c_max();
  detector_.reset();
  profile_breaking_ = BreakingPrediction{};
}

template <geometry::FluxLaw F>
AdvanceResult KinematicReach<F>::advance(double t0_s, double t1_s,
                                         const PiecewiseLinearSeries& inflow_m3s,
                                         const LateralInflow& lateral) {
  const auto wall_start = std::chrono::steady_clock::now();
  ProblemList problems(detail::reach_label(spec_));
  problems.append(detail::validate_advance(t0_s, t1_s, time_s_, inflow_m3s));
  problems.throw_if_any();
  if (std::isnan(time_s_)) {  // first advance since the initial state: inlet sample of it
    breaking_.restart(t0_s, inflow_m3s.value_at(t0_s), state_.area_m2.front(), profile_breaking_);
  }
  breaking_.advance(t0_s, t1_s, inflow_m3s, !lateral.is_none());
  detector_.set_earliest_birth(breaking_.earliest_birth_s(), breaking_.earliest_birth_position_m(),
                               breaking_.outlook().resolvable);
  if (lateral.is_none()) {
    if (!state_.lateral_map.is_none()) state_.lateral_map = CellLateralMap{};
  } else if (!state_.lateral_map.fits(lateral, spec_.cell_count, state_.dx_m)) {
    state_.lateral_map = CellLateralMap(lateral, spec_.cell_count, state_.dx_m);
    state_.lateral_m3.resize(n());
  }
  // The one dispatch on the scheme: the visited scheme's compiled code runs the interval.
  AdvanceResult r = std::visit(
      [&](auto& scheme) { return run(scheme, t0_s, t1_s, inflow_m3s, lateral); }, scheme_);
  if (!r.ok()) {
    r.message = detail::reach_label(spec_) + ", scheme " + std::string(to_string(opt_.scheme)) +
                ", t = " + format_value(r.reached_time_s) + " s: " + r.message;
  }
  finish_advance(t0_s, r);
  state_.diag.wall_time_s +=
      std::chrono::duration<double>(std::chrono::steady_clock::now() - wall_start).count();
  if (!r.ok() && opt_.throw_on_failure) throw NumericalError(r.message);
  return r;
}

template <geometry::FluxLaw F>
template <class S>
AdvanceResult KinematicReach<F>::run(S& scheme, double t0, double t1,
                                     const PiecewiseLinearSeries& inflow,
                                     const LateralInflow& lateral) {
  static_assert(schemes::SteppingScheme<S, F> || schemes::SelfTimedScheme<S, F>,
                "a scheme either steps under a Courant limit or integrates advance() itself");
  if constexpr (schemes::SelfTimedScheme<S, F>) {
    return scheme.advance(state_, t0, t1, inflow, lateral);
  } else {
    return march(scheme, t0, t1, inflow, lateral);
  }
}

// The time loop of the stepping schemes: choose dt, try the step, reject and retry with half
// the step when it went negative or the scheme does not accept its Courant number, accept,
// repeat until t1. On failure the result carries the status and the reason.
template <geometry::FluxLaw F>
template <class S>
AdvanceResult KinematicReach<F>::march(S& scheme, double t0, double t1,
                                       const PiecewiseLinearSeries& inflow,
                                       const LateralInflow& lateral) {
  AdvanceResult r;
  r.reached_time_s = t0;
  double t = t0;
  int consecutive_rejections = 0;
  bool follows_accepted_step = false;
  while (t < t1) {
    const double dt = choose_dt(scheme.target_courant(), t, t1, inflow);
    if (dt < opt_.min_dt_s && dt < t1 - t) {
      r.status = AdvanceStatus::kStepTooSmall;
      r.message = "step " + format_value(dt) + " s is below min_dt_s";
      return r;
    }
    const schemes::StepInput in{t, dt, inflow.integral(t, t + dt), &inflow, follows_accepted_step};
    const double lateral_m3 =
        state_.has_lateral() ? state_.lateral_map.volumes_m3(lateral, t, t + dt, state_.lateral_m3)
                             : 0.0;
    const schemes::StepResult s = scheme.step(state_, state_.face_flux_m3s, in);
    if (!s.ok || !scheme.accepts(dt * s.c_max_after_m_s / state_.dx_m)) {
      ++r.rejected_steps;
      dt_cap_ = 0.5 * dt;
      follows_accepted_step = false;
      if (++consecutive_rejections > opt_.max_consecutive_rejections) {
        r.status = s.ok ? AdvanceStatus::kStepTooSmall : AdvanceStatus::kSolverFailed;
        r.message = std::to_string(consecutive_rejections) +
                    " consecutive steps rejected, more than max_consecutive_rejections (last dt " +
                    format_value(dt) + " s)";
        return r;
      }
      continue;
    }
    consecutive_rejections = 0;
    accept_step(scheme, s, dt, lateral_m3, in, r);
    follows_accepted_step = true;
    t = dt == t1 - t ? t1 : t + dt;
    r.reached_time_s = t;
  }
  return r;
}

// dt from the Courant target over the current state and the inflow over the step, clipped
// by max_dt, by the cap left by rejected steps, and so that the step lands exactly on t1.
template <geometry::FluxLaw F>
double KinematicReach<F>::choose_dt(double courant, double t, double t1,
                                    const PiecewiseLinearSeries& inflow) const {
  const double remaining = t1 - t;
  double dt = std::min({remaining, opt_.max_dt_s, dt_cap_});
  const double dx = state_.dx_m;
  if (state_.c_max_m_s > 0.0) dt = std::min(dt, courant * dx / state_.c_max_m_s);
  const double q_in = detail::series_max(inflow, t, t + dt);
  const F& law0 = state_.laws.front();
  const double c_in = law0.celerity_m_s(law0.area_for_discharge_m2(q_in));
  if (c_in > 0.0) dt = std::min(dt, courant * dx / c_in);
  if (dt >= remaining * (1.0 - 1e-12)) return remaining;
  return dt;
}

template <geometry::FluxLaw F>
template <class S>
void KinematicReach<F>::accept_step(S& scheme, const schemes::StepResult& s, double dt,
                                    double lateral_m3, const schemes::StepInput& in,
                                    AdvanceResult& r) {
  const double courant = dt * std::max(state_.c_max_m_s, s.c_max_after_m_s) / state_.dx_m;
  state_.area_m2.swap(scheme.candidate_m2());
  state_.c_max_m_s = s.c_max_after_m_s;
  VolumeLedger& ledger = state_.ledger;
  ledger.inflow_m3 += in.inflow_m3;
  ledger.lateral_m3 += lateral_m3;
  ledger.outflow_m3 += s.outflow_m3;
  r.inflow_m3 += in.inflow_m3;
  r.lateral_m3 += lateral_m3;
  r.outflow_m3 += s.outflow_m3;
  ++r.steps;
  RunDiagnostics& diag = state_.diag;
  diag.max_courant = std::max(diag.max_courant, courant);
  diag.cell_updates += static_cast<long>(n()) * S::kCellUpdatesPerStep;
  dt_cap_ = std::min(std::numeric_limits<double>::infinity(), 2.0 * dt_cap_);
}

template <geometry::FluxLaw F>
void KinematicReach<F>::finish_advance(double t0, AdvanceResult& r) {
  state_.ledger.storage_m3 = state_.storage_m3();
  time_s_ = r.reached_time_s;
  const double span_s = r.reached_time_s - t0;
  r.mean_outflow_m3s = span_s > 0.0 ? r.outflow_m3 / span_s : state_.face_flux_m3s.back();
  state_.diag.steps_taken += r.steps;
  state_.diag.steps_rejected += r.rejected_steps;
  observe_shock(time_s_);
}

// The detector reads Q and c per cell on demand (no arrays kept for it).
template <geometry::FluxLaw F>
void KinematicReach<F>::observe_shock(double t) {
  if (!detect_shocks_) return;
  detector_.observe(t, state_.area_m2, [this](std::size_t i, double& q, double& c) {
    detail::flux_and_celerity(law(i), state_.area_m2[i], q, c);
  });
}

template <geometry::FluxLaw F>
RunDiagnostics KinematicReach<F>::diagnostics() const {
  RunDiagnostics d = state_.diag;
  d.mass_balance_error_m3 = state_.ledger.balance_error_m3();
  d.mass_balance_error_rel = state_.ledger.relative_balance_error();
  d.shocks_found = static_cast<int>(shock_reports().size());
  return d;
}

template <geometry::FluxLaw F>
void KinematicReach<F>::visit_state(StateVisitor& v) {
  StateGroup g(v, "reach");
  v.fixed_doubles("area_m2", state_.area_m2);
  v.fixed_doubles("face_flux_m3s", state_.face_flux_m3s);
  v.value("c_max_m_s", state_.c_max_m_s);
  freshet::visit_state(v, "ledger", state_.ledger);
  v.value("generation", state_.generation);
  detail::visit_counters(v, state_.diag);
  v.value("time_s", time_s_);
  v.value("dt_cap_s", dt_cap_);
  detector_.visit_state(v);
  breaking_.visit_state(v);
  routing::visit_state(v, "profile_breaking", profile_breaking_);
  // The lateral map is rebuilt from the next advance()'s forcing, as it would be unchanged.
  std::visit(
      [&v](auto& scheme) {
        if constexpr (requires { scheme.visit_state(v); }) scheme.visit_state(v);
      },
      scheme_);
}

template <geometry::FluxLaw F>
double KinematicReach<F>::memory_bytes_per_cell() const noexcept {
  const std::size_t doubles = state_.area_m2.capacity() + state_.face_flux_m3s.capacity() +
                              state_.lateral_m3.capacity();
  const std::size_t scheme = std::visit([](const auto& s) { return s.memory_bytes(); }, scheme_);
  const std::size_t laws = state_.uniform() ? 0 : state_.laws.capacity() * sizeof(F);
  const double bytes = static_cast<double>(doubles * sizeof(double) + scheme + laws +
                                           state_.lateral_map.memory_bytes());
  return bytes / static_cast<double>(n());
}

}  // namespace freshet::routing
