#include "result_scale.hpp"

#include <cmath>
#include <limits>
#include <string>
#include <vector>

#include "freshet/core/error.hpp"
#include "freshet/network/element.hpp"
#include "freshet/reporting/reported_as.hpp"

namespace freshet::reporting::detail {

namespace {

constexpr double kSquareMetresPerKm2 = 1e6;
constexpr double kKm2PerMi2 = 2.589988110336;        // (1609.344 m)^2
constexpr double kM3sPerCfs = 0.028316846592;        // (0.3048 m)^3

struct Upstream {
  std::vector<double> area_m2;  // subcatchment area draining to each element (itself included)
  std::vector<bool> other_inflow;  // an inflow hydrograph lies upstream
};

Upstream upstream_of(const network::Model& model,
                     const std::vector<network::ElementReport>& reports) {
  const std::size_t n = model.elements.size();
  Upstream up{std::vector<double>(n, 0.0), std::vector<bool>(n, false)};
  for (std::size_t i : model.topology.order) {  // upstream first
    if (is_subcatchment(model.links[i].kind)) {
      up.area_m2[i] += reports[i].subcatchment().area_m2;
    }
    if (model.links[i].kind == network::ElementKind::inflow) up.other_inflow[i] = true;
    const std::ptrdiff_t d = model.topology.downstream[i];
    if (d < 0) continue;
    up.area_m2[static_cast<std::size_t>(d)] += up.area_m2[i];
    if (up.other_inflow[i]) up.other_inflow[static_cast<std::size_t>(d)] = true;
  }
  return up;
}

std::string per_km2(double m3s_per_km2) { return format_fixed(m3s_per_km2, 1) + " m3/s per km2"; }

}  // namespace

double record_flood_envelope_m3s_per_km2(double area_km2) {
  const double a_mi2 = area_km2 / kKm2PerMi2;
  if (!(a_mi2 >= 1.0)) return std::numeric_limits<double>::quiet_NaN();
  const double q_cfs = 46.0 * 100.0 * std::pow(a_mi2, 0.894 * std::pow(a_mi2, -0.048));
  return q_cfs * kM3sPerCfs / area_km2;
}

void add_result_scale_warnings(const network::Model& model,
                               const std::vector<network::ElementReport>& reports,
                               RunSummary& summary) {
  const Upstream up = upstream_of(model, reports);
  for (std::size_t i = 0; i < model.elements.size() && i < summary.stations.size(); ++i) {
    const double area_m2 = up.area_m2[i];
    const double peak_m3s = summary.stations[i].peak_discharge_m3s;
    if (up.other_inflow[i] || !(area_m2 > 0.0) || !(peak_m3s > 0.0)) continue;
    const double area_km2 = area_m2 / kSquareMetresPerKm2;
    const double unit_m3s_km2 = peak_m3s / area_km2;
    const std::string id = model.links[i].id;
    const std::string head = "peak " + format_fixed(peak_m3s, 3) + " m3/s from " +
                             format_fixed(area_km2, 3) + " km2 of subcatchments (" +
                             per_km2(unit_m3s_km2) + ")";
    const double envelope = record_flood_envelope_m3s_per_km2(area_km2);
    if (unit_m3s_km2 > envelope) {  // false below 1 mi2 (NaN)
      summary.warnings.push_back(
          {id, head + " exceeds the envelope of the world's record floods at this area, " +
                   per_km2(envelope) + " (Creager, Justin & Hinds 1945, Q = 46 C "
                   "A^(0.894 A^-0.048) ft3/s, A in mi2, C = 100; from memory): check the "
                   "units of areas, rain and inflows"});
    }
  }
}

}  // namespace freshet::reporting::detail
