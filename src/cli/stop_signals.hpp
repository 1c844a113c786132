// SIGINT and SIGTERM ask a running command to stop cleanly. The handler only records the
// signal (an async-signal-safe store to a lock-free atomic); the runs poll stop_requested()
// through study::CancelFn at every coupling step, unwind, and remove their temporary files on the
// way out; main() then exits with 128 + the signal number (130 for SIGINT, 143 for SIGTERM).
// A second SIGINT or SIGTERM ends the process at once with the default action; what it leaves
// is recognisable by name and removed by the next run in that folder (docs/outputs.md). A
// signal that was ignored when freshet started (a shell's background job ignores SIGINT)
// stays ignored.
//
// SIGXFSZ is ignored, so that a write beyond a file-size limit (ulimit -f) fails with EFBIG
// and is reported and cleaned up like any other write failure instead of killing the process.
//
//   install_stop_handlers();                 // first thing in main()
//   study::run_study(study, request, {}, [] { return stop_requested(); });
//   if (const int sig = stop_signal()) return 128 + sig;
#pragma once

namespace freshet::cli {

void install_stop_handlers();
// The first stop signal received (SIGINT or SIGTERM), 0 while none.
[[nodiscard]] int stop_signal() noexcept;
[[nodiscard]] inline bool stop_requested() noexcept { return stop_signal() != 0; }
// "SIGINT", "SIGTERM".
[[nodiscard]] const char* signal_name(int signal) noexcept;

}  // namespace freshet::cli
