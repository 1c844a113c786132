// The exit codes of the `freshet` executable and the one function that turns a failure into
// its code and message. Kept apart from main() so that the mapping can be tested with any
// exception (tests/cli/exit_codes_test.cpp), including ones the program never means to throw.
#pragma once

#include <exception>
#include <ostream>
#include <stdexcept>

namespace freshet::cli {

// Documented in README.md, docs/user-guide.md and `freshet --help`.
enum ExitCode : int {
  kExitOk = 0,
  kExitUsage = 1,           // bad command line (including options that conflict)
  kExitBadInput = 2,        // a basin, storm or hydrograph file has problems, or cannot be
                            // opened (does not exist, is a folder, cannot be read)
  kExitNumerical = 3,       // a numerical method failed
  kExitIo = 4,              // output could not be written (an existing result, a full disk,
                            // an output folder in use or not writable)
  kExitVerifyFailed = 5,    // `freshet verify`: a case missed its published value
  kExitInternal = 70,       // a failure the program does not expect: a bug (sysexits EX_SOFTWARE)
  // 128 + the signal number: stopped by SIGINT (130) or SIGTERM (143); stop_signals.hpp.
};

// The command line asks for something contradictory (for example two runs writing one file).
class UsageError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

// Prints the message for `failure` on `err` and returns its exit code. freshet's own errors
// map to 1-4; RunInterrupted to 0 (main() reports the signal); anything else (a standard
// exception or one of unknown type) is an internal error, 70, reported with a request to
// report it and the caution that unfinished runs wrote no result. Sets `library_state_unknown`
// when a library (HDF5) may hold a file it could not close, so main() must not run exit
// handlers.
int report_failure(const std::exception_ptr& failure, std::ostream& err,
                   bool& library_state_unknown);

}  // namespace freshet::cli
