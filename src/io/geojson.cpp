// GeoJSON layers (RFC 7946): parsed with nlohmann_json, checked member by member, every
// problem collected. See include/freshet/io/geojson.hpp for the rules.
#include "freshet/io/geojson.hpp"

#include <cstdint>
#include <fstream>
#include <optional>
#include <sstream>

#include <nlohmann/json.hpp>

#include "freshet/core/error.hpp"

namespace freshet::io {

namespace {

using nlohmann::json;

// Collects the problems of one layer, each naming the file, the feature and the member.
class LayerProblems {
 public:
  explicit LayerProblems(std::string file) : file_(std::move(file)) {}
  void add(std::string element, std::string field, std::string message) {
    problems_.push_back({file_, 0, 0, std::move(element), std::move(field), std::move(message)});
  }
  [[nodiscard]] bool empty() const { return problems_.empty(); }
  [[nodiscard]] std::size_t size() const { return problems_.size(); }
  void throw_if_any() {
    if (!problems_.empty()) throw InputError(std::move(problems_));
  }

 private:
  std::string file_;
  std::vector<Problem> problems_;
};

std::string type_name(const json& j) {
  return j.is_null() ? "null" : std::string(j.type_name());
}

// A position: [longitude, latitude] or [longitude, latitude, altitude].
std::optional<LonLat> read_position(const json& p, const std::string& where,
                                    const std::string& field, LayerProblems& problems) {
  if (!p.is_array() || p.size() < 2 || p.size() > 3 ||
      !std::all_of(p.begin(), p.end(), [](const json& v) { return v.is_number(); })) {
    problems.add(where, field,
                 "= " + p.dump() + ": a position is [longitude, latitude] in degrees, with an "
                 "optional altitude (RFC 7946 sec. 3.1.1)");
    return std::nullopt;
  }
  const LonLat at{p[0].get<double>(), p[1].get<double>()};
  const bool lon_ok = at.longitude_deg >= -180.0 && at.longitude_deg <= 180.0;
  const bool lat_ok = at.latitude_deg >= -90.0 && at.latitude_deg <= 90.0;
  if (!lon_ok || !lat_ok) {
    problems.add(where, field,
                 "= " + p.dump() + ": " + (lon_ok ? "latitude" : "longitude") +
                     " out of range: GeoJSON positions are WGS 84 longitude in [-180, 180] "
                     "and latitude in [-90, 90] degrees (RFC 7946 sec. 4); projected "
                     "coordinates must be reprojected to EPSG:4326");
    return std::nullopt;
  }
  return at;
}

std::vector<LonLat> read_positions(const json& list, const std::string& where,
                                   const std::string& field, LayerProblems& problems) {
  std::vector<LonLat> out;
  if (!list.is_array()) {
    problems.add(where, field, "is " + type_name(list) + ": must be an array of positions");
    return out;
  }
  for (std::size_t i = 0; i < list.size(); ++i) {
    const auto p = read_position(list[i], where, field + "[" + std::to_string(i) + "]", problems);
    if (p) out.push_back(*p);
  }
  return out;
}

void check_ring(const json& ring, const std::string& where, const std::string& field,
                LayerProblems& problems) {
  if (!ring.is_array()) return;  // reported by read_positions
  if (ring.size() < 4) {
    problems.add(where, field,
                 "has " + std::to_string(ring.size()) + " positions: a polygon ring needs at "
                 "least 4, the last equal to the first (RFC 7946 sec. 3.1.6)");
  } else if (ring.front() != ring.back()) {
    problems.add(where, field,
                 "is not closed: its last position " + ring.back().dump() +
                     " differs from its first " + ring.front().dump() +
                     " (RFC 7946 sec. 3.1.6: a ring's first and last positions are equal)");
  }
}

void read_geometry(const json& g, GeoFeature& f, const std::string& where,
                   LayerProblems& problems) {
  if (!g.is_object()) {
    problems.add(where, "geometry",
                 "is " + type_name(g) + ": every feature needs a Point, LineString or Polygon");
    return;
  }
  const std::string type = g.value("type", std::string{});
  const auto coords = g.find("coordinates");
  if (coords == g.end()) {
    problems.add(where, "geometry.coordinates", "is missing");
    return;
  }
  const std::size_t before = problems.size();
  if (type == "Point") {
    f.shape = GeoShape::point;
    if (const auto p = read_position(*coords, where, "geometry.coordinates", problems)) {
      f.positions.push_back(*p);
    }
  } else if (type == "LineString") {
    f.shape = GeoShape::line;
    f.positions = read_positions(*coords, where, "geometry.coordinates", problems);
    if (coords->is_array() && coords->size() < 2) {
      problems.add(where, "geometry.coordinates",
                   "has " + std::to_string(coords->size()) +
                       " position(s): a LineString needs at least 2 (RFC 7946 sec. 3.1.4)");
    }
  } else if (type == "Polygon") {
    f.shape = GeoShape::polygon;
    if (!coords->is_array() || coords->empty()) {
      problems.add(where, "geometry.coordinates",
                   "must be an array of rings, the exterior ring first (RFC 7946 sec. 3.1.6)");
      return;
    }
    for (std::size_t r = 0; r < coords->size(); ++r) {
      const std::string field = "geometry.coordinates[" + std::to_string(r) + "]";
      auto ring = read_positions((*coords)[r], where, field, problems);
      check_ring((*coords)[r], where, field, problems);
      (r == 0 ? f.positions : f.holes.emplace_back()) = std::move(ring);
    }
  } else {
    problems.add(where, "geometry.type",
                 "= '" + type + "': use Point, LineString or Polygon (split multi-part "
                 "geometries into single parts)");
  }
  if (problems.size() != before) f.positions.clear();
}


bool to_toml(const json& v, toml::array& out);
bool to_toml(const json& v, toml::table& out, const std::string& key);

bool to_toml_table(const json& object, toml::table& out) {
  bool ok = true;
  for (const auto& [k, v] : object.items()) {
    if (v.is_null()) continue;
    ok = to_toml(v, out, k) && ok;
  }
  return ok;
}

template <class Insert>
bool insert_value(const json& v, Insert&& insert) {
  if (v.is_boolean()) {
    insert(toml::value<bool>(v.get<bool>()));
  } else if (v.is_number_integer()) {
    insert(toml::value<std::int64_t>(v.get<std::int64_t>()));
  } else if (v.is_number()) {
    insert(toml::value<double>(v.get<double>()));
  } else if (v.is_string()) {
    insert(toml::value<std::string>(v.get<std::string>()));
  } else if (v.is_array()) {
    toml::array a;
    for (const auto& item : v) {
      if (!to_toml(item, a)) return false;
    }
    insert(std::move(a));
  } else if (v.is_object()) {
    toml::table t;
    if (!to_toml_table(v, t)) return false;
    insert(std::move(t));
  } else {
    return false;
  }
  return true;
}

bool to_toml(const json& v, toml::array& out) {
  return insert_value(v, [&](auto&& node) { out.push_back(std::forward<decltype(node)>(node)); });
}

bool to_toml(const json& v, toml::table& out, const std::string& key) {
  return insert_value(v, [&](auto&& node) {
    out.insert_or_assign(key, std::forward<decltype(node)>(node));
  });
}

void read_properties(const json& props, GeoFeature& f, const std::string& where,
                     LayerProblems& problems) {
  if (props.is_null()) return;
  if (!props.is_object()) {
    problems.add(where, "properties", "is " + type_name(props) + ": must be an object or null");
    return;
  }
  for (const auto& [key, value] : props.items()) {
    if (value.is_null()) continue;
    if (!to_toml(value, f.properties, key)) {
      problems.add(where, "properties." + key,
                   "= " + value.dump() + ": an array holding null has no basin-file value");
    }
  }
}

std::string feature_id(const json& feature) {
  const auto id = feature.find("id");
  if (id == feature.end() || id->is_null()) return {};
  return id->is_string() ? id->get<std::string>() : id->dump();
}

void check_crs_member(const json& root, LayerProblems& problems) {
  const auto crs = root.find("crs");
  if (crs == root.end() || crs->is_null()) return;
  const std::string text = crs->dump();
  const bool wgs84 = text.find("CRS84") != std::string::npos ||
                     text.find("EPSG::4326") != std::string::npos ||
                     text.find("EPSG:4326") != std::string::npos;
  if (!wgs84) {
    problems.add("FeatureCollection", "crs",
                 "= " + text + ": RFC 7946 layers are WGS 84 longitude/latitude (the crs "
                 "member was removed, sec. 4); reproject the layer to EPSG:4326");
  }
}

}  // namespace

std::string_view to_string(GeoShape shape) {
  switch (shape) {
    case GeoShape::point: return "Point";
    case GeoShape::line: return "LineString";
    case GeoShape::polygon: return "Polygon";
  }
  return "?";
}

std::string GeoFeature::label() const {
  std::string out = "features[" + std::to_string(index) + "]";
  if (!id.empty()) out += " (id '" + id + "')";
  return out;
}

GeoLayer parse_geojson_layer(std::string_view text, std::string file) {
  GeoLayer layer{file, {}};
  LayerProblems problems(file);
  json root;
  try {
    root = json::parse(text.begin(), text.end());
  } catch (const json::parse_error& e) {
    problems.add("", "", std::string("is not valid JSON: ") + e.what());
    problems.throw_if_any();
  }
  if (!root.is_object() || root.value("type", std::string{}) != "FeatureCollection") {
    problems.add("", "type", "must be \"FeatureCollection\" at the top level (RFC 7946 sec. 3.3)");
    problems.throw_if_any();
  }
  check_crs_member(root, problems);
  const auto features = root.find("features");
  if (features == root.end() || !features->is_array()) {
    problems.add("FeatureCollection", "features", "must be an array of features");
    problems.throw_if_any();
  }
  for (std::size_t i = 0; i < features->size(); ++i) {
    const json& item = (*features)[i];
    GeoFeature f;
    f.index = i;
    if (!item.is_object() || item.value("type", std::string{}) != "Feature") {
      problems.add(f.label(), "type", "must be \"Feature\" (RFC 7946 sec. 3.2)");
      continue;
    }
    f.id = feature_id(item);
    const std::string where = f.label();
    const auto geometry = item.find("geometry");
    read_geometry(geometry == item.end() ? json() : *geometry, f, where, problems);
    const auto props = item.find("properties");
    read_properties(props == item.end() ? json() : *props, f, where, problems);
    layer.features.push_back(std::move(f));
  }
  problems.throw_if_any();
  return layer;
}

GeoLayer read_geojson_layer(const std::filesystem::path& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) throw IoError("cannot read GeoJSON layer '" + path.string() + "'");
  std::ostringstream text;
  text << in.rdbuf();
  if (in.bad()) throw IoError("cannot read GeoJSON layer '" + path.string() + "'");
  return parse_geojson_layer(text.str(), path.string());
}

}  // namespace freshet::io
