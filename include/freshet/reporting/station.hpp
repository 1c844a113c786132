// Where a station sits, for the run's reports and outputs: one per element of the network,
// in model order. The basin reader (freshet/study) describes them; the reports and the
// output files read them.
//
//   StationDescription s{"mill-culvert", network::ElementKind::culvert, "Mill Lane culvert",
//                        "lower-reach", true};
#pragma once

#include <string>

#include "freshet/network/topology.hpp"

namespace freshet::reporting {

struct StationDescription {
  std::string id;
  network::ElementKind kind = network::ElementKind::junction;
  std::string name;        // human label, e.g. "Mill Lane culvert"
  std::string to;          // downstream element id ("" for outlets)
  bool stage_is_elevation = false;  // stage is a water-surface elevation (else a depth)
};

}  // namespace freshet::reporting
