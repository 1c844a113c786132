// How well a routed hydrograph fits an observed one: the usual goodness-of-fit figures on
// paired samples (the same times, both in m3 s-1). Pure functions, no I/O.
//
//   FitStatistics f = fit_statistics(times_s, routed_m3s, observed_m3s);
//   f.nse;                   // Nash & Sutcliffe (1970) efficiency: 1 is a perfect fit
//   f.kge;                   // Kling-Gupta efficiency (Gupta et al. 2009)
//   f.peak_timing_error_s;   // routed peak time minus observed peak time
//
// Definitions (o observed, s routed, n pairs, bars are means, sigma population standard
// deviations):
//   NSE = 1 - sum (s - o)^2 / sum (o - obar)^2
//         (Nash & Sutcliffe 1970, "River flow forecasting through conceptual models part I",
//          J. Hydrol. 10(3), 282-290, the efficiency R^2 of sec. "Assessment of model")
//   KGE = 1 - sqrt((r - 1)^2 + (alpha - 1)^2 + (beta - 1)^2), r Pearson's correlation,
//         alpha = sigma_s / sigma_o, beta = sbar / obar
//         (Gupta, Kling, Yilmaz & Martinez 2009, J. Hydrol. 377, 80-91, eq. 9)
//   peak error = max s - max o (and relative to max o); peak timing error = time of the first
//         max of s - time of the first max of o (over the paired samples);
//   volume error = (V_s - V_o) / V_o, each V the trapezoidal integral over the paired times.
// A figure whose denominator is zero (a flat or all-zero observed series) is NaN: not defined.
#pragma once

#include <cstddef>
#include <span>

namespace freshet::reporting {

struct FitStatistics {
  std::size_t pairs = 0;
  double nse = 0.0;
  double kge = 0.0;
  double kge_r = 0.0;      // Pearson correlation of s and o
  double kge_alpha = 0.0;  // sigma_s / sigma_o
  double kge_beta = 0.0;   // mean s / mean o
  double peak_error_m3s = 0.0;
  double peak_error_relative = 0.0;  // (max s - max o) / max o
  double peak_timing_error_s = 0.0;  // > 0: the routed peak comes late
  double volume_error_relative = 0.0;
  double observed_volume_m3 = 0.0;
  double routed_volume_m3 = 0.0;
};

// Precondition (FRESHET_ASSERT): the three spans have the same size, at least 2, and the
// times strictly increase.
FitStatistics fit_statistics(std::span<const double> times_s, std::span<const double> routed_m3s,
                             std::span<const double> observed_m3s);

}  // namespace freshet::reporting
