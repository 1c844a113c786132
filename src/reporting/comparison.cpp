#include "freshet/reporting/comparison.hpp"

#include <stdexcept>

namespace freshet::reporting {

std::vector<ComparisonRow> compare_scenarios(const std::string& storm_id,
                                             const std::vector<ScenarioPeaks>& runs) {
  std::vector<ComparisonRow> rows;
  if (runs.empty()) return rows;
  const std::vector<StationPeak>& base = *runs.front().peaks;
  for (const ScenarioPeaks& r : runs) {
    if (r.peaks->size() != base.size()) {
      throw std::invalid_argument("compare_scenarios: runs list different stations");
    }
    for (std::size_t i = 0; i < base.size(); ++i) {
      if ((*r.peaks)[i].id != base[i].id) {
        throw std::invalid_argument("compare_scenarios: runs list stations in another order");
      }
    }
  }
  rows.reserve(base.size() * runs.size());
  for (std::size_t i = 0; i < base.size(); ++i) {
    const StationPeak& b = base[i];
    for (std::size_t k = 0; k < runs.size(); ++k) {
      const StationPeak& p = (*runs[k].peaks)[i];
      ComparisonRow row;
      row.storm_id = storm_id;
      row.station_id = p.id;
      row.station_name = p.name;
      row.kind = p.kind;
      row.scenario_id = runs[k].scenario_id;
      row.peak_discharge_m3s = p.peak_discharge_m3s;
      row.peak_time_s = p.peak_time_s;
      row.peak_stage_m = p.peak_stage_m;
      row.stage_is_elevation = p.stage_is_elevation;
      row.volume_m3 = p.volume_m3;
      row.overtopping_s = p.overtopping_s;
      if (k > 0) {
        row.peak_discharge_change_m3s = p.peak_discharge_m3s - b.peak_discharge_m3s;
        row.peak_time_shift_s = p.peak_time_s - b.peak_time_s;
        if (p.stage_is_elevation == b.stage_is_elevation) {
          row.peak_stage_change_m = p.peak_stage_m - b.peak_stage_m;
        }
        row.volume_change_m3 = p.volume_m3 - b.volume_m3;
      }
      rows.push_back(std::move(row));
    }
  }
  return rows;
}

}  // namespace freshet::reporting
