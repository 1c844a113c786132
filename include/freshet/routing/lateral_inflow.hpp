// Lateral inflow to a reach: discharge per unit length q_lat(x, t) in m2/s (m3/s per metre).
//
// The reach is split into stretches [station_m[k], station_m[k+1]); within stretch k the
// inflow is uniform in x and follows the piecewise-linear series rate_m2s[k] in time. Volumes
// delivered to a cell over a step are exact integrals (overlap length x series integral), so
// the volume ledger carries no quadrature error. Rates must be >= 0 (losses are not modelled).
//
//   LateralInflow runoff = LateralInflow::uniform(1200.0, PiecewiseLinearSeries(
//       {0.0, 600.0, 1800.0}, {0.0, 2e-3, 0.0}));        // 2 L/s per metre at the peak
//   LateralInflow none = LateralInflow::none();
#pragma once

#include <string>
#include <vector>

#include "freshet/core/time_series.hpp"

namespace freshet::routing {

class LateralInflow {
 public:
  // No lateral inflow.
  static LateralInflow none();
  // One series over the whole reach [0, length_m].
  static LateralInflow uniform(double length_m, PiecewiseLinearSeries rate_m2s);
  // Makes this uniform(length_m, constant(rate_m2s)), reusing its storage when it already is
  // a constant rate over the same length (set at every coupling step by a network reach).
  void set_uniform_constant(double length_m, double rate_m2s);
  // station_m: K+1 strictly increasing stations starting at 0; rate_m2s: K series.
  // Throws InputError (naming `what`) listing every problem found.
  LateralInflow(std::vector<double> station_m, std::vector<PiecewiseLinearSeries> rate_m2s,
                const std::string& what = "lateral inflow");

  [[nodiscard]] bool is_none() const noexcept { return rate_m2s_.empty(); }
  [[nodiscard]] const std::vector<double>& station_m() const noexcept { return station_m_; }
  [[nodiscard]] const std::vector<PiecewiseLinearSeries>& rate_m2s() const noexcept {
    return rate_m2s_;
  }
  // Every sample time of every stretch's series (sorted, unique): forcing breakpoints.
  [[nodiscard]] std::vector<double> breakpoint_times_s() const;

 private:
  LateralInflow() = default;
  std::vector<double> station_m_;
  std::vector<PiecewiseLinearSeries> rate_m2s_;
};

// Per-cell lateral forcing on a uniform grid, precomputed once per (reach, LateralInflow):
// for each cell the overlapping stretches and overlap lengths (compressed rows).
class CellLateralMap {
 public:
  CellLateralMap() = default;
  CellLateralMap(const LateralInflow& lateral, int cell_count, double cell_width_m);

  // volume_m3[i] = volume entering cell i over [t0_s, t1_s] (exact). Returns the total.
  double volumes_m3(const LateralInflow& lateral, double t0_s, double t1_s,
                    std::vector<double>& volume_m3) const;
  // rate_m3s[i] = inflow rate into cell i at time t_s. Returns the total.
  double rates_m3s(const LateralInflow& lateral, double t_s, std::vector<double>& rate_m3s) const;
  [[nodiscard]] bool is_none() const noexcept { return stretch_.empty(); }
  // True when this map was built for the same stations, cell count and cell width: a reach
  // keeps its map from one advance() to the next instead of rebuilding it (issue 16).
  [[nodiscard]] bool fits(const LateralInflow& lateral, int cell_count,
                          double cell_width_m) const noexcept {
    return !is_none() && cell_count == cell_count_ && cell_width_m == cell_width_m_ &&
           lateral.station_m() == station_m_;
  }
  [[nodiscard]] std::size_t memory_bytes() const noexcept {
    return row_begin_.capacity() * sizeof(int) + stretch_.capacity() * sizeof(int) +
           overlap_m_.capacity() * sizeof(double);
  }

 private:
  int cell_count_ = 0;
  double cell_width_m_ = 0.0;
  std::vector<double> station_m_;     // the stations the map was built for
  std::vector<int> row_begin_;        // cell_count_ + 1 offsets into stretch_/overlap_m_
  std::vector<int> stretch_;          // stretch index
  std::vector<double> overlap_m_;     // overlap length of cell and stretch
  mutable std::vector<double> per_stretch_;  // scratch: one value per stretch
};

}  // namespace freshet::routing
