// A basin file's element tables built from GeoJSON layers (`freshet layers`): subcatchment
// polygons, reach and pipe lines, and points for junctions, culverts, detention basins,
// outlets and inflows. docs/inputs.md ("Catchments from GeoJSON layers") gives every rule.
//
//   study::LayerSources src{.subcatchments = "layers/subcatchments.geojson",
//                           .reaches = "layers/reaches.geojson",
//                           .points = "layers/points.geojson"};
//   study::LayerTables t = study::build_layer_tables(src, units::System::si);
//   // t.text: [[subcatchment]], [[reach]], ... tables to append to a file's [study] settings
//
// - Sizes come from the geometry, on the WGS 84 ellipsoid (io/geodesy.hpp): a subcatchment's
//   `area` is its polygon's geodesic area less its holes, a reach's `length` the geodesic
//   length of its line; a layer that gives them too is refused.
// - Downstream links: a `to` property when given; otherwise a reach's last position drains
//   to the point within the tolerance or, with no point there, to the reach whose first
//   position is there; a point (not an outlet) drains to the reach that starts within the
//   tolerance of it. None is a dangling end, two or more an ambiguous one: both are errors,
//   as are links that form a cycle. A subcatchment needs its `to` property.
// - Properties are basin-file keys of the element; a property named `a.b` is key `b` of the
//   table `a` (flat GIS attribute tables: `loss.method`, `section.shape`, `plane.length`).
//   A subcatchment's `plane` (and a detention basin's `outlet`) table, or array of tables,
//   becomes [[subcatchment.plane]] ([[detention.outlet]]) tables.
// - Each element keeps its place: `location = { longitude, latitude }` (a reach at its
//   downstream end, a subcatchment at the mean of its ring's vertices, a point where it is).
#pragma once

#include <filesystem>
#include <string>
#include <vector>

#include "freshet/core/error.hpp"
#include "freshet/core/units.hpp"

namespace freshet::study {

struct LayerSources {
  std::filesystem::path subcatchments;  // Polygon features (empty: no such layer)
  std::filesystem::path reaches;        // LineString features
  std::filesystem::path points;         // Point features, each with a `kind` property
  double tolerance_m = 1.0;             // end points closer than this (geodesic) meet
};

struct LayerTables {
  std::string text;  // the element tables, basin-file TOML, each under a comment naming its source
  // Where each table came from, by its lines in `text` (1-based, inclusive).
  struct Origin {
    int first_line = 0;
    int last_line = 0;
    std::string file;     // the layer
    std::string feature;  // "features[3] (id 'x')"
  };
  std::vector<Origin> origins;
  std::size_t subcatchments = 0;
  std::size_t reaches = 0;
  std::size_t points = 0;
};

// Throws InputError listing every problem (each naming the layer file, the feature and the
// property), IoError when a layer cannot be read.
[[nodiscard]] LayerTables build_layer_tables(const LayerSources& sources, units::System system);

// The problems of a basin file made of `settings_lines` lines of settings followed by
// `tables`, written at `written`: those inside a table are given the layer, feature and
// property it came from; those in the settings part the settings file and its own line.
[[nodiscard]] std::vector<Problem> locate_in_layers(const std::vector<Problem>& problems,
                                                    const LayerTables& tables,
                                                    const std::filesystem::path& written,
                                                    int settings_lines,
                                                    const std::string& settings_file);

}  // namespace freshet::study
