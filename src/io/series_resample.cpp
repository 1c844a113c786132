#include "freshet/io/series_resample.hpp"

#include <algorithm>
#include <cmath>
#include <vector>

#include "freshet/core/error.hpp"

namespace freshet::io {

namespace {

std::vector<double> node_times(double t_start_s, double dt_s, std::size_t n) {
  std::vector<double> t(n + 1);
  for (std::size_t k = 0; k <= n; ++k) t[k] = t_start_s + static_cast<double>(k) * dt_s;
  return t;
}

// Exact interval volumes: p_0 = q(t_0), p_{k+1} = 2 V_k / dt - p_k is one solution; the others
// add the alternating mode (-1)^k c. c is the least-squares fit to the point values q(t_k),
//   minimise sum_k (p_k + (-1)^k c - q_k)^2  =>  c = -mean_k((-1)^k (p_k - q_k)),
// clamped to the range that keeps every value non-negative: c >= -p_k (k even), c <= p_k (k odd).
// Returns an empty vector when that range is empty.
std::vector<double> interval_volume_values(const PiecewiseLinearSeries& s,
                                           const std::vector<double>& t) {
  const std::size_t n = t.size() - 1;
  std::vector<double> q(n + 1);
  std::vector<double> p(n + 1);
  for (std::size_t k = 0; k <= n; ++k) q[k] = s.value_at(t[k]);
  p[0] = q[0];
  double largest = std::abs(q[0]);
  for (std::size_t k = 0; k < n; ++k) {
    p[k + 1] = 2.0 * s.integral(t[k], t[k + 1]) / (t[k + 1] - t[k]) - p[k];
    largest = std::max(largest, std::abs(p[k + 1]));
  }
  double sum = 0.0;
  double c_min = -INFINITY, c_max = INFINITY;
  for (std::size_t k = 0; k <= n; ++k) {
    const bool even = k % 2 == 0;
    sum += (even ? 1.0 : -1.0) * (p[k] - q[k]);
    if (even) c_min = std::max(c_min, -p[k]);
    else c_max = std::min(c_max, p[k]);
  }
  if (c_min > c_max + 1e-12 * largest) return {};  // tolerance: round-off of the recursion
  const double c = std::clamp(-sum / static_cast<double>(n + 1), c_min, std::max(c_min, c_max));
  for (std::size_t k = 0; k <= n; ++k) p[k] = std::max(0.0, p[k] + (k % 2 == 0 ? c : -c));
  return p;
}

std::vector<double> scaled_sample_values(const PiecewiseLinearSeries& s,
                                         const std::vector<double>& t) {
  const std::size_t n = t.size() - 1;
  std::vector<double> q(n + 1);
  double trapezoid = 0.0;
  for (std::size_t k = 0; k <= n; ++k) q[k] = s.value_at(t[k]);
  for (std::size_t k = 0; k < n; ++k) trapezoid += 0.5 * (q[k] + q[k + 1]) * (t[k + 1] - t[k]);
  const double volume = s.integral(t.front(), t.back());
  if (trapezoid == 0.0) {
    if (volume != 0.0) {
      throw InputError(Problem{"", 0, 0, "resampled series", "dt_s",
                               "every sample is zero but the volume is not; choose a shorter "
                               "interval"});
    }
    return q;
  }
  const double scale = volume / trapezoid;
  for (double& v : q) v *= scale;
  return q;
}

}  // namespace

PiecewiseLinearSeries resample_preserving_volume(const PiecewiseLinearSeries& series,
                                                 double t_start_s, double dt_s,
                                                 std::size_t n_intervals, ResampleMethod method) {
  FRESHET_ASSERT(dt_s > 0.0 && n_intervals >= 1 && !series.empty(),
                 "resample needs dt > 0, at least one interval and a non-empty series");
  const std::vector<double> t = node_times(t_start_s, dt_s, n_intervals);
  std::vector<double> values = method == ResampleMethod::interval_volumes
                                   ? interval_volume_values(series, t)
                                   : scaled_sample_values(series, t);
  if (values.empty()) {
    throw InputError(Problem{"", 0, 0, "resampled series", "dt_s",
                             "= " + format_value(dt_s) + ": keeping every interval's volume would "
                             "need negative values (a feature shorter than the interval); choose "
                             "a shorter interval or the scaled-samples method"});
  }
  return PiecewiseLinearSeries(t, std::move(values), "resampled series");
}

}  // namespace freshet::io
