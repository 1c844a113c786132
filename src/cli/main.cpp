// freshet command-line entry point: parses the command line, runs the chosen subcommand and
// maps failures to the documented exit codes.
#include <cstdlib>
#include <iostream>

#include "commands.hpp"
#include "freshet/core/error.hpp"

int main(int argc, char** argv) {
  using namespace freshet::cli;
  CLI::App app{
      "freshet: kinematic-wave flood routing for drainage and stormwater studies.\n"
      "Exit codes: 0 success, 1 bad command line, 2 bad input file, 3 numerical failure,\n"
      "4 file could not be read or written, 5 verification case failed."};
  app.require_subcommand(1);
  app.fallthrough();  // global flags (--quiet) may also follow the subcommand
  GlobalOptions global;
  global.command_line = "freshet";
  for (int k = 1; k < argc; ++k) {
    const std::string arg = argv[k];
    if (!arg.empty() && arg.find_first_of(" \t'\"\\$") == std::string::npos) {
      global.command_line += " " + arg;
      continue;
    }
    std::string quoted = "'";  // shell single quotes; a ' inside becomes '\''
    for (char ch : arg) quoted += ch == '\'' ? std::string("'\\''") : std::string(1, ch);
    global.command_line += " " + quoted + "'";
  }
  app.add_flag("-q,--quiet", global.quiet, "No progress messages on stderr");
  Action action;
  add_route_command(app, global, action);
  add_check_command(app, global, action);
  add_compare_command(app, global, action);
  add_storm_command(app, global, action);
  add_verify_command(app, global, action);
  add_version_command(app, global, action);
  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    const int code = app.exit(e);
    return code == 0 ? kExitOk : kExitUsage;
  }
  try {
    return action ? action() : kExitOk;
  } catch (const freshet::InputError& e) {
    std::cerr << "freshet: the input has " << e.problems().size() << " problem(s):\n"
              << e.what() << "\n";
    return kExitBadInput;
  } catch (const freshet::NumericalError& e) {
    std::cerr << "freshet: numerical failure: " << e.what() << "\n";
    return kExitNumerical;
  } catch (const freshet::IoError& e) {
    std::cerr << "freshet: " << e.what() << "\n";
    // After a failed write HDF5 may still hold the file it could not close, and its exit
    // handler then crashes (seen with a file-size limit). The partial files were already
    // removed during unwinding, so leave without running the library's exit handlers.
    std::cout.flush();
    std::cerr.flush();
    std::_Exit(kExitIo);
  }
}
