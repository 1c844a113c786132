// Element tables from GeoJSON layers; see include/freshet/study/layers.hpp.
#include "freshet/study/layers.hpp"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <map>
#include <optional>
#include <set>
#include <sstream>

#include "freshet/io/geodesy.hpp"
#include "freshet/io/geojson.hpp"

namespace freshet::study {

namespace {

using io::GeoFeature;
using io::GeoLayer;
using io::GeoShape;
using io::LonLat;

const std::vector<std::string> kPointKinds = {"junction", "culvert", "detention", "outlet",
                                              "inflow"};

// ---- TOML text of a value -------------------------------------------------------------------

std::string number_text(double v) {
  char buf[64];
  const auto res = std::to_chars(buf, buf + sizeof buf, v);
  std::string s(buf, res.ptr);
  if (s.find_first_of(".eE") == std::string::npos) s += ".0";
  return s;
}

std::string toml_string(std::string_view s) {
  std::string out = "\"";
  for (const char c : s) {
    switch (c) {
      case '"': out += "\\\""; break;
      case '\\': out += "\\\\"; break;
      case '\n': out += "\\n"; break;
      case '\t': out += "\\t"; break;
      case '\r': out += "\\r"; break;
      default:
        if (static_cast<unsigned char>(c) < 0x20) {
          char hex[8];
          std::snprintf(hex, sizeof hex, "\\u%04x", static_cast<unsigned>(c));
          out += hex;
        } else {
          out += c;
        }
    }
  }
  return out + "\"";
}

std::string key_text(std::string_view key) {
  const bool bare = !key.empty() && std::all_of(key.begin(), key.end(), [](char c) {
    return std::isalnum(static_cast<unsigned char>(c)) || c == '_' || c == '-';
  });
  return bare ? std::string(key) : toml_string(key);
}

std::string value_text(const toml::node& node) {
  if (const auto* s = node.as_string()) return toml_string(s->get());
  if (const auto* i = node.as_integer()) return std::to_string(i->get());
  if (const auto* d = node.as_floating_point()) return number_text(d->get());
  if (const auto* b = node.as_boolean()) return b->get() ? "true" : "false";
  if (const auto* a = node.as_array()) {
    std::string out = "[";
    for (std::size_t k = 0; k < a->size(); ++k) out += (k ? ", " : "") + value_text(*a->get(k));
    return out + "]";
  }
  if (const auto* t = node.as_table()) {
    std::string out = "{ ";
    bool first = true;
    for (const auto& [k, v] : *t) {
      out += (first ? "" : ", ") + key_text(k.str()) + " = " + value_text(v);
      first = false;
    }
    return out + (first ? "}" : " }");
  }
  return "\"\"";
}

// "features[3] (id 'x')": the id property names the feature when its id member does not.
std::string label(const GeoFeature& f) {
  if (!f.id.empty()) return f.label();
  const toml::node* id = f.properties.get("id");
  std::string text;
  if (id && id->is_string()) text = id->value_or(std::string{});
  if (id && id->is_integer()) text = std::to_string(id->value_or(std::int64_t{0}));
  std::string out = "features[" + std::to_string(f.index) + "]";
  return text.empty() ? out : out + " (id '" + text + "')";
}

// ---- one element's table -------------------------------------------------------------------

struct Element {
  std::string kind;  // basin-file array: subcatchment, reach, junction, ...
  std::string id;
  std::optional<std::string> to;  // resolved downstream id
  LonLat location;
  std::optional<double> size;  // area (file units) or length (file units)
  const char* size_key = nullptr;
  toml::table keys;            // the properties, dotted names grouped into tables
  const GeoFeature* feature = nullptr;
  std::string file;
};

class Builder {
 public:
  Builder(const LayerSources& s, units::System system) : sources_(s), system_(system) {}

  LayerTables build() {
    read(sources_.subcatchments, GeoShape::polygon, "subcatchment");
    read(sources_.reaches, GeoShape::line, "reach");
    read(sources_.points, GeoShape::point, "point");
    if (!problems_.empty()) throw InputError(std::move(problems_));
    for (auto& e : elements_) link(e);
    if (problems_.empty()) check_cycles();
    if (!problems_.empty()) throw InputError(std::move(problems_));
    return write();
  }

