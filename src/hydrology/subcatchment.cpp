#include "freshet/hydrology/subcatchment.hpp"

#include <algorithm>
#include <cmath>

namespace freshet::hydrology {
namespace {

// Spec validation first, so that the cascade is only built from valid planes.
SubcatchmentSpec checked(SubcatchmentSpec spec) {
  ProblemList problems("subcatchment '" + spec.name + "'");
  problems.append(spec.validate());
  problems.throw_if_any();
  return spec;
}

}  // namespace

std::string_view to_string(DrainKind kind) { return kind == DrainKind::node ? "node" : "reach"; }

std::vector<Problem> SubcatchmentSpec::validate() const {
  ProblemList problems("subcatchment '" + name + "'");
  problems.require_positive("area_m2", area_m2);
  if (planes.empty()) problems.add("planes", "is empty: a subcatchment needs at least one plane");
  for (const auto& p : planes) problems.append(p.validate());
  if (drain.target.empty()) problems.add("drain.target", "is empty: name the node or reach");
  if (drain.kind == DrainKind::reach) {
    problems.require_positive("drain.reach_length_m", drain.reach_length_m);
  }
  return problems.problems();
}

Subcatchment::Subcatchment(SubcatchmentSpec spec, Hyetograph rain,
                           std::unique_ptr<LossModel> losses, routing::RoutingOptions options)
    : spec_(checked(std::move(spec))),
      rain_(std::move(rain)),
      losses_(std::move(losses)),
      cascade_(spec_.planes, std::move(options)) {
  FRESHET_ASSERT(losses_ != nullptr, "a subcatchment needs a loss model");
  FRESHET_ASSERT(rain_.block_count() > 0, "a subcatchment needs a hyetograph");
}

double Subcatchment::to_lateral_m2s(double runoff_m3s) const {
  return spec_.drain.kind == DrainKind::reach ? runoff_m3s / spec_.drain.reach_length_m : 0.0;
}

// Splits [t0, t1] at the hyetograph's block boundaries, so that rain is uniform in each part.
SubcatchmentStep Subcatchment::advance(double t0_s, double t1_s) {
  FRESHET_ASSERT(t1_s > t0_s, "a subcatchment step needs t1 > t0");
  const auto bounds = rain_.boundary_times_s();
  double t = t0_s, runoff_m2 = 0.0, excess_m = 0.0;
  while (t < t1_s) {
    const auto next = std::upper_bound(bounds.begin(), bounds.end(), t);
    const double tb = next == bounds.end() ? t1_s : std::min(t1_s, *next);
    const double rain_m = rain_.depth_between_m(t, tb);
    const double excess = losses_->step(rain_m, tb - t).excess_m;
    runoff_m2 += cascade_.advance(t, tb, excess / (tb - t)) * (tb - t);
    excess_m += excess;
    t = tb;
  }
  SubcatchmentStep s;
  const double dt = t1_s - t0_s;
  s.runoff_mean_m3s = width_m() * runoff_m2 / dt;
  s.runoff_end_m3s = runoff_m3s();
  s.lateral_mean_m2s = to_lateral_m2s(s.runoff_mean_m3s);
  s.lateral_end_m2s = to_lateral_m2s(s.runoff_end_m3s);
  s.rain_mean_m_s = rain_.depth_between_m(t0_s, t1_s) / dt;
  s.excess_mean_m_s = excess_m / dt;
  return s;
}

void Subcatchment::visit_state(StateVisitor& v) {
  losses_->visit_state(v);
  cascade_.visit_state(v);
}

void Subcatchment::reset() {
  losses_->reset();
  cascade_.reset();
}

SubcatchmentLedger Subcatchment::ledger() const {
  const double w = width_m();
  SubcatchmentLedger l;
  l.rain_m3 = spec_.area_m2 * losses_->ledger().rain_m;
  l.loss_m3 = spec_.area_m2 * losses_->ledger().loss_m;
  l.runoff_m3 = w * cascade_.outflow_volume_m2();
  l.storage_m3 = w * cascade_.storage_m2();
  return l;
}

}  // namespace freshet::hydrology
