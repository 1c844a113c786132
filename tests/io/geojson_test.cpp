// GeoJSON layers (io/geojson.hpp) against RFC 7946 (Butler et al. 2016, The GeoJSON Format):
// what a valid layer reads as, and the message of every malformed input.
#include "freshet/io/geojson.hpp"

#include "freshet/core/error.hpp"

#include <string>

#include <gtest/gtest.h>

namespace freshet::io {
namespace {

std::string collection(const std::string& features) {
  return R"({"type": "FeatureCollection", "features": [)" + features + "]}";
}

// The message of the one problem of a layer, as "file: element, field: message".
std::string only_problem(const std::string& text) {
  try {
    (void)parse_geojson_layer(text, "layers/test.geojson");
  } catch (const InputError& e) {
    EXPECT_EQ(e.problems().size(), 1u) << e.what();
    return e.problems().front().to_string();
  }
  ADD_FAILURE() << "no problem found in " << text;
  return {};
}

TEST(GeoJson, ReadsPointsLinesAndPolygonsWithTheirProperties) {
  const GeoLayer l = parse_geojson_layer(collection(R"(
    {"type": "Feature", "id": 7, "geometry": {"type": "Point", "coordinates": [-2.5, 53.25, 80.0]},
     "properties": {"kind": "outlet", "empty": null}},
    {"type": "Feature", "geometry": {"type": "LineString", "coordinates": [[0, 0], [0.001, 0.002]]},
     "properties": {"id": "r1", "manning_n": 0.035, "cells": 40, "loss.method": "curve-number",
                    "section": {"shape": "rectangular", "bottom_width": 5}, "flag": true}},
    {"type": "Feature", "id": "p", "geometry": {"type": "Polygon",
     "coordinates": [[[0, 0], [1, 0], [1, 1], [0, 0]], [[0.5, 0.1], [0.6, 0.1], [0.6, 0.2], [0.5, 0.1]]]},
     "properties": null})"),
                                         "t.geojson");
  ASSERT_EQ(l.features.size(), 3u);
  EXPECT_EQ(l.features[0].label(), "features[0] (id '7')");
  EXPECT_EQ(l.features[0].shape, GeoShape::point);
  EXPECT_DOUBLE_EQ(l.features[0].positions[0].longitude_deg, -2.5);
  EXPECT_DOUBLE_EQ(l.features[0].positions[0].latitude_deg, 53.25);
  EXPECT_FALSE(l.features[0].properties.contains("empty"));  // null: absent
  const toml::table& p = l.features[1].properties;
  EXPECT_EQ(l.features[1].label(), "features[1]");
  EXPECT_DOUBLE_EQ(*p["manning_n"].value<double>(), 0.035);
  EXPECT_TRUE(p["cells"].is_integer());
  EXPECT_EQ(*p["loss.method"].value<std::string>(), "curve-number");
  EXPECT_EQ(*p["section"]["shape"].value<std::string>(), "rectangular");
  EXPECT_TRUE(*p["flag"].value<bool>());
  EXPECT_EQ(l.features[2].positions.size(), 4u);
  EXPECT_EQ(l.features[2].holes.size(), 1u);
}

TEST(GeoJson, EveryMalformedInputNamesTheFileFeatureAndMember) {
  const std::string f = R"({"type": "Feature", "properties": {}, "geometry": )";
  struct Case { std::string text; std::string message; };
  const Case cases[] = {
      {"{\"type\": \"FeatureCollection\", \"features\": [}",
       "layers/test.geojson: is not valid JSON: [json.exception.parse_error.101] parse error at line 1, column 44: syntax error while parsing value - unexpected '}'; expected '[', '{', or a literal"},
      {R"({"type": "Feature"})",
       "layers/test.geojson: field 'type' must be \"FeatureCollection\" at the top level (RFC 7946 sec. 3.3)"},
      {collection(f + R"({"type": "Polygon", "coordinates": [[[0, 0], [1, 0], [0, 0]]]}})"),
       "layers/test.geojson: features[0], field 'geometry.coordinates[0]' has 3 positions: a polygon ring needs at least 4, the last equal to the first (RFC 7946 sec. 3.1.6)"},
      {collection(f + R"({"type": "Polygon", "coordinates": [[[0, 0], [1, 0], [1, 1], [0, 1]]]}})"),
       "layers/test.geojson: features[0], field 'geometry.coordinates[0]' is not closed: its last position [0,1] differs from its first [0,0] (RFC 7946 sec. 3.1.6: a ring's first and last positions are equal)"},
      {collection(f + R"({"type": "LineString", "coordinates": [[0, 0]]}})"),
       "layers/test.geojson: features[0], field 'geometry.coordinates' has 1 position(s): a LineString needs at least 2 (RFC 7946 sec. 3.1.4)"},
      {collection(f + R"({"type": "Point", "coordinates": [431250.0, 5876300.0]}})"),
       "layers/test.geojson: features[0], field 'geometry.coordinates' = [431250.0,5876300.0]: longitude out of range: GeoJSON positions are WGS 84 longitude in [-180, 180] and latitude in [-90, 90] degrees (RFC 7946 sec. 4); projected coordinates must be reprojected to EPSG:4326"},
      {collection(f + R"({"type": "MultiPolygon", "coordinates": []}})"),
       "layers/test.geojson: features[0], field 'geometry.type' = 'MultiPolygon': use Point, LineString or Polygon (split multi-part geometries into single parts)"},
      {collection(R"({"type": "Feature", "id": "a", "properties": {}, "geometry": null})"),
       "layers/test.geojson: features[0] (id 'a'), field 'geometry' is null: every feature needs a Point, LineString or Polygon"},
      {collection(R"({"type": "Feature", "geometry": {"type": "Point", "coordinates": [0, 0]}, "properties": {"offsets": [1, null]}})"),
       "layers/test.geojson: features[0], field 'properties.offsets' = [1,null]: an array holding null has no basin-file value"},
      {R"({"type": "FeatureCollection", "crs": {"type": "name", "properties": {"name": "urn:ogc:def:crs:EPSG::27700"}}, "features": []})",
       "layers/test.geojson: FeatureCollection, field 'crs' = {\"properties\":{\"name\":\"urn:ogc:def:crs:EPSG::27700\"},\"type\":\"name\"}: RFC 7946 layers are WGS 84 longitude/latitude (the crs member was removed, sec. 4); reproject the layer to EPSG:4326"},
  };
  for (const Case& c : cases) EXPECT_EQ(only_problem(c.text), c.message) << c.text;
}

TEST(GeoJson, AllProblemsOfALayerAreReportedAtOnce) {
  const std::string bad = R"({"type": "Feature", "properties": {}, "geometry": {"type": "LineString", "coordinates": [[0, 0]]}})";
  try {
    (void)parse_geojson_layer(collection(bad + "," + bad), "x.geojson");
    FAIL() << "no error";
  } catch (const InputError& e) {
    ASSERT_EQ(e.problems().size(), 2u);
    EXPECT_EQ(e.problems()[1].element, "features[1]");
  }
}

TEST(GeoJson, AMissingFileIsAnIoErrorNamingIt) {
  try {
    (void)read_geojson_layer("no-such-folder/layer.geojson");
    FAIL() << "no error";
  } catch (const IoError& e) {
    EXPECT_NE(std::string(e.what()).find("no-such-folder/layer.geojson"), std::string::npos);
  }
}

}  // namespace
}  // namespace freshet::io
