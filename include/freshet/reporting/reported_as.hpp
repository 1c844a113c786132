// How the run's reports treat an element of each kind: a reach (Ponce numbers, shocks,
// capacity, profiles), a subcatchment (rainfall excess, its own NetCDF file), a pool (culvert
// headwater and overtopping, detention stage, backwater) or a passage (inflow hydrograph,
// junction, outlet: samples only). The one switch over network::ElementKind in the reports,
// with no `default`: a new element kind does not compile (-Wswitch, an error in CI) until it
// is placed here, and every report that asks these questions then learns it.
#pragma once

#include "freshet/network/topology.hpp"

namespace freshet::reporting {

enum class ReportedAs { reach, subcatchment, pool, passage };

constexpr ReportedAs reported_as(network::ElementKind kind) {
  switch (kind) {
    case network::ElementKind::reach:
      return ReportedAs::reach;
    case network::ElementKind::subcatchment:
      return ReportedAs::subcatchment;
    case network::ElementKind::culvert:
    case network::ElementKind::detention:
      return ReportedAs::pool;
    case network::ElementKind::inflow:
    case network::ElementKind::junction:
    case network::ElementKind::outlet:
      return ReportedAs::passage;
  }
  return ReportedAs::passage;  // not reached: every kind is listed above
}

constexpr bool is_reach(network::ElementKind k) { return reported_as(k) == ReportedAs::reach; }
constexpr bool is_subcatchment(network::ElementKind k) {
  return reported_as(k) == ReportedAs::subcatchment;
}
constexpr bool is_pool(network::ElementKind k) { return reported_as(k) == ReportedAs::pool; }

}  // namespace freshet::reporting
