// Fixed-interval storage-indication routing (Chow, Maidment and Mays 1988, Applied
// Hydrology, sec. 8.2).
#include <algorithm>
#include <cmath>

#include "freshet/core/error.hpp"
#include "freshet/network/structures/level_pool.hpp"

namespace freshet::network::structures {
namespace {

void validate(std::span<const double> s, std::span<const double> o, double dt, ProblemList& p) {
  if (s.size() != o.size()) {
    p.add("outflow_m3s", "has " + std::to_string(o.size()) + " values but storage_m3 has " +
                             std::to_string(s.size()) + ": sizes must match");
    return;
  }
  if (s.size() < 2) p.add("storage_m3", "needs >= 2 rows");
  for (std::size_t k = 0; k < s.size(); ++k) {
    const std::string at = "[" + std::to_string(k + 1) + "]";
    p.require_non_negative("storage_m3" + at, s[k]);
    p.require_non_negative("outflow_m3s" + at, o[k]);
    if (k > 0 && s[k] <= s[k - 1]) p.require(false, "storage_m3" + at, s[k], "must increase");
    if (k > 0 && o[k] < o[k - 1]) p.require(false, "outflow_m3s" + at, o[k], "must not decrease");
  }
  p.require_positive("dt_s", dt);
}

// Linear interpolation of y against non-decreasing x, extrapolating the end segments
// (below the first x the first y is held).
double interpolate(std::span<const double> x, std::span<const double> y, double v) {
  if (v <= x.front()) return y.front();
  auto it = std::upper_bound(x.begin(), x.end(), v);
  std::size_t k = std::min<std::size_t>(static_cast<std::size_t>(it - x.begin()), x.size() - 1);
  k = std::max<std::size_t>(k, 1) - 1;
  if (x[k + 1] == x[k]) return y[k + 1];
  return y[k] + (v - x[k]) / (x[k + 1] - x[k]) * (y[k + 1] - y[k]);
}

}  // namespace

std::vector<double> route_storage_indication(std::span<const double> storage_m3,
                                             std::span<const double> outflow_m3s, double dt_s,
                                             std::span<const double> inflow_m3s,
                                             double initial_outflow_m3s) {
  ProblemList p("storage-indication table");
  validate(storage_m3, outflow_m3s, dt_s, p);
  p.require_non_negative("initial_outflow_m3s", initial_outflow_m3s);
  for (std::size_t j = 0; j < inflow_m3s.size(); ++j)
    p.require_non_negative("inflow_m3s[" + std::to_string(j + 1) + "]", inflow_m3s[j]);
  p.throw_if_any();
  std::vector<double> indication(storage_m3.size());  // 2S/dt + O
  for (std::size_t k = 0; k < storage_m3.size(); ++k)
    indication[k] = 2.0 * storage_m3[k] / dt_s + outflow_m3s[k];
  std::vector<double> out;
  if (inflow_m3s.empty()) return out;
  double o = initial_outflow_m3s;
  double n = interpolate(outflow_m3s, indication, o);  // first row reaching that outflow
  out.push_back(o);
  for (std::size_t j = 0; j + 1 < inflow_m3s.size(); ++j) {
    n = inflow_m3s[j] + inflow_m3s[j + 1] + (n - 2.0 * o);
    o = interpolate(indication, outflow_m3s, n);
    out.push_back(o);
  }
  return out;
}

}  // namespace freshet::network::structures
