// Placeholder registration while the subcommand is being written (replaced in this session).
#include <iostream>

#include "commands.hpp"

namespace freshet::cli {

void add_verify_command(CLI::App& app, const GlobalOptions& /*global*/, Action& action) {
  auto* cmd = app.add_subcommand("verify", "(in preparation)");
  cmd->callback([&action] {
    action = [] {
      std::cerr << "freshet verify: not available in this build\n";
      return kExitUsage;
    };
  });
}

}  // namespace freshet::cli
