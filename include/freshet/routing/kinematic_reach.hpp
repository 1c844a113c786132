// A reach routed by the kinematic wave equation  A_t + Q(A)_x = q_lat(x, t).
//
// Finite volumes: `cell_count` cells of equal width dx = length / cell_count; the state is
// the flow area per cell (cell_area_m2, N values), the face fluxes are stored apart
// (face_flux_m3s, N+1 values: face 0 is the inlet, face N the outlet; after a step they hold
// the fluxes the step applied, time-averaged over stages). Q(A) is any geometry::FluxLaw,
// uniform along the reach or one law per cell. The scheme is chosen per run through
// RoutingOptions (see docs/methods-routing.md). The reach owns its clock: advance(t0, t1, ...)
// takes as many internal steps as the scheme needs and lands exactly on t1.
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
#include <memory>
#include <span>
#include <string>
#include <type_traits>
#include <utility>
#include <vector>

#include "freshet/core/error.hpp"
#include "freshet/core/root_finding.hpp"
#include "freshet/core/time_series.hpp"
#include "freshet/geometry/flux_law.hpp"
#include "freshet/routing/detail/celerity_envelope.hpp"
#include "freshet/routing/detail/flux_eval.hpp"
#include "freshet/routing/detail/kernels.hpp"
#include "freshet/routing/diagnostics.hpp"
#include "freshet/routing/lateral_inflow.hpp"
#include "freshet/routing/routing_options.hpp"
#include "freshet/routing/shock.hpp"

namespace freshet::routing {

struct ReachSpec {
  std::string name = "reach";  // used in messages, e.g. "reach 'mill-race'"
  double length_m = 0.0;
  int cell_count = 0;
  [[nodiscard]] std::vector<Problem> validate() const;
};

// Run-time interface: one virtual call per advance(), never inside the cell loops.
class ReachModel {
 public:
  virtual ~ReachModel() = default;
  virtual AdvanceResult advance(double t0_s, double t1_s, const PiecewiseLinearSeries& inflow_m3s,
                                const LateralInflow& lateral) = 0;
  // Hand-over form for a driver: the inflow is constant at mean_inflow_m3s over [t0, t1] (for
  // example the mean_outflow_m3s of the elements upstream), so exactly mean x (t1 - t0) enters.
  AdvanceResult advance(double t0_s, double t1_s, double mean_inflow_m3s,
                        const LateralInflow& lateral) {
    return advance(t0_s, t1_s, PiecewiseLinearSeries::constant(mean_inflow_m3s), lateral);
  }
  // Initial states; both restart the volume ledger and the clock.
  virtual void set_initial_areas(std::span<const double> area_m2) = 0;
  virtual void set_uniform_discharge(double discharge_m3s) = 0;  // normal depth in every cell

  [[nodiscard]] virtual const ReachSpec& spec() const noexcept = 0;
  [[nodiscard]] virtual const RoutingOptions& options() const noexcept = 0;
  [[nodiscard]] virtual double cell_width_m() const noexcept = 0;
  [[nodiscard]] virtual std::span<const double> cell_area_m2() const noexcept = 0;
  [[nodiscard]] virtual std::span<const double> face_flux_m3s() const noexcept = 0;
  [[nodiscard]] virtual double cell_discharge_m3s(int cell) const = 0;  // Q_i(A_i) now
  [[nodiscard]] virtual double time_s() const noexcept = 0;  // NaN before the first advance
  [[nodiscard]] virtual const VolumeLedger& ledger() const noexcept = 0;
  [[nodiscard]] virtual RunDiagnostics diagnostics() const = 0;
  // The first kinematic shock of the run (formed == false when none), and every shock in
  // order of formation.
  [[nodiscard]] virtual const ShockReport& shock_report() const noexcept = 0;
  [[nodiscard]] virtual const std::vector<ShockReport>& shock_reports() const noexcept = 0;
  // Bytes of per-cell arrays held (state, faces, scratch, per-cell laws, lateral map) divided
  // by N. Per-reach constants (a 6.4 kB celerity envelope for laws whose celerity may fall
  // with area) are not included.
  [[nodiscard]] virtual double memory_bytes_per_cell() const noexcept = 0;
};

template <geometry::FluxLaw F>
class KinematicReach final : public ReachModel {
 public:
  // One flux law for the whole reach. Throws InputError listing every bad spec/option value.
  KinematicReach(ReachSpec spec, F law, RoutingOptions options = {})
      : KinematicReach(std::move(spec), std::vector<F>{std::move(law)}, std::move(options)) {}
  // One law per cell (size cell_count), or a single law.
  KinematicReach(ReachSpec spec, std::vector<F> laws, RoutingOptions options = {});

  using ReachModel::advance;
  AdvanceResult advance(double t0_s, double t1_s, const PiecewiseLinearSeries& inflow_m3s,
                        const LateralInflow& lateral) override;
  void set_initial_areas(std::span<const double> area_m2) override;
  void set_uniform_discharge(double discharge_m3s) override;

