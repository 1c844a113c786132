// The subcommands of the `freshet` executable. Each add_*_command registers its subcommand
// (options, help with an example) on `app` and, when the user selects it, the action that
// runs it. main() runs the selected action and maps exceptions to the documented exit codes.
#pragma once

#include <CLI/CLI.hpp>
#include <functional>
#include <memory>
#include <string>

#include "exit_codes.hpp"
#include "freshet/io/command_result.hpp"

namespace freshet::cli {

struct GlobalOptions {
  bool quiet = false;  // no progress on stderr
  // The command line as typed (program name "freshet", arguments with spaces quoted), for
  // the NetCDF history attribute.
  std::string command_line;
  // --format json: route, compare and check fill this in; main() prints it as one JSON
  // document on stdout (io::format_command_json) instead of their text. Null for text.
  std::shared_ptr<io::CommandResult> result;
};

using Action = std::function<int()>;

// Rejects an empty path argument (`--out ''`), which would otherwise mean "the default".
inline const CLI::Validator kNonEmptyPath(
    [](std::string& value) {
      return value.empty() ? std::string("is empty: name a file or folder") : std::string();
    },
    "PATH", "non-empty path");

void add_route_command(CLI::App& app, const GlobalOptions& global, Action& action);
void add_check_command(CLI::App& app, const GlobalOptions& global, Action& action);
void add_ensemble_command(CLI::App& app, const GlobalOptions& global, Action& action);
void add_compare_command(CLI::App& app, const GlobalOptions& global, Action& action);
void add_storm_command(CLI::App& app, const GlobalOptions& global, Action& action);
void add_verify_command(CLI::App& app, const GlobalOptions& global, Action& action);
void add_layers_command(CLI::App& app, const GlobalOptions& global, Action& action);
void add_version_command(CLI::App& app, const GlobalOptions& global, Action& action);
// What `freshet version`, `freshet --version` and `freshet -V` print: version, build, caution
// (no trailing line break).
std::string version_text();

}  // namespace freshet::cli
