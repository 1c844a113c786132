#include <iostream>

#include "commands.hpp"
#include "freshet/core/caution.hpp"
#include "freshet_version.hpp"

namespace freshet::cli {

void add_version_command(CLI::App& app, const GlobalOptions& /*global*/, Action& action) {
  auto* cmd = app.add_subcommand("version", "Print version and build information\n"
                                            "Example: freshet version");
  cmd->callback([&action] {
    action = [] {
      std::cout << "freshet " << FRESHET_VERSION << "\n"
                << "build: " << FRESHET_BUILD_TYPE << ", " << FRESHET_COMPILER
                << ", C++20, CPU only\n\n"
                << kCautionText << "\n";
      return kExitOk;
    };
  });
}

}  // namespace freshet::cli