 private:
  void add(const Element& e, std::string field, std::string message) {
    problems_.push_back({e.file, 0, 0, label(*e.feature), std::move(field), std::move(message)});
  }
  void add(const std::string& file, const GeoFeature& f, std::string field, std::string message) {
    problems_.push_back({file, 0, 0, label(f), std::move(field), std::move(message)});
  }

  void read(const std::filesystem::path& path, GeoShape shape, const std::string& layer) {
    if (path.empty()) return;
    try {
      layers_.push_back(io::read_geojson_layer(path));
    } catch (const InputError& e) {
      problems_.insert(problems_.end(), e.problems().begin(), e.problems().end());
      return;
    }
    const GeoLayer& l = layers_.back();
    for (const GeoFeature& f : l.features) {
      if (f.shape != shape) {
        add(l.file, f, "geometry.type",
            "= '" + std::string(io::to_string(f.shape)) + "': the " + layer + " layer takes " +
                std::string(io::to_string(shape)) + " features");
        continue;
      }
      element(l.file, f, layer);
    }
  }

  void element(const std::string& file, const GeoFeature& f, const std::string& layer) {
    Element e;
    e.feature = &f;
    e.file = file;
    e.kind = layer;
    const std::size_t before = problems_.size();
    group_properties(e);
    e.id = take_text(e, "id").value_or(f.id);
    if (e.id.empty()) {
      add(e, "properties.id", "is missing: every feature needs an id (an `id` property or "
                              "the feature's id member)");
    }
    e.to = take_text(e, "to");
    if (layer == "point") point(e);
    if (layer == "subcatchment") subcatchment(e);
    if (layer == "reach") reach(e);
    if (problems_.size() == before) elements_.push_back(std::move(e));
  }

  // Dotted property names become nested tables ("loss.method" -> loss = { method = .. }).
  void group_properties(Element& e) {
    for (const auto& [key, value] : e.feature->properties) {
      const std::string name(key.str());
      toml::table* at = &e.keys;
      std::string rest = name;
      for (auto dot = rest.find('.'); dot != std::string::npos; dot = rest.find('.')) {
        const std::string head = rest.substr(0, dot);
        rest = rest.substr(dot + 1);
        if (!at->contains(head)) at->insert(head, toml::table{});
        at = at->get_as<toml::table>(head);
        if (!at) {
          add(e, "properties." + name, "repeats '" + head + "', which is not a table here");
          break;
        }
      }
      if (at) at->insert_or_assign(rest, value);
    }
  }

  std::optional<std::string> take_text(Element& e, const std::string& key) {
    const toml::node* n = e.keys.get(key);
    if (!n) return std::nullopt;
    std::optional<std::string> out;
    if (const auto* s = n->as_string()) {
      out = s->get();
    } else if (const auto* i = n->as_integer()) {
      out = std::to_string(i->get());
    } else {
      add(e, "properties." + key, "= " + value_text(*n) + ": must be a text (an element id)");
    }
    e.keys.erase(key);
    return out;
  }

  void refuse_size(Element& e, const char* key, const char* what) {
    if (e.keys.contains(key)) {
      add(e, std::string("properties.") + key,
          "is computed from the geometry (" + std::string(what) + "): remove the property");
    }
  }

  void point(Element& e) {
    const auto kind = take_text(e, "kind");
    e.location = e.feature->positions.front();
    if (!kind) {
      add(e, "properties.kind", "is missing: say what the point is (junction, culvert, "
                                "detention, outlet or inflow)");
      return;
    }
    if (std::find(kPointKinds.begin(), kPointKinds.end(), *kind) == kPointKinds.end()) {
      add(e, "properties.kind", "= '" + *kind + "': unknown kind of point: use junction, "
                                "culvert, detention, outlet or inflow");
      return;
    }
    e.kind = *kind;
    if (e.kind == "outlet" && e.to) add(e, "properties.to", "= '" + *e.to + "': an outlet "
                                                              "drains nowhere");
  }

