// The distribution a study declares for an uncertain parameter, and the two functions the
// sampler and the tests need of it: the quantile (inverse cumulative distribution) and the
// cumulative distribution. Boost.Math supplies both for each family.
//
//   Uniform{low, high}               every value between the bounds equally likely
//   Triangular{low, mode, high}      a published minimum / normal / maximum, e.g. Manning's n
//                                    from Chow (1959, Open-Channel Hydraulics, Table 5-6)
//   Normal{mean, sd, low, high}      truncated to [low, high] (infinite bounds allowed)
//   LogNormal{median, log_sd, low, high}   ln(x) normal with mean ln(median), truncated
#pragma once

#include <limits>
#include <string>
#include <variant>

#include "freshet/core/error.hpp"

namespace freshet::uncertainty {

inline constexpr double kUnbounded = std::numeric_limits<double>::infinity();

struct Uniform {
  double low = 0.0;
  double high = 1.0;
};

struct Triangular {
  double low = 0.0;
  double mode = 0.5;
  double high = 1.0;
};

struct Normal {
  double mean = 0.0;
  double sd = 1.0;
  double low = -kUnbounded;  // truncation bounds
  double high = kUnbounded;
};

struct LogNormal {
  double median = 1.0;
  double log_sd = 0.1;  // standard deviation of ln(x)
  double low = 0.0;
  double high = kUnbounded;
};

using Distribution = std::variant<Uniform, Triangular, Normal, LogNormal>;

// Adds to `problems` whatever makes `d` unusable (non-finite or inverted bounds, a mode
// outside its bounds, sd <= 0, truncation bounds that leave no probability). `field` names the
// parameter in the messages.
void check(const Distribution& d, std::string_view field, ProblemList& problems);

// x with P(X <= x) = p, for p in [0, 1]. The distribution must have passed check().
[[nodiscard]] double quantile(const Distribution& d, double p);
// P(X <= x).
[[nodiscard]] double cdf(const Distribution& d, double x);
// Short description for reports: "triangular(0.025, 0.03, 0.033)".
[[nodiscard]] std::string describe(const Distribution& d);

}  // namespace freshet::uncertainty
