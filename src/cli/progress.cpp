#include "progress.hpp"

#include <cstdlib>
#include <cstring>
#include <unistd.h>

namespace freshet::cli {

namespace {
bool stderr_is_terminal() {
  const char* term = std::getenv("TERM");
  return isatty(STDERR_FILENO) == 1 && !(term && std::strcmp(term, "dumb") == 0);
}

std::string clock_text(double seconds) {
  const long s = static_cast<long>(seconds + 0.5);
  char buf[32];
  std::snprintf(buf, sizeof buf, "%ld:%02ld", s / 60, s % 60);
  return buf;
}
}  // namespace

Progress::Progress(std::string label, bool quiet, std::string measure)
    : label_(std::move(label)),
      measure_(std::move(measure)),
      quiet_(quiet),
      terminal_(stderr_is_terminal()),
      start_(Clock::now()),
      last_draw_(start_) {}

Progress::~Progress() { finish(); }

void Progress::update(double fraction) {
  if (quiet_) return;
  std::lock_guard lock(mutex_);
  const auto now = Clock::now();
  const double elapsed_s = std::chrono::duration<double>(now - start_).count();
  if (elapsed_s < 1.0) return;  // short runs stay silent
  const double remaining_s = fraction > 0.0 ? elapsed_s * (1.0 - fraction) / fraction : 0.0;
  const int percent = static_cast<int>(100.0 * fraction);
  if (terminal_) {
    if (std::chrono::duration<double>(now - last_draw_).count() < 0.1 && fraction < 1.0) return;
    std::fprintf(stderr, "\r%s: %3d%%  elapsed %s  remaining %s ", label_.c_str(), percent,
                 clock_text(elapsed_s).c_str(), clock_text(remaining_s).c_str());
    last_draw_ = now;
  } else {
    if (percent / 10 <= last_decile_) return;
    last_decile_ = percent / 10;
    std::fprintf(stderr, "%s: %d%% %s, elapsed %s, remaining %s\n", label_.c_str(), percent,
                 measure_.c_str(), clock_text(elapsed_s).c_str(),
                 clock_text(remaining_s).c_str());
  }
  shown_ = true;
}

void Progress::finish() {
  std::lock_guard lock(mutex_);
  if (shown_ && terminal_) std::fprintf(stderr, "\n");
  shown_ = false;
}

}  // namespace freshet::cli
