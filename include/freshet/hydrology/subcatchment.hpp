// A subcatchment: rain on a plan area, losses, and overland flow on a cascade of planes,
// delivering runoff either to a node (a point inflow, m3/s) or along a reach (a lateral
// inflow per unit length, m2/s).
//
// Over each step the rain of every hyetograph block inside it goes through the loss model;
// the excess drives the planes (kinematic waves on the routing core); the runoff is the last
// plane's outflow per unit width times the width W = area / (total flow length).
// The ledger closes rain = loss + runoff + storage change (m3) to round-off.
//
//   Subcatchment alder({.name = "alder", .area_m2 = 24000.0,
//                       .planes = {{.name = "alder-lawn", .length_m = 80.0, .slope = 0.02,
//                                   .manning_n = 0.24}},
//                       .drain = {.kind = DrainKind::reach, .target = "mill-race",
//                                 .reach_length_m = 400.0}},
//                      storm, std::make_unique<CurveNumberLoss>(CurveNumberParameters{.curve_number = 74},
//                                                               "subcatchment 'alder'"));
//   SubcatchmentStep s = alder.advance(0.0, 300.0);  // s.runoff_mean_m3s, s.lateral_mean_m2s
#pragma once

#include <memory>
#include <string>
#include <vector>

#include "freshet/hydrology/hyetograph.hpp"
#include "freshet/hydrology/loss_model.hpp"
#include "freshet/hydrology/overland_plane.hpp"

namespace freshet::hydrology {

enum class DrainKind { node, reach };
[[nodiscard]] std::string_view to_string(DrainKind kind);

struct SubcatchmentDrain {
  DrainKind kind = DrainKind::node;
  std::string target;           // id of the node or reach receiving the runoff
  double reach_length_m = 0.0;  // DrainKind::reach: length the runoff is spread over, > 0
};

struct SubcatchmentSpec {
  std::string name = "subcatchment";
  double area_m2 = 0.0;                    // plan area, > 0
  std::vector<OverlandPlaneSpec> planes;   // in flow order, at least one
  SubcatchmentDrain drain;

  [[nodiscard]] std::vector<Problem> validate() const;
};

// Runoff over one step [t0, t1]: means (carry the volume) and rates at t1.
struct SubcatchmentStep {
  double runoff_mean_m3s = 0.0;
  double runoff_end_m3s = 0.0;
  double lateral_mean_m2s = 0.0;  // DrainKind::reach: runoff / reach length; else 0
  double lateral_end_m2s = 0.0;
  double rain_mean_m_s = 0.0;     // mean rain and excess intensity over the step
  double excess_mean_m_s = 0.0;
};

struct SubcatchmentLedger {
  double rain_m3 = 0.0;
  double loss_m3 = 0.0;
  double runoff_m3 = 0.0;
  double storage_m3 = 0.0;  // water on the planes now (initial storage is zero: dry start)
  [[nodiscard]] double closure_error_m3() const {
    return rain_m3 - loss_m3 - runoff_m3 - storage_m3;
  }
};

class Subcatchment {
 public:
  // Throws InputError naming the subcatchment for every problem of the spec and its planes.
  Subcatchment(SubcatchmentSpec spec, Hyetograph rain, std::unique_ptr<LossModel> losses,
               routing::RoutingOptions options = {});

  // Advances from t0_s (the previous t1_s after the first call) to t1_s > t0_s.
  SubcatchmentStep advance(double t0_s, double t1_s);
  // Dry planes, loss model reset, ledger cleared.
  void reset();

  [[nodiscard]] double width_m() const { return spec_.area_m2 / cascade_.length_m(); }
  [[nodiscard]] double runoff_m3s() const { return width_m() * cascade_.outflow_m2s(); }
  [[nodiscard]] SubcatchmentLedger ledger() const;
  [[nodiscard]] const SubcatchmentSpec& spec() const noexcept { return spec_; }
  [[nodiscard]] const PlaneCascade& cascade() const noexcept { return cascade_; }
  [[nodiscard]] const LossModel& losses() const noexcept { return *losses_; }
  // Hot start: the loss stores and the planes (the storm is read at absolute times).
  void visit_state(StateVisitor& v);

 private:
  [[nodiscard]] double to_lateral_m2s(double runoff_m3s) const;

  SubcatchmentSpec spec_;
  Hyetograph rain_;
  std::unique_ptr<LossModel> losses_;
  PlaneCascade cascade_;
};

}  // namespace freshet::hydrology
