// The difference table of `freshet compare`: for one storm, each point's peak discharge, peak
// time, peak stage, volume and road overtopping under the base network and each scenario, with
// the difference of each scenario from the base. In memory; io writes it as CSV and JSON.
//
//   std::vector<ScenarioPeaks> runs = {{"", &base.peaks}, {"twin-1500", &upgrade.peaks}};
//   auto rows = reporting::compare_scenarios("aep1-60min", runs);   // base rows first
#pragma once

#include <string>
#include <vector>

#include "freshet/reporting/run_report.hpp"

namespace freshet::reporting {

struct ComparisonRow {
  std::string storm_id;
  std::string station_id;
  std::string station_name;
  network::ElementKind kind = network::ElementKind::junction;
  std::string scenario_id;  // "" for the base network
  double peak_discharge_m3s = kNotApplicable;
  double peak_discharge_change_m3s = kNotApplicable;  // scenario minus base; NaN for the base
  double peak_time_s = kNotApplicable;
  double peak_time_shift_s = kNotApplicable;          // scenario minus base
  double peak_stage_m = kNotApplicable;
  bool stage_is_elevation = false;                    // peak_stage_m is an elevation (else a depth)
  // Scenario minus base; NaN for the base, and where the two stages are not on one datum (the
  // scenario made a reach a culvert, say: a depth against an elevation).
  double peak_stage_change_m = kNotApplicable;
  double volume_m3 = kNotApplicable;
  double volume_change_m3 = kNotApplicable;           // scenario minus base
  double overtopping_s = kNotApplicable;              // road overtopping time at culverts; NaN elsewhere
};

struct ScenarioPeaks {
  std::string scenario_id;                   // "" for the base network
  const std::vector<StationPeak>* peaks;     // one per station, the same stations in each run
};

// Rows point by point in station order, the base first within each point, then each scenario
// in the order given. runs[0] must be the base. Throws std::invalid_argument when the runs do
// not list the same stations in the same order.
std::vector<ComparisonRow> compare_scenarios(const std::string& storm_id,
                                             const std::vector<ScenarioPeaks>& runs);

}  // namespace freshet::reporting