  void subcatchment(Element& e) {
    refuse_size(e, "area", "the geodesic area of the polygon less its holes");
    const auto& ring = e.feature->positions;
    double area_m2 = io::geodesic_area_m2(ring);
    for (const auto& hole : e.feature->holes) area_m2 -= io::geodesic_area_m2(hole);
    if (!(area_m2 > 0.0)) {
      add(e, "geometry.coordinates", "encloses no area (" + number_text(area_m2) +
                                         " m2): a subcatchment polygon needs an area");
      return;
    }
    const double per_m2 = system_ == units::System::si ? 1e4 : units::kSquareMetresPerAcre;
    e.size = area_m2 / per_m2;
    e.size_key = "area";
    LonLat mean{0.0, 0.0};
    const std::size_t n = ring.size() - 1;  // the closing position repeats the first
    for (std::size_t k = 0; k < n; ++k) {
      mean.longitude_deg += ring[k].longitude_deg / static_cast<double>(n);
      mean.latitude_deg += ring[k].latitude_deg / static_cast<double>(n);
    }
    e.location = mean;
    if (!e.to) {
      add(e, "properties.to", "is missing: name the element the subcatchment drains to (a "
                              "reach, junction, culvert, detention basin or outlet)");
    }
  }

  void reach(Element& e) {
    refuse_size(e, "length", "the geodesic length of the line");
    const double length_m = io::geodesic_length_m(e.feature->positions);
    if (!(length_m > 0.0)) {
      add(e, "geometry.coordinates", "has no length: its positions coincide");
      return;
    }
    e.size = length_m / units::length_to_m(1.0, system_);
    e.size_key = "length";
    e.location = e.feature->positions.back();
  }

  // ---- downstream links ----------------------------------------------------------------------

  [[nodiscard]] bool near(LonLat a, LonLat b) const {
    return io::geodesic_distance_m(a, b) <= sources_.tolerance_m;
  }

  static std::string where_text(LonLat p) {
    return "(" + number_text(p.longitude_deg) + ", " + number_text(p.latitude_deg) + ")";
  }

  std::string names(const std::vector<const Element*>& found) const {
    std::string out;
    for (const Element* f : found) out += (out.empty() ? "" : ", ") + f->kind + " '" + f->id + "'";
    return out;
  }

  void link(Element& e) {
    if (e.to || e.kind == "outlet" || e.kind == "subcatchment") return;
    std::vector<const Element*> found;
    const LonLat end = e.kind == "reach" ? e.feature->positions.back() : e.location;
    if (e.kind == "reach") {
      for (const auto& p : elements_) {
        if (p.feature->shape == GeoShape::point && near(end, p.location)) found.push_back(&p);
      }
    }
    if (found.empty()) {
      for (const auto& r : elements_) {
        if (&r != &e && r.kind == "reach" && near(end, r.feature->positions.front())) {
          found.push_back(&r);
        }
      }
    }
    const std::string at = "its downstream end " + where_text(end);
    const std::string tol = number_text(sources_.tolerance_m) + " m";
    if (found.empty()) {
      add(e, "properties.to",
          "is not given and " + at + " is a dangling end: no " +
              std::string(e.kind == "reach" ? "point or reach start" : "reach start") +
              " lies within " + tol + " of it (give a `to` property, or end it at a "
              "junction or outlet)");
    } else if (found.size() > 1) {
      add(e, "properties.to",
          "is not given and " + at + " is ambiguous: " + names(found) + " all lie within " +
              tol + " of it (give a `to` property)");
    } else {
      e.to = found.front()->id;
    }
  }

  // Follows every chain of links; a chain that comes back to an element is a cycle.
  void check_cycles() {
    std::map<std::string, const Element*> by_id;
    for (const auto& e : elements_) by_id.emplace(e.id, &e);
    std::set<std::string> done;
    for (const auto& start : elements_) {
      std::vector<const Element*> path;
      const Element* at = &start;
      while (at && !done.count(at->id)) {
        const auto seen = std::find(path.begin(), path.end(), at);
        if (seen != path.end()) {
          std::string ring;
          for (auto it = seen; it != path.end(); ++it) ring += (*it)->kind + " '" + (*it)->id + "' -> ";
          add(*at, "properties.to", "the downstream links form a cycle (water would flow in a "
                                    "loop): " + ring + at->kind + " '" + at->id + "'");
          break;
        }
        path.push_back(at);
        const auto next = at->to ? by_id.find(*at->to) : by_id.end();
        at = next == by_id.end() ? nullptr : next->second;
      }
      for (const Element* p : path) done.insert(p->id);
    }
  }

