#include "freshet/routing/make_reach.hpp"

#include "freshet/routing/kinematic_reach.hpp"

namespace freshet::routing {

std::unique_ptr<ReachModel> make_reach(ReachSpec spec, const geometry::SectionFlux& flux,
                                       RoutingOptions options) {
  return geometry::visit_flux(flux, [&](const auto& law) -> std::unique_ptr<ReachModel> {
    using Law = std::decay_t<decltype(law)>;
    return std::make_unique<KinematicReach<Law>>(std::move(spec), law, std::move(options));
  });
}

std::unique_ptr<ReachModel> make_reach(ReachSpec spec, const geometry::FlowSection& section,
                                       RoutingOptions options) {
  return geometry::visit_flux(section.flux, [&](const auto& law) -> std::unique_ptr<ReachModel> {
    using Law = std::decay_t<decltype(law)>;
    return std::make_unique<KinematicReach<Law>>(std::move(spec), law, std::move(options),
                                                 ChannelShape{section.section, section.bed_slope});
  });
}

}  // namespace freshet::routing
