// freshet check: read and check a basin file without running it; every problem at once.
#include <iostream>
#include <map>

#include "batch.hpp"
#include "commands.hpp"

namespace freshet::cli {

namespace {

// For --format json: what the file holds.
void record_check(io::CommandResult& result, const study::Study& study, const std::string& basin,
                  const std::map<std::string, int>& counts) {
  result.basin = basin;
  result.facts = {{"title", study.settings().title},
                  {"units", std::string(units::to_string(study.settings().units))}};
  for (const auto& [kind, n] : counts) result.facts.emplace_back(kind + " elements", std::to_string(n));
  for (const auto& s : study.storms()) {
    result.storms.push_back(s.id);
    if (s.ends_after_run) result.input_warnings.push_back(s.ends_after_run->to_string());
  }
  for (const Problem& w : study.warnings()) result.input_warnings.push_back(w.to_string());
  for (const auto& s : study.scenarios()) result.scenarios.push_back(s.id);
}

int check(const std::string& basin, const GlobalOptions& global) {
  if (global.result) global.result->basin = basin;  // also when loading fails
  const study::Study study = load_basin(basin);  // InputError lists every problem
  std::map<std::string, int> counts;
  for (const auto& s : study.stations()) ++counts[std::string(network::to_string(s.kind))];
  if (global.result) record_check(*global.result, study, basin, counts);
  std::cout << basin << ": no problems found.\n"
            << "  title: " << study.settings().title << "\n"
            << "  units: " << units::to_string(study.settings().units) << "\n  elements:";
  for (const auto& [kind, n] : counts) std::cout << " " << n << " " << kind;
  std::cout << "\n  storms:";
  const bool us = study.settings().units == units::System::us_customary;
  for (const auto& s : study.storms()) {
    const double depth = s.rain.total_depth_m() / (us ? units::kMetresPerInch : 1e-3);
    std::cout << " " << s.id << " (" << number(depth, us ? 2 : 1) << (us ? " in)" : " mm)");
  }
  for (const auto& s : study.storms()) {
    if (s.ends_after_run) {
      std::cout << "\n  warning: " << s.ends_after_run->to_string()
                << " (routing this storm is refused)";
    }
  }
  const std::string warnings = format_input_warnings(study, "  ");
  if (!warnings.empty()) std::cout << "\n" << warnings.substr(0, warnings.size() - 1);
  std::cout << "\n  scenarios:";
  if (study.scenarios().empty()) std::cout << " none";
  for (const auto& s : study.scenarios()) std::cout << " " << s.id;
  std::cout << "\n";
  return kExitOk;
}

}  // namespace

void add_check_command(CLI::App& app, const GlobalOptions& global, Action& action) {
  auto basin = std::make_shared<std::string>();
  auto* cmd = app.add_subcommand("check",
                                 "Check a basin file (and its scenarios) without running it.\n"
                                 "Example: freshet check basins/tansy-brook.toml");
  cmd->add_option("basin", *basin, "Basin file (TOML)")->required();
  cmd->callback([&action, &global, basin] { action = [&global, basin] { return check(*basin, global); }; });
}

}  // namespace freshet::cli
