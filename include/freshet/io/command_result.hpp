// What a `freshet route`, `compare` or `check` command did, as one JSON document for scripts
// (`freshet --format json ...`): the peaks of every station in every run, the warnings, the
// caution, the files written and the exit status. Field list in docs/outputs.md.
//
//   io::CommandResult r;  r.command = "route";  r.basin = "basins/tansy-brook.toml";
//   r.runs.push_back({"", "aep1-60min", summary});
//   std::cout << io::format_command_json(r);
#pragma once

#include <string>
#include <utility>
#include <vector>

#include "freshet/io/ensemble_writer.hpp"
#include "freshet/reporting/summary.hpp"

namespace freshet::io {

struct CommandRun {
  std::string scenario;  // "" = the base network
  std::string storm;
  reporting::RunSummary summary;
};

// `ensemble`: one storm's summary of the members (the content of its <storm>_ensemble.json).
struct CommandEnsemble {
  uncertainty::EnsembleSummary summary;
  EnsembleDescription description;
};

struct CommandResult {
  std::string command;  // "route", "compare", "check" or "ensemble"
  std::string basin;    // the basin file as given
  int exit_status = 0;
  std::string error;    // the failure's message when exit_status != 0
  std::vector<std::string> input_warnings;  // values outside their plausible ranges
  std::vector<CommandRun> runs;
  std::vector<CommandEnsemble> ensembles;
  std::vector<std::string> files;  // written and renamed into place
  // `check`: what the file holds, e.g. {"title", ...}, {"units", "si"}.
  std::vector<std::pair<std::string, std::string>> facts;
  std::vector<std::string> storms;
  std::vector<std::string> scenarios;
};

// One JSON document (NaN as null), ending with a line break.
std::string format_command_json(const CommandResult& result);

}  // namespace freshet::io
