// Resampling a piecewise-linear series (a hydrograph in m3 s-1, a rain intensity in m s-1) to
// a regular output interval dt without losing volume, for writing CSV files.
//
// Both methods return nodal values Q_k at t_k = t_start + k dt, k = 0..n, to be read back as a
// piecewise-linear series (the CSV reader's interpretation), and both reproduce the original
// volume over [t_start, t_start + n dt] to round-off:
//
//  * ResampleMethod::interval_volumes: every interval keeps its own volume exactly,
//      (Q_k + Q_{k+1}) dt / 2 = V_k = integral of the original over [t_k, t_{k+1}].
//    These n equations leave one degree of freedom, an alternating mode (-1)^k c. c is the
//    least-squares fit to the original point values q(t_k), clamped so no value is negative.
//    Where the original has breakpoints between output nodes the result carries a small
//    alternating ripple. When no c keeps every value non-negative (a feature shorter than
//    the interval between zero flows; or zero flow at both ends with off-grid breakpoints,
//    which pins the mode twice), the function throws InputError rather than write a negative
//    discharge: choose a shorter dt, or scaled_samples.
//  * ResampleMethod::local_correction: the point values q(t_k), each corrected by the volume
//    its intervals miss: e_k = V_k - (q_k + q_k+1) dt / 2 is shared between interval k's two
//    nodes in proportion to their values (half each when both are zero), and a node adds
//    the volume it received divided by its trapezoid weight (dt, or dt/2 at the ends). The
//    total volume is kept exactly; where the original is linear between nodes (steady flow,
//    straight limbs) nothing changes; a peak between nodes is raised towards the original's.
//    Never negative (an interval's true volume is never negative, so a node can lose at most
//    its own value), and never above the original's largest value over the node's two
//    intervals: what that cap holds back goes to the nodes still below their caps, in
//    proportion to their room. Throws InputError when there is not room enough.
//  * ResampleMethod::scaled_samples: Q_k = s q(t_k), with one factor s making the trapezoid
//    volume equal the original volume. Never negative; per-interval volumes are approximate,
//    and every value, base flow included, is scaled.
//
//   auto out = resample_preserving_volume(q, 0.0, 300.0, 72, ResampleMethod::interval_volumes);
//   // out.values(): 73 samples, 5-minute interval, same 6-hour volume as q.
#pragma once

#include <cstddef>
#include <optional>

#include "freshet/core/error.hpp"

#include "freshet/core/time_series.hpp"

namespace freshet::reporting {

enum class ResampleMethod { interval_volumes, local_correction, scaled_samples };

// Precondition: dt_s > 0, n_intervals >= 1. Throws InputError when the interval-volume
// solution would be negative (see above) or when scaled_samples meets a zero sample sum with
// a non-zero volume.
// `cumulative_volume`, when given, is the volume passed since some origin (m3 for a
// discharge) at the series' own times; volumes between nodes are then its differences
// instead of the integral of `series` (for instantaneous samples of a flow whose volumes are
// known exactly, from a ledger).
PiecewiseLinearSeries resample_preserving_volume(
    const PiecewiseLinearSeries& series, double t_start_s, double dt_s, std::size_t n_intervals,
    ResampleMethod method, const PiecewiseLinearSeries* cumulative_volume = nullptr);

// The same without an exception: std::nullopt where resample_preserving_volume would throw,
// for callers that try the methods in turn.
std::optional<PiecewiseLinearSeries> try_resample_preserving_volume(
    const PiecewiseLinearSeries& series, double t_start_s, double dt_s, std::size_t n_intervals,
    ResampleMethod method, const PiecewiseLinearSeries* cumulative_volume = nullptr);

// Why `method` could not resample at `dt_s`: the problem resample_preserving_volume throws.
Problem resample_refusal(double dt_s, ResampleMethod method);

}  // namespace freshet::reporting
