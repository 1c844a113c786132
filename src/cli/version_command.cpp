#include <iostream>

#include "commands.hpp"
#include "freshet/core/caution.hpp"
#include "freshet_version.hpp"

namespace freshet::cli {

std::string version_text() {
  return std::string("freshet ") + FRESHET_VERSION + "\nbuild: " + FRESHET_BUILD_TYPE + ", " +
         FRESHET_COMPILER + ", C++20, CPU only\n\n" + std::string(kCautionText);
}

void add_version_command(CLI::App& app, const GlobalOptions& /*global*/, Action& action) {
  auto* cmd = app.add_subcommand("version", "Print version and build information (also\n"
                                            "freshet --version or -V)\n"
                                            "Example: freshet version");
  cmd->callback([&action] {
    action = [] {
      std::cout << version_text() << "\n";
      return kExitOk;
    };
  });
}

}  // namespace freshet::cli
