// Shared helpers for the routing tests: wide-channel Manning laws and common forcings.
#pragma once

#include <cmath>
#include <vector>

#include "freshet/core/time_series.hpp"
#include "freshet/geometry/flux_law.hpp"
#include "freshet/routing/routing_options.hpp"

namespace freshet::routing::testing {

// Manning's equation for a wide rectangular channel (hydraulic radius ~ depth), SI:
// Q = (sqrt(S)/n) B^(-2/3) A^(5/3) (Chow 1959, Open-Channel Hydraulics, eq. 5-6 with R = y).
inline geometry::PowerLawFlux wide_manning(double width_m, double manning_n, double slope) {
  return {std::sqrt(slope) / (manning_n * std::pow(width_m, 2.0 / 3.0)), 5.0 / 3.0};
}

inline geometry::PowerLawFlux burgers() { return {0.5, 2.0}; }  // Q = A^2 / 2

inline constexpr SchemeKind kAllSchemes[] = {
    SchemeKind::kExplicitUpwind, SchemeKind::kImplicitUpwind, SchemeKind::kMethodOfLines,
    SchemeKind::kMusclHeun, SchemeKind::kCharacteristics};
// The finite-volume schemes (one flux law per cell allowed; characteristics needs one law).
inline constexpr SchemeKind kGridSchemes[] = {SchemeKind::kExplicitUpwind,
                                              SchemeKind::kImplicitUpwind,
                                              SchemeKind::kMethodOfLines, SchemeKind::kMusclHeun};

inline RoutingOptions options_for(SchemeKind scheme) {
  RoutingOptions opt;
  opt.scheme = scheme;
  return opt;
}

inline double cell_center_m(int i, double dx_m) { return (i + 0.5) * dx_m; }

}  // namespace freshet::routing::testing
