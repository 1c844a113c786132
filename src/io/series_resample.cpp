#include "freshet/io/series_resample.hpp"

#include <algorithm>
#include <cmath>
#include <vector>

#include "freshet/core/error.hpp"

namespace freshet::io {

namespace {

// Volume between two times: the series' integral, or differences of a cumulative volume.
class Volumes {
 public:
  Volumes(const PiecewiseLinearSeries& series, const PiecewiseLinearSeries* cumulative)
      : series_(series), cumulative_(cumulative) {}
  [[nodiscard]] double between(double a_s, double b_s) const {
    return cumulative_ ? cumulative_->value_at(b_s) - cumulative_->value_at(a_s)
                       : series_.integral(a_s, b_s);
  }

 private:
  const PiecewiseLinearSeries& series_;
  const PiecewiseLinearSeries* cumulative_;
};

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
std::vector<double> interval_volume_values(const PiecewiseLinearSeries& s, const Volumes& v,
                                           const std::vector<double>& t) {
  const std::size_t n = t.size() - 1;
  std::vector<double> q(n + 1);
  std::vector<double> p(n + 1);
  for (std::size_t k = 0; k <= n; ++k) q[k] = s.value_at(t[k]);
  p[0] = q[0];
  double largest = std::abs(q[0]);
  for (std::size_t k = 0; k < n; ++k) {
    p[k + 1] = 2.0 * v.between(t[k], t[k + 1]) / (t[k + 1] - t[k]) - p[k];
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

// Each node takes half of the volume its two intervals miss, per unit time; the end nodes take
// all of their one interval's. Sum over nodes of the trapezoid weights times the corrections
// is sum_k e_k, so the total volume is exact. Empty when a value would be negative.
std::vector<double> locally_corrected_values(const PiecewiseLinearSeries& s, const Volumes& v,
                                             const std::vector<double>& t) {
  const std::size_t n = t.size() - 1;
  std::vector<double> q(n + 1), missed(n);
  for (std::size_t k = 0; k <= n; ++k) q[k] = s.value_at(t[k]);
  for (std::size_t k = 0; k < n; ++k) {
    const double dt = t[k + 1] - t[k];
    missed[k] = v.between(t[k], t[k + 1]) - 0.5 * (q[k] + q[k + 1]) * dt;
  }
  std::vector<double> out(n + 1);
  double largest = 0.0;
  for (std::size_t k = 0; k <= n; ++k) {
    const double left = k > 0 ? missed[k - 1] / (t[k] - t[k - 1]) : 0.0;
    const double right = k < n ? missed[k] / (t[k + 1] - t[k]) : 0.0;
    const double weight = (k == 0 || k == n) ? 1.0 : 0.5;
    out[k] = q[k] + weight * (left + right);
    largest = std::max(largest, std::abs(q[k]));
  }
  for (double& value : out) {
    if (value < -1e-12 * largest) return {};
    value = std::max(value, 0.0);
  }
  return out;
}

std::vector<double> scaled_sample_values(const PiecewiseLinearSeries& s, const Volumes& v,
                                         const std::vector<double>& t) {
  const std::size_t n = t.size() - 1;
  std::vector<double> q(n + 1);
  double trapezoid = 0.0;
  for (std::size_t k = 0; k <= n; ++k) q[k] = s.value_at(t[k]);
  for (std::size_t k = 0; k < n; ++k) trapezoid += 0.5 * (q[k] + q[k + 1]) * (t[k + 1] - t[k]);
  const double volume = v.between(t.front(), t.back());
  if (trapezoid == 0.0) {
    if (volume != 0.0) {
      throw InputError(Problem{"", 0, 0, "resampled series", "dt_s",
                               "every sample is zero but the volume is not; choose a shorter "
                               "interval"});
    }
    return q;
  }
  const double scale = volume / trapezoid;
  for (double& value : q) value *= scale;
  return q;
}

}  // namespace

PiecewiseLinearSeries resample_preserving_volume(
    const PiecewiseLinearSeries& series, double t_start_s, double dt_s, std::size_t n_intervals,
    ResampleMethod method, const PiecewiseLinearSeries* cumulative_volume) {
  FRESHET_ASSERT(dt_s > 0.0 && n_intervals >= 1 && !series.empty(),
                 "resample needs dt > 0, at least one interval and a non-empty series");
  const std::vector<double> t = node_times(t_start_s, dt_s, n_intervals);
  const Volumes v(series, cumulative_volume);
  std::vector<double> values;
  switch (method) {
    case ResampleMethod::interval_volumes: values = interval_volume_values(series, v, t); break;
    case ResampleMethod::local_correction: values = locally_corrected_values(series, v, t); break;
    case ResampleMethod::scaled_samples: values = scaled_sample_values(series, v, t); break;
  }
  if (values.empty()) {
    throw InputError(Problem{"", 0, 0, "resampled series", "dt_s",
                             "= " + format_value(dt_s) + ": keeping the volume this way would "
                             "need negative values (a feature shorter than the interval); choose "
                             "a shorter interval or the scaled-samples method"});
  }
  return PiecewiseLinearSeries(t, std::move(values), "resampled series");
}

}  // namespace freshet::io
