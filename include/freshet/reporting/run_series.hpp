// The series a run's HTML report draws: every station's samples at the output times (the
// values the NetCDF files hold), and the largest depth each reach cell reached at those
// times. Kept by RunRecorder::keep_output_series() (run_recorder.hpp), in memory: 32 bytes a
// station and output time, plus 8 bytes a reach cell. A study run keeps them only while that
// stays within a budget (study_run.hpp); the report then says it has no plots.
//
//   recorder.keep_output_series();  ... the run ...
//   const RunSeries& s = recorder.output_series();
//   double q = s.stations[i].discharge_m3s[k];   // station i at s.times_s[k]
#pragma once

#include <cstddef>
#include <vector>

namespace freshet::reporting {

// One station at RunSeries::times_s.
struct StationSeries {
  std::vector<double> discharge_m3s;  // outflow (runoff for a subcatchment)
  std::vector<double> stage_m;        // elevation or depth (StationDescription says which)
  std::vector<double> rain_m_s;       // subcatchments: rainfall intensity, mean over the
  std::vector<double> excess_m_s;     // interval ending at the time; empty for other kinds
};

// The largest depth of each cell of one reach over the output times.
struct ReachPeakProfile {
  std::size_t station = 0;  // index in model order
  std::vector<double> chainage_m;    // cell centres from the upstream end
  std::vector<double> peak_depth_m;
};

struct RunSeries {
  std::vector<double> times_s;  // output times, the start included
  std::vector<StationSeries> stations;           // model order; empty when not kept
  std::vector<ReachPeakProfile> reach_profiles;  // reaches, model order

  [[nodiscard]] bool kept() const { return !stations.empty(); }
};

}  // namespace freshet::reporting
