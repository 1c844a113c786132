// The network elements that carry the numerics of the other modules: a channel or pipe
// reach (routing), a subcatchment (hydrology) and a level pool behind a road culvert or in a
// detention basin (structures). Each adapts its model to the driver's Element interface and
// keeps its own reports (shocks, overtopping, peaks) for the summaries.
#pragma once

#include <memory>
#include <optional>

#include "freshet/geometry/section_flux.hpp"
#include "freshet/network/backwater.hpp"
#include "freshet/hydrology/subcatchment.hpp"
#include "freshet/network/element.hpp"
#include "freshet/network/structures/level_pool.hpp"
#include "freshet/routing/reach_model.hpp"

namespace freshet::network {

class PoolElement;

// A reach routed by the kinematic wave. Its station is the downstream end: discharge,
// depth and velocity of the last cell, and stage = outlet invert elevation + depth when
// the invert is known (otherwise the depth).
class ReachElement final : public Element {
 public:
  ReachElement(std::string id, geometry::FlowSection section,
               std::unique_ptr<routing::ReachModel> reach,
               std::optional<double> outlet_invert_m);
  void reset(double start_s) override;
  // Starts in steady uniform flow carrying the inflow at the start (dry when it is zero).
  void prime(double inflow_m3s) override;
  StepOutflow advance(const StepInflow& in) override;
  [[nodiscard]] StationSample sample() const override;
  [[nodiscard]] VolumeLedger ledger() const override;
  [[nodiscard]] ElementReport report() const override;
  [[nodiscard]] std::vector<CellSample> cell_samples() const override;
  [[nodiscard]] bool takes_lateral_inflow() const override { return true; }
  void visit_state(StateVisitor& v) override;

  [[nodiscard]] const routing::ReachModel& reach() const { return *reach_; }
  [[nodiscard]] const geometry::FlowSection& section() const { return section_; }
  [[nodiscard]] std::optional<double> outlet_invert_m() const { return outlet_invert_m_; }
  // Coupling steps at whose end some cell held the conduit's capacity area (the kinematic
  // wave at its limit: surcharge is not represented).
  [[nodiscard]] long capacity_steps() const { return capacity_steps_; }
  // Closed conduits: the conduit's full volume (full area x length), and the largest volume
  // held above the full area (summed over cells, at coupling-step ends) with its time. A
  // kinematic conduit cannot surcharge, so water it cannot pass stays in it; in a real system
  // that water would pressurise the pipe or leave at manholes. 0 for open channels.
  [[nodiscard]] double full_volume_m3() const { return full_volume_m3_; }
  [[nodiscard]] double peak_volume_above_full_m3() const { return peak_above_full_m3_; }
  [[nodiscard]] double time_of_peak_volume_above_full_s() const { return peak_above_full_s_; }
  // The reach's breaking prediction and the kinematic shocks that matter to the flood, in
  // order of formation: each one's largest discharge jump along its path is at least
  // kSignificantShockFraction of the reach's peak outflow. Small fronts (the first trickle
  // running onto a dry bed) are left out.
  [[nodiscard]] WaveFacts wave_facts() const;
  [[nodiscard]] const routing::PredictedBreaking& breaking() const { return watch_.result(); }

  // Backwater (backwater.hpp). attach_backwater: the pool this reach drains into backs water
  // into it (the reach needs an outlet invert). From then on the reach keeps its own ledger
  // over its routed (not drowned) cells.
  void attach_backwater(const PoolElement& pool);
  [[nodiscard]] bool has_backwater() const noexcept { return backwater_pool_ != nullptr; }
  // The reach's volume below a level (needs an outlet invert).
  [[nodiscard]] ReachWedge wedge() const;
  // Drowns the cells, from the outlet upstream, whose computed water surface lies below
  // stage_m, and lets emerge those that no longer do (taking back no more than
  // pool_storage_m3). Returns the volume handed to the pool (< 0: taken from it).
  double drown(double stage_m, double pool_storage_m3, double time_s);
  [[nodiscard]] int drowned_cells() const noexcept { return drowned_; }