  // ---- text ----------------------------------------------------------------------------------

  [[nodiscard]] static bool array_of_tables(const std::string& kind, const std::string& key) {
    return (kind == "subcatchment" && key == "plane") || (kind == "detention" && key == "outlet");
  }

  void write_element(const Element& e, std::ostringstream& out, LayerTables& t, int& line) {
    std::vector<std::string> lines;
    lines.push_back("# " + e.file + " " + label(*e.feature));
    lines.push_back("[[" + e.kind + "]]");
    lines.push_back("id = " + toml_string(e.id));
    if (const auto* name = e.keys.get("name")) lines.push_back("name = " + value_text(*name));
    if (e.to) lines.push_back("to = " + toml_string(*e.to));
    if (e.size) {
      // Rounded to 1e-4 ha (1 m2) or 1 mm (in the file's units, 1e-4 acre or 1e-3 ft).
      const double step = std::string_view(e.size_key) == "area" ? 1e4 : 1e3;
      lines.push_back(std::string(e.size_key) + " = " +
                      number_text(std::round(*e.size * step) / step) + "  # geodesic, WGS 84");
    }
    lines.push_back("location = { longitude = " + number_text(e.location.longitude_deg) +
                    ", latitude = " + number_text(e.location.latitude_deg) + " }");
    std::vector<std::string> trailing;
    for (const auto& [k, v] : e.keys) {
      const std::string key(k.str());
      if (key == "name") continue;  // written above
      if (array_of_tables(e.kind, key) && (v.is_table() || v.is_array_of_tables())) {
        const auto emit = [&](const toml::table& tbl) {
          trailing.push_back("  [[" + e.kind + "." + key + "]]");
          for (const auto& [kk, vv] : tbl) {
            trailing.push_back("  " + key_text(kk.str()) + " = " + value_text(vv));
          }
        };
        if (const auto* one = v.as_table()) {
          emit(*one);
        } else {
          for (const auto& item : *v.as_array()) emit(*item.as_table());
        }
        continue;
      }
      lines.push_back(key_text(key) + " = " + value_text(v));
    }
    lines.insert(lines.end(), trailing.begin(), trailing.end());
    t.origins.push_back({line + 1, line + static_cast<int>(lines.size()), e.file,
                         label(*e.feature)});
    for (const auto& l : lines) out << l << "\n";
    out << "\n";
    line += static_cast<int>(lines.size()) + 1;
  }

  LayerTables write() {
    LayerTables t;
    std::ostringstream out;
    int line = 0;
    for (const auto& e : elements_) {
      write_element(e, out, t, line);
      if (e.kind == "subcatchment") ++t.subcatchments;
      else if (e.kind == "reach") ++t.reaches;
      else ++t.points;
    }
    t.text = out.str();
    return t;
  }

  const LayerSources& sources_;
  units::System system_;
  std::vector<GeoLayer> layers_;  // reserved below: features are pointed to
  std::vector<Element> elements_;
  std::vector<Problem> problems_;

 public:
  void reserve() { layers_.reserve(3); }
};

}  // namespace

LayerTables build_layer_tables(const LayerSources& sources, units::System system) {
  Builder b(sources, system);
  b.reserve();
  return b.build();
}

std::vector<Problem> locate_in_layers(const std::vector<Problem>& problems,
                                      const LayerTables& tables,
                                      const std::filesystem::path& written, int settings_lines,
                                      const std::string& settings_file) {
  std::vector<Problem> out;
  for (Problem p : problems) {
    if (p.file == written.string() && p.line > 0) {
      if (p.line <= settings_lines) {
        p.file = settings_file;
      } else {
        const int at = p.line - settings_lines;
        for (const auto& o : tables.origins) {
          if (at >= o.first_line && at <= o.last_line) {
            p.file = o.file;
            p.element = o.feature + (p.element.empty() ? "" : ", " + p.element);
            p.field = p.field.empty() ? p.field : "properties." + p.field;
            p.line = 0;
            p.column = 0;
          }
        }
      }
    }
    out.push_back(std::move(p));
  }
  return out;
}

}  // namespace freshet::study
