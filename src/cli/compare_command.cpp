// freshet compare: route the base network and its scenarios under the same storms and print,
// for each point of interest, the results side by side with their differences from the base.
#include <algorithm>
#include <iostream>
#include <sstream>

#include "batch.hpp"
#include "commands.hpp"
#include "freshet/io/comparison_writer.hpp"
#include "freshet/io/summary_writer.hpp"
#include "freshet/study/study_report.hpp"
#include "freshet/reporting/comparison.hpp"
#include "freshet_version.hpp"

namespace freshet::cli {

namespace {

struct CompareArgs : RunArgs {
  std::vector<std::string> scenarios;
  bool all_points = false;
};

std::string signed_number(double v, int digits) {
  if (!std::isfinite(v)) return "-";
  return (v >= 0.0 ? "+" : "") + number(v, digits);
}

// One storm: rows per point of interest, one line per scenario (base first).
std::string comparison_table(const std::vector<const study::RunOutcome*>& runs,
                             const std::vector<reporting::StationDescription>& stations,
                             bool all_points) {
  std::size_t w_point = 6, w_scenario = 9;
  for (const auto& s : stations) w_point = std::max(w_point, s.id.size() + 2);
  for (const auto* r : runs) w_scenario = std::max(w_scenario, r->scenario_id.size() + 2);
  std::ostringstream out;
  out << cell("point", w_point) << cell("scenario", w_scenario) << cell("peak Q m3/s", 12, true)
      << cell("vs base", 9, true) << cell("t peak", 8, true) << cell("peak stage m", 13, true)
      << cell("vs base", 9, true) << cell("volume m3", 12, true) << cell("overtopping", 13, true)
      << "\n";
  const study::RunOutcome& base = *runs.front();
  for (std::size_t i = 0; i < stations.size(); ++i) {
    if (!all_points && network::is_source(stations[i].kind)) {
      continue;
    }
    for (std::size_t k = 0; k < runs.size(); ++k) {
      const reporting::StationPeak& p = runs[k]->peaks[i];
      const reporting::StationPeak& b = base.peaks[i];
      out << cell(k == 0 ? stations[i].id : "", w_point)
          << cell(runs[k]->scenario_id.empty() ? "base" : runs[k]->scenario_id, w_scenario)
          << cell(number(p.peak_discharge_m3s, 3), 12, true)
          << cell(k == 0 ? "" : signed_number(p.peak_discharge_m3s - b.peak_discharge_m3s, 3), 9,
                  true)
          << cell(clock_hm(p.peak_time_s), 8, true) << cell(number(p.peak_stage_m, 2), 13, true)
          << cell(k == 0                                            ? ""
                  : p.stage_is_elevation == b.stage_is_elevation ? signed_number(p.peak_stage_m - b.peak_stage_m, 2)
                                                                 : "datum",
                  9, true)
          << cell(number(p.volume_m3, 0), 12, true)
          << cell(p.overtopping.empty() ? "" : p.overtopping, 13, true) << "\n";
    }
  }
  return out.str();
}

// Every run's warnings, by run (storm, then base and scenarios) and within a run by element,
// as `freshet route` prints them: the tables above show none of them, and a backwater warning
// means a stage difference upstream of a pond is not computed.
std::string warnings_by_run(const std::vector<study::RunOutcome>& runs) {
  std::string out = "\nWarnings of each run (the tables above do not show them):\n";
  bool any = false;
  for (const study::RunOutcome& r : runs) {
    const std::string lines = io::format_warning_lines(r.summary);
    if (lines.empty()) continue;
    out += (r.scenario_id.empty() ? std::string("base") : r.scenario_id) + ", storm " +
           r.storm_id + ":\n" + lines;
    any = true;
  }
  return any ? out : out + "  none in any run\n";
}

int compare(const CompareArgs& a, const GlobalOptions& global) {
  if (global.result) global.result->basin = a.basin;  // also when loading fails
  const study::Study study = load_basin(a.basin);
  const std::vector<std::string> storms = storm_ids(study, a);
  std::vector<std::string> scenarios{""};
  if (a.scenarios.empty()) {
    for (const auto& s : study.scenarios()) scenarios.push_back(s.id);
  } else {
    for (const auto& id : a.scenarios) (void)study.scenario(id);  // InputError if unknown
    scenarios.insert(scenarios.end(), a.scenarios.begin(), a.scenarios.end());
  }
  const BatchOptions options = batch_options(a, global.quiet);
  std::vector<study::RunRequest> requests;
  for (const auto& storm : storms) {
    for (const auto& scenario : scenarios) {
      requests.push_back({scenario, storm, options.out_dir, options.overwrite,
                          global.command_line,
                          std::string("freshet ") + FRESHET_VERSION, {}, 0.0, {}, 1, {}, {}});
    }
  }
  if (scenarios.size() == 1) {
    std::cerr << "freshet compare: note: the basin file defines no [[scenario]]; showing the base\n";
  }
  const std::string warnings = format_input_warnings(study);
  if (!warnings.empty()) std::cout << warnings << "\n";
  const study::ReportRequest report{study::report_path(options.out_dir, "", false), "compare",
                                    global.command_line, std::string("freshet ") + FRESHET_VERSION,
                                    options.overwrite};
  io::require_absent(report.path, report.overwrite);  // refused before anything is routed
  // The difference table's files: a clash stops the command before anything is routed.
  const io::ComparisonFiles files = io::comparison_files(options.out_dir);
  const io::Overwrite overwrite = options.overwrite;
  for (const auto& path : {files.csv, files.csv_metadata, files.json}) {
    io::require_absent(path, overwrite);
  }
  const std::vector<study::RunOutcome> runs = run_batch(study, requests, options);
  study::write_study_report(study, runs, report);
  std::cout << study.settings().title << "\nComparison of the base network";
  for (std::size_t k = 1; k < scenarios.size(); ++k) std::cout << (k == 1 ? " with " : ", ") << scenarios[k];
  std::cout << "\n";
  for (std::size_t k = 1; k < scenarios.size(); ++k) {
    std::cout << "  " << scenarios[k] << ": " << study.scenario(scenarios[k]).description << "\n";
  }
  std::vector<reporting::ComparisonRow> rows;
  for (std::size_t j = 0; j < storms.size(); ++j) {
    std::vector<const study::RunOutcome*> group;
    std::vector<reporting::ScenarioPeaks> peaks;
    for (std::size_t k = 0; k < scenarios.size(); ++k) {
      group.push_back(&runs[j * scenarios.size() + k]);
      peaks.push_back({group.back()->scenario_id, &group.back()->peaks});
    }
    std::cout << "\nStorm " << storms[j] << " (t peak in h:min from the study start)\n"
              << comparison_table(group, study.stations(), a.all_points);
    const auto storm_rows = reporting::compare_scenarios(storms[j], peaks);
    rows.insert(rows.end(), storm_rows.begin(), storm_rows.end());
  }
  io::write_comparison(files, rows,
                       {study.settings().title, std::string("freshet ") + FRESHET_VERSION,
                        study.settings().start_iso},
                       overwrite);
  if (global.result) {
    record_runs(*global.result, study, a.basin, runs, {report.path, files.csv, files.json});
  }
  std::cout << warnings_by_run(runs);
  std::cout << "\nEach run's full results: " << options.out_dir.string()
            << "/<base or scenario>/<storm>.nc and <storm>_summary.*\n"
            << "The study report (open it in a browser): " << report.path.string() << "\n"
            << "Difference table (every point, storm and scenario): " << files.csv.string()
            << " and " << files.json.filename().string() << "\n\n"
            << wrapped_caution();
  return kExitOk;
}

}  // namespace

void add_compare_command(CLI::App& app, const GlobalOptions& global, Action& action) {
  auto args = std::make_shared<CompareArgs>();
  auto* cmd = app.add_subcommand(
      "compare",
      "Route the base network and its scenarios under the same storms; print them side by side.\n"
      "Example: freshet compare basins/tansy-brook.toml --storm aep1-60min");
  add_run_options(cmd, *args);
  cmd->add_option("--scenario", args->scenarios, "Scenario id (repeatable; default: all)");
  cmd->add_flag("--all-points", args->all_points, "Also list subcatchments and inflows");
  cmd->callback([&action, &global, args] { action = [&global, args] { return compare(*args, global); }; });
}

}  // namespace freshet::cli
