// freshet ensemble: route every member of a study's [uncertainty] section for one or more
// storms and write what they say together (percentiles, threshold exceedance, convergence).
#include <iostream>
#include <sstream>

#include "batch.hpp"
#include "commands.hpp"
#include "freshet/io/ensemble_writer.hpp"
#include "freshet/study/ensemble_output.hpp"
#include "freshet/study/ensemble_run.hpp"
#include "freshet_version.hpp"
#include "progress.hpp"
#include "stop_signals.hpp"

namespace freshet::cli {

namespace {

using uncertainty::PeakQuantity;

struct EnsembleArgs : RunArgs {
  std::string scenario;
};

// "1.23 / 1.50 / 1.91": one quantity's percentiles.
std::string spread(const std::vector<double>& values, int digits, bool clock) {
  std::string out;
  for (const double v : values) {
    out += (out.empty() ? "" : " / ") + (clock ? clock_hm(v) : number(v, digits));
  }
  return out;
}

std::string format_ensemble_table(const study::Study& study,
                                  const study::EnsembleOutcome& e,
                                  const uncertainty::EnsembleSummary& s) {
  std::ostringstream out;
  std::string labels;
  for (const double q : s.percentiles)
    labels += (labels.empty() ? "" : "/") + io::percentile_label(q);
  out << "Ensemble, storm " << e.storm_id
      << (e.scenario_id.empty() ? " (base)" : ", scenario " + e.scenario_id) << ": " << s.members
      << " members; percentiles " << labels << " over the members\n";
  out << cell("point", 22) << cell("peak discharge m3/s", 30) << cell("peak stage m", 30)
      << cell("time of peak h:mm", 24) << "outflow volume m3\n";
  for (const uncertainty::StationPercentiles& st : s.stations) {
    out << cell(st.id, 22) << cell(spread(st.values[index(PeakQuantity::discharge)], 3, false), 30)
        << cell(spread(st.values[index(PeakQuantity::stage)], 3, false), 30)
        << cell(spread(st.values[index(PeakQuantity::time)], 0, true), 24)
        << spread(st.values[index(PeakQuantity::volume)], 0, false) << "\n";
  }
  if (!s.exceedances.empty()) {
    out << "Thresholds (members whose peak is strictly above):\n";
    for (const uncertainty::ExceedanceResult& x : s.exceedances) {
      const bool q = x.threshold.quantity == PeakQuantity::discharge;
      out << "  " << x.threshold.name << ": " << x.threshold.station_id << " peak "
          << (q ? "discharge above " + number(x.threshold.value_si, 3) + " m3/s"
                : "stage above " + number(x.threshold.value_si, 3) + " m")
          << ": ";
      if (std::isnan(x.probability)) {
        out << "the station has no stage\n";
      } else {
        out << x.exceeded << " of " << x.members << " members, probability "
            << number(x.probability, 3) << " (standard error " << number(x.standard_error, 3)
            << ")\n";
      }
    }
  }
  (void)study;
  const auto sizes = uncertainty::convergence_sizes(s.members);
  out << "Convergence: the percentiles of the first ";
  for (std::size_t k = 0; k < sizes.size(); ++k) out << (k ? ", " : "") << sizes[k];
  out << " members are in the _convergence.csv file; a band that still moves between the last "
         "two sizes needs more members\n";
  return out.str();
}

int ensemble(const EnsembleArgs& a, const GlobalOptions& global) {
  if (global.result) global.result->basin = a.basin;  // also when loading fails
  const study::Study study = load_basin(a.basin);
  if (!a.scenario.empty()) (void)study.scenario(a.scenario);  // InputError if unknown
  study::check_ensemble_study(study);
  const std::vector<std::string> storms = storm_ids(study, a);
  for (const auto& id : storms) {
    if (study.storm(id).ends_after_run) throw InputError(*study.storm(id).ends_after_run);
  }
  const BatchOptions options = batch_options(a, global.quiet);
  const study::EnsembleOutputRequest request{options.out_dir,
                                             options.overwrite,
                                             global.command_line,
                                             std::string("freshet ") + FRESHET_VERSION};
  // Refused before anything is routed: another freshet writing there, or an existing result.
  study::RunRequest where;
  where.scenario_id = a.scenario;
  where.out_dir = options.out_dir;
  const io::OutputFolderLock::Handle lock = io::OutputFolderLock::acquire(study::run_folder(where));
  for (const auto& left : lock->removed_leftovers()) {
    std::cerr << "freshet: removed '" << left.string()
              << "', left by an earlier run that was killed before it finished\n";
  }
  for (const auto& id : storms) {
    for (const auto& path : study::planned_ensemble_files(options.out_dir, a.scenario, id)) {
      io::require_absent(path, options.overwrite);
    }
  }
  const study::EnsembleDefinition& def = *study.ensemble();
  std::cout << study.settings().title << "\n"
            << "basin file: " << a.basin << (a.scenario.empty() ? "" : ", scenario " + a.scenario)
            << ", " << storms.size() << " storm(s), " << def.members << " members each\n"
            << format_input_warnings(study);
  if (study.settings().automatic_wave_choice) {
    std::cout << "note: members are routed with the scheme each reach is given; wave_choice = "
                 "\"automatic\" is not applied to them, so their peaks may differ from those "
                 "of freshet route\n";
  }
  std::cout << "\n";
  const auto cancel = [] { return stop_requested(); };
  std::vector<std::filesystem::path> files;
  for (const auto& storm : storms) {
    Progress progress("freshet: routing " + std::to_string(def.members) + " members of " + storm,
                      options.quiet,
                      "of the members");
    const study::EnsembleOutcome e =
        study::run_ensemble(study,
                            {a.scenario, storm, static_cast<unsigned>(options.jobs)},
                            cancel,
                            [&progress](double f) { progress.update(f); });
    progress.finish();
    const study::EnsembleWritten w = study::write_ensemble_outputs(study, e, request, cancel);
    std::cout << format_ensemble_table(study, e, w.summary) << "\n";
    files.insert(files.end(), w.files.begin(), w.files.end());
    if (global.result) global.result->ensembles.push_back({w.summary, w.description});
  }
  if (global.result) {
    global.result->basin = a.basin;
    for (const Problem& w : study.warnings())
      global.result->input_warnings.push_back(w.to_string());
    for (const auto& f : files) global.result->files.push_back(f.string());
  }
  std::cout << "Outputs:\n";
  for (const auto& f : files) std::cout << "  " << f.string() << "\n";
  std::cout << "\nThe bands show the spread that the declared parameter ranges imply, not every "
               "uncertainty of the model.\n"
            << wrapped_caution();
  return kExitOk;
}

}  // namespace

void add_ensemble_command(CLI::App& app, const GlobalOptions& global, Action& action) {
  auto args = std::make_shared<EnsembleArgs>();
  auto* cmd = app.add_subcommand(
      "ensemble",
      "Route every member of the basin file's [uncertainty] section; write percentiles of the\n"
      "peaks, threshold exceedance probabilities and the convergence of the percentiles.\n"
      "Example: freshet ensemble basins/tansy-brook.toml --storm aep1-60min --out results");
  add_run_options(cmd, *args);
  cmd->add_option("--scenario", args->scenario, "Vary a scenario instead of the base network");
  cmd->callback(
      [&action, &global, args] { action = [&global, args] { return ensemble(*args, global); }; });
}

}  // namespace freshet::cli
