#include "freshet/hydrology/areal_rain.hpp"

#include <algorithm>
#include <cmath>

#include "freshet/core/error.hpp"
#include "freshet/core/units.hpp"

namespace freshet::hydrology {

Hyetograph mix_hyetographs(const std::vector<std::pair<double, const Hyetograph*>>& weighted,
                           const std::string& what) {
  ProblemList problems(what);
  if (weighted.empty()) problems.add("weights", "names no gauge");
  for (std::size_t k = 0; k < weighted.size(); ++k) {
    problems.require_non_negative("weight[" + std::to_string(k + 1) + "]", weighted[k].first);
  }
  problems.throw_if_any();
  std::vector<double> times;
  for (const auto& [w, h] : weighted) {
    times.insert(times.end(), h->boundary_times_s().begin(), h->boundary_times_s().end());
  }
  std::sort(times.begin(), times.end());
  times.erase(std::unique(times.begin(), times.end()), times.end());
  const auto cumulative = [&weighted](double t) {
    double sum = 0.0;
    for (const auto& item : weighted) sum += item.first * item.second->cumulative_depth_m(t);
    return sum;
  };
  std::vector<double> depths;
  depths.reserve(times.size() - 1);
  double before = cumulative(times.front());
  for (std::size_t k = 1; k < times.size(); ++k) {
    const double now = cumulative(times[k]);
    depths.push_back(std::max(0.0, now - before));  // a sum of rising curves: >= 0 but rounding
    before = now;
  }
  return Hyetograph::from_depths(std::move(times), std::move(depths), what);
}

namespace {
constexpr double kSquareMetresPerSquareMile = 1609.344 * 1609.344;  // NIST SP 811, exact
}

double tp29_areal_reduction_factor(double area_m2, double duration_s) {
  const double a_mi2 = area_m2 / kSquareMetresPerSquareMile;
  const double x = -1.1 * std::pow(duration_s / units::kSecondsPerHour, 0.25);
  return 1.0 - std::exp(x) + std::exp(x - 0.01 * a_mi2);
}

std::string tp29_range_problem(double area_m2, double duration_s) {
  const double a_km2 = area_m2 / 1e6;
  const double t_h = duration_s / units::kSecondsPerHour;
  if (!(area_m2 >= 0.0) || a_km2 > 400.0 * kSquareMetresPerSquareMile / 1e6) {
    return "area " + format_value(a_km2) + " km2 is outside the TP-29 curves (0 to 400 mi2, "
           "1036 km2)";
  }
  if (!(t_h >= 0.5) || t_h > 24.0) {
    return "storm duration " + format_value(t_h) + " h is outside the TP-29 curves (30 min to "
           "24 h)";
  }
  return {};
}

}  // namespace freshet::hydrology
