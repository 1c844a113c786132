// Routes the members of a study's ensemble ([uncertainty], study/ensemble.hpp) for one storm
// and scenario, in memory, and says what they give together at every station: each member's
// peak discharge, peak stage, time of peak and outflow volume, and pointwise percentile bands
// of the discharge and stage series (the band at a time is the percentile of the members'
// values at that time: no member need follow it).
//
//   EnsembleOutcome e = run_ensemble(study, {"", "aep1-60min", 2});
//   e.stations[k].peak_discharge_m3s   // one value per member
//
// Running and collating are separate steps: route_member() routes one member and returns what
// it left (MemberRecord, plain values), and collate_members() makes the outcome from the
// records of every member, in member order. run_ensemble() is the two on a pool of threads; a
// runner that spreads members over processes gathers their records and calls
// collate_members() once.
#pragma once

#include <string>
#include <vector>

#include "freshet/study/study.hpp"
#include "freshet/uncertainty/ensemble_summary.hpp"
#include "freshet/study/study_run.hpp"

namespace freshet::study {

struct EnsembleRequest {
  std::string scenario_id;  // empty: the base network
  std::string storm_id;
  unsigned threads = 1;     // members routed at once; results do not depend on it
};

// The member values (id, peak discharge, peak stage, time of peak, outflow volume: one value
// per member, in member order; uncertainty/ensemble_summary.hpp) and the bands.
struct StationEnsemble : uncertainty::MemberPeaks {
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

// What one member's run leaves, per station in model order.
struct MemberRecord {
  std::vector<std::string> station_ids;
  std::vector<double> times_s;                     // output times
  std::vector<std::vector<double>> discharge_m3s;  // [station][output time]
  std::vector<std::vector<double>> stage_m;        // NaN where the element has no stage
  // Over every coupling step, not only the output times.
  std::vector<double> peak_discharge_m3s, peak_stage_m, peak_time_s;
  std::vector<double> outflow_volume_m3;
};

// Routes member `member` (0-based) in memory. Throws as run_ensemble.
MemberRecord route_member(const Study& study, const EnsembleRequest& request, std::size_t member,
                          const CancelFn& cancel = {});

// The outcome from every member's record, in member order (at least one; all of one storm and
// scenario, so the same stations and output times: FRESHET_ASSERT).
EnsembleOutcome collate_members(const std::vector<MemberRecord>& members,
                                const EnsembleRequest& request,
                                const std::vector<double>& percentiles);

// Throws InputError when the study has no [uncertainty] section or the storm/scenario is
// unknown, NumericalError when a member's run fails (naming the member), RunInterrupted when
// `cancel` returns true.
// `progress` (called from the routing threads) receives the fraction of members routed.
EnsembleOutcome run_ensemble(const Study& study, const EnsembleRequest& request,
                             const CancelFn& cancel = {},
                             const network::ProgressFn& progress = {});

}  // namespace freshet::study
