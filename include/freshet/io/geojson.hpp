// GeoJSON layers (RFC 7946, 2016): a FeatureCollection whose features are Points,
// LineStrings or Polygons with WGS 84 longitude/latitude positions, each with its
// properties. This is the format layer only: what a layer's features become in a basin
// study is the study module's (freshet/study/layers.hpp).
//
//   io::GeoLayer layer = io::read_geojson_layer("layers/reaches.geojson");
//   for (const io::GeoFeature& f : layer.features) { ... f.positions, f.properties ... }
//
// Rules (every break is a Problem naming the file, the feature as "features[3]" (its
// 0-based place in the file's `features` array) with its id when it has one, and the member
// or property; all problems are reported at once):
// - The text is JSON (RFC 8259); the top level is a FeatureCollection with a `features`
//   array of objects of type "Feature", each with a `geometry` (not null) and `properties`
//   (an object, or null for none).
// - Geometry types: Point, LineString and Polygon. Multi-part geometries and
//   GeometryCollections are refused (split them into single parts in the GIS tool).
// - A position is 2 or 3 numbers, longitude then latitude in degrees (an altitude is
//   ignored): longitude in [-180, 180], latitude in [-90, 90] (RFC 7946 sec. 3.1.1, 4).
//   Projected coordinates fail this check: reproject the layer to EPSG:4326 (WGS 84).
// - A LineString has at least 2 positions (sec. 3.1.4). Every ring of a Polygon has at least
//   4 positions and its last position equals its first (sec. 3.1.6).
// - A `crs` member (GeoJSON 2008, removed by RFC 7946) is accepted only when it names
//   OGC CRS84 or EPSG:4326.
// - Properties become TOML values: a number (an integer stays an integer), a string, a
//   boolean, an array, an object (a table). A property whose value is null is treated as
//   absent (GIS tools write null for an empty attribute); null inside an array is refused.
#pragma once

#include <filesystem>
#include <string>
#include <string_view>
#include <vector>

#include <toml++/toml.h>

#include "freshet/io/geodesy.hpp"

namespace freshet::io {

enum class GeoShape { point, line, polygon };
// "Point", "LineString", "Polygon": the GeoJSON type names.
[[nodiscard]] std::string_view to_string(GeoShape shape);

struct GeoFeature {
  std::size_t index = 0;   // 0-based place in the collection's `features` array
  std::string id;          // the feature's `id` member as text ("" when it has none)
  GeoShape shape = GeoShape::point;
  std::vector<LonLat> positions;           // point: 1; line: >= 2; polygon: its exterior ring
  std::vector<std::vector<LonLat>> holes;  // a polygon's interior rings
  toml::table properties;                  // the feature's properties, as TOML values

  // "features[3] (id 'hob-hill')", or "features[3]" when the feature has no id member.
  [[nodiscard]] std::string label() const;
};

struct GeoLayer {
  std::string file;  // as given, for messages
  std::vector<GeoFeature> features;
};

// Reads a layer: IoError when the file cannot be read, InputError listing every problem.
[[nodiscard]] GeoLayer read_geojson_layer(const std::filesystem::path& path);
// The same from text; `file` names it in messages.
[[nodiscard]] GeoLayer parse_geojson_layer(std::string_view text, std::string file);

}  // namespace freshet::io
