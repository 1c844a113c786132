// Where a station sits, for the run's reports and outputs: one per element of the network,
// in model order. The basin reader (freshet/study) describes them; the reports and the
// output files read them.
//
//   StationDescription s{"mill-culvert", network::ElementKind::culvert, "Mill Lane culvert",
//                        "lower-reach", true};
#pragma once

#include <limits>
#include <string>

#include "freshet/network/topology.hpp"

namespace freshet::reporting {

struct StationDescription {
  std::string id;
  network::ElementKind kind = network::ElementKind::junction;
  std::string name;        // human label, e.g. "Mill Lane culvert"
  std::string to;          // downstream element id ("" for outlets)
  bool stage_is_elevation = false;  // stage is a water-surface elevation (else a depth)
  // Where the element is on the map, WGS 84 (EPSG:4326) degrees; NaN when the study file
  // does not say. A reach is placed at its downstream end, a subcatchment at its outlet or
  // centroid, as the study file gives it.
  double longitude_deg = std::numeric_limits<double>::quiet_NaN();
  double latitude_deg = std::numeric_limits<double>::quiet_NaN();
};

}  // namespace freshet::reporting
