// What an element tells the run's reports about itself: typed facts, one struct per kind of
// element, through one channel (Element::report()). The reports above the network (warnings,
// summaries, element notes, overtopping tables) read these facts and never the element's
// concrete type; they switch over ElementReport::kind with no `default`, so the compiler
// points at every place that must learn a new element kind.
//
//   const network::ElementReport r = element.report();
//   switch (r.kind) {
//     case ElementKind::reach: use(r.reach().capacity_steps); break;
//     case ElementKind::culvert: case ElementKind::detention: use(r.pool()); break;
//     case ElementKind::subcatchment: use(r.subcatchment().area_m2); break;
//     case ElementKind::inflow: case ElementKind::junction: case ElementKind::outlet: break;
//   }
#pragma once

#include <optional>
#include <string>
#include <variant>
#include <vector>

#include "freshet/network/structures/level_pool.hpp"
#include "freshet/network/topology.hpp"
#include "freshet/routing/breaking_watch.hpp"
#include "freshet/routing/diagnostics.hpp"
#include "freshet/routing/shock.hpp"

namespace freshet::network {

// One kinematic shock as the reports show it: its formation, path, speeds and fate
// (routing::ShockReport) and its largest jump along the path.
struct ShockFacts {
  routing::ShockReport shock;
  double discharge_jump_m3s = 0.0;  // largest Q_left - Q_right along the path (per metre of
                                    // width on a plane, m2/s)
  double depth_jump_m = 0.0;        // h_left - h_right at that path sample
  double jump_time_s = 0.0;         // when the largest jump was seen
  std::vector<double> path_discharge_jump_m3s;  // Q_left - Q_right at each path sample
};

// Breaking and shocks of one kinematic-wave element (a reach, or an overland plane).
struct WaveFacts {
  double length_m = 0.0;
  int cell_count = 0;
  double cell_width_m = 0.0;
  std::string scheme;     // routing scheme name
  bool grid_free = false;  // the characteristics scheme: shocks come from its fronts
  int front_cells = 0;     // cells over which the scheme smears a front
  // Where and when the characteristics of the inflow (and lateral inflow) first cross.
  routing::PredictedBreaking breaking;
  // The kinematic shocks that matter to the flood, in order of formation: each one's largest
  // discharge jump along its path is at least kSignificantShockFraction of the element's
  // peak outflow.
  std::vector<ShockFacts> significant_shocks;
};
inline constexpr double kSignificantShockFraction = 0.1;  // our criterion, no source

// A reach routed by the kinematic wave.
// Backwater from the pool a reach drains into, represented as a level pool (backwater.hpp).
struct BackwaterFacts {
  bool represented = false;  // the reach follows its pool's level
  std::string pool_id;
  double longest_drowned_m = 0.0;  // whole drowned cells, from the outlet
  int most_drowned_cells = 0;
  double time_longest_drowned_s = 0.0;
  double stage_then_m = 0.0;  // the pool's level at that time
};

struct ReachFacts {
  double bed_slope = 0.0;  // m/m
  double length_m = 0.0;
  std::optional<double> outlet_invert_m;  // bed elevation at the downstream end, when given
  int cell_count = 0;
  double cell_width_m = 0.0;
  WaveFacts wave;  // breaking and shocks
  // Coupling steps at whose end some cell held the conduit's capacity area (surcharge is not
  // represented); 0 for open channels that never fill.
  long capacity_steps = 0;
  // Closed conduits: full area x length, and the largest volume held above it (summed over
  // cells, at coupling-step ends) with its time; 0 for open channels.
  double full_volume_m3 = 0.0;
  double peak_volume_above_full_m3 = 0.0;
  double time_of_peak_volume_above_full_s = 0.0;
  routing::RunDiagnostics diagnostics;  // scheme, steps, Courant numbers, shocks, wall time
  BackwaterFacts backwater;
};

// One overland plane of a subcatchment (per metre of width: discharges in m2/s).
struct PlaneFacts {
  std::string name;
  WaveFacts wave;
};

// A subcatchment.
struct SubcatchmentFacts {
  double area_m2 = 0.0;
  std::vector<PlaneFacts> planes;  // in flow order
};

// A level the reports mark on a pool's stage axis and on long sections: a culvert's inlet
// invert and barrel crown, the lowest road crest, a spillway crest, an orifice invert.
struct MarkedStage {
  std::string what;  // e.g. "road crest (lowest)"
  double stage_m = 0.0;
};

// A level pool: the ponding upstream of a culvert crossing, or a detention basin.
struct PoolFacts {
  double peak_inflow_m3s = 0.0;  // at coupling-step ends
  std::vector<MarkedStage> marked_stages;  // lowest first
  std::optional<structures::CrossingReport> crossing;    // culvert crossings: headwater, road
  std::optional<structures::DetentionReport> detention;  // detention basins: stage, storage
};

// Nothing to report beyond the station samples (inflow hydrographs, junctions, outlets).
struct NoFacts {};

struct ElementReport {
  ElementKind kind = ElementKind::junction;
  std::variant<NoFacts, ReachFacts, SubcatchmentFacts, PoolFacts> facts;

  // The facts of the element's kind; asking for another kind's is a programmer error
  // (std::bad_variant_access).
  [[nodiscard]] const ReachFacts& reach() const { return std::get<ReachFacts>(facts); }
  [[nodiscard]] const SubcatchmentFacts& subcatchment() const {
    return std::get<SubcatchmentFacts>(facts);
  }
  [[nodiscard]] const PoolFacts& pool() const { return std::get<PoolFacts>(facts); }
};

// One computational cell of an element at the end of the last coupling step (reaches: the
// along-reach profile).
struct CellSample {
  double chainage_m = 0.0;  // cell centre, from the upstream end
  double discharge_m3s = 0.0;
  double depth_m = 0.0;
  double velocity_m_s = 0.0;
};

}  // namespace freshet::network
