#include "freshet/study/ensemble_output.hpp"

#include <string>

#include "freshet/core/error.hpp"
#include "freshet/io/csv_table.hpp"
#include "freshet/io/ensemble_writer.hpp"
#include "freshet/study/study_run.hpp"

namespace freshet::study {
namespace {

std::filesystem::path folder_of(const std::filesystem::path& out_dir,
                                const std::string& scenario_id) {
  RunRequest r;
  r.scenario_id = scenario_id;
  r.out_dir = out_dir;
  return run_folder(r);
}

std::filesystem::path stem_of(const std::filesystem::path& folder, const std::string& storm_id) {
  return folder / (storm_id + "_ensemble");
}

}  // namespace

void check_ensemble_study(const Study& study) {
  const std::string file = study.file().string();
  if (!study.ensemble()) {
    throw InputError(Problem{file,
                             0,
                             0,
                             "",
                             "uncertainty",
                             "the basin file has no [uncertainty] section: nothing to vary "
                             "(docs/uncertainty.md describes it)"});
  }
  const EnsembleDefinition& e = *study.ensemble();
  if (e.members < 2) {
    throw InputError(Problem{file,
                             e.line,
                             0,
                             "uncertainty",
                             "members",
                             "= " + std::to_string(e.members) +
                                 ": an ensemble needs at least 2 members for its percentiles"});
  }
}

std::vector<std::filesystem::path> planned_ensemble_files(const std::filesystem::path& out_dir,
                                                          const std::string& scenario_id,
                                                          const std::string& storm_id) {
  std::vector<std::filesystem::path> out;
  for (const auto& p :
       io::ensemble_table_paths(stem_of(folder_of(out_dir, scenario_id), storm_id))) {
    out.push_back(p);
    if (p.extension() == ".csv") out.push_back(io::csv_metadata_path(p));
  }
  return out;
}

uncertainty::EnsembleSummary summarize(const Study& study, const EnsembleOutcome& outcome) {
  std::vector<uncertainty::MemberPeaks> members(outcome.stations.begin(), outcome.stations.end());
  std::vector<uncertainty::Threshold> thresholds;
  if (study.ensemble()) {
    thresholds.assign(study.ensemble()->thresholds.begin(), study.ensemble()->thresholds.end());
  }
  return uncertainty::summarize_ensemble(members, outcome.percentiles, thresholds);
}

EnsembleWritten write_ensemble_outputs(const Study& study,
                                       const EnsembleOutcome& outcome,
                                       const EnsembleOutputRequest& request,
                                       const CancelFn& cancel) {
  const io::OutputFolderLock::Handle lock =
      io::OutputFolderLock::acquire(folder_of(request.out_dir, outcome.scenario_id));
  EnsembleWritten out;
  out.summary = summarize(study, outcome);
  io::EnsembleDescription& d = out.description;
  d.title = study.settings().title;
  d.source = request.source;
  d.time_origin_iso = study.settings().start_iso;
  d.scenario = outcome.scenario_id;
  d.storm = outcome.storm_id;
  const EnsembleDefinition& e = *study.ensemble();
  d.sampling =
      std::string(e.method == uncertainty::SamplingMethod::monte_carlo ? "monte-carlo"
                                                                       : "latin-hypercube") +
      ", seed " + std::to_string(e.seed);
  for (const StationDescription& s : study.stations(outcome.scenario_id)) {
    d.station_names.push_back(s.name);
  }
  const std::filesystem::path stem = stem_of(lock->folder(), outcome.storm_id);
  io::OutputSet set(lock->folder(), outcome.storm_id + "_ensemble", request.overwrite);
  const std::vector<uncertainty::MemberPeaks> members(outcome.stations.begin(),
                                                      outcome.stations.end());
  const auto paths =
      io::write_ensemble_tables(stem, out.summary, members, d, request.overwrite, &set);
  if (cancel && cancel())
    throw RunInterrupted("the ensemble was stopped before its results were kept");
  out.files = set.commit(paths.back());
  return out;
}

}  // namespace freshet::study