  [[nodiscard]] const ReachSpec& spec() const noexcept override { return spec_; }
  [[nodiscard]] const RoutingOptions& options() const noexcept override { return opt_; }
  [[nodiscard]] double cell_width_m() const noexcept override { return dx_; }
  [[nodiscard]] std::span<const double> cell_area_m2() const noexcept override { return area_; }
  [[nodiscard]] std::span<const double> face_flux_m3s() const noexcept override { return face_; }
  [[nodiscard]] double cell_discharge_m3s(int cell) const override {
    return law(static_cast<std::size_t>(cell)).discharge_m3s(area_.at(static_cast<std::size_t>(cell)));
  }
  [[nodiscard]] double time_s() const noexcept override { return time_s_; }
  [[nodiscard]] const VolumeLedger& ledger() const noexcept override { return ledger_; }
  [[nodiscard]] RunDiagnostics diagnostics() const override;
  [[nodiscard]] const ShockReport& shock_report() const noexcept override {
    return detector_.report();
  }
  [[nodiscard]] const std::vector<ShockReport>& shock_reports() const noexcept override {
    return detector_.reports();
  }
  [[nodiscard]] double memory_bytes_per_cell() const noexcept override;
  [[nodiscard]] const F& law(std::size_t cell) const noexcept {
    return laws_[laws_.size() == 1 ? 0 : cell];
  }

 private:
  // What one attempted step did; on success the new state is in next_.
  struct StepResult {
    bool ok = false;
    double c_max_after_m_s = 0.0;
    double outflow_m3 = 0.0;
  };
  struct Forcing {  // over one step [t, t + dt]
    double inflow_m3 = 0.0;
    double lateral_m3 = 0.0;
    bool has_lateral = false;
  };

  [[nodiscard]] std::size_t n() const noexcept { return area_.size(); }
  [[nodiscard]] bool uniform() const noexcept { return laws_.size() == 1; }
  void restart_ledger();
  [[nodiscard]] double storage_m3() const noexcept;
  [[nodiscard]] double current_c_max() const noexcept;
  [[nodiscard]] double target_courant() const noexcept;
  [[nodiscard]] double choose_dt(double t, double t1, const PiecewiseLinearSeries& inflow) const;
  Forcing prepare_forcing(double t, double dt, const PiecewiseLinearSeries& inflow,
                          const LateralInflow& lateral);
  StepResult try_step(double t, double dt, const Forcing& forcing,
                      const PiecewiseLinearSeries& inflow);
  [[nodiscard]] bool step_acceptable(const StepResult& s, double dt) const noexcept;
  void accept_step(const StepResult& s, double dt, const Forcing& forcing, AdvanceResult& r);
  AdvanceResult advance_stepping(double t0, double t1, const PiecewiseLinearSeries& inflow,
                                 const LateralInflow& lateral);
  AdvanceResult advance_method_of_lines(double t0, double t1, const PiecewiseLinearSeries& inflow,
                                        const LateralInflow& lateral);
  AdvanceResult fail(AdvanceResult r, AdvanceStatus status, std::string message) const;
  void finish_advance(double t0, AdvanceResult& r);
  void observe_shock(double t);
  double clear_negative_areas_into_outflow();
  bool integrate_mol_segment(const detail::OdeRhs& rhs, Eigen::VectorXd& y, double ta, double tb,
                             const PiecewiseLinearSeries& inflow, const LateralInflow& lateral,
                             AdvanceResult& r);

  template <bool kUniform, bool kLateral>
  StepResult explicit_step(double dt, double inflow_m3);
  // Uniform law: a bound on max_i c(A_i) from the largest area (exact for monotone c).
  [[nodiscard]] double celerity_bound(double max_area_m2, std::span<const double> areas) const noexcept;
  template <bool kUniform, bool kLateral>
  StepResult implicit_step(double dt, double inflow_m3);
  template <bool kUniform, Limiter kLimiter>
  StepResult muscl_heun_step(double t, double dt, double inflow_m3,
                             const PiecewiseLinearSeries& inflow);
  template <bool kUniform, Limiter kLimiter>
  void muscl_fluxes(const double* a, double a_ghost, double flux_in, double* face) const;
  bool solve_implicit_cell(const F& law, double lambda, double rhs, double guess, double q_guess,
                           double c_guess, double& area, double& flux, double& celerity) const;

