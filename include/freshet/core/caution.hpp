// The standing caution that accompanies every freshet result: README, console output,
// NetCDF global attributes, CSV and JSON summaries all print this one text.
#pragma once

#include <string_view>

namespace freshet {

inline constexpr std::string_view kCautionText =
    "CAUTION: freshet results are engineering estimates for use by qualified professionals. "
    "They depend on the input data and on the assumptions of the kinematic-wave approximation "
    "(no backwater, no surcharge, no flow reversal). They do not replace review by a licensed "
    "hydrologic and hydraulic engineer, and they defer to the design standards and codes of "
    "the local authority.";

}  // namespace freshet
