// freshet command-line entry point.
#include <CLI/CLI.hpp>
#include <iostream>

#include "freshet/core/caution.hpp"
#include "freshet_version.hpp"

int main(int argc, char** argv) {
  CLI::App app{"freshet: kinematic-wave flood routing for drainage and stormwater studies"};
  app.require_subcommand(1);
  auto* version = app.add_subcommand("version", "Print version and build information");
  CLI11_PARSE(app, argc, argv);
  if (*version) {
    std::cout << "freshet " << FRESHET_VERSION << " (" << FRESHET_BUILD_TYPE << ", "
              << FRESHET_COMPILER << ")\n\n"
              << freshet::kCautionText << "\n";
  }
  return 0;
}
