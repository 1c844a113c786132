#include "freshet/reporting/series_resample.hpp"

#include <algorithm>
#include <cmath>
#include <vector>

#include "freshet/core/error.hpp"

namespace freshet::reporting {

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

// Largest value of the original over [a, b] (its breakpoints inside and both ends).
double local_max(const PiecewiseLinearSeries& s, double a_s, double b_s) {
  double m = std::max(s.value_at(a_s), s.value_at(b_s));
  const auto times = s.times_s();
  const auto values = s.values();
  auto it = std::upper_bound(times.begin(), times.end(), a_s);
  for (; it != times.end() && *it < b_s; ++it) {
    m = std::max(m, values[static_cast<std::size_t>(it - times.begin())]);
  }
  return m;
}

// Each interval's missed volume e_k goes to its two nodes in proportion to their values
// (half each when both are zero), and each node turns the volume it received into a
// discharge through its trapezoid weight. No value can go negative: a node receives at most
// -(its value x its trapezoid weight), because an interval's true volume is never negative
// (e_k >= -(q_k + q_k+1) dt / 2). A node may not rise above the original's largest value
// over its two intervals either (a sharp peak between nodes would otherwise be overstated):
// what such a cap holds back is handed to the nodes still below their caps, in proportion
// to their room. Empty when there is not room enough (or round-off leaves a value below 0).
std::vector<double> locally_corrected_values(const PiecewiseLinearSeries& s, const Volumes& v,
                                             const std::vector<double>& t) {
  const std::size_t n = t.size() - 1;
  std::vector<double> q(n + 1), received(n + 1, 0.0), weight(n + 1, 0.0), cap(n + 1);
  for (std::size_t k = 0; k <= n; ++k) {
    q[k] = s.value_at(t[k]);
    cap[k] = local_max(s, t[k > 0 ? k - 1 : 0], t[k < n ? k + 1 : n]);
  }
  double largest = 0.0;
  for (std::size_t k = 0; k < n; ++k) {
    const double dt = t[k + 1] - t[k];
    const double missed = v.between(t[k], t[k + 1]) - 0.5 * (q[k] + q[k + 1]) * dt;
    const double both = q[k] + q[k + 1];
    const double share = both > 0.0 ? q[k] / both : 0.5;
    received[k] += share * missed;
    received[k + 1] += (1.0 - share) * missed;
    weight[k] += 0.5 * dt;
    weight[k + 1] += 0.5 * dt;
    largest = std::max({largest, cap[k], cap[k + 1]});
  }
  std::vector<double> out(n + 1);
  double held_back_m3 = 0.0, room_m3 = 0.0;
  for (std::size_t k = 0; k <= n; ++k) {
    out[k] = q[k] + received[k] / weight[k];
    if (out[k] < -1e-12 * largest) return {};
    out[k] = std::max(out[k], 0.0);
    if (out[k] > cap[k]) {
      held_back_m3 += (out[k] - cap[k]) * weight[k];
      out[k] = cap[k];
    }
    room_m3 += (cap[k] - out[k]) * weight[k];
  }
  if (held_back_m3 > 0.0) {
    if (held_back_m3 > room_m3) return {};
    const double fill = held_back_m3 / room_m3;
    for (std::size_t k = 0; k <= n; ++k) out[k] += fill * (cap[k] - out[k]);
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
    if (volume != 0.0) return {};  // every sample zero but not the volume
    return q;
  }
  const double scale = volume / trapezoid;
  for (double& value : q) value *= scale;
  return q;
}

}  // namespace

std::optional<PiecewiseLinearSeries> try_resample_preserving_volume(
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
  if (values.empty()) return std::nullopt;
  return PiecewiseLinearSeries(t, std::move(values), "resampled series");
}

PiecewiseLinearSeries resample_preserving_volume(
    const PiecewiseLinearSeries& series, double t_start_s, double dt_s, std::size_t n_intervals,
    ResampleMethod method, const PiecewiseLinearSeries* cumulative_volume) {
  auto out = try_resample_preserving_volume(series, t_start_s, dt_s, n_intervals, method,
                                            cumulative_volume);
  if (!out) throw InputError(resample_refusal(dt_s, method));
  return std::move(*out);
}

Problem resample_refusal(double dt_s, ResampleMethod method) {
  const std::string why =
      method == ResampleMethod::scaled_samples
          ? "every sample is zero but the volume is not; choose a shorter interval"
          : "keeping the volume this way would need negative values (a feature shorter than "
            "the interval); choose a shorter interval or the scaled-samples method";
  return Problem{"", 0, 0, "resampled series", "dt_s", "= " + format_value(dt_s) + ": " + why};
}

}  // namespace freshet::reporting
