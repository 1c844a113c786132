// Runs a batch of (scenario, storm) pairs of one study on a small pool of threads, with one
// progress line for the whole batch, and formats the tables the route and compare commands
// print.
#pragma once

#include "freshet/io/command_result.hpp"

#include <CLI/CLI.hpp>
#include <string>
#include <vector>

#include "freshet/study/study.hpp"
#include "freshet/study/study_run.hpp"

namespace freshet::cli {

struct BatchOptions {
  std::filesystem::path out_dir;
  io::Overwrite overwrite = io::Overwrite::no;
  std::string history;  // the command line
  int jobs = 2;         // threads
  bool quiet = false;
};

// The options route and compare share.
struct RunArgs {
  std::string basin;
  std::vector<std::string> storms;  // empty: every storm of the study
  std::string out_dir;              // empty: out/<basin file stem>
  bool overwrite = false;
  int jobs = 2;
};

// Reads the basin file named on the command line. One that does not exist or is a folder is
// bad input (InputError, exit 2) like any input file that cannot be opened, e.g.
// "nosuch.toml: cannot open the basin file: it does not exist"; study::Study::load reports every
// other problem of the file.
study::Study load_basin(const std::string& basin);

// Registers basin, --storm, --out, --overwrite and --jobs on `cmd`.
void add_run_options(CLI::App* cmd, RunArgs& args);
BatchOptions batch_options(const RunArgs& args, bool quiet);
// The storms to run, each checked to exist (InputError names an unknown one).
std::vector<std::string> storm_ids(const study::Study& study, const RunArgs& args);
// The items without repeats, in their first order (a storm or station named twice on the
// command line is run or exported once).
std::vector<std::string> unique_in_order(const std::vector<std::string>& items);

// Runs every request; results come back in request order. Every output folder is locked for
// the whole batch (io::OutputFolderLock). The first failure (by request order) is rethrown
// after all threads have stopped; outputs of completed runs stay. SIGINT/SIGTERM
// (stop_signals.hpp) stop the runs under way and those not yet started (study::RunInterrupted).
std::vector<study::RunOutcome> run_batch(const study::Study& study,
                                      const std::vector<study::RunRequest>& requests,
                                      const BatchOptions& options);

// "1:05" for 3900 s (hours:minutes), "-" for NaN.
std::string clock_hm(double seconds);
// Fixed-point with `digits` decimals, "-" for NaN.
std::string number(double value, int digits);
// Pads or cuts to `width` (left-aligned text, right-aligned numbers).
std::string cell(const std::string& text, std::size_t width, bool right = false);

// The storms giving the highest peak discharge at each station: one row per station with
// the peak for every storm and the critical one.
std::string format_critical_storms(const std::vector<study::RunOutcome>& runs,
                                   const std::vector<reporting::StationDescription>& stations);

// Element reports (culvert crossings, detention basins, shocks, capacity) of one run.
std::string format_notes(const study::RunOutcome& run);

// The basin file's plausibility warnings (study::Study::warnings), one "warning: ..." line each
// after `indent`; empty when there are none.
std::string format_input_warnings(const study::Study& study, std::string_view indent = "");

// For --format json (io::CommandResult): the basin, its plausibility warnings, every run's
// summary and files, and `extra_files` (the study report, a comparison table).
void record_runs(io::CommandResult& result, const study::Study& study, const std::string& basin,
                 const std::vector<study::RunOutcome>& runs,
                 const std::vector<std::filesystem::path>& extra_files);

// The caution, wrapped for a terminal.
std::string wrapped_caution();

}  // namespace freshet::cli
