// One element of the basin network, as the driver sees it.
//
// The driver advances elements upstream first over coupling steps [t0, t1]. An element
// receives the mean point inflow over the step (the sum of the mean outflows of the elements
// that drain into it) and the mean lateral inflow (runoff from subcatchments draining along a
// reach), advances its own state with whatever internal steps it needs, and returns its mean
// outflow over the step. Handing on means keeps volumes exact from element to element.
#pragma once

#include <limits>
#include <string>
#include <vector>

#include "freshet/core/state_archive.hpp"
#include "freshet/core/volume_ledger.hpp"
#include "freshet/network/element_report.hpp"
#include "freshet/network/topology.hpp"

namespace freshet::network {

inline constexpr double kNoValue = std::numeric_limits<double>::quiet_NaN();

// What an element reports at an output time; NaN where a quantity does not apply.
struct StationSample {
  double discharge_m3s = kNoValue;  // outflow of the element (runoff for a subcatchment)
  double stage_m = kNoValue;        // water-surface elevation (or depth where no datum is known)
  double depth_m = kNoValue;        // flow depth (headwater depth at a culvert, pool depth)
  double velocity_m_s = kNoValue;   // mean velocity Q/A where defined
  double rain_m_s = kNoValue;       // subcatchments: rainfall intensity
  double excess_m_s = kNoValue;     // subcatchments: rainfall excess (runoff-producing) rate
  // Volume that has left the element since the run started (its ledger's outflow), filled in
  // by the driver: differences give exact volumes between samples.
  double outflow_volume_m3 = kNoValue;
  // Filled in by the driver from the samples of the elements draining into this one: the
  // total inflow at the sample time (upstream plus lateral, as one hydrograph) and the part
  // of it that enters along a reach (subcatchment runoff); 0 where nothing drains in.
  double inflow_m3s = kNoValue;
  double lateral_inflow_m3s = kNoValue;
  // Volume stored in the element at the sample time (its ledger's storage), filled in by the
  // driver.
  double storage_m3 = kNoValue;
};

// Every element keeps the shared freshet::VolumeLedger (core/volume_ledger.hpp).
using freshet::VolumeLedger;

// What flows into an element over one coupling step [t0_s, t1_s]: the means over the step
// (which carry the volume) and the instantaneous rates at t1 (which are reported at stations).
struct StepInflow {
  double t0_s = 0.0;
  double t1_s = 0.0;
  double inflow_mean_m3s = 0.0;   // point inflow at the upstream end
  double lateral_mean_m3s = 0.0;  // total lateral inflow along the element
  double inflow_end_m3s = 0.0;
  double lateral_end_m3s = 0.0;
  [[nodiscard]] double dt_s() const { return t1_s - t0_s; }
};

struct StepOutflow {
  double mean_m3s = 0.0;  // volume that left over the step / step length
  double end_m3s = 0.0;   // outflow rate at t1
};

class Element {
 public:
  Element(std::string id, ElementKind kind) : id_(std::move(id)), kind_(kind) {}
  virtual ~Element() = default;
  Element(const Element&) = delete;
  Element& operator=(const Element&) = delete;

  // Restores the initial state at the run's start time (a dry network unless the element
  // says otherwise).
  virtual void reset(double start_s) = 0;
  // After reset, in upstream-first order: the instantaneous inflow at the start time, so
  // that elements without storage can report it in the first record. Default: ignored.
  virtual void prime(double /*inflow_m3s*/) {}
  // Advances over the step; returns the outflow over it.
  virtual StepOutflow advance(const StepInflow& in) = 0;
  // The state at the end of the last step.
  [[nodiscard]] virtual StationSample sample() const = 0;
  [[nodiscard]] virtual VolumeLedger ledger() const = 0;
  // What the element found so far, as typed facts of its kind (element_report.hpp): shocks,
  // capacity, volume above full, pool stage, overtopping. Default: nothing beyond samples.
  [[nodiscard]] virtual ElementReport report() const { return {kind_, NoFacts{}}; }
  // The element's computational cells at the end of the last step (the along-reach profile
  // of a reach); empty for elements without cells.
  [[nodiscard]] virtual std::vector<CellSample> cell_samples() const { return {}; }
  // Hot start (docs/state-files.md): saves the element's whole state at the end of a coupling
  // step, or restores it into an element built from the same study, after reset() and
  // prime(); the element then continues bit for bit as the one that saved it. Everything its
  // sample(), ledger(), report() and cell_samples() read is state. Every element kind of the
  // library implements it; the default refuses (an element written for a test).
  virtual void visit_state(StateVisitor& v);
  // True for elements whose inflow from subcatchments enters along their length (reaches).
  [[nodiscard]] virtual bool takes_lateral_inflow() const { return false; }

  [[nodiscard]] const std::string& id() const { return id_; }
  [[nodiscard]] ElementKind kind() const { return kind_; }

 private:
  std::string id_;
  ElementKind kind_;
};

}  // namespace freshet::network
