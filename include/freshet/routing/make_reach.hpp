// Run-time construction of a reach from a geometry::SectionFlux (rectangular, trapezoidal,
// power-law or tabulated Manning law). The variant is visited once here; the returned reach
// runs the compiled scheme for that law, with no dispatch inside its cell loops.
//
//   geometry::FlowSection s = geometry::make_flow_section(spec, 0.002);
//   std::unique_ptr<ReachModel> reach = make_reach({"north-cut", 2400.0, 240}, s.flux, opt);
//   reach->set_uniform_discharge(1.5);
//   reach->advance(0.0, 900.0, inflow_m3s, LateralInflow::none());
#pragma once

#include <memory>

#include "freshet/geometry/section_flux.hpp"
#include "freshet/routing/reach_model.hpp"

namespace freshet::routing {

// Throws InputError listing every bad spec/option value.
[[nodiscard]] std::unique_ptr<ReachModel> make_reach(ReachSpec spec,
                                                     const geometry::SectionFlux& flux,
                                                     RoutingOptions options = {});
// The same from a reach's section, flux law and bed slope together: the reach also knows its
// top width and slope, which the diffusion-wave scheme (muskingum-cunge) needs.
[[nodiscard]] std::unique_ptr<ReachModel> make_reach(ReachSpec spec,
                                                     const geometry::FlowSection& section,
                                                     RoutingOptions options = {});

}  // namespace freshet::routing
