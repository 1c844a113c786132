#include "freshet/study/ensemble_output.hpp"

#include <string>

#include "freshet/core/error.hpp"
#include "freshet/io/csv_table.hpp"
#include "freshet/io/ensemble_writer.hpp"
#include "freshet/io/netcdf_writer.hpp"
#include "freshet/reporting/reported_as.hpp"
#include "freshet/study/study_run.hpp"
#include "run_metadata.hpp"

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

std::filesystem::path bands_path(const std::filesystem::path& stem) {
  return stem.string() + "_bands.nc";
}

// The percentile hydrographs of discharge and stage at every station that is not a
// subcatchment (the stations of a run's <storm>.nc), as CF timeSeries with a percentile
// dimension. Nothing is written when the network has no such station.
void write_bands(const Study& study, const EnsembleOutcome& e, const EnsembleOutputRequest& request,
                 const std::filesystem::path& path, io::OutputSet& set) {
  const std::vector<StationDescription> stations = study.stations(e.scenario_id);
  FRESHET_ASSERT(stations.size() == e.stations.size(), "ensemble stations and study stations differ");
  std::vector<std::size_t> index;
  for (std::size_t i = 0; i < stations.size(); ++i) {
    FRESHET_ASSERT(stations[i].id == e.stations[i].id, "ensemble stations out of model order");
    if (!reporting::is_subcatchment(stations[i].kind)) index.push_back(i);
  }
  if (index.empty()) return;
  RunRequest run;
  run.scenario_id = e.scenario_id;
  run.storm_id = e.storm_id;
  run.history = request.history;
  run.source = request.source;
  io::NetcdfRunMetadata m = detail::run_metadata(study, run, "ensemble percentile bands");
  m.summary = "Pointwise percentiles over " + std::to_string(e.members) +
              " ensemble members (the [uncertainty] section of " + study.file().string() +
              ") of the discharge and stage computed by freshet";
  m.keywords += ", ensemble, uncertainty, percentile";
  io::NetcdfWriterOptions options;
  options.overwrite = request.overwrite;
  options.set = &set;
  io::NetcdfTimeSeriesWriter out(path, options);
  out.begin(m, detail::run_instances(stations, index, io::InstanceKind::station),
            {io::OutputVariable::discharge, io::OutputVariable::stage}, e.percentiles);
  const std::size_t n = index.size(), np = e.percentiles.size();
  std::vector<double> row(2 * n * np);
  for (std::size_t t = 0; t < e.times_s.size(); ++t) {
    for (std::size_t k = 0; k < n; ++k) {
      const StationEnsemble& s = e.stations[index[k]];
      for (std::size_t p = 0; p < np; ++p) {
        row[k * np + p] = s.discharge_band_m3s[p][t];
        row[(n + k) * np + p] = s.stage_band_m[p][t];
      }
    }
    out.record(e.times_s[t], row);
  }
  out.commit();
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
  const std::filesystem::path stem = stem_of(folder_of(out_dir, scenario_id), storm_id);
  std::vector<std::filesystem::path> out{bands_path(stem)};
  for (const auto& p : io::ensemble_table_paths(stem)) {
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
  write_bands(study, outcome, request, bands_path(stem), set);
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