  ReachSpec spec_;
  RoutingOptions opt_;
  double dx_ = 0.0;
  bool monotone_ = false;             // uniform law whose celerity never decreases with A
  detail::CelerityEnvelope envelope_; // uniform law with possibly decreasing celerity
  std::vector<F> laws_;               // size 1 (uniform) or N
  std::vector<double> area_;          // N: the state
  std::vector<double> face_;          // N+1: fluxes applied by the last step
  std::vector<double> next_;          // N: candidate state of the step being tried
  std::vector<double> stage_;         // N: MUSCL-Heun stage, implicit Q at the guesses, scratch
  std::vector<double> lateral_m3_;    // N: lateral volume per cell over the step (if any)
  CellLateralMap lateral_map_;
  double time_s_ = std::numeric_limits<double>::quiet_NaN();
  double c_max_ = 0.0;                // celerity bound of the current state
  bool previous_state_valid_ = false; // next_ holds the state before the last step
  double dt_cap_ = std::numeric_limits<double>::infinity();  // shrinks after rejections
  VolumeLedger ledger_;
  RunDiagnostics diag_;
  ShockDetector detector_;
};

// ---------------------------------------------------------------------------------------------
// Implementation (templates).

namespace detail {
// Calls fn(std::bool_constant<b>{}) so that a run-time flag selects a compiled variant.
template <class Fn>
decltype(auto) with_flag(bool b, Fn&& fn) {
  if (b) return fn(std::true_type{});
  return fn(std::false_type{});
}
std::vector<Problem> validate_laws_count(std::size_t laws, int cells);
std::string reach_label(const ReachSpec& spec);
std::vector<Problem> validate_advance(double t0_s, double t1_s, double reach_time_s,
                                      const PiecewiseLinearSeries& inflow_m3s);
}  // namespace detail

template <geometry::FluxLaw F>
KinematicReach<F>::KinematicReach(ReachSpec spec, std::vector<F> laws, RoutingOptions options)
    : spec_(std::move(spec)), opt_(std::move(options)), laws_(std::move(laws)) {
  ProblemList problems(detail::reach_label(spec_));
  problems.append(spec_.validate());
  problems.append(opt_.validate());
  problems.append(detail::validate_laws_count(laws_.size(), spec_.cell_count));
  problems.throw_if_any();
  const auto cells = static_cast<std::size_t>(spec_.cell_count);
  dx_ = spec_.length_m / spec_.cell_count;
  monotone_ = uniform() && detail::celerity_non_decreasing(laws_.front());
  if (uniform() && !monotone_) envelope_ = detail::CelerityEnvelope(laws_.front());
  area_.assign(cells, 0.0);
  face_.assign(cells + 1, 0.0);
  next_.assign(cells, 0.0);
  // stage_: MUSCL-Heun stage areas, implicit Q at the Newton guesses, detector celerities.
  if (opt_.scheme != SchemeKind::kExplicitUpwind || opt_.shock.enabled) stage_.assign(cells, 0.0);
  detector_ = ShockDetector(resolved_shock_options(opt_), dx_, spec_.cell_count);
  diag_.scheme = std::string(to_string(opt_.scheme));
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
  std::copy(area_m2.begin(), area_m2.end(), area_.begin());
  restart_ledger();
}

template <geometry::FluxLaw F>
void KinematicReach<F>::set_uniform_discharge(double discharge_m3s) {
  ProblemList problems(detail::reach_label(spec_));
  problems.require_non_negative("initial_discharge_m3s", discharge_m3s);
  problems.throw_if_any();
  for (std::size_t i = 0; i < n(); ++i) area_[i] = law(i).area_for_discharge_m2(discharge_m3s);
  restart_ledger();
}

template <geometry::FluxLaw F>
void KinematicReach<F>::restart_ledger() {
  ledger_ = VolumeLedger{};
  ledger_.initial_storage_m3 = ledger_.storage_m3 = storage_m3();
  for (std::size_t i = 0; i < n(); ++i) face_[i + 1] = law(i).discharge_m3s(area_[i]);
  face_[0] = face_[1];
  time_s_ = std::numeric_limits<double>::quiet_NaN();
  previous_state_valid_ = false;
  c_max_ = current_c_max();
  detector_.reset();
}

template <geometry::FluxLaw F>
double KinematicReach<F>::storage_m3() const noexcept {
  double sum = 0.0;
  for (double a : area_) sum += a;
  return sum * dx_;
}

template <geometry::FluxLaw F>
double KinematicReach<F>::celerity_bound(double max_area_m2,
                                         std::span<const double> areas) const noexcept {
  const double c_at_max = laws_.front().celerity_m_s(max_area_m2);
  if (monotone_) return c_at_max;
  const double bound = envelope_.bound(max_area_m2, c_at_max);
  if (bound >= 0.0) return bound;
  double c = 0.0;  // beyond the envelope table: evaluate every cell
  for (double a : areas) c = std::max(c, laws_.front().celerity_m_s(a));
  return c;
}

template <geometry::FluxLaw F>
double KinematicReach<F>::current_c_max() const noexcept {
  if (uniform()) return celerity_bound(*std::max_element(area_.begin(), area_.end()), area_);
  double c = 0.0;
  for (std::size_t i = 0; i < n(); ++i) c = std::max(c, law(i).celerity_m_s(area_[i]));
  return c;
}

template <geometry::FluxLaw F>
double KinematicReach<F>::target_courant() const noexcept {
  switch (opt_.scheme) {
    case SchemeKind::kImplicitUpwind: return opt_.implicit_courant;
    case SchemeKind::kMusclHeun: return opt_.tvd_courant_target;
    default: return opt_.courant_target;
  }
}

// dt from the Courant target over the current state and the inflow over the step, clipped
// by max_dt, by the cap left by rejected steps, and so that the step lands exactly on t1.
template <geometry::FluxLaw F>
double KinematicReach<F>::choose_dt(double t, double t1, const PiecewiseLinearSeries& inflow) const {
  const double remaining = t1 - t;
  double dt = std::min({remaining, opt_.max_dt_s, dt_cap_});
  const double courant = target_courant();
  if (c_max_ > 0.0) dt = std::min(dt, courant * dx_ / c_max_);
  const double q_in = detail::series_max(inflow, t, t + dt);
  const double c_in = laws_.front().celerity_m_s(laws_.front().area_for_discharge_m2(q_in));
  if (c_in > 0.0) dt = std::min(dt, courant * dx_ / c_in);
  if (dt >= remaining * (1.0 - 1e-12)) return remaining;
  return dt;
}

template <geometry::FluxLaw F>
typename KinematicReach<F>::Forcing KinematicReach<F>::prepare_forcing(
    double t, double dt, const PiecewiseLinearSeries& inflow, const LateralInflow& lateral) {
  Forcing f;
  f.inflow_m3 = inflow.integral(t, t + dt);
  f.has_lateral = !lateral_map_.is_none();
  if (f.has_lateral) f.lateral_m3 = lateral_map_.volumes_m3(lateral, t, t + dt, lateral_m3_);
  return f;
}

// Dispatch once per step to the compiled variant of the chosen scheme.
template <geometry::FluxLaw F>
typename KinematicReach<F>::StepResult KinematicReach<F>::try_step(
    double t, double dt, const Forcing& forcing, const PiecewiseLinearSeries& inflow) {
  const bool lat = forcing.has_lateral;
  switch (opt_.scheme) {
    case SchemeKind::kImplicitUpwind:
      return detail::with_flag(uniform(), [&](auto u) {
        return detail::with_flag(lat, [&](auto l) {
          return implicit_step<decltype(u)::value, decltype(l)::value>(dt, forcing.inflow_m3);
        });
      });
    case SchemeKind::kMusclHeun:
      return detail::with_flag(uniform(), [&](auto u) {
        if (opt_.limiter == Limiter::kMinmod)
          return muscl_heun_step<decltype(u)::value, Limiter::kMinmod>(t, dt, forcing.inflow_m3, inflow);
        return muscl_heun_step<decltype(u)::value, Limiter::kVanLeer>(t, dt, forcing.inflow_m3, inflow);
      });
    default:
      return detail::with_flag(uniform(), [&](auto u) {
        return detail::with_flag(lat, [&](auto l) {
          return explicit_step<decltype(u)::value, decltype(l)::value>(dt, forcing.inflow_m3);
        });
      });
  }
}

// Explicit conservative upwind (Godunov) step, forward Euler (LeVeque 2002, eq. 4.4 with the
// upwind flux, sec. 4.8): A_i^{n+1} = A_i^n - dt/dx (Q_i(A_i^n) - Q_{i-1}(A_{i-1}^n)) + V_lat,i/dx.
// One flux evaluation per cell; no allocation, no virtual call.
template <geometry::FluxLaw F>
template <bool kUniform, bool kLateral>
typename KinematicReach<F>::StepResult KinematicReach<F>::explicit_step(double dt,
                                                                        double inflow_m3) {
  const std::size_t cells = n();
  const double lambda = dt / dx_;
  const double inv_dx = 1.0 / dx_;
  const double* a = area_.data();
  const double* lat = lateral_m3_.data();
  double* next = next_.data();
  double* face = face_.data();
  double flux_left = inflow_m3 / dt;
  face[0] = flux_left;
  double a_min = 0.0, a_max = 0.0, c_max = 0.0;
  for (std::size_t i = 0; i < cells; ++i) {
    const F& law_i = laws_[kUniform ? 0 : i];
    const double flux_right = detail::upwind_face_flux(law_i, a[i]);
    const double lateral_area = kLateral ? lat[i] * inv_dx : 0.0;
    const double a_new = detail::conservative_update(a[i], lambda, flux_left, flux_right, lateral_area);
    face[i + 1] = flux_right;
    next[i] = a_new;
    a_min = std::min(a_min, a_new);
    a_max = std::max(a_max, a_new);
    if constexpr (!kUniform) c_max = std::max(c_max, law_i.celerity_m_s(a_new));
    flux_left = flux_right;
  }
  if constexpr (kUniform) c_max = celerity_bound(a_max, next_);
  return {a_min >= 0.0, c_max, dt * face[cells]};
}

// Safeguarded Newton for the implicit cell equation g(A) = A + lambda Q(A) - rhs = 0 on
// [0, rhs] (g is increasing, g(0) <= 0 <= g(rhs)), starting from `guess` where Q and c are
// already known. Newton steps leaving the shrinking bracket are replaced by bisection (Press
// et al. 2007, Numerical Recipes 3rd ed., sec. 9.4); if the loop does not converge, core's
// solve_bracketed_newton finishes the job. A Newton step smaller than 1e-6 A is accepted
// without a further evaluation (quadratic convergence leaves an error near 1e-12 A); the
// flux is returned as (rhs - A) / lambda, so the cell balance holds exactly whatever A is.
template <geometry::FluxLaw F>
bool KinematicReach<F>::solve_implicit_cell(const F& law_i, double lambda, double rhs,
                                            double guess, double q, double c, double& area,
                                            double& flux, double& celerity) const {
  if (!(rhs > 0.0)) {
    area = 0.0, flux = 0.0, celerity = law_i.celerity_m_s(0.0);
    return true;
  }
  double lo = 0.0, hi = rhs, x = guess;
  if (!(x >= 0.0 && x <= rhs)) {
    x = std::clamp(guess, 0.0, rhs);
    detail::flux_and_celerity(law_i, x, q, c);
  }
  bool converged = false;
  for (int it = 0; it < opt_.newton_max_iterations; ++it) {
    const double g = x + lambda * q - rhs;
    if (g == 0.0) { converged = true; break; }
    (g > 0.0 ? hi : lo) = x;
    double x_new = x - g / (1.0 + lambda * c);
    if (!(x_new > lo && x_new < hi)) x_new = 0.5 * (lo + hi);
    const bool small_step = std::abs(x_new - x) <= 1e-6 * x_new;
    x = x_new;
    if (small_step) { converged = true; break; }
    detail::flux_and_celerity(law_i, x, q, c);
  }
  if (!converged) {
    auto fdf = [&](double y, double& g, double& dg) {
      detail::flux_and_celerity(law_i, y, q, c);
      g = y + lambda * q - rhs;
      dg = 1.0 + lambda * c;
    };
    const RootResult root = solve_bracketed_newton(fdf, 0.0, rhs);
    if (!root.converged) return false;
    x = root.x;
  }
  area = std::clamp(x, 0.0, rhs);
  flux = (rhs - area) / lambda;
  celerity = c;
  return true;
}

// Implicit conservative upwind step, backward Euler: A_i + dt/dx Q_i(A_i) = A_i^n +
// dt/dx F_i + V_lat,i/dx, solved cell by cell downstream because F_i = Q_{i-1}(A_{i-1}) is
// already known (the upwind Jacobian is lower bidiagonal). Unconditionally stable; A in
// [0, rhs] so never negative.
template <geometry::FluxLaw F>
template <bool kUniform, bool kLateral>
typename KinematicReach<F>::StepResult KinematicReach<F>::implicit_step(double dt,
                                                                        double inflow_m3) {
  const std::size_t cells = n();
  const double lambda = dt / dx_;
  const double inv_dx = 1.0 / dx_;
  // Pass 1, independent per cell (so evaluations overlap): the guess, linear extrapolation
  // in time from the previous state when next_ still holds it, and Q, c there.
  for (std::size_t i = 0; i < cells; ++i) {
    const double guess = previous_state_valid_ ? std::max(0.0, 2.0 * area_[i] - next_[i]) : area_[i];
    next_[i] = guess;
    detail::flux_and_celerity(laws_[kUniform ? 0 : i], guess, stage_[i], face_[i + 1]);
  }
  // Pass 2, downstream: the cell equations, each needing the flux just found upstream.
  double flux_left = inflow_m3 / dt;
  face_[0] = flux_left;
  double c_max = 0.0;
  for (std::size_t i = 0; i < cells; ++i) {
    const F& law_i = laws_[kUniform ? 0 : i];
    double rhs = area_[i] + lambda * flux_left;
    if constexpr (kLateral) rhs += lateral_m3_[i] * inv_dx;
    double a_new = 0.0, flux_right = 0.0, c = 0.0;
    if (!solve_implicit_cell(law_i, lambda, rhs, next_[i], stage_[i], face_[i + 1], a_new,
                             flux_right, c)) {
      previous_state_valid_ = false;
      return {};
    }
    next_[i] = a_new;
    face_[i + 1] = flux_right;
    c_max = std::max(c_max, c);
    flux_left = flux_right;
  }
  return {true, c_max, dt * face_[cells]};
}

// MUSCL face fluxes: A at the downstream side of cell i is A_i + slope_i / 2 with a limited
// slope (van Leer 1979; LeVeque 2002, sec. 6.9); the upwind flux of that value is the face
// flux. Ghosts: the inflow area upstream, zero gradient downstream.
template <geometry::FluxLaw F>
template <bool kUniform, Limiter kLimiter>
void KinematicReach<F>::muscl_fluxes(const double* a, double a_ghost, double flux_in,
                                     double* face) const {
  const std::size_t cells = n();
  face[0] = flux_in;
  double a_prev = a_ghost;
  for (std::size_t i = 0; i < cells; ++i) {
    const double a_next = i + 1 < cells ? a[i + 1] : a[i];
    const double slope = detail::limited_slope<kLimiter>(a[i] - a_prev, a_next - a[i]);
    face[i + 1] = detail::upwind_face_flux(laws_[kUniform ? 0 : i], a[i] + 0.5 * slope);
    a_prev = a[i];
  }
}

// Second-order step: MUSCL reconstruction + SSP-RK2 (Heun; Shu & Osher 1988, J. Comput. Phys.
// 77; Gottlieb, Shu & Tadmor 2001, SIAM Rev. 43): A* = A + dt L(A); A^{n+1} = (A + A* +
// dt L(A*)) / 2. Boundary and lateral forcing use their exact step means in both stages, so
// the applied face fluxes (stage average) carry the exact volumes.
template <geometry::FluxLaw F>
template <bool kUniform, Limiter kLimiter>
typename KinematicReach<F>::StepResult KinematicReach<F>::muscl_heun_step(
    double t, double dt, double inflow_m3, const PiecewiseLinearSeries& inflow) {
  const std::size_t cells = n();
  const double lambda = dt / dx_;
  const bool lat = !lateral_map_.is_none();
  const double flux_in = inflow_m3 / dt;
  const F& law0 = laws_.front();
  muscl_fluxes<kUniform, kLimiter>(area_.data(), law0.area_for_discharge_m2(inflow.value_at(t)),
                                   flux_in, face_.data());
  double a_min = 0.0;
  for (std::size_t i = 0; i < cells; ++i) {
    const double lateral_area = lat ? lateral_m3_[i] / dx_ : 0.0;
    stage_[i] = detail::conservative_update(area_[i], lambda, face_[i], face_[i + 1], lateral_area);
    a_min = std::min(a_min, stage_[i]);
  }
  if (a_min < 0.0) return {};
  // Stage 2, reconstructing from the stage areas on the fly; face_ becomes the stage mean.
  double a_prev = law0.area_for_discharge_m2(inflow.value_at(t + dt));
  double flux_left = flux_in, a_max = 0.0, c_max = 0.0;
  for (std::size_t i = 0; i < cells; ++i) {
    const F& law_i = laws_[kUniform ? 0 : i];
    const double a_next = i + 1 < cells ? stage_[i + 1] : stage_[i];
    const double slope = detail::limited_slope<kLimiter>(stage_[i] - a_prev, a_next - stage_[i]);
    const double flux_right = detail::upwind_face_flux(law_i, stage_[i] + 0.5 * slope);
    const double lateral_area = lat ? lateral_m3_[i] / dx_ : 0.0;
    const double a2 = detail::conservative_update(stage_[i], lambda, flux_left, flux_right, lateral_area);
    face_[i] = 0.5 * (face_[i] + flux_left);
    next_[i] = 0.5 * (area_[i] + a2);
    a_min = std::min(a_min, next_[i]);
    a_max = std::max(a_max, next_[i]);
    if constexpr (!kUniform) c_max = std::max(c_max, law_i.celerity_m_s(next_[i]));
    a_prev = stage_[i];
    flux_left = flux_right;
  }
  face_[cells] = 0.5 * (face_[cells] + flux_left);
  if constexpr (kUniform) c_max = celerity_bound(a_max, next_);
  return {a_min >= 0.0, c_max, dt * face_[cells]};
}

template <geometry::FluxLaw F>
AdvanceResult KinematicReach<F>::advance(double t0_s, double t1_s,
                                         const PiecewiseLinearSeries& inflow_m3s,
                                         const LateralInflow& lateral) {
  const auto wall_start = std::chrono::steady_clock::now();
  ProblemList problems(detail::reach_label(spec_));
  problems.append(detail::validate_advance(t0_s, t1_s, time_s_, inflow_m3s));
  problems.throw_if_any();
  if (lateral.is_none()) {
    lateral_map_ = CellLateralMap{};
  } else {
    lateral_map_ = CellLateralMap(lateral, spec_.cell_count, dx_);
    lateral_m3_.resize(n());
  }
  AdvanceResult r = opt_.scheme == SchemeKind::kMethodOfLines
                        ? advance_method_of_lines(t0_s, t1_s, inflow_m3s, lateral)
                        : advance_stepping(t0_s, t1_s, inflow_m3s, lateral);
  finish_advance(t0_s, r);
  diag_.wall_time_s +=
      std::chrono::duration<double>(std::chrono::steady_clock::now() - wall_start).count();
  if (!r.ok() && opt_.throw_on_failure) throw NumericalError(r.message);
  return r;
}

// The time loop of the stepping schemes: choose dt, try the step, reject and retry with half
// the step when it went negative or broke the Courant limit, accept, repeat until t1.
template <geometry::FluxLaw F>
AdvanceResult KinematicReach<F>::advance_stepping(double t0, double t1,
                                                  const PiecewiseLinearSeries& inflow,
                                                  const LateralInflow& lateral) {
  AdvanceResult r;
  r.reached_time_s = t0;
  double t = t0;
  int consecutive_rejections = 0;
  while (t < t1) {
    const double dt = choose_dt(t, t1, inflow);
    if (dt < opt_.min_dt_s && dt < t1 - t) {
      return fail(r, AdvanceStatus::kStepTooSmall,
                  "step " + format_value(dt) + " s is below min_dt_s");
    }
    const Forcing forcing = prepare_forcing(t, dt, inflow, lateral);
    const StepResult s = try_step(t, dt, forcing, inflow);
    if (!step_acceptable(s, dt)) {
      ++r.rejected_steps;
      dt_cap_ = 0.5 * dt;
      if (++consecutive_rejections > opt_.max_consecutive_rejections) {
        return fail(r, s.ok ? AdvanceStatus::kStepTooSmall : AdvanceStatus::kSolverFailed,
                    std::to_string(consecutive_rejections) +
                        " consecutive steps rejected, more than max_consecutive_rejections (last dt " +
                        format_value(dt) + " s)");
      }
      continue;
    }
    consecutive_rejections = 0;
    accept_step(s, dt, forcing, r);
    t = dt == t1 - t ? t1 : t + dt;
    r.reached_time_s = t;
  }
  return r;
}

template <geometry::FluxLaw F>
bool KinematicReach<F>::step_acceptable(const StepResult& s, double dt) const noexcept {
  if (!s.ok) return false;
  const double courant = dt * s.c_max_after_m_s / dx_;
  switch (opt_.scheme) {
    case SchemeKind::kImplicitUpwind: return true;
    case SchemeKind::kMusclHeun: return courant <= opt_.tvd_courant_limit;
    default: return courant <= opt_.courant_limit;
  }
}

template <geometry::FluxLaw F>
void KinematicReach<F>::accept_step(const StepResult& s, double dt, const Forcing& forcing,
                                    AdvanceResult& r) {
  const double courant = dt * std::max(c_max_, s.c_max_after_m_s) / dx_;
  area_.swap(next_);
  previous_state_valid_ = true;
  c_max_ = s.c_max_after_m_s;
  ledger_.inflow_m3 += forcing.inflow_m3;
  ledger_.lateral_m3 += forcing.lateral_m3;
  ledger_.outflow_m3 += s.outflow_m3;
  r.inflow_m3 += forcing.inflow_m3;
  r.lateral_m3 += forcing.lateral_m3;
  r.outflow_m3 += s.outflow_m3;
  ++r.steps;
  diag_.max_courant = std::max(diag_.max_courant, courant);
  diag_.cell_updates += static_cast<long>(n()) * (opt_.scheme == SchemeKind::kMusclHeun ? 2 : 1);
  dt_cap_ = std::min(std::numeric_limits<double>::infinity(), 2.0 * dt_cap_);
}

template <geometry::FluxLaw F>
AdvanceResult KinematicReach<F>::fail(AdvanceResult r, AdvanceStatus status,
                                      std::string message) const {
  r.status = status;
  r.message = detail::reach_label(spec_) + ", scheme " + std::string(to_string(opt_.scheme)) +
              ", t = " + format_value(r.reached_time_s) + " s: " + message;
  return r;
}

template <geometry::FluxLaw F>
void KinematicReach<F>::finish_advance(double t0, AdvanceResult& r) {
  ledger_.storage_m3 = storage_m3();
  time_s_ = r.reached_time_s;
  const double span_s = r.reached_time_s - t0;
  r.mean_outflow_m3s = span_s > 0.0 ? r.outflow_m3 / span_s : face_.back();
  diag_.steps_taken += r.steps;
  diag_.steps_rejected += r.rejected_steps;
  observe_shock(time_s_);
}

template <geometry::FluxLaw F>
void KinematicReach<F>::observe_shock(double t) {
  if (!opt_.shock.enabled) return;
  for (std::size_t i = 0; i < n(); ++i) detail::flux_and_celerity(law(i), area_[i], next_[i], stage_[i]);
  detector_.observe(t, area_, next_, stage_);
  previous_state_valid_ = false;  // next_ now holds discharges
}

// Method of lines: dA_i/dt = (F_i - F_{i+1})/dx + q_lat,i with upwind fluxes, plus one extra
// component dV_out/dt = Q_N(A_N) so the outflow volume comes from the same integrator (every
// Runge-Kutta method preserves the linear invariant dx sum A + V_out - V_in - V_lat, and
// integrates the piecewise-linear forcing exactly between breakpoints).
template <geometry::FluxLaw F>
AdvanceResult KinematicReach<F>::advance_method_of_lines(double t0, double t1,
                                                         const PiecewiseLinearSeries& inflow,
                                                         const LateralInflow& lateral) {
  const std::size_t cells = n();
  const bool lat = !lateral_map_.is_none();
  const detail::OdeRhs rhs = [&](const Eigen::VectorXd& y, Eigen::VectorXd& dydt, double t) {
    if (lat) lateral_map_.rates_m3s(lateral, t, lateral_m3_);
    double flux_left = inflow.value_at(t);
    for (std::size_t i = 0; i < cells; ++i) {
      const auto k = static_cast<Eigen::Index>(i);
      const double flux_right = law(i).discharge_m3s(std::max(y[k], 0.0));
      dydt[k] = (flux_left - flux_right + (lat ? lateral_m3_[i] : 0.0)) / dx_;
      flux_left = flux_right;
    }
    dydt[static_cast<Eigen::Index>(cells)] = flux_left;
  };
  std::vector<double> breaks(inflow.times_s().begin(), inflow.times_s().end());
  if (!lateral.is_none()) {
    const auto more = lateral.breakpoint_times_s();
    breaks.insert(breaks.end(), more.begin(), more.end());
  }
  const std::vector<double> times = detail::segment_times(t0, t1, breaks);
  AdvanceResult r;
  r.reached_time_s = t0;
  Eigen::VectorXd y(static_cast<Eigen::Index>(cells) + 1);
  for (std::size_t k = 0; k + 1 < times.size(); ++k) {
    if (!integrate_mol_segment(rhs, y, times[k], times[k + 1], inflow, lateral, r)) return r;
  }
  face_[0] = inflow.value_at(r.reached_time_s);
  for (std::size_t i = 0; i < cells; ++i) face_[i + 1] = law(i).discharge_m3s(area_[i]);
  return r;
}

// One smooth forcing segment [ta, tb] of the method of lines: a fresh controlled stepper,
// then the areas, the outflow volume (ODE component) and the exact forcing volumes booked.
template <geometry::FluxLaw F>
bool KinematicReach<F>::integrate_mol_segment(const detail::OdeRhs& rhs, Eigen::VectorXd& y,
                                              double ta, double tb,
                                              const PiecewiseLinearSeries& inflow,
                                              const LateralInflow& lateral, AdvanceResult& r) {
  const std::size_t cells = n();
  const auto outflow_index = static_cast<Eigen::Index>(cells);
  for (std::size_t i = 0; i < cells; ++i) y[static_cast<Eigen::Index>(i)] = area_[i];
  y[outflow_index] = 0.0;
  const double c_in = laws_.front().celerity_m_s(
      laws_.front().area_for_discharge_m2(detail::series_max(inflow, ta, tb)));
  const double c = std::max(c_max_, c_in);
  const double dt0 = std::min({tb - ta, opt_.max_dt_s, c > 0.0 ? 0.5 * dx_ / c : tb - ta});
  const detail::OdeSegmentResult seg = detail::integrate_ode_segment(rhs, y, ta, tb, dt0, opt_);
  r.steps += seg.steps;
  r.rejected_steps += seg.rejected;
  if (!seg.ok) {
    r = fail(r, AdvanceStatus::kSolverFailed, seg.message);
    return false;
  }
  for (std::size_t i = 0; i < cells; ++i) area_[i] = y[static_cast<Eigen::Index>(i)];
  const double outflow_m3 = y[outflow_index] + clear_negative_areas_into_outflow();
  const double inflow_m3 = inflow.integral(ta, tb);
  const double lateral_m3 =
      lateral_map_.is_none() ? 0.0 : lateral_map_.volumes_m3(lateral, ta, tb, lateral_m3_);
  ledger_.inflow_m3 += inflow_m3, r.inflow_m3 += inflow_m3;
  ledger_.lateral_m3 += lateral_m3, r.lateral_m3 += lateral_m3;
  ledger_.outflow_m3 += outflow_m3, r.outflow_m3 += outflow_m3;
  c_max_ = current_c_max();
  diag_.max_courant = std::max(diag_.max_courant, seg.largest_dt_s * c_max_ / dx_);
  diag_.cell_updates += static_cast<long>(cells) * seg.steps;
  r.reached_time_s = tb;
  return true;
}

// Moves round-off-level negative areas (possible inside Runge-Kutta stages near a dry front)
// to the next cell downstream, and off the outlet cell into the outflow; exactly conservative.
// Returns the change in outflow volume (<= 0).
template <geometry::FluxLaw F>
double KinematicReach<F>::clear_negative_areas_into_outflow() {
  double outflow_change = 0.0;
  for (std::size_t i = 0; i < n(); ++i) {
    if (area_[i] >= 0.0) continue;
    const double deficit = area_[i];
    area_[i] = 0.0;
    diag_.positivity_transfer_m3 -= deficit * dx_;
    if (i + 1 < n()) area_[i + 1] += deficit;
    else outflow_change += deficit * dx_;
  }
  return outflow_change;
}

template <geometry::FluxLaw F>
RunDiagnostics KinematicReach<F>::diagnostics() const {
  RunDiagnostics d = diag_;
  d.mass_balance_error_m3 = ledger_.balance_error_m3();
  d.mass_balance_error_rel = ledger_.relative_balance_error();
  d.shocks_found = detector_.shocks_found();
  return d;
}

template <geometry::FluxLaw F>
double KinematicReach<F>::memory_bytes_per_cell() const noexcept {
  const std::size_t doubles = area_.capacity() + face_.capacity() + next_.capacity() +
                              stage_.capacity() + lateral_m3_.capacity();
  const std::size_t laws = uniform() ? 0 : laws_.capacity() * sizeof(F);
  const double bytes = static_cast<double>(doubles * sizeof(double) + laws +
                                           lateral_map_.memory_bytes());
  return bytes / static_cast<double>(n());
}

}  // namespace freshet::routing
