#include "freshet/uncertainty/ensemble_statistics.hpp"

#include <algorithm>
#include <cmath>

#include "freshet/core/error.hpp"

namespace freshet::uncertainty {
namespace {

std::vector<double> sorted_copy(std::span<const double> values) {
  std::vector<double> v(values.begin(), values.end());
  for (double x : v) FRESHET_ASSERT(!std::isnan(x), "NaN in an ensemble sample");
  std::sort(v.begin(), v.end());
  return v;
}

// Hyndman & Fan definition 7 on a sorted sample.
double sorted_percentile(const std::vector<double>& v, double q) {
  FRESHET_ASSERT(!v.empty(), "percentile of an empty sample");
  FRESHET_ASSERT(q >= 0.0 && q <= 100.0, "percentile outside [0, 100]");
  const double h = (static_cast<double>(v.size()) - 1.0) * q / 100.0;
  const auto lo = static_cast<std::size_t>(std::floor(h));
  const std::size_t hi = std::min(lo + 1, v.size() - 1);
  return v[lo] + (h - static_cast<double>(lo)) * (v[hi] - v[lo]);
}

}  // namespace

double percentile(std::span<const double> values, double q) {
  return sorted_percentile(sorted_copy(values), q);
}

std::vector<double> percentiles(std::span<const double> values, std::span<const double> qs) {
  const std::vector<double> v = sorted_copy(values);
  std::vector<double> out;
  out.reserve(qs.size());
  for (double q : qs) out.push_back(sorted_percentile(v, q));
  return out;
}

double exceedance_fraction(std::span<const double> values, double threshold) {
  FRESHET_ASSERT(!values.empty(), "exceedance of an empty sample");
  const auto above = std::count_if(values.begin(), values.end(),
                                   [threshold](double x) { return x > threshold; });
  return static_cast<double>(above) / static_cast<double>(values.size());
}

double kolmogorov_q(double lambda) {
  // The alternating series converges fast away from 0; below ~0.2 it is 1 to round-off.
  if (lambda < 0.2) return 1.0;
  double q = 0.0;
  double sign = 1.0;
  for (int j = 1; j <= 100; ++j) {
    const double term = sign * 2.0 * std::exp(-2.0 * j * j * lambda * lambda);
    q += term;
    if (std::abs(term) < 1e-12 * std::abs(q)) break;
    sign = -sign;
  }
  return std::clamp(q, 0.0, 1.0);
}

KsResult kolmogorov_smirnov(std::span<const double> values,
                            const std::function<double(double)>& cdf) {
  const std::vector<double> v = sorted_copy(values);
  FRESHET_ASSERT(!v.empty(), "Kolmogorov-Smirnov test of an empty sample");
  const auto n = static_cast<double>(v.size());
  double d = 0.0;
  for (std::size_t i = 0; i < v.size(); ++i) {
    const double f = cdf(v[i]);
    d = std::max({d, static_cast<double>(i + 1) / n - f, f - static_cast<double>(i) / n});
  }
  const double root_n = std::sqrt(n);
  const double lambda = (root_n + 0.12 + 0.11 / root_n) * d;
  return {d, kolmogorov_q(lambda)};
}

}  // namespace freshet::uncertainty
