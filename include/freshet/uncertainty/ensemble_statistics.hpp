// What an ensemble's members say together: percentiles, the probability of exceeding a
// threshold, and the Kolmogorov-Smirnov check of a sample against the distribution it was
// drawn from.
#pragma once

#include <functional>
#include <span>
#include <vector>

namespace freshet::uncertainty {

// The q-th percentile (q in [0, 100]) of `values` by linear interpolation between order
// statistics: Hyndman & Fan (1996, Sample quantiles in statistical packages, The American
// Statistician 50(4), 361-365) definition 7, p(k) = (k - 1) / (n - 1), the default of R's
// quantile() and of numpy.percentile. NaN is refused (FRESHET_ASSERT): a member that failed
// has no value, and the caller decides what its absence means.
[[nodiscard]] double percentile(std::span<const double> values, double q);
// Several percentiles of one sample, sorting it once.
[[nodiscard]] std::vector<double> percentiles(std::span<const double> values,
                                              std::span<const double> qs);

// Fraction of members whose value is strictly above `threshold`.
[[nodiscard]] double exceedance_fraction(std::span<const double> values, double threshold);

// The one-sample Kolmogorov-Smirnov statistic D = sup |F_n(x) - F(x)| and its asymptotic
// significance Q_KS(lambda), lambda = (sqrt(n) + 0.12 + 0.11 / sqrt(n)) D, Q_KS(l) =
// 2 sum_{j>=1} (-1)^(j-1) exp(-2 j^2 l^2) (Press, Teukolsky, Vetterling & Flannery 2007,
// Numerical Recipes, 3rd ed., sec. 14.3.3, eq. 14.3.9 and 14.3.18). A small p rejects F.
struct KsResult {
  double statistic = 0.0;  // D
  double p_value = 1.0;
};
// Q_KS(lambda) alone, the probability that the Kolmogorov distribution exceeds lambda.
[[nodiscard]] double kolmogorov_q(double lambda);
[[nodiscard]] KsResult kolmogorov_smirnov(std::span<const double> values,
                                          const std::function<double(double)>& cdf);

}  // namespace freshet::uncertainty
