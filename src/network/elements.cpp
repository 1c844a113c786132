#include "freshet/network/elements.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <variant>

namespace freshet::network {

// The breaking prediction and the significant shocks of one kinematic-wave element: each
// shock's largest discharge jump along its path (a kinematic shock is born with no jump and
// grows as characteristics run into it: its largest jump is what the flood sees) against
// kSignificantShockFraction of the element's peak outflow.
template <class DepthOf>
WaveFacts make_wave_facts(const routing::ReachModel& reach, const geometry::SectionFlux& flux,
                          DepthOf depth_of, double peak_outflow, const routing::PredictedBreaking& breaking) {
  WaveFacts w;
  w.length_m = reach.spec().length_m;
  w.cell_count = reach.spec().cell_count;
  w.cell_width_m = reach.cell_width_m();
  w.scheme = std::string(routing::to_string(reach.options().scheme));
  w.grid_free = reach.options().scheme == routing::SchemeKind::kCharacteristics;
  w.front_cells = routing::resolved_shock_options(reach.options()).front_cells;
  w.breaking = breaking;
  for (const routing::ShockReport& shock : reach.shock_reports()) {
    if (!shock.formed || shock.path.empty()) continue;
    ShockFacts f{shock, 0.0, 0.0, shock.formation_time_s, {}};
    for (const routing::ShockSample& at : shock.path) {
      const double jump = geometry::discharge_m3s(flux, at.area_left_m2) -
                          geometry::discharge_m3s(flux, at.area_right_m2);
      f.path_discharge_jump_m3s.push_back(jump);
      if (jump > f.discharge_jump_m3s) {
        f.discharge_jump_m3s = jump;
        f.depth_jump_m = depth_of(at.area_left_m2) - depth_of(at.area_right_m2);
        f.jump_time_s = at.time_s;
      }
    }
    if (f.discharge_jump_m3s > 0.0 && f.discharge_jump_m3s >= kSignificantShockFraction * peak_outflow) {
      w.significant_shocks.push_back(std::move(f));
    }
  }
  return w;
}

// ---- ReachElement ------------------------------------------------------------------------

ReachElement::ReachElement(std::string id,
                           geometry::FlowSection section,
                           std::unique_ptr<routing::ReachModel> reach,
                           std::optional<double> outlet_invert_m)
    : Element(std::move(id), ElementKind::reach),
      section_(std::move(section)),
      reach_(std::move(reach)),
      outlet_invert_m_(outlet_invert_m),
      watch_(section_.flux, reach_->spec().length_m) {
  if (const auto crown = section_.section->full_depth_m()) {
    full_area_m2_ = section_.section->area_m2(*crown);
    full_volume_m3_ = full_area_m2_ * reach_->spec().length_m;
  }
}

void ReachElement::reset(double start_s) {
  reach_->set_uniform_discharge(0.0);  // dry; restarts the reach's clock and ledger
  drowned_ = 0;
  routed_ledger_ = VolumeLedger{};
  const bool represented = backwater_facts_.represented;
  const std::string pool_id = backwater_facts_.pool_id;
  backwater_facts_ = {represented, pool_id, 0.0, 0, start_s, 0.0};
  start_s_ = start_s;
  inflow_end_m3s_ = 0.0;
  watch_.start(start_s, 0.0, 0.0);
  capacity_steps_ = 0;
  peak_outflow_m3s_ = 0.0;
  peak_above_full_m3_ = 0.0;
  peak_above_full_s_ = 0.0;
}

void ReachElement::prime(double inflow_m3s) {
  if (!(inflow_m3s > 0.0)) return;
  reach_->set_uniform_discharge(inflow_m3s);
  routed_ledger_.initial_storage_m3 = routed_ledger_.storage_m3 = routed_storage_m3();
  inflow_end_m3s_ = inflow_m3s;
  watch_.start(start_s_, inflow_m3s, reach_->cell_area_m2().front());
}

StepOutflow ReachElement::advance(const StepInflow& in) {
  const double length_m = reach_->spec().length_m;
  // The forcing's storage is kept from step to step (no allocation per step).
  const bool along = in.lateral_mean_m3s > 0.0;
  if (along) lateral_.set_uniform_constant(length_m, in.lateral_mean_m3s / length_m);
  const double routed_before_m3 = backwater_pool_ ? routed_storage_m3() : 0.0;
  routing::AdvanceResult r;
  try {
    inflow_.set_constant(in.inflow_mean_m3s);
    r = reach_->advance(in.t0_s, in.t1_s, inflow_, along ? lateral_ : no_lateral_);
  } catch (const InputError& e) {
    throw NumericalError("reach '" + id() + "' at t = " + format_value(in.t0_s) +
                         " s received an invalid forcing: " + e.what());
  }
  if (!r.ok()) {
    throw NumericalError("reach '" + id() + "' at t = " + format_value(in.t0_s) +
                         " s: " + r.message);
  }
  // The breaking prediction reads the inflow linear between the upstream rates at step ends
  // (a staircase of step means would break at every step) and the mean lateral inflow.
  watch_.advance(in.t0_s, in.t1_s, inflow_end_m3s_, in.inflow_end_m3s,
                 in.lateral_mean_m3s / length_m);
  inflow_end_m3s_ = in.inflow_end_m3s;
  const int last = reach_->spec().cell_count - 1;
  const auto areas = reach_->cell_area_m2();
  if (section_.at_capacity(*std::max_element(areas.begin(), areas.end()))) ++capacity_steps_;
  if (full_area_m2_ > 0.0) {
    double above_m2 = 0.0;
    for (double a : areas) above_m2 += std::max(0.0, a - full_area_m2_);
    const double above_m3 = above_m2 * reach_->cell_width_m();
    if (above_m3 > peak_above_full_m3_) {
      peak_above_full_m3_ = above_m3;
      peak_above_full_s_ = in.t1_s;
    }
  }
  if (backwater_pool_) {
    // The routed cells' update is conservative, so what crossed into the drowned length is
    // what entered less what they now hold more; lateral inflow onto the drowned length goes
    // straight to the pool.
    const double dt_s = in.dt_s();
    const double routed_after_m3 = routed_storage_m3();
    const double in_m3 = in.inflow_mean_m3s * dt_s, lateral_m3 = in.lateral_mean_m3s * dt_s;
    const double out_m3 = std::max(0.0, in_m3 + lateral_m3 - (routed_after_m3 - routed_before_m3));
    routed_ledger_.inflow_m3 += in_m3;
    routed_ledger_.lateral_m3 += lateral_m3;
    routed_ledger_.outflow_m3 += out_m3;
    routed_ledger_.storage_m3 = routed_after_m3;
    const int edge = last - drowned_;
    const double drowned_fraction = static_cast<double>(drowned_) / (last + 1);
    const double end_m3s = (edge >= 0 ? reach_->cell_discharge_m3s(edge) : in.inflow_end_m3s) +
                           drowned_fraction * in.lateral_end_m3s;
    peak_outflow_m3s_ = std::max(peak_outflow_m3s_, end_m3s);
    return {out_m3 / dt_s, end_m3s};
  }
  const double end_m3s = reach_->cell_discharge_m3s(last);
  peak_outflow_m3s_ = std::max(peak_outflow_m3s_, end_m3s);
  return {r.mean_outflow_m3s, end_m3s};
}

void ReachElement::visit_state(StateVisitor& v) {
  reach_->visit_state(v);
  watch_.visit_state(v, "breaking_watch");
  v.value("start_s", start_s_);
  v.value("inflow_end_m3s", inflow_end_m3s_);
  v.value("capacity_steps", capacity_steps_);
  v.value("peak_outflow_m3s", peak_outflow_m3s_);
  v.value("peak_volume_above_full_m3", peak_above_full_m3_);
  v.value("time_of_peak_volume_above_full_s", peak_above_full_s_);
  StateGroup g(v, "backwater");
  v.value("drowned_cells", drowned_);
  freshet::visit_state(v, "routed_ledger", routed_ledger_);
  v.value("longest_drowned_m", backwater_facts_.longest_drowned_m);
  v.value("most_drowned_cells", backwater_facts_.most_drowned_cells);
  v.value("time_longest_drowned_s", backwater_facts_.time_longest_drowned_s);
  v.value("stage_then_m", backwater_facts_.stage_then_m);
}

// ---- backwater ---------------------------------------------------------------------------

void ReachElement::attach_backwater(const PoolElement& pool) {
  FRESHET_ASSERT(outlet_invert_m_.has_value(), "backwater needs the reach's outlet invert");
  backwater_pool_ = &pool;
  backwater_facts_.represented = true;
  backwater_facts_.pool_id = pool.id();
}

ReachWedge ReachElement::wedge() const {
  FRESHET_ASSERT(outlet_invert_m_.has_value(), "a reach's wedge needs its outlet invert");
  return {section_.section, *outlet_invert_m_, section_.bed_slope, reach_->spec().length_m};
}

double ReachElement::cell_bed_m(int cell) const {
  const double dx = reach_->cell_width_m();
  const double upstream_of_outlet_m = (reach_->spec().cell_count - cell - 0.5) * dx;
  return *outlet_invert_m_ + section_.bed_slope * upstream_of_outlet_m;
}

double ReachElement::routed_storage_m3() const {
  const auto areas = reach_->cell_area_m2();
  const std::size_t routed = areas.size() - static_cast<std::size_t>(drowned_);
  double sum = 0.0;
  for (std::size_t k = 0; k < routed; ++k) sum += areas[k];
  return sum * reach_->cell_width_m();
}

double ReachElement::drown(double stage_m, double pool_storage_m3, double time_s) {
  const auto areas = reach_->cell_area_m2();
  const int n = reach_->spec().cell_count;
  const double dx = reach_->cell_width_m();
  int below = 0;  // cells from the outlet whose computed water surface is below the level
  while (below < n) {
    const int k = n - 1 - below;
    if (!(stage_m > cell_bed_m(k) + section_.depth_m(areas[static_cast<std::size_t>(k)]))) break;
    ++below;
  }
  double moved_m3 = 0.0;
  for (; drowned_ < below; ++drowned_) {
    moved_m3 += areas[static_cast<std::size_t>(n - 1 - drowned_)] * dx;
  }
  // Cells emerge from the upstream edge of the drowned length, each taking back the water
  // the routing holds in it, while the pool has that water.
  while (drowned_ > below) {
    const double cell_m3 = areas[static_cast<std::size_t>(n - drowned_)] * dx;
    if (cell_m3 - moved_m3 > pool_storage_m3) break;
    moved_m3 -= cell_m3;
    --drowned_;
  }
  routed_ledger_.outflow_m3 += moved_m3;
  routed_ledger_.storage_m3 = routed_storage_m3();
  const double drowned_m = drowned_ * dx;
  if (drowned_ > backwater_facts_.most_drowned_cells) {
    backwater_facts_.most_drowned_cells = drowned_;
    backwater_facts_.longest_drowned_m = drowned_m;
    backwater_facts_.time_longest_drowned_s = time_s;
    backwater_facts_.stage_then_m = stage_m;
  }
  return moved_m3;
}

StationSample ReachElement::sample() const {
  const auto areas = reach_->cell_area_m2();
  const double a = areas.back();
  StationSample s;
  if (backwater_pool_ && drowned_ > 0) {
    // The outlet lies in the drowned length: the pool's level is the stage there, and the
    // discharge is what enters the drowned length.
    const int edge = reach_->spec().cell_count - 1 - drowned_;
    s.stage_m = backwater_pool_->stage_m();
    s.depth_m = std::max(0.0, s.stage_m - *outlet_invert_m_);
    s.discharge_m3s = edge >= 0 ? reach_->cell_discharge_m3s(edge) : inflow_end_m3s_;
    const double area_m2 = section_.section->area_m2(s.depth_m);
    s.velocity_m_s = area_m2 > 0.0 ? s.discharge_m3s / area_m2 : 0.0;
    return s;
  }
  s.discharge_m3s = reach_->cell_discharge_m3s(reach_->spec().cell_count - 1);
  s.depth_m = section_.depth_m(a);
  s.velocity_m_s = section_.velocity_m_s(a);
  s.stage_m = outlet_invert_m_ ? *outlet_invert_m_ + s.depth_m : s.depth_m;
  return s;
}

VolumeLedger ReachElement::ledger() const {
  return backwater_pool_ ? routed_ledger_ : reach_->ledger();
}

WaveFacts ReachElement::wave_facts() const {
  return make_wave_facts(
      *reach_, section_.flux, [this](double a) { return section_.depth_m(a); },
      peak_outflow_m3s_, watch_.result());
}

ElementReport ReachElement::report() const {
  ReachFacts f;
  f.bed_slope = section_.bed_slope;
  f.length_m = reach_->spec().length_m;
  f.outlet_invert_m = outlet_invert_m_;
  f.cell_count = reach_->spec().cell_count;
  f.cell_width_m = reach_->cell_width_m();
  f.wave = wave_facts();
  f.capacity_steps = capacity_steps_;
  f.full_volume_m3 = full_volume_m3_;
  f.peak_volume_above_full_m3 = peak_above_full_m3_;
  f.time_of_peak_volume_above_full_s = peak_above_full_s_;
  f.diagnostics = reach_->diagnostics();
  f.backwater = backwater_facts_;
  return {kind(), std::move(f)};
}

std::vector<CellSample> ReachElement::cell_samples() const {
  const auto areas = reach_->cell_area_m2();
  const double dx_m = reach_->cell_width_m();
  std::vector<CellSample> out(areas.size());
  for (std::size_t k = 0; k < areas.size(); ++k) {
    out[k].chainage_m = (static_cast<double>(k) + 0.5) * dx_m;
    out[k].discharge_m3s = reach_->cell_discharge_m3s(static_cast<int>(k));
    out[k].depth_m = section_.depth_m(areas[k]);
    out[k].velocity_m_s = section_.velocity_m_s(areas[k]);
  }
  // Cells in the drowned length stand at the pool's level and pass what enters it.
  const int n = static_cast<int>(areas.size());
  for (int k = n - drowned_; k < n && backwater_pool_; ++k) {
    const auto i = static_cast<std::size_t>(k);
    const double depth_m = std::max(0.0, backwater_pool_->stage_m() - cell_bed_m(k));
    const double area_m2 = section_.section->area_m2(depth_m);
    out[i].discharge_m3s = n - drowned_ > 0 ? out[static_cast<std::size_t>(n - drowned_ - 1)].discharge_m3s
                                            : inflow_end_m3s_;
    out[i].depth_m = depth_m;
    out[i].velocity_m_s = area_m2 > 0.0 ? out[i].discharge_m3s / area_m2 : 0.0;
  }
  return out;
}

// ---- SubcatchmentElement -----------------------------------------------------------------

SubcatchmentElement::SubcatchmentElement(std::string id,
                                         std::unique_ptr<hydrology::Subcatchment> model)
    : Element(std::move(id), ElementKind::subcatchment), model_(std::move(model)) {}

void SubcatchmentElement::reset(double /*start_s*/) {
  model_->reset();
  sample_ = {};
  sample_.discharge_m3s = 0.0;
  sample_.rain_m_s = 0.0;
  sample_.excess_m_s = 0.0;
}

StepOutflow SubcatchmentElement::advance(const StepInflow& in) {
  const hydrology::SubcatchmentStep s = model_->advance(in.t0_s, in.t1_s);
  sample_.discharge_m3s = s.runoff_end_m3s;
  sample_.rain_m_s = s.rain_mean_m_s;
  sample_.excess_m_s = s.excess_mean_m_s;
  return {s.runoff_mean_m3s, s.runoff_end_m3s};
}

void SubcatchmentElement::visit_state(StateVisitor& v) {
  model_->visit_state(v);
  StateGroup g(v, "sample");
  v.value("discharge_m3s", sample_.discharge_m3s);
  v.value("rain_m_s", sample_.rain_m_s);
  v.value("excess_m_s", sample_.excess_m_s);
}

VolumeLedger SubcatchmentElement::ledger() const {
  const hydrology::SubcatchmentLedger h = model_->ledger();
  VolumeLedger l;
  l.rain_m3 = h.rain_m3;
  l.loss_m3 = h.loss_m3;
  l.outflow_m3 = h.runoff_m3;
  l.storage_m3 = h.storage_m3;
  return l;
}

ElementReport SubcatchmentElement::report() const {
  SubcatchmentFacts f;
  f.area_m2 = model_->spec().area_m2;
  for (const hydrology::OverlandPlane& plane : model_->cascade().planes()) {
    // Unit width: the area is the depth.
    f.planes.push_back({plane.spec().name,
                        make_wave_facts(plane.reach(), geometry::SectionFlux{plane.spec().flux()},
                                        [](double a) { return a; }, plane.peak_outflow_m2s(),
                                        plane.breaking())});
  }
  return {kind(), std::move(f)};
}

// ---- PoolElement -------------------------------------------------------------------------

PoolElement::PoolElement(std::string id,
                         ElementKind kind,
                         std::shared_ptr<const structures::CulvertCrossing> crossing,
                         structures::StageStorage ponding,
                         structures::LevelPoolOptions options)
    : Element(std::move(id), kind), crossing_(std::move(crossing)) {
  pool_ = std::make_unique<structures::LevelPool>(
      structures::make_crossing_pool(*crossing_, std::move(ponding), options));
  // Below a tailwater standing above the inlet invert the pond holds water before any flow.
  initial_stage_m_ = std::max(crossing_->culvert().spec().inlet_invert_stage_m,
                              crossing_->tailwater_stage_m().value_or(-1e300));
}

PoolElement::PoolElement(std::string id,
                         std::unique_ptr<structures::Riser> riser,
                         structures::StageStorage basin,
                         structures::LevelPoolOptions options,
                         double initial_stage_m)
    : Element(std::move(id), ElementKind::detention),
      riser_(std::move(riser)),
      initial_stage_m_(initial_stage_m) {
  const structures::Riser* r = riser_.get();
  pool_ = std::make_unique<structures::LevelPool>(
      "detention basin '" + this->id() + "'",
      std::move(basin),
      [r](double stage_m) { return r->discharge_m3s(stage_m); },
      options);
}

void PoolElement::add_backwater_storage(const ReachWedge& wedge) {
  pool_->add_storage([wedge](double stage_m) { return wedge.volume_m3(stage_m); });
}

void PoolElement::reset(double start_s) {
  start_s_ = start_s;
  pool_->reset(start_s, initial_stage_m_);
  peak_inflow_m3s_ = 0.0;
}

void PoolElement::prime(double inflow_m3s) {
  if (!(inflow_m3s > 0.0)) return;
  // The outflow rises with the level: bracket the steady level, then bisect to 1e-9 m.
  double lo = initial_stage_m_, hi = initial_stage_m_ + 1.0;
  for (int k = 0; k < 60 && pool_->outflow_m3s(hi) < inflow_m3s; ++k) hi += 2.0 * (hi - lo);
  for (int k = 0; k < 200 && hi - lo > 1e-9; ++k) {
    const double mid = 0.5 * (lo + hi);
    (pool_->outflow_m3s(mid) < inflow_m3s ? lo : hi) = mid;
  }
  pool_->reset(start_s_, 0.5 * (lo + hi));
}

StepOutflow PoolElement::advance(const StepInflow& in) {
  const double inflow = in.inflow_mean_m3s + in.lateral_mean_m3s;
  peak_inflow_m3s_ = std::max(peak_inflow_m3s_, inflow);
  const structures::LevelPoolStep s = pool_->advance(in.t0_s, in.t1_s, inflow);
  // The pool's mean outflow is I - dS/dt, which round-off can leave a few 1e-14 m3/s below
  // zero on an empty pool; nothing negative is handed downstream.
  return {std::max(0.0, s.mean_outflow_m3s), pool_->state().outflow_m3s};
}

void PoolElement::visit_state(StateVisitor& v) {
  pool_->visit_state(v);
  v.value("start_s", start_s_);
  v.value("peak_inflow_m3s", peak_inflow_m3s_);
}

StationSample PoolElement::sample() const {
  const structures::LevelPoolState& st = pool_->state();
  StationSample s;
  s.discharge_m3s = st.outflow_m3s;
  s.stage_m = st.stage_m;
  s.depth_m = std::max(0.0, st.stage_m - pool_->storage().bottom_stage_m());
  return s;
}

VolumeLedger PoolElement::ledger() const { return pool_->ledger(); }

std::vector<MarkedStage> PoolElement::marked_stages() const {
  std::vector<MarkedStage> out;
  if (crossing_) {
    const structures::CulvertSpec& spec = crossing_->culvert().spec();
    out.push_back({"culvert inlet invert", spec.inlet_invert_stage_m});
    out.push_back({"barrel crown", spec.inlet_invert_stage_m + spec.rise_m});
    if (crossing_->road()) out.push_back({"road crest (lowest)", crossing_->road()->lowest_crest_stage_m()});
  }
  if (riser_) {
    for (const structures::Outlet& o : riser_->outlets()) {
      if (const auto* w = std::get_if<structures::RectangularWeir>(&o)) {
        out.push_back({"weir crest", w->crest_stage_m});
      } else if (const auto* v = std::get_if<structures::VNotchWeir>(&o)) {
        out.push_back({"notch vertex", v->vertex_stage_m});
      } else if (const auto* h = std::get_if<structures::Orifice>(&o)) {
        out.push_back({"orifice invert", h->invert_stage_m});
      }
    }
  }
  std::stable_sort(out.begin(), out.end(),
                   [](const MarkedStage& a, const MarkedStage& b) { return a.stage_m < b.stage_m; });
  return out;
}

ElementReport PoolElement::report() const {
  PoolFacts f;
  f.peak_inflow_m3s = peak_inflow_m3s_;
  if (crossing_) {
    f.crossing = structures::crossing_report(*crossing_, *pool_);
  } else {
    f.detention = structures::detention_report(*pool_);
  }
  f.marked_stages = marked_stages();
  return {kind(), std::move(f)};
}

}  // namespace freshet::network
