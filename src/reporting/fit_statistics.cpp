#include "freshet/reporting/fit_statistics.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "freshet/core/error.hpp"

namespace freshet::reporting {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

double ratio(double a, double b) { return b == 0.0 ? kNaN : a / b; }

double mean(std::span<const double> v) {
  double sum = 0.0;
  for (double x : v) sum += x;
  return sum / static_cast<double>(v.size());
}

double trapezoid(std::span<const double> t, std::span<const double> q) {
  double sum = 0.0;
  for (std::size_t k = 1; k < t.size(); ++k) sum += 0.5 * (q[k] + q[k - 1]) * (t[k] - t[k - 1]);
  return sum;
}

std::size_t first_max(std::span<const double> v) {
  return static_cast<std::size_t>(std::max_element(v.begin(), v.end()) - v.begin());
}

}  // namespace

FitStatistics fit_statistics(std::span<const double> times_s, std::span<const double> routed_m3s,
                             std::span<const double> observed_m3s) {
  FRESHET_ASSERT(times_s.size() == routed_m3s.size() && times_s.size() == observed_m3s.size(),
                 "fit_statistics: series of different lengths");
  FRESHET_ASSERT(times_s.size() >= 2, "fit_statistics needs at least 2 pairs");
  FitStatistics f;
  f.pairs = times_s.size();
  const double o_bar = mean(observed_m3s), s_bar = mean(routed_m3s);
  double sse = 0.0, oo = 0.0, ss = 0.0, so = 0.0;
  for (std::size_t k = 0; k < f.pairs; ++k) {
    const double o = observed_m3s[k] - o_bar, s = routed_m3s[k] - s_bar;
    const double e = routed_m3s[k] - observed_m3s[k];
    sse += e * e;
    oo += o * o;
    ss += s * s;
    so += s * o;
  }
  f.nse = oo == 0.0 ? kNaN : 1.0 - sse / oo;
  f.kge_r = ratio(so, std::sqrt(oo * ss));
  f.kge_alpha = ratio(std::sqrt(ss), std::sqrt(oo));  // the 1/n of both sigmas cancels
  f.kge_beta = ratio(s_bar, o_bar);
  f.kge = 1.0 - std::sqrt((f.kge_r - 1.0) * (f.kge_r - 1.0) +
                          (f.kge_alpha - 1.0) * (f.kge_alpha - 1.0) +
                          (f.kge_beta - 1.0) * (f.kge_beta - 1.0));
  const std::size_t ks = first_max(routed_m3s), ko = first_max(observed_m3s);
  f.peak_error_m3s = routed_m3s[ks] - observed_m3s[ko];
  f.peak_error_relative = ratio(f.peak_error_m3s, observed_m3s[ko]);
  f.peak_timing_error_s = times_s[ks] - times_s[ko];
  f.observed_volume_m3 = trapezoid(times_s, observed_m3s);
  f.routed_volume_m3 = trapezoid(times_s, routed_m3s);
  f.volume_error_relative =
      ratio(f.routed_volume_m3 - f.observed_volume_m3, f.observed_volume_m3);
  return f;
}

}  // namespace freshet::reporting
