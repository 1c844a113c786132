#include "freshet/core/time_series.hpp"

#include <algorithm>
#include <cmath>

#include "freshet/core/error.hpp"

namespace freshet {

PiecewiseLinearSeries::PiecewiseLinearSeries(std::vector<double> times_s,
                                             std::vector<double> values, const std::string& what)
    : times_s_(std::move(times_s)), values_(std::move(values)) {
  ProblemList problems(what);
  if (times_s_.size() != values_.size()) {
    problems.add("values", "has " + std::to_string(values_.size()) + " entries but times has " +
                               std::to_string(times_s_.size()));
    problems.throw_if_any();
  }
  if (times_s_.empty()) problems.add("times", "has no samples");
  for (std::size_t k = 0; k < times_s_.size(); ++k) {
    const std::string at = "[" + std::to_string(k + 1) + "]";
    problems.require_finite("time" + at, times_s_[k]);
    problems.require_finite("value" + at, values_[k]);
    if (k > 0 && std::isfinite(times_s_[k]) && !(times_s_[k] > times_s_[k - 1])) {
      problems.add("time" + at, "= " + format_value(times_s_[k]) +
                                    ": times must strictly increase (previous " +
                                    format_value(times_s_[k - 1]) + ")");
    }
  }
  problems.throw_if_any();
  cumulative_.assign(times_s_.size(), 0.0);
  for (std::size_t k = 1; k < times_s_.size(); ++k) {
    cumulative_[k] = cumulative_[k - 1] +
                     0.5 * (values_[k] + values_[k - 1]) * (times_s_[k] - times_s_[k - 1]);
  }
}

PiecewiseLinearSeries PiecewiseLinearSeries::constant(double value) {
  return PiecewiseLinearSeries({0.0}, {value});
}

void PiecewiseLinearSeries::set_constant(double value) {
  if (times_s_.size() == 1 && times_s_[0] == 0.0 && std::isfinite(value)) {
    values_[0] = value;  // cumulative_ is {0} for one sample
    return;
  }
  *this = constant(value);
}

double PiecewiseLinearSeries::value_at(double t_s) const {
  if (t_s <= times_s_.front()) return values_.front();
  if (t_s >= times_s_.back()) return values_.back();
  const auto it = std::upper_bound(times_s_.begin(), times_s_.end(), t_s);
  const std::size_t k = static_cast<std::size_t>(it - times_s_.begin()) - 1;
  const double w = (t_s - times_s_[k]) / (times_s_[k + 1] - times_s_[k]);
  return values_[k] + w * (values_[k + 1] - values_[k]);
}

double PiecewiseLinearSeries::cumulative(double t_s) const {
  if (t_s <= times_s_.front()) return values_.front() * (t_s - times_s_.front());
  if (t_s >= times_s_.back()) return cumulative_.back() + values_.back() * (t_s - times_s_.back());
  const auto it = std::upper_bound(times_s_.begin(), times_s_.end(), t_s);
  const std::size_t k = static_cast<std::size_t>(it - times_s_.begin()) - 1;
  return cumulative_[k] + 0.5 * (values_[k] + value_at(t_s)) * (t_s - times_s_[k]);
}

double PiecewiseLinearSeries::integral(double t0_s, double t1_s) const {
  return cumulative(t1_s) - cumulative(t0_s);
}

double PiecewiseLinearSeries::mean(double t0_s, double t1_s) const {
  if (!(t1_s > t0_s)) return value_at(t0_s);
  return integral(t0_s, t1_s) / (t1_s - t0_s);
}

}  // namespace freshet
