// Runs one (scenario, storm) of a study end to end: builds the model, drives it into the
// reporting layer's recorder (reporting/run_recorder.hpp) while streaming the station series
// to CF NetCDF, has reporting::report_run make the summaries and warnings, and writes the
// summary CSV and JSON files (io/summary_writer.hpp). The run's files are one result set
// (io/atomic_file.hpp): written into a private staging folder and renamed into place
// together, the summary JSON last, only when the run has completed; the output folder is
// locked against other freshet processes for the run (OutputFolderLock).
//
//   Study study = Study::load("basins/tansy-brook.toml");
//   RunRequest req{"", "aep1-60min", "out/tansy-brook", io::Overwrite::no, "freshet route ..."};
//   RunOutcome r = run_study(study, req);
//   std::cout << io::format_summary_table(r.summary);
#pragma once

#include <filesystem>
#include <functional>
#include <stdexcept>
#include <string>
#include <vector>

#include "freshet/io/atomic_file.hpp"
#include "freshet/study/study.hpp"
#include "freshet/network/driver.hpp"
#include "freshet/reporting/run_report.hpp"
#include "freshet/routing/diagnostics.hpp"

namespace freshet::study {

struct RunRequest {
  std::string scenario_id;  // empty: the base network
  std::string storm_id;
  std::filesystem::path out_dir;  // files go to out_dir/<scenario or "base">/<storm>...
  io::Overwrite overwrite = io::Overwrite::no;
  std::string history;      // command line, recorded in the NetCDF history attribute
  std::string source;       // "freshet <version>"
  // Hydrograph export for downstream models: these stations' discharge, resampled to
  // export_interval_s keeping the run's total volume (io::ResampleMethod::scaled_samples),
  // written as CSV files <storm>_<station>_hydrograph.csv that the inflow reader accepts.
  std::vector<std::string> export_stations;
  double export_interval_s = 0.0;  // 0: the study's output interval
  // Along-reach profiles: every cell of these reaches at every output time, written to
  // <storm>_profiles.nc (CF timeSeries, one instance per cell, with reach id and chainage).
  std::vector<std::string> profile_reaches;
  // Threads that advance this run's elements within each coupling step (network::SweepOptions):
  // independent subtrees in parallel, results bit-identical to one thread.
  int threads = 1;
  // Hot start (docs/state-files.md). The run saves its complete state at each of these times
  // (s after the run's start; each the end of a coupling step inside the run) to
  // <storm>_state_<seconds>s.h5 in its folder, written under a temporary name and renamed as
  // soon as the run reaches the time (a state file outlives a run that fails later).
  std::vector<double> save_state_at_s;
  // A state file saved by a run of the same basin file (by SHA-256), scenario and storm: the
  // run continues from it. Its NetCDF files hold the output times after the saved time; its
  // summaries, exports and report cover the whole run and equal the unsplit run's.
  std::filesystem::path resume_from;
};

// The state file run_study writes for `request` at `time_s`.
std::filesystem::path state_file_path(const RunRequest& request, double time_s);

// What report_run found (summary, peaks, reach numerics, element notes: run_report.hpp), with
// the run's identity, its numerics and the files it wrote.
struct RunOutcome : reporting::RunReport {
  std::string scenario_id;
  std::string storm_id;
  network::RunSummary numerics;              // steps, wall time, ledgers
  std::vector<std::filesystem::path> files;  // written and renamed into place
};

// Asked at every coupling step and before the results are renamed into place: true stops the
// run (RunInterrupted). The command line sets it from SIGINT/SIGTERM; the library knows
// nothing of signals.
using CancelFn = std::function<bool()>;

// A run stopped because CancelFn returned true; none of its files is left, under a final or a
// temporary name.
class RunInterrupted : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

// Runs and writes; throws InputError, NumericalError, IoError or RunInterrupted (no file of
// the run is left under its final name after a failure, and no temporary file either).
// An input problem found only while routing (say a storm whose rain overflows to infinity on
// a subcatchment) names the study file, the storm and the element. `progress` receives the
// fraction of simulated time.
RunOutcome run_study(const Study& study, const RunRequest& request,
                     const network::ProgressFn& progress = {}, const CancelFn& cancel = {});

// The output folder of one run: out_dir/<scenario id, or "base">.
std::filesystem::path run_folder(const RunRequest& request);

// Every file run_study would write for this request, under its final name (NetCDF series,
// summaries, hydrograph exports).
std::vector<std::filesystem::path> planned_output_files(const Study& study,
                                                        const RunRequest& request);

// Checks a request before any routing: InputError for an unknown storm or scenario, or a storm
// whose rain goes on after the run ends; IoError naming the first planned file that already
// exists, unless the request allows overwriting. run_study calls it; a batch can call it for
// all of its requests before starting any.
void check_run_request(const Study& study, const RunRequest& request);

}  // namespace freshet::study
