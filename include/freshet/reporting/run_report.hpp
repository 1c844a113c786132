// What a run found, from the network and its in-memory record (run_recorder.hpp), with no
// file: station summaries, attenuation of every reach, pond and culvert and of the stretches
// the study names, shocks, volume balances, Ponce numbers,
// the warnings (kinematic-wave applicability, conduits at capacity, backwater from ponds,
// coupling steps longer than a rise, peaks not reached by the end of the run, peaks out of
// scale with the area draining to them), the per-station peaks for the cross-run tables, each
// reach's numerics and each element's notes. Elements are read through their typed reports
// (network::Element::report()), never through their concrete types.
//
//   RunRecorder recorder(model, stations);
//   const network::RunSummary numerics = network::simulate(model, clock, recorder);
//   const RunReport r = report_run(model, numerics, recorder, {title, "freshet 0.1", clock});
//   for (const ApplicabilityWarning& w : r.summary.warnings) ...
#pragma once

#include <string>
#include <utility>
#include <vector>

#include "freshet/network/driver.hpp"
#include "freshet/reporting/fit_statistics.hpp"
#include "freshet/reporting/run_recorder.hpp"
#include "freshet/reporting/run_series.hpp"
#include "freshet/reporting/station.hpp"
#include "freshet/reporting/summary.hpp"
#include "freshet/routing/diagnostics.hpp"

namespace freshet::reporting {

// What one station did, for the cross-storm and cross-scenario tables.
struct StationPeak {
  std::string id;
  std::string name;
  network::ElementKind kind = network::ElementKind::junction;
  double peak_discharge_m3s = kNotApplicable;
  double peak_time_s = kNotApplicable;
  double peak_stage_m = kNotApplicable;
  bool stage_is_elevation = false;  // peak_stage_m is an elevation (else a depth)
  double volume_m3 = kNotApplicable;
  // Culvert crossings: whether and how long the road overtopped, e.g. "55 min" or "no";
  // empty for other elements.
  std::string overtopping;
  double overtopping_s = kNotApplicable;
};

struct ReportContext {
  std::string title;   // the summary's title
  std::string source;  // freshet version string
  network::ClockOptions clock;  // the run's clock (its coupling step judges rises)
  std::string time_origin_iso;  // time 0 of the run as ISO 8601, e.g. "2000-01-01T00:00:00Z"
};

// A station's routed discharge against an observed hydrograph, paired at the observed
// readings within the run, with the fit statistics (fit_statistics.hpp).
struct ObservedFit {
  std::string station_id;
  std::string source;  // the observed record's file
  std::vector<double> times_s, observed_m3s, routed_m3s;
  FitStatistics fit;
};

struct RunReport {
  RunSummary summary;             // peaks, attenuation, shocks, mass balance, warnings
  std::vector<StationPeak> peaks;  // one per station, model order
  // Per reach: scheme, steps taken and rejected, largest Courant number, volume balance,
  // shocks found, wall time.
  std::vector<std::pair<std::string, routing::RunDiagnostics>> reach_numerics;
  // What each element found (shocks, conduits at capacity, culvert headwater and road
  // overtopping, detention peaks): element id and one line of text, in network order.
  std::vector<std::pair<std::string, std::string>> notes;
  // Each element's typed report (model order): the HTML report's marks and profiles.
  std::vector<network::ElementReport> elements;
  // The output-time series, when the recorder kept them (RunRecorder::keep_output_series).
  RunSeries series;
  // Routed against observed, one per observed hydrograph of the run's storm (set by the
  // study's run; the report draws them on the station's hydrograph).
  std::vector<ObservedFit> observed;
};

// `numerics` is what network::simulate returned for `model`; `recorder` recorded that run.
// Warnings are grouped by element, in network order.
RunReport report_run(const network::Model& model, const network::RunSummary& numerics,
                     const RunRecorder& recorder, const ReportContext& context);

}  // namespace freshet::reporting
