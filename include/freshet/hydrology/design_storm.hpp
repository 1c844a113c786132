// Design storms built from an IDF curve.
//
//   * Alternating block method (Chow, Maidment & Mays 1988, Applied Hydrology, sec. 14.4):
//     the increments P(k dt) - P((k-1) dt) of the IDF depth, sorted in descending order, are
//     placed with the largest at the peak block and the rest alternately to its right and
//     left. Every window of k blocks centred on the peak then holds exactly the IDF depth
//     for duration k dt. The duration must be a whole number of steps.
//   * Chicago storm (Keifer & Chu 1957, "Synthetic storm pattern for drainage design",
//     J. Hydraulics Div. ASCE 83(HY4)): a continuous intensity pattern with its peak at
//     t_p = r T. Before the peak the intensity at time t_b ahead of it is
//     i_b = dP/dt_d at t_d = t_b / r, after it i_a = dP/dt_d at t_d = t_a / (1 - r); for the
//     formula i = a/(t+b)^c this is i = a [(1 - c) t_d + b] / (t_d + b)^(1 + c). Any window
//     around the peak split r : (1 - r) holds the IDF depth P(t_d). Blocks are the exact
//     integrals of that pattern (from its mass curve r P(t_b/r) and (1 - r) P(t_a/(1 - r))),
//     so any step works; the last block is shorter when the step does not divide T.
// Both storms hold exactly the IDF depth P(T) for their duration T (to round-off).
//
//   DesignStormOptions opt{.duration_s = 7200.0, .step_s = 600.0, .peak_ratio = 0.4};
//   Hyetograph storm = chicago_storm(idf, opt, "storm 'T10-2h'");
#pragma once

#include <string>

#include "freshet/core/error.hpp"
#include "freshet/hydrology/hyetograph.hpp"
#include "freshet/hydrology/idf_curve.hpp"

namespace freshet::hydrology {

struct DesignStormOptions {
  double duration_s = 0.0;  // storm duration T (s), >= step_s
  double step_s = 0.0;      // block length (s), > 0
  double peak_ratio = 0.5;  // r = (time of peak - start) / T, in [0, 1]
  double start_s = 0.0;     // time of the storm's start (s)

  // Adds every problem found (naming the fields) to `problems`.
  void validate(ProblemList& problems) const;
};

// Throw InputError naming `what` when the options are invalid; the alternating block method
// also needs duration_s to be a whole number of step_s.
Hyetograph alternating_block_storm(const IdfCurve& idf, const DesignStormOptions& options,
                                   const std::string& what = "design storm");
Hyetograph chicago_storm(const IdfCurve& idf, const DesignStormOptions& options,
                         const std::string& what = "design storm");

// Mass curve of the Chicago storm: depth (m) fallen from its start to `elapsed_s`
// (clamped to [0, duration_s]).
double chicago_cumulative_depth_m(const IdfCurve& idf, double duration_s, double peak_ratio,
                                  double elapsed_s);

}  // namespace freshet::hydrology
