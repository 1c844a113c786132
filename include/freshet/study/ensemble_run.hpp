// Routes the members of a study's ensemble ([uncertainty], study/ensemble.hpp) for one storm
// and scenario, in memory, and says what they give together at every station: each member's
// peak discharge, peak stage, time of peak and outflow volume, and pointwise percentile bands
// of the discharge and stage series (the band at a time is the percentile of the members'
// values at that time: no member need follow it).
//
//   EnsembleOutcome e = run_ensemble(study, {"", "aep1-60min", 2});
//   e.stations[k].peak_discharge_m3s   // one value per member
#pragma once

#include <string>
#include <vector>

#include "freshet/study/study.hpp"
#include "freshet/study/study_run.hpp"

namespace freshet::study {

struct EnsembleRequest {
  std::string scenario_id;  // empty: the base network
  std::string storm_id;
  unsigned threads = 1;     // members routed at once; results do not depend on it
};

struct StationEnsemble {
  std::string id;
  // One value per member, in member order.
  std::vector<double> peak_discharge_m3s;
  std::vector<double> peak_stage_m;  // NaN where the element has no stage
  std::vector<double> peak_time_s;
  std::vector<double> outflow_volume_m3;
  // [percentile][output time]: pointwise bands.
  std::vector<std::vector<double>> discharge_band_m3s;
  std::vector<std::vector<double>> stage_band_m;
};

struct EnsembleOutcome {
  std::string scenario_id;
  std::string storm_id;
  std::size_t members = 0;
  std::vector<double> percentiles;  // as the study declares them
  std::vector<double> times_s;      // output times
  std::vector<StationEnsemble> stations;  // model order
};

// Throws InputError when the study has no [uncertainty] section or the storm/scenario is
// unknown, NumericalError when a member's run fails (naming the member), RunInterrupted when
// `cancel` returns true.
EnsembleOutcome run_ensemble(const Study& study, const EnsembleRequest& request,
                             const CancelFn& cancel = {});

}  // namespace freshet::study
