// Piecewise-linear time series: hydrographs, lateral inflows, rain intensities.
//
// Values are linear between samples and held constant outside the sampled range (the first
// value before the first time, the last value after the last). Integrals are exact for that
// interpretation, so volumes handed between elements carry no quadrature error.
#pragma once

#include <span>
#include <string>
#include <vector>

namespace freshet {

class PiecewiseLinearSeries {
 public:
  PiecewiseLinearSeries() = default;

  // Throws InputError naming `what` (e.g. "hydrograph 'mill-inflow'") when the sizes differ,
  // there are no samples, a value is not finite, or times do not strictly increase. The
  // reported index is 1-based (sample number).
  PiecewiseLinearSeries(std::vector<double> times_s, std::vector<double> values,
                        const std::string& what = "series");

  // A constant value for all time.
  static PiecewiseLinearSeries constant(double value);
  // Makes this series constant(value), reusing its storage when it already is a constant (a
  // network reach's forcing, set at every coupling step, allocates nothing); a value that
  // constant() refuses is refused the same way.
  void set_constant(double value);

  [[nodiscard]] double value_at(double t_s) const;
  // Exact integral of the series over [t0_s, t1_s] (t0 <= t1).
  [[nodiscard]] double integral(double t0_s, double t1_s) const;
  // Mean over [t0_s, t1_s]; value_at(t0_s) when the interval is empty.
  [[nodiscard]] double mean(double t0_s, double t1_s) const;

  [[nodiscard]] std::span<const double> times_s() const { return times_s_; }
  [[nodiscard]] std::span<const double> values() const { return values_; }
  [[nodiscard]] bool empty() const { return times_s_.empty(); }
  [[nodiscard]] double start_s() const { return times_s_.front(); }
  [[nodiscard]] double end_s() const { return times_s_.back(); }

 private:
  // Integral from the first sample time to t (may be negative for t before it).
  [[nodiscard]] double cumulative(double t_s) const;

  std::vector<double> times_s_;
  std::vector<double> values_;
  std::vector<double> cumulative_;  // integral from times_s_[0] to times_s_[k]
};

}  // namespace freshet