 private:
  [[nodiscard]] double routed_storage_m3() const;
  [[nodiscard]] double cell_bed_m(int cell) const;
  StepOutflow advance_drowned(const StepInflow& in, double mean_outflow_m3s);
  geometry::FlowSection section_;
  std::unique_ptr<routing::ReachModel> reach_;
  std::optional<double> outlet_invert_m_;
  routing::BreakingWatch watch_;
  // This step's forcing, kept between steps so that setting it allocates nothing.
  PiecewiseLinearSeries inflow_ = PiecewiseLinearSeries::constant(0.0);
  routing::LateralInflow lateral_ = routing::LateralInflow::none();
  routing::LateralInflow no_lateral_ = routing::LateralInflow::none();
  double start_s_ = 0.0;
  double inflow_end_m3s_ = 0.0;  // upstream rate at the end of the last step
  long capacity_steps_ = 0;
  double peak_outflow_m3s_ = 0.0;  // at step ends, for the significance of shocks
  double full_area_m2_ = 0.0;      // 0 for open sections
  double full_volume_m3_ = 0.0;
  double peak_above_full_m3_ = 0.0;
  double peak_above_full_s_ = 0.0;
  // Backwater: the pool, the drowned cells (counted from the outlet), the ledger of the
  // routed cells, and the longest drowned length with its time.
  const PoolElement* backwater_pool_ = nullptr;
  int drowned_ = 0;
  VolumeLedger routed_ledger_;
  BackwaterFacts backwater_facts_;
};

// A subcatchment: rain, losses and overland planes. Its station reports the runoff, the
// rainfall intensity and the rainfall excess (means over the last coupling step).
class SubcatchmentElement final : public Element {
 public:
  SubcatchmentElement(std::string id, std::unique_ptr<hydrology::Subcatchment> model);
  void reset(double start_s) override;
  StepOutflow advance(const StepInflow& in) override;
  [[nodiscard]] StationSample sample() const override { return sample_; }
  [[nodiscard]] VolumeLedger ledger() const override;
  [[nodiscard]] ElementReport report() const override;
  [[nodiscard]] const hydrology::Subcatchment& model() const { return *model_; }
  void visit_state(StateVisitor& v) override;

 private:
  std::unique_ptr<hydrology::Subcatchment> model_;
  StationSample sample_;
};

// A level pool: the ponding area upstream of a road culvert crossing, or a detention basin.
// Its station reports the outflow, the pool stage (headwater at a culvert) and the depth
// above the pool's lowest point.
class PoolElement final : public Element {
 public:
  // For a culvert crossing: `crossing` owns the rating the pool's outflow reads.
  PoolElement(std::string id, ElementKind kind,
              std::shared_ptr<const structures::CulvertCrossing> crossing,
              structures::StageStorage ponding, structures::LevelPoolOptions options);
  // For a detention basin: outflow through the riser's outlets.
  PoolElement(std::string id, std::unique_ptr<structures::Riser> riser,
              structures::StageStorage basin, structures::LevelPoolOptions options,
              double initial_stage_m);
  void reset(double start_s) override;
  // Starts at the level whose outflow equals the inflow at the start (steady state), or at
  // the starting level when nothing flows in.
  void prime(double inflow_m3s) override;
  StepOutflow advance(const StepInflow& in) override;
  [[nodiscard]] StationSample sample() const override;
  [[nodiscard]] VolumeLedger ledger() const override;
  [[nodiscard]] ElementReport report() const override;

  [[nodiscard]] const structures::LevelPool& pool() const { return *pool_; }
  void visit_state(StateVisitor& v) override;
  // Backwater (backwater.hpp): the pool's storage gains a reach's wedge (before the run);
  // volume handed over by a drowning reach (> 0) or taken back (< 0) at the current time.
  void add_backwater_storage(const ReachWedge& wedge);
  void exchange_volume(double volume_m3) { pool_->exchange(volume_m3); }
  [[nodiscard]] double stage_m() const { return pool_->state().stage_m; }
  [[nodiscard]] double storage_m3() const { return pool_->state().storage_m3; }
  [[nodiscard]] const structures::CulvertCrossing* crossing() const { return crossing_.get(); }

 private:
  [[nodiscard]] std::vector<MarkedStage> marked_stages() const;
  std::shared_ptr<const structures::CulvertCrossing> crossing_;  // may be shared between runs
  std::unique_ptr<structures::Riser> riser_;
  std::unique_ptr<structures::LevelPool> pool_;
  double initial_stage_m_ = 0.0;
  double start_s_ = 0.0;
  double peak_inflow_m3s_ = 0.0;
};

}  // namespace freshet::network
