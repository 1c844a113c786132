// freshet route: route a basin for one or more design storms and write the results.
#include <algorithm>
#include <cstdio>
#include <iostream>

#include "batch.hpp"
#include "commands.hpp"
#include "freshet/io/summary_writer.hpp"
#include "freshet/study/study_report.hpp"
#include "freshet_version.hpp"

namespace freshet::cli {

namespace {

struct RouteArgs : RunArgs {
  std::string scenario;
  std::vector<std::string> exports;
  double export_interval_min = 0.0;
  std::vector<std::string> profiles;
  std::vector<double> save_state_at_h;
  std::string resume_from;
};

int route(const RouteArgs& a, const GlobalOptions& global) {
  if (global.result) global.result->basin = a.basin;  // also when loading fails
  const study::Study study = load_basin(a.basin);
  if (!a.scenario.empty()) (void)study.scenario(a.scenario);  // InputError if unknown
  const std::vector<std::string> storms = storm_ids(study, a);
  const BatchOptions options = batch_options(a, global.quiet);
  std::vector<study::RunRequest> requests;
  std::vector<double> save_state_at_s;
  for (double h : a.save_state_at_h) save_state_at_s.push_back(h * 3600.0);
  for (const auto& storm : storms) {
    // threads = 1 here: run_batch shares the --jobs threads among the runs.
    requests.push_back({a.scenario, storm, options.out_dir, options.overwrite, global.command_line,
                        std::string("freshet ") + FRESHET_VERSION, unique_in_order(a.exports),
                        a.export_interval_min * 60.0, unique_in_order(a.profiles), 1,
                        save_state_at_s, a.resume_from});
  }
  std::cout << study.settings().title << "\n"
            << "basin file: " << a.basin << (a.scenario.empty() ? "" : ", scenario " + a.scenario)
            << ", " << storms.size() << " storm(s)\n"
            << format_input_warnings(study) << "\n";
  const study::ReportRequest report{study::report_path(options.out_dir, a.scenario), "route",
                                    global.command_line, std::string("freshet ") + FRESHET_VERSION,
                                    options.overwrite};
  io::require_absent(report.path, report.overwrite);  // refused before anything is routed
  const std::vector<study::RunOutcome> runs = run_batch(study, requests, options);
  study::write_study_report(study, runs, report);
  if (global.result) record_runs(*global.result, study, a.basin, runs, {report.path});
  for (const auto& r : runs) {
    std::cout << io::format_summary_table(r.summary, false);
    const std::string notes = format_notes(r);
    if (!notes.empty()) std::cout << "Element reports:\n" << notes;
    std::cout << "Reach numerics:\n";
    for (const auto& [id, d] : r.reach_numerics) {
      std::cout << "  " << id << ": " << d.brief_report();
      if (d.shocks_found > 0) {
        const auto listed = std::count_if(r.summary.shocks.begin(), r.summary.shocks.end(),
                                          [&id](const reporting::ShockRecord& s) { return s.element == id; });
        std::cout << " (" << listed << " with a jump of at least a tenth of the reach's peak, "
                  << "listed under Shocks)";
      }
      std::cout << "\n";
    }
    // What the run's volume check measured (network::relative_imbalance): each element's
    // |in - out - losses - storage change| over max(water in, water out + losses, 1 m3),
    // and the limit above which the run stops (exit 3).
    const auto sci = [](double x) {
      char text[32];
      std::snprintf(text, sizeof text, "%.1e", x);
      return std::string(text);
    };
    const auto sci0 = [](double x) {
      char text[32];
      std::snprintf(text, sizeof text, "%.0e", x);
      return std::string(text);
    };
    const network::BalanceTolerance limit;
    std::cout << "Numerics: " << r.numerics.coupling_steps << " coupling steps, largest element "
              << "volume imbalance " << sci(r.numerics.worst_relative_imbalance)
              << " of max(water supplied, outflow + losses, " << number(limit.floor_m3, 0) << " m3)"
              << (r.numerics.worst_element.empty() ? "" : " at " + r.numerics.worst_element)
              << " (a run stops above " << sci0(limit.relative) << "), wall time "
              << number(r.numerics.wall_time_s, 2) << " s\n\n";
  }
  if (runs.size() > 1) std::cout << format_critical_storms(runs, study.stations(a.scenario)) << "\n";
  std::cout << "Outputs:\n";
  for (const auto& r : runs) {
    for (const auto& f : r.files) std::cout << "  " << f.string() << "\n";
  }
  std::cout << "  " << report.path.string() << "  (the study report: open it in a browser)\n";
  std::cout << "\n" << wrapped_caution();
  return kExitOk;
}

}  // namespace

void add_route_command(CLI::App& app, const GlobalOptions& global, Action& action) {
  auto args = std::make_shared<RouteArgs>();
  auto* cmd = app.add_subcommand(
      "route",
      "Route a basin for its design storms; write CF NetCDF series and summaries.\n"
      "Example: freshet route basins/tansy-brook.toml --storm aep1-60min --out results");
  add_run_options(cmd, *args);
  cmd->add_option("--scenario", args->scenario, "Route a scenario instead of the base network");
  cmd->add_option("--export", args->exports,
                  "Station whose hydrograph is written as CSV for downstream models (repeatable)");
  cmd->add_option("--export-interval-min", args->export_interval_min,
                  "Interval of exported hydrographs (default: the output interval)")
      ->check(CLI::PositiveNumber);
  cmd->add_option("--profile", args->profiles,
                  "Reach whose every cell is written to <storm>_profiles.nc (repeatable)");
  cmd->add_option("--save-state-at", args->save_state_at_h,
                  "Hours after the start at which the run saves its state to "
                  "<storm>_state_<seconds>s.h5 for a hot start (repeatable; the end of a "
                  "coupling step)")
      ->check(CLI::PositiveNumber);
  cmd->add_option("--resume-from", args->resume_from,
                  "Continue a run from a state file saved by --save-state-at (same basin file, "
                  "scenario and storm)")
      ->check(CLI::ExistingFile);
  cmd->callback([&action, &global, args] { action = [&global, args] { return route(*args, global); }; });
}

}  // namespace freshet::cli
