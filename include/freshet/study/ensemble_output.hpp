// The outputs of an ensemble (study/ensemble_run.hpp) of one storm and scenario: the summary of
// its members (percentiles, threshold exceedance, convergence: uncertainty/ensemble_summary.hpp)
// written as one result set in the run folder, out_dir/<scenario or "base">/, under the stem
// <storm>_ensemble (io/ensemble_writer.hpp), the JSON last; nothing appears under a final name
// unless every file is complete. Beside the tables, <storm>_ensemble_bands.nc holds the
// percentile hydrographs (discharge and stage at each station that is not a subcatchment, CF
// timeSeries with a percentile dimension: io/netcdf_writer.hpp).
//
//   check_ensemble_study(study);                       // InputError before any routing
//   EnsembleOutcome e = run_ensemble(study, {"", "aep1-60min", 2});
//   EnsembleWritten w = write_ensemble_outputs(study, e, {"out/tansy-brook", ...});
#pragma once

#include <filesystem>
#include <string>
#include <vector>

#include "freshet/io/atomic_file.hpp"
#include "freshet/io/ensemble_writer.hpp"
#include "freshet/study/ensemble_run.hpp"
#include "freshet/study/study.hpp"
#include "freshet/uncertainty/ensemble_summary.hpp"

namespace freshet::study {

struct EnsembleOutputRequest {
  std::filesystem::path out_dir;
  io::Overwrite overwrite = io::Overwrite::no;
  std::string history;  // the command line
  std::string source;   // "freshet <version>"
};

// InputError naming the file (and the line and field 'members' of [uncertainty]) when the
// study has no [uncertainty] section or fewer than 2 members: a percentile of one member says
// nothing about a spread.
void check_ensemble_study(const Study& study);

// Every file write_ensemble_outputs would write, under its final name (sidecars included).
std::vector<std::filesystem::path> planned_ensemble_files(const std::filesystem::path& out_dir,
                                                          const std::string& scenario_id,
                                                          const std::string& storm_id);

// The summary of the members with the study's percentiles and thresholds.
uncertainty::EnsembleSummary summarize(const Study& study, const EnsembleOutcome& outcome);

struct EnsembleWritten {
  uncertainty::EnsembleSummary summary;
  io::EnsembleDescription description;       // what the files say the ensemble is
  std::vector<std::filesystem::path> files;  // renamed into place, the JSON last
};

// Locks the run folder, writes every file and renames them into place together. Throws
// IoError naming the path (an existing file without overwrite stops it before writing), or
// RunInterrupted when `cancel` returns true before the commit.
EnsembleWritten write_ensemble_outputs(const Study& study,
                                       const EnsembleOutcome& outcome,
                                       const EnsembleOutputRequest& request,
                                       const CancelFn& cancel = {});

}  // namespace freshet::study
