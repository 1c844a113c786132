// Run-time choices for routing one reach: which time-integration scheme, its accuracy and
// stability settings, and how kinematic shocks are detected in the computed solution.
//
// All times in seconds, areas in m2. Defaults are valid; validate() returns every problem
// found (an empty list means the options are usable).
//
//   RoutingOptions opt;
//   opt.scheme = SchemeKind::kImplicitUpwind;
//   opt.implicit_courant = 10.0;
//   ProblemList p("routing options"); p.append(opt.validate()); p.throw_if_any();
#pragma once

#include <limits>
#include <string>
#include <string_view>
#include <vector>

#include "freshet/core/error.hpp"

namespace freshet::routing {

// Each kind is one type in schemes/ (registered in schemes/registry.hpp, in this order), which
// also supplies its name for to_string/parse_scheme_kind.
enum class SchemeKind {
  kExplicitUpwind,  // first-order Godunov (upwind) flux, forward Euler, Courant-limited dt
  kImplicitUpwind,  // first-order upwind, backward Euler, cell-by-cell downstream Newton solve
  kMethodOfLines,   // upwind semi-discretisation integrated by an adaptive Runge-Kutta (Odeint)
  kMusclHeun,       // MUSCL limited reconstruction + SSP-RK2 (Heun), second order where smooth
  kCharacteristics, // grid-free front tracking on a piecewise-linear flux (no cells, no dt)
  kMuskingumCunge,  // diffusion wave: variable-parameter Muskingum-Cunge, volume by continuity
};

enum class Limiter { kMinmod, kVanLeer };

[[nodiscard]] std::string_view to_string(SchemeKind kind) noexcept;
[[nodiscard]] std::string_view to_string(Limiter limiter) noexcept;
// Parse the names returned by to_string; throw InputError naming the value and the choices.
[[nodiscard]] SchemeKind parse_scheme_kind(std::string_view name);
// Every registered scheme's name, in the order of SchemeKind (what a study file may choose).
[[nodiscard]] std::vector<std::string> scheme_names();
[[nodiscard]] Limiter parse_limiter(std::string_view name);
// True for a scheme that routes the diffusion wave (it declares kDiffusionWave), false for the
// kinematic-wave schemes.
[[nodiscard]] bool routes_diffusion_wave(SchemeKind kind) noexcept;

struct ShockDetectionOptions {
  bool enabled = true;
  // A front is "steep" when this fraction of the jump (A_left - A_right) happens across
  // `front_cells` consecutive cells. 0 = automatic: the width over which the scheme smears a
  // captured shock (4 explicit upwind and MUSCL-Heun, 8 method of lines, 8 (1 + Courant)
  // implicit upwind; see docs/methods-routing.md). A scheme whose waves do not break
  // (muskingum-cunge, a diffusion wave) gives 0, and detection is then off.
  double steep_fraction = 0.9;
  int front_cells = 0;
  // Cells either side of the steepest drop searched for the plateau states A_left, A_right.
  // 0 = automatic: 3 x front_cells.
  int plateau_cells = 0;
  // Jumps smaller than this fraction of the largest area in the reach are ignored.
  double min_relative_jump = 0.02;
  // Breaking-time extrapolation: an observation is used while 1/max(-dc/dx) still falls at
  // least this fast (exact value 1 s/s before breaking; ~0 once the front is grid-limited).
  double steepening_rate_min = 0.95;
  // Consecutive observations a steep front must persist before it is reported as a shock.
  int persistence = 3;

  [[nodiscard]] std::vector<Problem> validate() const;
};

struct RoutingOptions;
// The detection options with automatic (0) widths replaced for the scheme in `routing`.
[[nodiscard]] ShockDetectionOptions resolved_shock_options(const RoutingOptions& routing);

struct RoutingOptions {
  SchemeKind scheme = SchemeKind::kExplicitUpwind;
  // Explicit upwind: dt = courant_target * dx / c_max (stable for Courant <= 1).
  double courant_target = 0.9;
  // MUSCL-Heun: dt = tvd_courant_target * dx / c_max (positivity needs <= 0.5).
  double tvd_courant_target = 0.45;
  // An accepted step must satisfy dt * c_max(after) / dx <= courant_limit (explicit upwind)
  // or <= tvd_courant_limit (MUSCL-Heun; TVD and positive for Courant <= 1/2).
  double courant_limit = 1.0;
  double tvd_courant_limit = 0.5;
  Limiter limiter = Limiter::kVanLeer;
  // Implicit upwind: dt = implicit_courant * dx / c_max (unconditionally stable; this only
  // controls accuracy). Infinity means one step per advance() call.
  double implicit_courant = 10.0;
  int newton_max_iterations = 60;
  // Method of lines: error tolerances of the controlled Runge-Kutta stepper.
  double ode_abs_tolerance_m2 = 1e-9;
  double ode_rel_tolerance = 1e-8;
  // Characteristics: relative spacing of the area nodes of the piecewise-linear flux
  // (A_{k+1} = A_k (1 + spacing)). A fan's states, and so a rarefaction, are resolved to one
  // node: about m x spacing in discharge for Q ~ A^m; the flux itself is within
  // m |m - 1| spacing^2 / 8 of the law (docs/methods-routing.md).
  double front_node_spacing = 1e-3;
  // Characteristics: most fronts one Riemann fan may hold (a fan onto a dry bed crosses
  // thousands of nodes); a thinned fan's states are within 1/front_fan_max_fronts of its
  // jump in discharge.
  int front_fan_max_fronts = 256;
  // Characteristics: when lateral inflow rebuilds the fronts, neighbouring segments together
  // shorter than this are joined, volume-weighted (0 = automatic: 1e-3 x the reach length).
  double front_merge_length_m = 0.0;
  // Characteristics: longest sub-step of the Strang splitting of lateral inflow.
  double lateral_split_step_s = 30.0;
  // Muskingum-Cunge: dt = diffusion_courant_target * dx / c_max (the recursion is stable at
  // any Courant number; its coefficients stay non-negative while C <= 1 + R and C + R >= 1,
  // R the cell Reynolds number; docs/methods-routing.md).
  double diffusion_courant_target = 1.0;
  // Every scheme: upper bound on an internal step, and the smallest step tried after
  // rejections before advance() gives up.
  double max_dt_s = std::numeric_limits<double>::infinity();
  double min_dt_s = 1e-6;
  int max_consecutive_rejections = 40;
  // On failure: throw NumericalError (true) or return a failed AdvanceStatus (false).
  bool throw_on_failure = true;
  ShockDetectionOptions shock;

  [[nodiscard]] std::vector<Problem> validate() const;
};

}  // namespace freshet::routing
