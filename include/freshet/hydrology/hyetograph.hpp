// Rainfall hyetograph: a storm as blocks of constant intensity.
//
// Block k covers [t_k, t_{k+1}] (seconds) with intensity i_k (m/s, >= 0); blocks may have any
// lengths. Depths are exact for that interpretation: the cumulative depth is piecewise linear,
// so the depth over any interval, and the total, carry no quadrature error. Design storms
// (design_storm.hpp, nrcs_distribution.hpp) and rain read from a file (by the io module, which
// converts to SI first) all become a Hyetograph, which io can print or export as
// (times, intensities).
//
//   auto storm = Hyetograph::from_depths({0.0, 600.0, 1200.0}, {0.004, 0.010}, "storm 'kestrel'");
//   storm.total_depth_m();                     // 0.014
//   storm.depth_between_m(300.0, 900.0);       // 0.002 + 0.005 = 0.007
//   storm.intensities_m_s()[1];                // 0.010 / 600
#pragma once

#include <span>
#include <string>
#include <vector>

#include "freshet/core/time_series.hpp"

namespace freshet::hydrology {

class Hyetograph {
 public:
  Hyetograph() = default;

  // Block boundaries (n + 1 strictly increasing times, s) and n block intensities (m/s).
  // Throws InputError naming `what` (e.g. "subcatchment 'alder' rain") for mismatched sizes,
  // no block, non-finite or non-increasing times, and negative or NaN intensities.
  static Hyetograph from_intensities(std::vector<double> boundary_times_s,
                                     std::vector<double> intensity_m_s,
                                     const std::string& what = "hyetograph");
  // As from_intensities, with the depth (m) of each block instead of its intensity.
  static Hyetograph from_depths(std::vector<double> boundary_times_s,
                                std::vector<double> depth_m,
                                const std::string& what = "hyetograph");
  // Equal blocks of `step_s` starting at `start_s`.
  static Hyetograph from_uniform_intensities(double start_s, double step_s,
                                             std::vector<double> intensity_m_s,
                                             const std::string& what = "hyetograph");

  [[nodiscard]] std::size_t block_count() const noexcept { return depth_m_.size(); }
  [[nodiscard]] double start_s() const { return times_s_.front(); }
  [[nodiscard]] double end_s() const { return times_s_.back(); }
  [[nodiscard]] double duration_s() const { return end_s() - start_s(); }
  [[nodiscard]] std::span<const double> boundary_times_s() const { return times_s_; }
  [[nodiscard]] std::span<const double> intensities_m_s() const { return intensity_m_s_; }
  [[nodiscard]] std::span<const double> block_depths_m() const { return depth_m_; }

  // Sum of the block depths (m).
  [[nodiscard]] double total_depth_m() const { return cumulative_m_.back(); }
  // Depth fallen from the start up to t_s (0 before the start, the total after the end).
  // A NaN time raises NumericalError (this and intensity_at_m_s).
  [[nodiscard]] double cumulative_depth_m(double t_s) const;
  // Depth fallen over [t0_s, t1_s] (t0 <= t1), exact.
  [[nodiscard]] double depth_between_m(double t0_s, double t1_s) const;
  // Intensity at t_s (m/s): the block holding t_s (blocks are closed on the left), 0 outside.
  [[nodiscard]] double intensity_at_m_s(double t_s) const;
  [[nodiscard]] double peak_intensity_m_s() const;
  // Cumulative depth (m) at the block boundaries, as a piecewise-linear series (exact).
  [[nodiscard]] PiecewiseLinearSeries cumulative_depth_series() const;

 private:
  Hyetograph(std::vector<double> times_s, std::vector<double> depth_m,
             std::vector<double> intensity_m_s, const std::string& what);
  void check_derived() const;         // InputError unless depths and intensities are finite
  void require_time(double t_s) const;  // NumericalError for a NaN time
  [[nodiscard]] std::size_t block_index(double t_s) const;

  std::string what_;                   // names the storm in messages
  std::vector<double> times_s_;        // n + 1 block boundaries
  std::vector<double> depth_m_;        // n block depths
  std::vector<double> intensity_m_s_;  // n block intensities
  std::vector<double> cumulative_m_;   // n + 1 cumulative depths at the boundaries
};

}  // namespace freshet::hydrology
