#include "freshet/hydrology/overland_plane.hpp"

#include <algorithm>
#include <cmath>

#include "freshet/core/converged_root.hpp"
#include "freshet/core/root_finding.hpp"
#include "freshet/routing/kinematic_reach.hpp"

namespace freshet::hydrology {
namespace {

std::string plane_label(const OverlandPlaneSpec& spec) { return "plane '" + spec.name + "'"; }

routing::ReachSpec reach_spec(const OverlandPlaneSpec& spec) {
  return {"plane " + spec.name, spec.length_m, spec.cell_count};
}

// Recession after the rain stops at t_r (Singh 1996, ch. 5): along the characteristic leaving
// x0 = q/i at t_r with constant depth, L = q/i + m alpha^(1/m) q^(1-1/m) (t - t_r). Solved for
// q in (0, q_max] by safeguarded Newton; the residual increases with q. Called after the
// plateau, so the root lies below q_max; one below 1e-300 q_max (long after the rain) is a
// drained plane, 0. A solve that does not converge is a NumericalError (it once returned
// q_max, the plateau, without a word; for a drained plane too).
double recession_outflow_m2s(const geometry::PowerLawFlux& flux, double length_m, double i,
                             double q_max, double elapsed_s) {
  const double m = flux.exponent();
  const double k = m * std::pow(flux.alpha(), 1.0 / m) * elapsed_s;
  auto fdf = [&](double q, double& f, double& df) {
    const double p = std::pow(q, 1.0 - 1.0 / m);
    f = q / i + k * p - length_m;
    df = 1.0 / i + k * (1.0 - 1.0 / m) * p / q;
  };
  const double lo = q_max * 1e-300;
  double f_lo = 0.0, df_lo = 0.0;
  fdf(lo, f_lo, df_lo);
  if (f_lo >= 0.0) return 0.0;
  return converged_root(solve_bracketed_newton(fdf, lo, q_max), "kinematic plane solution",
                        "recession outflow (m2/s)", [&] {
                          return "time since the rain " + format_value(elapsed_s) + " s";
                        });
}

}  // namespace

std::vector<Problem> OverlandPlaneSpec::validate() const {
  ProblemList problems(plane_label(*this));
  problems.require_positive("length_m", length_m);
  problems.require_positive("slope", slope);
  problems.require_positive("manning_n", manning_n);
  if (cell_count < 1) problems.add("cell_count", "= " + std::to_string(cell_count) + ": must be >= 1");
  return problems.problems();
}

geometry::PowerLawFlux OverlandPlaneSpec::flux() const {
  return geometry::PowerLawFlux(std::sqrt(slope) / manning_n, kSheetFlowExponent);
}

double kinematic_plane_equilibrium_time_s(const geometry::PowerLawFlux& flux, double length_m,
                                          double intensity_m_s) {
  const double m = flux.exponent();
  return std::pow(length_m * std::pow(intensity_m_s, 1.0 - m) / flux.alpha(), 1.0 / m);
}

double kinematic_plane_outflow_m2s(const geometry::PowerLawFlux& flux, double length_m,
                                   double intensity_m_s, double rain_end_s, double t_s) {
  const double i = intensity_m_s, m = flux.exponent(), alpha = flux.alpha();
  if (t_s <= 0.0 || i <= 0.0) return 0.0;
  const double t_e = kinematic_plane_equilibrium_time_s(flux, length_m, i);
  const double t_rise = std::min(t_e, rain_end_s);
  if (t_s <= t_rise) return alpha * std::pow(i * t_s, m);  // rising limb
  if (t_s <= rain_end_s) return i * length_m;              // equilibrium
  // Depth i t_r (or the equilibrium profile) stands still at the outlet until the
  // characteristic from x_r = q_max / i arrives (the partial-equilibrium plateau).
  const double q_max = alpha * std::pow(i * t_rise, m);
  const double x_r = q_max / i;
  const double c = m * alpha * std::pow(i * t_rise, m - 1.0);
  if (t_s <= rain_end_s + (length_m - x_r) / c) return q_max;
  return recession_outflow_m2s(flux, length_m, i, q_max, t_s - rain_end_s);
}

OverlandPlane::OverlandPlane(OverlandPlaneSpec spec, routing::RoutingOptions options)
    : spec_(std::move(spec)) {
  ProblemList problems(plane_label(spec_));
  problems.append(spec_.validate());
  problems.throw_if_any();
  reach_ = std::make_unique<routing::KinematicReach<geometry::PowerLawFlux>>(
      reach_spec(spec_), spec_.flux(), std::move(options));
  watch_ = routing::BreakingWatch(geometry::SectionFlux{spec_.flux()}, spec_.length_m);
}

routing::AdvanceResult OverlandPlane::advance(double t0_s, double t1_s, double excess_m_s,
                                              double inflow_m2s, double inflow_end_m2s) {
  ProblemList problems(plane_label(spec_));
  problems.require_non_negative("excess_m_s", excess_m_s);
  problems.require_non_negative("inflow_m2s", inflow_m2s);
  problems.throw_if_any();
  const auto inflow = PiecewiseLinearSeries::constant(inflow_m2s);
  const routing::AdvanceResult r =
      excess_m_s <= 0.0
          ? reach_->advance(t0_s, t1_s, inflow, routing::LateralInflow::none())
          : reach_->advance(t0_s, t1_s, inflow,
                            routing::LateralInflow::uniform(
                                spec_.length_m,
                                PiecewiseLinearSeries::constant(excess_m_s)));  // m/s x 1 m = m2/s
  const double end_m2s = std::isnan(inflow_end_m2s) ? inflow_m2s : inflow_end_m2s;
  watch_.advance(t0_s, t1_s, inflow_end_m2s_, end_m2s, excess_m_s);
  inflow_end_m2s_ = end_m2s;
  peak_outflow_m2s_ = std::max(peak_outflow_m2s_, outflow_m2s());
  return r;
}

void OverlandPlane::visit_state(StateVisitor& v) {
  reach_->visit_state(v);
  watch_.visit_state(v, "breaking_watch");
  v.value("inflow_end_m2s", inflow_end_m2s_);
  v.value("peak_outflow_m2s", peak_outflow_m2s_);
}

void OverlandPlane::reset() {
  std::vector<double> dry(static_cast<std::size_t>(spec_.cell_count), 0.0);
  reach_->set_initial_areas(dry);
  watch_.reset();
  inflow_end_m2s_ = 0.0;
  peak_outflow_m2s_ = 0.0;
}

// The flux through the outlet face, not Q of the last cell's average: with the
// characteristics scheme the cell average mixes the states on either side of a front inside
// the last cell (1-2 % low on a rising limb); for the grid schemes the outlet face flux is
// the flux their last step applied there.
double OverlandPlane::outflow_m2s() const { return reach_->face_flux_m3s().back(); }

double OverlandPlane::storage_m2() const {
  double sum = 0.0;
  for (double h : reach_->cell_area_m2()) sum += h;
  return sum * reach_->cell_width_m();
}

PlaneCascade::PlaneCascade(const std::vector<OverlandPlaneSpec>& planes,
                           routing::RoutingOptions options, double handover_step_s)
    : handover_step_s_(handover_step_s) {
  ProblemList problems("plane cascade");
  if (planes.empty()) problems.add("planes", "is empty: a cascade needs at least one plane");
  problems.require_positive("handover_step_s", handover_step_s);
  for (const auto& p : planes) problems.append(p.validate());
  problems.throw_if_any();
  planes_.reserve(planes.size());
  for (const auto& p : planes) planes_.emplace_back(p, options);
}

double PlaneCascade::advance(double t0_s, double t1_s, double excess_m_s) {
  if (planes_.size() == 1) return advance_once(t0_s, t1_s, excess_m_s);
  const double span_s = t1_s - t0_s;
  const auto parts = static_cast<long>(std::ceil(span_s / handover_step_s_ * (1.0 - 1e-12)));
  double volume_m2 = 0.0, t = t0_s;
  for (long k = 1; k <= parts; ++k) {
    const double tb = k == parts ? t1_s : t0_s + span_s * static_cast<double>(k) /
                                                      static_cast<double>(parts);
    volume_m2 += advance_once(t, tb, excess_m_s) * (tb - t);
    t = tb;
  }
  return volume_m2 / span_s;
}

double PlaneCascade::advance_once(double t0_s, double t1_s, double excess_m_s) {
  double inflow_m2s = 0.0, inflow_end_m2s = 0.0;
  for (auto& plane : planes_) {
    inflow_m2s = plane.advance(t0_s, t1_s, excess_m_s, inflow_m2s, inflow_end_m2s).mean_outflow_m3s;
    inflow_end_m2s = plane.outflow_m2s();
  }
  return inflow_m2s;
}

void PlaneCascade::visit_state(StateVisitor& v) {
  for (std::size_t k = 0; k < planes_.size(); ++k) {
    StateGroup g(v, "plane" + std::to_string(k));
    planes_[k].visit_state(v);
  }
}

void PlaneCascade::reset() {
  for (auto& plane : planes_) plane.reset();
}

double PlaneCascade::storage_m2() const {
  double sum = 0.0;
  for (const auto& plane : planes_) sum += plane.storage_m2();
  return sum;
}

double PlaneCascade::length_m() const {
  double sum = 0.0;
  for (const auto& plane : planes_) sum += plane.spec().length_m;
  return sum;
}

double PlaneCascade::excess_received_m2() const {
  double sum = 0.0;
  for (const auto& plane : planes_) sum += plane.ledger().lateral_m3;
  return sum;
}

}  // namespace freshet::hydrology
