#include "freshet/hydrology/hyetograph.hpp"

#include <algorithm>
#include <cmath>

#include "freshet/core/error.hpp"

namespace freshet::hydrology {
namespace {

// Checks sizes, times and values; `value_name` is "intensity" or "depth".
void check_blocks(const std::vector<double>& times_s, const std::vector<double>& values,
                  const std::string& value_name, const std::string& what) {
  ProblemList problems(what);
  if (values.empty()) problems.add(value_name, "has no block: a hyetograph needs at least one");
  if (times_s.size() != values.size() + 1) {
    problems.add("times", "has " + std::to_string(times_s.size()) + " boundaries but " +
                              value_name + " has " + std::to_string(values.size()) +
                              " blocks: need one more boundary than blocks");
  }
  problems.throw_if_any();
  for (std::size_t k = 0; k < times_s.size(); ++k) {
    const std::string at = "[" + std::to_string(k + 1) + "]";
    problems.require_finite("time" + at, times_s[k]);
    if (k > 0 && std::isfinite(times_s[k]) && !(times_s[k] > times_s[k - 1])) {
      problems.add("time" + at, "= " + format_value(times_s[k]) +
                                    ": times must strictly increase (previous " +
                                    format_value(times_s[k - 1]) + ")");
    }
  }
  for (std::size_t k = 0; k < values.size(); ++k) {
    problems.require_non_negative(value_name + "[" + std::to_string(k + 1) + "]", values[k]);
  }
  problems.throw_if_any();
}

}  // namespace

Hyetograph::Hyetograph(std::vector<double> times_s, std::vector<double> depth_m,
                       std::vector<double> intensity_m_s, const std::string& what)
    : what_(what),
      times_s_(std::move(times_s)),
      depth_m_(std::move(depth_m)),
      intensity_m_s_(std::move(intensity_m_s)) {
  cumulative_m_.assign(times_s_.size(), 0.0);
  for (std::size_t k = 0; k < depth_m_.size(); ++k) {
    cumulative_m_[k + 1] = cumulative_m_[k] + depth_m_[k];
  }
  check_derived();
}

// Finite times and values can still give infinite ones (an intensity of 1e300 m/s over an
// hour, a block of 1e-320 s, times of -1e308 and 1e308 whose difference overflows); every
// lookup would then return inf or NaN, so such a storm is refused here.
void Hyetograph::check_derived() const {
  ProblemList problems(what_);
  for (std::size_t k = 0; k < depth_m_.size(); ++k) {
    const std::string at = "[" + std::to_string(k + 1) + "]";
    const double dt = times_s_[k + 1] - times_s_[k];
    if (!std::isfinite(dt)) {
      problems.add("time[" + std::to_string(k + 2) + "]",
                   "= " + format_value(times_s_[k + 1]) + ": the block from " +
                                    format_value(times_s_[k]) + " s is too long to represent");
    } else if (!std::isfinite(depth_m_[k]) || !std::isfinite(cumulative_m_[k + 1])) {
      problems.add("depth" + at, "= " + format_value(depth_m_[k]) + " m (total " +
                                     format_value(cumulative_m_[k + 1]) +
                                     " m): the storm's depth must be finite");
    } else if (!std::isfinite(intensity_m_s_[k])) {
      problems.add("intensity" + at, "= " + format_value(intensity_m_s_[k]) +
                                         " m/s: the block is too short for its depth");
    }
  }
  problems.throw_if_any();
}

void Hyetograph::require_time(double t_s) const {
  if (std::isnan(t_s)) {
    throw NumericalError(what_ + ": rain was asked for at a time that is not a number");
  }
}

Hyetograph Hyetograph::from_intensities(std::vector<double> boundary_times_s,
                                        std::vector<double> intensity_m_s,
                                        const std::string& what) {
  check_blocks(boundary_times_s, intensity_m_s, "intensity", what);
  std::vector<double> depth(intensity_m_s.size());
  for (std::size_t k = 0; k < depth.size(); ++k) {
    depth[k] = intensity_m_s[k] * (boundary_times_s[k + 1] - boundary_times_s[k]);
  }
  return Hyetograph(std::move(boundary_times_s), std::move(depth), std::move(intensity_m_s), what);
}

Hyetograph Hyetograph::from_depths(std::vector<double> boundary_times_s,
                                   std::vector<double> depth_m, const std::string& what) {
  check_blocks(boundary_times_s, depth_m, "depth", what);
  std::vector<double> intensity(depth_m.size());
  for (std::size_t k = 0; k < depth_m.size(); ++k) {
    intensity[k] = depth_m[k] / (boundary_times_s[k + 1] - boundary_times_s[k]);
  }
  return Hyetograph(std::move(boundary_times_s), std::move(depth_m), std::move(intensity), what);
}

Hyetograph Hyetograph::from_uniform_intensities(double start_s, double step_s,
                                                std::vector<double> intensity_m_s,
                                                const std::string& what) {
  ProblemList problems(what);
  problems.require_finite("start_s", start_s);
  problems.require_positive("step_s", step_s);
  problems.throw_if_any();
  std::vector<double> times(intensity_m_s.size() + 1);
  for (std::size_t k = 0; k < times.size(); ++k) {
    times[k] = start_s + static_cast<double>(k) * step_s;
  }
  return from_intensities(std::move(times), std::move(intensity_m_s), what);
}

// The block holding t_s, clamped to the blocks that exist: whatever upper_bound returns
// (end() for a time past the last boundary, or for NaN), the index is a valid block.
std::size_t Hyetograph::block_index(double t_s) const {
  const auto it = std::upper_bound(times_s_.begin(), times_s_.end(), t_s);
  const auto k = static_cast<std::size_t>(it - times_s_.begin());
  return std::clamp<std::size_t>(k, 1, intensity_m_s_.size()) - 1;
}

double Hyetograph::cumulative_depth_m(double t_s) const {
  require_time(t_s);
  if (t_s <= times_s_.front()) return 0.0;
  if (t_s >= times_s_.back()) return cumulative_m_.back();
  const std::size_t k = block_index(t_s);
  return cumulative_m_[k] + intensity_m_s_[k] * (t_s - times_s_[k]);
}

double Hyetograph::depth_between_m(double t0_s, double t1_s) const {
  require_time(t0_s);
  require_time(t1_s);
  FRESHET_ASSERT(t0_s <= t1_s, "depth_between_m needs t0 <= t1");
  return cumulative_depth_m(t1_s) - cumulative_depth_m(t0_s);
}

double Hyetograph::intensity_at_m_s(double t_s) const {
  require_time(t_s);
  if (t_s < times_s_.front() || t_s >= times_s_.back()) return 0.0;
  return intensity_m_s_[block_index(t_s)];
}

double Hyetograph::peak_intensity_m_s() const {
  return *std::max_element(intensity_m_s_.begin(), intensity_m_s_.end());
}

PiecewiseLinearSeries Hyetograph::cumulative_depth_series() const {
  return PiecewiseLinearSeries(times_s_, cumulative_m_, "cumulative rain depth");
}

}  // namespace freshet::hydrology
