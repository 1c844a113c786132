#include "freshet/routing/kinematic_reach.hpp"

#include <cstdio>

namespace freshet::routing {

std::vector<Problem> ReachSpec::validate() const {
  ProblemList p(detail::reach_label(*this));
  p.require_positive("length_m", length_m);
  p.require(cell_count >= 1, "cell_count", cell_count, "must be >= 1");
  return p.problems();
}


std::string_view to_string(AdvanceStatus status) noexcept {
  switch (status) {
    case AdvanceStatus::kOk: return "ok";
    case AdvanceStatus::kStepTooSmall: return "step-too-small";
    case AdvanceStatus::kSolverFailed: return "solver-failed";
  }
  return "?";
}

std::string RunDiagnostics::brief_report() const {
  char buf[320];
  std::snprintf(buf, sizeof buf,
                "%s: %ld steps (%ld rejected), %ld cell updates, max Courant %.3g, volume "
                "balance error %.3g m3 (%.3g relative), %d shock(s), %.3g s wall",
                scheme.c_str(), steps_taken, steps_rejected, cell_updates, max_courant,
                mass_balance_error_m3, mass_balance_error_rel, shocks_found, wall_time_s);
  return buf;
}

namespace detail {

std::string reach_label(const ReachSpec& spec) { return "reach '" + spec.name + "'"; }

std::vector<Problem> validate_laws_count(std::size_t laws, int cells) {
  ProblemList p;
  if (laws != 1 && laws != static_cast<std::size_t>(cells < 0 ? 0 : cells)) {
    p.add("flux_laws", "has " + std::to_string(laws) +
                           " entries: must have 1 (uniform) or one per cell (" +
                           std::to_string(cells) + ")");
  }
  return p.problems();
}

void visit_counters(StateVisitor& v, RunDiagnostics& d) {
  StateGroup g(v, "diagnostics");
  v.value("steps_taken", d.steps_taken);
  v.value("steps_rejected", d.steps_rejected);
  v.value("cell_updates", d.cell_updates);
  v.value("max_courant", d.max_courant);
  v.value("positivity_transfer_m3", d.positivity_transfer_m3);
  v.value("max_fronts", d.max_fronts);
}

std::vector<Problem> validate_advance(double t0_s, double t1_s, double reach_time_s,
                                      const PiecewiseLinearSeries& inflow_m3s) {
  ProblemList p;
  p.require_finite("t0_s", t0_s);
  p.require(std::isfinite(t1_s) && t1_s >= t0_s, "t1_s", t1_s, "must be finite and >= t0_s");
  if (!std::isnan(reach_time_s)) {
    const double tol = 1e-9 * std::max(1.0, std::abs(reach_time_s));
    if (!(std::abs(t0_s - reach_time_s) <= tol)) {  // the message is built only when needed
      p.require(false, "t0_s", t0_s,
                "must equal the reach time " + format_value(reach_time_s) +
                    " s (advance calls must be contiguous)");
    }
  }
  if (inflow_m3s.empty()) {
    p.add("inflow_m3s", "has no samples");
  } else if (std::isfinite(t0_s) && std::isfinite(t1_s) && t1_s >= t0_s) {
    const double low = series_min(inflow_m3s, t0_s, t1_s);
    p.require(low >= 0.0, "inflow_m3s", low, "inflow must be >= 0 over the step");
  }
  return p.problems();
}

}  // namespace detail
}  // namespace freshet::routing
