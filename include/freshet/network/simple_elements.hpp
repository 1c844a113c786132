// Elements with no storage: junctions and outlets pass their inflow on unchanged, and an
// inflow element releases a hydrograph given as a piecewise-linear series.
#pragma once

#include "freshet/core/time_series.hpp"
#include "freshet/network/element.hpp"

namespace freshet::network {

// A junction or an outlet: outflow equals the sum of the inflows, at every instant.
class PassThrough final : public Element {
 public:
  PassThrough(std::string id, ElementKind kind) : Element(std::move(id), kind) {}
  void reset(double start_s) override;
  void prime(double inflow_m3s) override { end_m3s_ = inflow_m3s; }
  StepOutflow advance(const StepInflow& in) override;
  [[nodiscard]] StationSample sample() const override;
  [[nodiscard]] VolumeLedger ledger() const override { return ledger_; }
  void visit_state(StateVisitor& v) override;

 private:
  double end_m3s_ = 0.0;
  VolumeLedger ledger_;
};

// A hydrograph entering the network (for example from a CSV file under hydrographs/).
class InflowHydrograph final : public Element {
 public:
  InflowHydrograph(std::string id, PiecewiseLinearSeries discharge_m3s)
      : Element(std::move(id), ElementKind::inflow), q_(std::move(discharge_m3s)) {}
  void reset(double start_s) override;
  StepOutflow advance(const StepInflow& in) override;
  [[nodiscard]] StationSample sample() const override;
  [[nodiscard]] VolumeLedger ledger() const override { return ledger_; }
  void visit_state(StateVisitor& v) override;

 private:
  PiecewiseLinearSeries q_;
  double t_s_ = 0.0;
  VolumeLedger ledger_;
};

}  // namespace freshet::network
