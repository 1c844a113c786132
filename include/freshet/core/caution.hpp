// The standing caution that accompanies every freshet result: README, console output,
// NetCDF global attributes, CSV and JSON summaries all print this one text. It names what
// each routing method represents and leaves out, as docs/cautions.md does at length.
#pragma once

#include <string_view>

namespace freshet {

inline constexpr std::string_view kCautionText =
    "CAUTION: freshet results are engineering estimates for use by qualified professionals. "
    "They depend on the input data and on the approximations of the routing methods: the "
    "kinematic wave (water surface parallel to the bed: no attenuation by its slope, no "
    "backwater), the Muskingum-Cunge diffusion wave (attenuation by the water-surface slope, "
    "no inertia, no backwater) and, where asked for, backwater from ponds and culverts as a "
    "level pool over the drowned length of a reach (flat water surface, no backwater curve "
    "above it); none represents surcharge or flow reversal. They do not replace review by a "
    "licensed hydrologic and hydraulic engineer, and they defer to the design standards and "
    "codes of the local authority.";

}  // namespace freshet
