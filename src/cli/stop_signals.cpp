#include "stop_signals.hpp"

#include <signal.h>

#include <atomic>

namespace freshet::cli {

namespace {

std::atomic<int> g_stop_signal{0};
// A lock-free atomic is safe to use in a signal handler (C++20 [support.signal]).
static_assert(std::atomic<int>::is_always_lock_free);

extern "C" void on_stop_signal(int signal) {
  int none = 0;
  if (!g_stop_signal.compare_exchange_strong(none, signal)) {
    // Asked twice: stop now, by the default action of the signal.
    ::signal(signal, SIG_DFL);
    ::raise(signal);
  }
}

}  // namespace

void install_stop_handlers() {
  struct sigaction action {};
  action.sa_handler = on_stop_signal;
  sigemptyset(&action.sa_mask);
  action.sa_flags = SA_RESTART;
  for (const int signal : {SIGINT, SIGTERM}) {
    // A signal ignored by whoever started freshet (a shell's background job ignores SIGINT)
    // stays ignored, as is the convention for command-line programs.
    struct sigaction inherited {};
    if (::sigaction(signal, nullptr, &inherited) == 0 && inherited.sa_handler == SIG_IGN) continue;
    ::sigaction(signal, &action, nullptr);
  }
  ::signal(SIGXFSZ, SIG_IGN);
}

int stop_signal() noexcept { return g_stop_signal.load(); }

const char* signal_name(int signal) noexcept {
  switch (signal) {
    case SIGINT: return "SIGINT";
    case SIGTERM: return "SIGTERM";
    default: return "a signal";
  }
}

}  // namespace freshet::cli
