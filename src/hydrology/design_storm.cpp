#include "freshet/hydrology/design_storm.hpp"

#include <algorithm>
#include <cmath>
#include <functional>

namespace freshet::hydrology {
namespace {

// Block boundaries start, start + dt, ..., the last one exactly at start + T.
std::vector<double> block_boundaries(const DesignStormOptions& o) {
  const double blocks = o.duration_s / o.step_s;
  auto n = static_cast<std::size_t>(std::ceil(blocks * (1.0 - 1e-12)));
  n = std::max<std::size_t>(n, 1);
  std::vector<double> times(n + 1);
  for (std::size_t k = 0; k < n; ++k) times[k] = o.start_s + static_cast<double>(k) * o.step_s;
  times[n] = o.start_s + o.duration_s;
  return times;
}

std::size_t whole_block_count(const DesignStormOptions& o, const std::string& what) {
  ProblemList problems(what);
  o.validate(problems);
  problems.throw_if_any();
  const double blocks = o.duration_s / o.step_s;
  const double n = std::round(blocks);
  problems.require(std::abs(blocks - n) <= 1e-9 * n, "duration_s", o.duration_s,
                   "must be a whole number of step_s = " + format_value(o.step_s) +
                       " for the alternating block method");
  problems.throw_if_any();
  return static_cast<std::size_t>(n);
}

// Order in which blocks are filled: the peak block, then alternately right and left.
std::vector<std::size_t> alternating_order(std::size_t n, std::size_t peak) {
  std::vector<std::size_t> order{peak};
  std::size_t left = peak, right = peak;
  while (order.size() < n) {
    if (right + 1 < n) order.push_back(++right);
    if (order.size() < n && left > 0) order.push_back(--left);
  }
  return order;
}

}  // namespace

void DesignStormOptions::validate(ProblemList& problems) const {
  problems.require_finite("start_s", start_s);
  problems.require_positive("duration_s", duration_s);
  problems.require_positive("step_s", step_s);
  if (std::isfinite(peak_ratio)) {
    problems.require(peak_ratio >= 0.0 && peak_ratio <= 1.0, "peak_ratio", peak_ratio,
                     "must be in [0, 1]");
  } else {
    problems.require_finite("peak_ratio", peak_ratio);
  }
  if (duration_s > 0.0 && step_s > 0.0) {
    problems.require(duration_s >= step_s, "duration_s", duration_s,
                     "storm is shorter than one time step (step_s = " + format_value(step_s) +
                         ")");
  }
}

Hyetograph alternating_block_storm(const IdfCurve& idf, const DesignStormOptions& options,
                                   const std::string& what) {
  const std::size_t n = whole_block_count(options, what);
  std::vector<double> increments(n);
  for (std::size_t k = 0; k < n; ++k) {
    const double t0 = static_cast<double>(k) * options.step_s;
    increments[k] = idf.depth_m(t0 + options.step_s) - idf.depth_m(t0);
  }
  std::sort(increments.begin(), increments.end(), std::greater<>());
  const auto peak = std::min(n - 1, static_cast<std::size_t>(options.peak_ratio *
                                                             static_cast<double>(n)));
  const std::vector<std::size_t> order = alternating_order(n, peak);
  std::vector<double> depth(n);
  for (std::size_t rank = 0; rank < n; ++rank) depth[order[rank]] = increments[rank];
  std::vector<double> times(n + 1);
  for (std::size_t k = 0; k <= n; ++k) {
    times[k] = options.start_s + static_cast<double>(k) * options.step_s;
  }
  return Hyetograph::from_depths(std::move(times), std::move(depth), what);
}

double chicago_cumulative_depth_m(const IdfCurve& idf, double duration_s, double peak_ratio,
                                  double elapsed_s) {
  const double t = std::clamp(elapsed_s, 0.0, duration_s);
  const double r = peak_ratio;
  const double t_peak = r * duration_s;
  const double before_peak = r > 0.0 ? r * idf.depth_m(duration_s) : 0.0;  // = r P(t_p / r)
  if (t <= t_peak) {
    return r > 0.0 ? before_peak - r * idf.depth_m((t_peak - t) / r) : 0.0;
  }
  return before_peak + (1.0 - r) * idf.depth_m((t - t_peak) / (1.0 - r));
}

Hyetograph chicago_storm(const IdfCurve& idf, const DesignStormOptions& options,
                         const std::string& what) {
  ProblemList problems(what);
  options.validate(problems);
  problems.throw_if_any();
  std::vector<double> times = block_boundaries(options);
  std::vector<double> depth(times.size() - 1);
  double previous = 0.0;
  for (std::size_t k = 0; k < depth.size(); ++k) {
    const bool last = k + 1 == depth.size();
    const double elapsed_s = last ? options.duration_s : static_cast<double>(k + 1) * options.step_s;
    const double next =
        chicago_cumulative_depth_m(idf, options.duration_s, options.peak_ratio, elapsed_s);
    depth[k] = std::max(0.0, next - previous);
    previous = next;
  }
  return Hyetograph::from_depths(std::move(times), std::move(depth), what);
}

}  // namespace freshet::hydrology
