// freshet command-line entry point: parses the command line, runs the chosen subcommand and
// maps failures to the documented exit codes.
#include <cstdlib>
#include <iostream>
#include <sstream>

#include "commands.hpp"
#include "stop_signals.hpp"

namespace {

using namespace freshet::cli;

// CLI11 answers a word that names no subcommand with "A subcommand is required"; this names
// the word and lists the subcommands instead. Returns false when the failure is another one.
bool report_unknown_subcommand(const CLI::App& app, int argc, char** argv) {
  if (!app.get_subcommands().empty()) return false;  // a subcommand was recognised
  for (int k = 1; k < argc; ++k) {
    const std::string word = argv[k];
    if (word.empty() || word.front() == '-') continue;
    std::string names;
    for (const CLI::App* sub : app.get_subcommands([](const CLI::App*) { return true; })) {
      names += (names.empty() ? "" : ", ") + sub->get_name();
    }
    std::cerr << "freshet: unknown subcommand '" << word << "'; the subcommands are " << names
              << " (freshet --help describes them)\n";
    return true;
  }
  return false;
}

// Runs the selected action; maps any exception to an exit code and prints its message (also
// kept in `message`).
int run_action(const Action& action, bool& library_state_unknown, std::string& message) {
  try {
    return action ? action() : kExitOk;
  } catch (...) {
    std::ostringstream text;
    const int code = report_failure(std::current_exception(), text, library_state_unknown);
    message = text.str();
    std::cerr << message;
    return code;
  }
}

// With --format json, stdout holds one JSON document: the command's text goes nowhere while
// it runs, and the result is printed at the end, whatever the exit status.
class JsonStdout {
 public:
  explicit JsonStdout(std::shared_ptr<freshet::io::CommandResult> result)
      : result_(std::move(result)) {
    if (result_) saved_ = std::cout.rdbuf(sink_.rdbuf());
  }
  ~JsonStdout() { restore(); }
  JsonStdout(const JsonStdout&) = delete;
  JsonStdout& operator=(const JsonStdout&) = delete;
  void finish(int code, const std::string& message) {
    restore();
    if (!result_) return;
    result_->exit_status = code;
    result_->error = message;
    while (!result_->error.empty() && result_->error.back() == '\n') result_->error.pop_back();
    std::cout << freshet::io::format_command_json(*result_);
  }

 private:
  void restore() {
    if (saved_) std::cout.rdbuf(saved_);
    saved_ = nullptr;
  }
  std::shared_ptr<freshet::io::CommandResult> result_;
  std::ostringstream sink_;
  std::streambuf* saved_ = nullptr;
};

int run_main(int argc, char** argv);

}  // namespace

// Everything main() does runs inside run_main; an exception that escapes it (one thrown while
// the command line is set up or parsed: std::bad_alloc, say) is reported and mapped like one
// thrown by a command, so nothing ends in std::terminate without a documented exit code.
int main(int argc, char** argv) {
  try {
    return run_main(argc, argv);
  } catch (...) {
    bool library_state_unknown = false;
    return report_failure(std::current_exception(), std::cerr, library_state_unknown);
  }
}

namespace {

int run_main(int argc, char** argv) {
  install_stop_handlers();
  CLI::App app{
      "freshet: kinematic-wave flood routing for drainage and stormwater studies.\n"
      "Exit codes: 0 success, 1 bad command line, 2 bad input file, 3 numerical failure,\n"
      "4 output could not be written, 5 verification case failed,\n"
      "70 internal error (a bug: please report it), 130 stopped by SIGINT (Ctrl-C),\n"
      "143 stopped by SIGTERM."};
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
  std::string format = "text";
  app.add_option("--format", format,
                 "stdout of route, compare, check and ensemble: text (default) or json (one JSON "
                 "document: peaks, warnings, caution, files written, exit status)")
      ->check(CLI::IsMember({"text", "json"}));
  app.set_version_flag("-V,--version", version_text,
                       "Print version and build information and exit (as freshet version)");
  Action action;
  add_route_command(app, global, action);
  add_check_command(app, global, action);
  add_compare_command(app, global, action);
  add_ensemble_command(app, global, action);
  add_storm_command(app, global, action);
  add_verify_command(app, global, action);
  add_layers_command(app, global, action);
  add_version_command(app, global, action);
  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    if (e.get_exit_code() != 0 && report_unknown_subcommand(app, argc, argv)) return kExitUsage;
    const int code = app.exit(e);
    return code == 0 ? kExitOk : kExitUsage;
  }
  const std::string command =
      app.get_subcommands().empty() ? std::string() : app.get_subcommands().front()->get_name();
  if (format == "json" && (command == "route" || command == "compare" || command == "check" ||
                           command == "ensemble")) {
    global.result = std::make_shared<freshet::io::CommandResult>();
    global.result->command = command;
  }
  JsonStdout json(global.result);
  bool library_state_unknown = false;
  std::string message;
  int code = run_action(action, library_state_unknown, message);
  const int signal = stop_signal();
  if (signal != 0) {
    message = std::string("freshet: stopped by ") + signal_name(signal) +
              "; runs that had not finished left no file (their temporary files were "
              "removed); runs that had finished kept their complete results\n";
    std::cerr << message;
    code = 128 + signal;
  }
  json.finish(code, message);
  if (library_state_unknown || signal != 0) {
    // After a failed write HDF5 may still hold the file it could not close, and its exit
    // handler then crashes (seen with a file-size limit). The temporary files were already
    // removed during unwinding, so leave without running the library's exit handlers.
    std::cout.flush();
    std::cerr.flush();
    std::_Exit(code);
  }
  return code;
}

}  // namespace
