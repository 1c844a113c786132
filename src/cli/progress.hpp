// Progress on stderr for runs that take more than about a second: percentage of simulated
// time, elapsed and remaining wall time. Redrawn in place on a terminal, plain lines
// otherwise (at most every 10 %), nothing with --quiet. No colour is used, so NO_COLOR needs
// no special handling beyond never emitting escape codes.
#pragma once

#include <chrono>
#include <cstdio>
#include <mutex>
#include <string>

namespace freshet::cli {

class Progress {
 public:
  // `measure`: what the percentage counts, in the plain lines ("of simulated time").
  Progress(std::string label, bool quiet, std::string measure = "of simulated time");
  ~Progress();
  Progress(const Progress&) = delete;
  Progress& operator=(const Progress&) = delete;

  // fraction in [0, 1]; thread-safe.
  void update(double fraction);
  void finish();

 private:
  using Clock = std::chrono::steady_clock;
  std::string label_;
  std::string measure_;
  bool quiet_;
  bool terminal_;
  bool shown_ = false;
  int last_decile_ = -1;
  Clock::time_point start_;
  Clock::time_point last_draw_;
  std::mutex mutex_;
};

}  // namespace freshet::cli
