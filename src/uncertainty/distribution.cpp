#include "freshet/uncertainty/distribution.hpp"

#include <algorithm>
#include <cmath>

#include <boost/math/distributions/lognormal.hpp>
#include <boost/math/distributions/normal.hpp>
#include <boost/math/distributions/triangular.hpp>
#include <boost/math/distributions/uniform.hpp>

namespace freshet::uncertainty {
namespace {

template <class... Ts>
struct Overloaded : Ts... {
  using Ts::operator()...;
};
template <class... Ts>
Overloaded(Ts...) -> Overloaded<Ts...>;

// P(X <= x) of an untruncated Boost distribution, 0 and 1 beyond the infinities.
template <class Dist>
double untruncated_cdf(const Dist& dist, double x) {
  if (x == -kUnbounded) return 0.0;
  if (x == kUnbounded) return 1.0;
  return boost::math::cdf(dist, x);
}

// Quantile of `dist` truncated to [low, high]: p is mapped into [F(low), F(high)].
template <class Dist>
double truncated_quantile(const Dist& dist, double low, double high, double p) {
  if (p <= 0.0) return low;
  if (p >= 1.0) return high;
  const double f_low = untruncated_cdf(dist, low);
  const double f_high = untruncated_cdf(dist, high);
  const double x = boost::math::quantile(dist, f_low + p * (f_high - f_low));
  return std::clamp(x, low, high);
}

template <class Dist>
double truncated_cdf(const Dist& dist, double low, double high, double x) {
  if (x <= low) return 0.0;
  if (x >= high) return 1.0;
  const double f_low = untruncated_cdf(dist, low);
  const double f_high = untruncated_cdf(dist, high);
  return (boost::math::cdf(dist, x) - f_low) / (f_high - f_low);
}

void check_bounds(double low, double high, std::string_view field, ProblemList& problems) {
  if (std::isnan(low) || std::isnan(high) || low >= high) {
    problems.add(field, "bounds [" + format_value(low) + ", " + format_value(high) +
                            "]: the lower bound must be below the upper bound");
  }
}

}  // namespace

void check(const Distribution& d, std::string_view field, ProblemList& problems) {
  std::visit(
      Overloaded{
          [&](const Uniform& u) {
            if (!std::isfinite(u.low) || !std::isfinite(u.high) || u.low >= u.high) {
              problems.add(field, "uniform(" + format_value(u.low) + ", " +
                                      format_value(u.high) +
                                      "): bounds must be finite with low < high");
            }
          },
          [&](const Triangular& t) {
            if (!std::isfinite(t.low) || !std::isfinite(t.high) || !std::isfinite(t.mode) ||
                t.low >= t.high || t.mode < t.low || t.mode > t.high) {
              problems.add(field, "triangular(" + format_value(t.low) + ", " +
                                      format_value(t.mode) + ", " + format_value(t.high) +
                                      "): needs finite low <= normal <= high, low < high");
            }
          },
          [&](const Normal& n) {
            if (!std::isfinite(n.mean) || !(n.sd > 0.0) || !std::isfinite(n.sd)) {
              problems.add(field, "normal(mean " + format_value(n.mean) + ", sd " +
                                      format_value(n.sd) + "): needs a finite mean and sd > 0");
              return;
            }
            check_bounds(n.low, n.high, field, problems);
            // Bounds more than ~37 sd out leave a probability that rounds to zero.
            const boost::math::normal dist(n.mean, n.sd);
            if (n.low < n.high &&
                !(untruncated_cdf(dist, n.high) - untruncated_cdf(dist, n.low) > 1e-12)) {
              problems.add(field, "normal truncated to [" + format_value(n.low) + ", " +
                                      format_value(n.high) + "]: no probability left inside");
            }
          },
          [&](const LogNormal& l) {
            if (!(l.median > 0.0) || !std::isfinite(l.median) || !(l.log_sd > 0.0) ||
                !std::isfinite(l.log_sd)) {
              problems.add(field, "lognormal(median " + format_value(l.median) + ", log sd " +
                                      format_value(l.log_sd) +
                                      "): needs a finite median > 0 and log sd > 0");
              return;
            }
            check_bounds(l.low, l.high, field, problems);
            if (l.low < 0.0) problems.add(field, "lognormal lower bound < 0");
            const boost::math::lognormal dist(std::log(l.median), l.log_sd);
            if (l.low < l.high && l.low >= 0.0 &&
                !(untruncated_cdf(dist, l.high) - untruncated_cdf(dist, l.low) > 1e-12)) {
              problems.add(field, "lognormal truncated to [" + format_value(l.low) + ", " +
                                      format_value(l.high) + "]: no probability left inside");
            }
          }},
      d);
}

double quantile(const Distribution& d, double p) {
  FRESHET_ASSERT(p >= 0.0 && p <= 1.0, "probability outside [0, 1]");
  return std::visit(
      Overloaded{[&](const Uniform& u) { return u.low + p * (u.high - u.low); },
                 [&](const Triangular& t) {
                   if (p <= 0.0) return t.low;
                   if (p >= 1.0) return t.high;
                   return boost::math::quantile(
                       boost::math::triangular(t.low, t.mode, t.high), p);
                 },
                 [&](const Normal& n) {
                   return truncated_quantile(boost::math::normal(n.mean, n.sd), n.low, n.high,
                                             p);
                 },
                 [&](const LogNormal& l) {
                   return truncated_quantile(
                       boost::math::lognormal(std::log(l.median), l.log_sd), l.low, l.high, p);
                 }},
      d);
}

double cdf(const Distribution& d, double x) {
  return std::visit(
      Overloaded{[&](const Uniform& u) {
                   return std::clamp((x - u.low) / (u.high - u.low), 0.0, 1.0);
                 },
                 [&](const Triangular& t) {
                   if (x <= t.low) return 0.0;
                   if (x >= t.high) return 1.0;
                   return boost::math::cdf(boost::math::triangular(t.low, t.mode, t.high), x);
                 },
                 [&](const Normal& n) {
                   return truncated_cdf(boost::math::normal(n.mean, n.sd), n.low, n.high, x);
                 },
                 [&](const LogNormal& l) {
                   return truncated_cdf(boost::math::lognormal(std::log(l.median), l.log_sd),
                                        l.low, l.high, x);
                 }},
      d);
}

std::string describe(const Distribution& d) {
  auto bounds = [](double low, double high) {
    std::string s;
    if (std::isfinite(low)) s += ", low " + format_value(low);
    if (std::isfinite(high)) s += ", high " + format_value(high);
    return s;
  };
  return std::visit(
      Overloaded{[](const Uniform& u) {
                   return "uniform(" + format_value(u.low) + ", " + format_value(u.high) + ")";
                 },
                 [](const Triangular& t) {
                   return "triangular(" + format_value(t.low) + ", " + format_value(t.mode) +
                          ", " + format_value(t.high) + ")";
                 },
                 [&](const Normal& n) {
                   return "normal(mean " + format_value(n.mean) + ", sd " +
                          format_value(n.sd) + bounds(n.low, n.high) + ")";
                 },
                 [&](const LogNormal& l) {
                   return "lognormal(median " + format_value(l.median) + ", log sd " +
                          format_value(l.log_sd) + bounds(l.low, l.high) + ")";
                 }},
      d);
}

}  // namespace freshet::uncertainty
