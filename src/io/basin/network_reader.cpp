#include "network_reader.hpp"

#include <cmath>
#include <limits>

#include "freshet/geometry/section_flux.hpp"
#include "freshet/hydrology/composite_loss.hpp"
#include "freshet/hydrology/curve_number.hpp"
#include "freshet/hydrology/green_ampt.hpp"
#include "freshet/hydrology/horton.hpp"
#include "freshet/hydrology/initial_continuing_loss.hpp"
#include "freshet/io/csv_series.hpp"
#include "freshet/network/elements.hpp"
#include "freshet/network/simple_elements.hpp"
#include "freshet/routing/make_reach.hpp"

namespace freshet::io::detail {

namespace structures = network::structures;
using network::ElementKind;

void relocate(const InputError& e, const FieldReader& at, std::vector<Problem>& problems) {
  for (Problem p : e.problems()) {
    if (p.file.empty()) {
      p.file = at.file();
      p.line = at.line();
      p.column = at.column();
    }
    if (p.element.empty()) p.element = at.element();
    problems.push_back(std::move(p));
  }
}

CrossingCache::Crossing CrossingCache::get_or_build(const std::string& key,
                                                   const std::function<Crossing()>& build) {
  {
    std::lock_guard lock(mutex_);
    if (auto it = built_.find(key); it != built_.end()) return it->second;
  }
  Crossing made = build();  // outside the lock: runs of other crossings go on meanwhile
  std::lock_guard lock(mutex_);
  return built_.emplace(key, std::move(made)).first->second;
}

NetworkReader::NetworkReader(const toml::table& root, const toml::table* changes,
                             std::string file, std::filesystem::path base_dir,
                             const StudySettings& settings, const hydrology::Hyetograph& storm,
                             std::vector<Problem>& problems, CrossingCache* cache,
                             std::string cache_scope)
    : root_(root),
      changes_(changes),
      cache_(cache),
      cache_scope_(std::move(cache_scope)),
      file_(std::move(file)),
      base_dir_(std::move(base_dir)),
      settings_(settings),
      units_{settings.units},
      storm_(storm),
      problems_(problems) {}

network::Model NetworkReader::build() {
  read_array("inflow", ElementKind::inflow);
  read_array("subcatchment", ElementKind::subcatchment);
  read_array("reach", ElementKind::reach);
  read_array("junction", ElementKind::junction);
  read_array("culvert", ElementKind::culvert);
  read_array("detention", ElementKind::detention);
  read_array("outlet", ElementKind::outlet);
  try {
    model_.topology = network::build_topology(model_.links);
  } catch (const InputError& e) {
    problems_.insert(problems_.end(), e.problems().begin(), e.problems().end());
    complete_ = false;
  }
  if (!complete_) return {};
  return std::move(model_);
}

void NetworkReader::read_array(std::string_view key, ElementKind kind) {
  const toml::node* node = root_.get(key);
  if (!node) return;
  const toml::array* arr = node->as_array();
  if (!arr) {
    const auto& where = node->source().begin;
    problems_.push_back({file_, static_cast<int>(where.line), static_cast<int>(where.column),
                         "", std::string(key), "must be an array of tables ([[" +
                                                   std::string(key) + "]])"});
    complete_ = false;
    return;
  }
  for (const toml::node& item : *arr) {
    const toml::table* table = item.as_table();
    if (!table) {
      const auto& where = item.source().begin;
      problems_.push_back({file_, static_cast<int>(where.line), static_cast<int>(where.column),
                           "", std::string(key), "entries must be tables"});
      complete_ = false;
      continue;
    }
    element(*table, kind, [&](Reader& r, const std::string& id) {
      switch (kind) {
        case ElementKind::inflow: return read_inflow(r, id);
        case ElementKind::subcatchment: return read_subcatchment(r, id);
        case ElementKind::reach: return read_reach(r, id);
        case ElementKind::culvert: return read_culvert(r, id);
        case ElementKind::detention: return read_detention(r, id);
        case ElementKind::junction:
        case ElementKind::outlet:
          return std::unique_ptr<network::Element>(
              std::make_unique<network::PassThrough>(id, kind));
      }
      return std::unique_ptr<network::Element>();
    });
  }
}

template <class ReadFn>
void NetworkReader::element(const toml::table& table, ElementKind kind, ReadFn&& read) {
  const auto* id_node = table.get("id");
  const std::string id = id_node && id_node->is_string() ? id_node->value_or(std::string{}) : "";
  const std::string label = std::string(network::to_string(kind)) + " '" + id + "'";
  const toml::table* changed = changes_ ? changes_->get_as<toml::table>(id) : nullptr;
  Reader r(table, file_, label, problems_, changed);
  network::Link link;
  link.id = r.text("id");
  if (!is_safe_id(link.id) && !link.id.empty()) {
    r.report("id", "= '" + link.id + "': use letters, digits, '.', '_' and '-' only (ids name "
                   "output files and stations)");
  }
  link.kind = kind;
  link.where = {file_, r.line(), r.column()};
  // A missing or misplaced 'to' is reported once, by the topology check.
  link.to = r.optional_text("to").value_or("");
  StationDescription station{link.id, std::string(network::to_string(kind)),
                             r.optional_text("name").value_or(link.id), link.to, false};
  const std::size_t before = problems_.size();
  element_start_ = before;
  std::unique_ptr<network::Element> e;
  try {
    e = read(r, link.id);
  } catch (const InputError& error) {
    relocate(error, r, problems_);
  } catch (const IoError& error) {
    r.report_here(error.what());
  }
  r.finish();
  if (problems_.size() != before || !e) complete_ = false;
  // Ponds report their level; a reach reports an elevation only when its invert is given
  // (in the base or by the scenario), otherwise its depth.
  station.stage_is_elevation = kind == ElementKind::culvert ||
                               kind == ElementKind::detention ||
                               (kind == ElementKind::reach && r.has("outlet_invert"));
  model_.links.push_back(std::move(link));
  model_.elements.push_back(std::move(e));
  stations_.push_back(std::move(station));
}

// ---- inflow ------------------------------------------------------------------------------

std::unique_ptr<network::Element> NetworkReader::read_inflow(Reader& r, const std::string& id) {
  const std::string file = r.text("file");
  if (file.empty()) return nullptr;
  const std::filesystem::path path = base_dir_ / file;
  return std::make_unique<network::InflowHydrograph>(id, read_hydrograph_csv(path));
}

// ---- subcatchment ------------------------------------------------------------------------

namespace {

std::unique_ptr<hydrology::LossModel> read_pervious_loss(FieldReader& l, const InputUnits& u,
                                                         const std::string& element) {
  // Ranges are checked here, under the file's own field names and units; the loss models
  // check the physics (CN range, porosities, f0 >= fc) again when they are built.
  const std::size_t before = l.problems().size();
  const std::string method =
      l.choice("method", {"curve-number", "green-ampt", "horton", "initial-continuing", "none"});
  if (method == "curve-number") {
    hydrology::CurveNumberParameters p;
    p.curve_number = l.positive("curve_number");
    p.initial_abstraction_ratio =
        l.optional_non_negative("initial_abstraction_ratio").value_or(0.2);
    if (l.problems().size() != before) return nullptr;
    return std::make_unique<hydrology::CurveNumberLoss>(p, element);
  }
  if (method == "green-ampt") {
    hydrology::GreenAmptParameters p;
    p.hydraulic_conductivity_m_s = u.rate_m_s(l.positive("conductivity"));
    p.suction_head_m = u.rain_depth_m(l.positive("suction_head"));
    p.porosity = l.positive("porosity");
    p.effective_porosity = l.positive("effective_porosity");
    p.initial_effective_saturation = l.non_negative("initial_saturation");
    if (l.problems().size() != before) return nullptr;
    return std::make_unique<hydrology::GreenAmptLoss>(p, element);
  }
  if (method == "horton") {
    hydrology::HortonParameters p;
    p.initial_capacity_m_s = u.rate_m_s(l.non_negative("initial_rate"));
    p.final_capacity_m_s = u.rate_m_s(l.non_negative("final_rate"));
    p.decay_rate_per_s = l.positive("decay_per_h") / units::kSecondsPerHour;
    if (l.problems().size() != before) return nullptr;
    return std::make_unique<hydrology::HortonLoss>(p, element);
  }
  if (method == "initial-continuing" || method == "none") {
    hydrology::InitialContinuingParameters p;
    if (method == "initial-continuing") {
      p.initial_loss_m = u.rain_depth_m(l.non_negative("initial_loss"));
      p.continuing_loss_m_s = u.rate_m_s(l.non_negative("continuing_rate"));
    }
    if (l.problems().size() != before) return nullptr;
    return std::make_unique<hydrology::InitialContinuingLoss>(p, element);
  }
  return nullptr;
}

std::unique_ptr<hydrology::LossModel> read_loss(FieldReader& l, const InputUnits& u,
                                                const std::string& element) {
  auto pervious = read_pervious_loss(l, u, element);
  const auto fraction = l.optional_non_negative("impervious_fraction");
  const auto storage = l.optional_non_negative("impervious_storage");
  if (!pervious) return nullptr;
  if (!fraction && !storage) return pervious;
  hydrology::ImperviousCover cover;
  cover.fraction = fraction.value_or(0.0);
  cover.depression_storage_m = u.rain_depth_m(storage.value_or(0.0));
  return std::make_unique<hydrology::CompositeLoss>(cover, std::move(pervious), element);
}

}  // namespace

std::unique_ptr<network::Element> NetworkReader::read_subcatchment(Reader& r,
                                                                  const std::string& id) {
  hydrology::SubcatchmentSpec spec;
  spec.name = id;
  spec.area_m2 = units_.plan_area_m2(r.positive("area"));
  spec.drain.kind = hydrology::DrainKind::node;
  spec.drain.target = id;
  const toml::array* planes = r.optional_array("plane");
  if (!planes || planes->empty()) r.report_here("needs at least one [[subcatchment.plane]]");
  int k = 0;
  for (const toml::node& node : items_of(planes)) {
    ++k;
    const toml::table* t = node.as_table();
    if (!t) continue;
    Reader p(*t, file_, r.element() + " plane " + std::to_string(k), problems_);
    hydrology::OverlandPlaneSpec plane;
    plane.name = id + "/" + std::to_string(k);
    plane.length_m = units_.length_m(p.positive("length"));
    plane.slope = p.positive("slope");
    plane.manning_n = p.positive("manning_n");
    plane.cell_count = static_cast<int>(p.optional_integer("cells", 1).value_or(100));
    p.finish();
    spec.planes.push_back(plane);
  }
  std::unique_ptr<hydrology::LossModel> losses;
  if (const toml::table* loss = r.optional_table("loss")) {
    Reader l(*loss, file_, r.element() + " loss", problems_);
    losses = read_loss(l, units_, r.element());
    l.finish();
  } else {
    r.report_here("is missing required table 'loss' (use method = \"none\" for no losses)");
  }
  if (!losses || !clean()) return nullptr;
  auto model = std::make_unique<hydrology::Subcatchment>(spec, storm_, std::move(losses),
                                                         settings_.plane_routing);
  return std::make_unique<network::SubcatchmentElement>(id, std::move(model));
}

// ---- reach -------------------------------------------------------------------------------

namespace {

// `manning_n` is the reach's n (read by the caller so it is checked whatever the shape).
std::optional<geometry::SectionSpec> read_section(FieldReader& s, FieldReader& reach,
                                                  std::optional<double> manning_n,
                                                  const InputUnits& u) {
  const std::string shape = s.choice(
      "shape", {"rectangular", "trapezoidal", "triangular", "circular", "irregular"});
  if (shape == "irregular" && manning_n) {
    reach.report("manning_n", "is not used by an irregular section: give left_overbank_n, "
                              "main_channel_n and right_overbank_n in the section");
  }
  auto n = [&] {
    if (!manning_n) reach.report_here("is missing required field 'manning_n'");
    return manning_n.value_or(std::numeric_limits<double>::quiet_NaN());
  };
  if (shape == "rectangular") {
    return geometry::RectangularSpec{u.length_m(s.positive("bottom_width")), n()};
  }
  if (shape == "trapezoidal") {
    return geometry::TrapezoidalSpec{u.length_m(s.non_negative("bottom_width")),
                                     s.non_negative("left_side_slope"),
                                     s.non_negative("right_side_slope"), n()};
  }
  if (shape == "triangular") {
    return geometry::TriangularSpec{s.positive("left_side_slope"), s.positive("right_side_slope"),
                                    n()};
  }
  if (shape == "circular") return geometry::CircularSpec{u.length_m(s.positive("diameter")), n()};
  if (shape == "irregular") {
    geometry::IrregularSpec spec;
    const auto stations = s.numbers("stations");
    const auto elevations = s.numbers("elevations");
    if (stations.size() != elevations.size()) {
      s.report("elevations", "has " + std::to_string(elevations.size()) + " values but stations has " +
                                 std::to_string(stations.size()));
    }
    for (std::size_t i = 0; i < std::min(stations.size(), elevations.size()); ++i) {
      spec.points.push_back({u.length_m(stations[i]), u.length_m(elevations[i])});
    }
    spec.left_bank_station_m = u.length_m(s.number("left_bank"));
    spec.right_bank_station_m = u.length_m(s.number("right_bank"));
    spec.left_overbank_n = s.positive("left_overbank_n");
    spec.main_channel_n = s.positive("main_channel_n");
    spec.right_overbank_n = s.positive("right_overbank_n");
    return spec;
  }
  return std::nullopt;
}

}  // namespace

std::unique_ptr<network::Element> NetworkReader::read_reach(Reader& r, const std::string& id) {
  const double length_m = units_.length_m(r.positive("length"));
  const double slope = r.positive("slope");
  const std::optional<double> manning_n = r.optional_positive("manning_n");
  std::optional<geometry::SectionSpec> spec;
  if (const toml::table* section = r.optional_table("section")) {
    Reader s(*section, file_, r.element() + " section", problems_);
    spec = read_section(s, r, manning_n, units_);
    if (spec) s.finish();  // with an unknown shape, its other keys cannot be judged
  } else {
    r.report_here("is missing required table 'section'");
  }
  const auto cells = r.optional_integer("cells", 1);
  const auto cell_length = r.optional_positive("cell_length");
  const auto invert = r.optional_number("outlet_invert");
  routing::RoutingOptions options = settings_.channel_routing;
  if (r.optional_node("scheme")) {
    const std::string scheme = r.choice(
        "scheme", {"explicit-upwind", "implicit-upwind", "method-of-lines", "muscl-heun"});
    if (!scheme.empty()) options.scheme = routing::parse_scheme_kind(scheme);
  }
  if (!spec || !clean()) return nullptr;

  int cell_count = 0;
  if (cells) {
    cell_count = static_cast<int>(*cells);
  } else {
    const double dx = cell_length ? units_.length_m(*cell_length) : settings_.default_cell_length_m;
    cell_count = std::max(4, static_cast<int>(std::ceil(length_m / dx - 1e-9)));
  }
  geometry::FlowSection section = geometry::make_flow_section(*spec, slope, {}, r.element());
  auto reach = routing::make_reach({id, length_m, cell_count}, section.flux, options);
  std::optional<double> invert_m;
  if (invert) invert_m = units_.length_m(*invert);
  return std::make_unique<network::ReachElement>(id, std::move(section), std::move(reach),
                                                 invert_m);
}

// ---- culvert crossing and detention basin --------------------------------------------------

namespace {

std::optional<structures::StageStorage> read_storage(FieldReader& s, const InputUnits& u,
                                                     const std::string& element) {
  if (s.optional_node("stages")) {
    std::vector<double> stage = s.numbers("stages");
    std::vector<double> volume = s.numbers("storages");
    for (double& v : stage) v = u.length_m(v);
    for (double& v : volume) v = u.volume_m3(v);
    return structures::StageStorage::from_table(std::move(stage), std::move(volume),
                                                structures::StorageInterpolation::monotone_cubic,
                                                element);
  }
  const double bottom = u.length_m(s.number("bottom"));
  const double area = u.length_m(u.length_m(s.positive("area")));
  const double growth = u.length_m(s.optional_non_negative("area_growth").value_or(0.0));
  if (!std::isfinite(bottom) || !std::isfinite(area) || !std::isfinite(growth)) return std::nullopt;
  return structures::StageStorage::prismatic(bottom, area, growth, element);
}

}  // namespace

std::unique_ptr<network::Element> NetworkReader::read_culvert(Reader& r, const std::string& id) {
  structures::CulvertSpec spec;
  const toml::table* barrel = r.optional_table("barrel");
  if (!barrel) r.report_here("is missing required table 'barrel'");
  if (barrel) {
    Reader b(*barrel, file_, r.element() + " barrel", problems_);
    const std::string shape = b.choice("shape", {"circular", "box"});
    spec.shape = shape == "box" ? structures::BarrelShape::box : structures::BarrelShape::circular;
    if (shape == "box") {
      spec.rise_m = units_.length_m(b.positive("rise"));
      spec.span_m = units_.length_m(b.positive("span"));
    } else {
      spec.rise_m = units_.length_m(b.positive("diameter"));
    }
    spec.barrel_count = static_cast<int>(b.optional_integer("count", 1).value_or(1));
    spec.length_m = units_.length_m(b.positive("length"));
    spec.inlet_invert_stage_m = units_.length_m(b.number("inlet_invert"));
    spec.outlet_invert_stage_m = units_.length_m(b.number("outlet_invert"));
    spec.manning_n = b.positive("manning_n");
    const std::string inlet = b.text("inlet");
    if (auto type = structures::parse_inlet_type(inlet)) {
      spec.inlet = *type;
    } else if (!inlet.empty()) {
      b.report("inlet", "= '" + inlet + "': unknown inlet type (see docs/basin-file.md)");
    }
    spec.entrance_loss = b.optional_non_negative("entrance_loss");
    b.finish();
  }
  // The tailwater (a fixed downstream water level) acts on the barrels' outlet control and
  // submerges the road weir when it stands above the crest.
  std::optional<double> tailwater;
  if (auto tw = r.optional_number("tailwater")) tailwater = units_.length_m(*tw);
  std::optional<structures::RoadOvertopping> road;
  if (const toml::table* t = r.optional_table("road")) {
    Reader rd(*t, file_, r.element() + " road", problems_);
    std::vector<double> station = rd.numbers("stations");
    std::vector<double> crest = rd.numbers("elevations");
    for (double& v : station) v = units_.length_m(v);
    for (double& v : crest) v = units_.length_m(v);
    const double c = units_.weir_coefficient_si(
        rd.optional_positive("coefficient")
            .value_or(units_.us() ? structures::kRoadOvertoppingCoefficientSi /
                                        std::sqrt(units::kMetresPerFoot)
                                  : structures::kRoadOvertoppingCoefficientSi));
    rd.finish();
    try {
      road.emplace(std::move(station), std::move(crest), c, r.element(), tailwater);
    } catch (const InputError& e) {
      relocate(e, rd, problems_);  // keep reading: the ponding table is checked too
    }
  }
  std::optional<structures::StageStorage> ponding;
  if (const toml::table* t = r.optional_table("ponding")) {
    Reader p(*t, file_, r.element() + " ponding", problems_);
    ponding = read_storage(p, units_, r.element());
    p.finish();
  } else {
    r.report_here("is missing required table 'ponding' (the storage upstream of the road)");
  }
  if (!barrel || !ponding || !clean()) return nullptr;
  // Rate to above anything the pond, the road or the barrels will see (above the table the
  // barrels are computed directly, more slowly).
  double top_m = std::max(spec.inlet_invert_stage_m + 3.0 * spec.rise_m,
                          ponding->top_stage_m() + 1.0);
  if (road) top_m = std::max(top_m, road->lowest_crest_stage_m() + 3.0);
  auto build = [&]() -> CrossingCache::Crossing {
    return std::make_shared<const structures::CulvertCrossing>(
        structures::Culvert(spec, r.element()), road, tailwater, top_m, r.element());
  };
  CrossingCache::Crossing crossing =
      cache_ ? cache_->get_or_build(cache_scope_ + "/" + id, build) : build();
  structures::LevelPoolOptions options;
  options.max_substep_s = 10.0;
  return std::make_unique<network::PoolElement>(id, ElementKind::culvert, std::move(crossing),
                                                std::move(*ponding), options);
}

namespace {

std::optional<structures::Outlet> read_outlet(FieldReader& o, const InputUnits& u) {
  const std::string type = o.choice("type", {"orifice", "weir", "v-notch"});
  if (type == "orifice") {
    structures::Orifice orifice;
    orifice.invert_stage_m = u.length_m(o.number("invert"));
    if (o.optional_node("diameter")) {
      orifice.shape = structures::OrificeShape::circular;
      orifice.diameter_m = u.length_m(o.positive("diameter"));
    } else {
      orifice.shape = structures::OrificeShape::rectangular;
      orifice.width_m = u.length_m(o.positive("width"));
      orifice.height_m = u.length_m(o.positive("height"));
    }
    if (auto cd = o.optional_positive("coefficient")) orifice.discharge_coefficient = *cd;
    return orifice;
  }
  if (type == "weir") {
    structures::RectangularWeir weir;
    weir.crest_stage_m = u.length_m(o.number("crest"));
    weir.length_m = u.length_m(o.positive("length"));
    if (auto c = o.optional_positive("coefficient")) weir.coefficient_si = u.weir_coefficient_si(*c);
    return weir;
  }
  if (type == "v-notch") {
    structures::VNotchWeir weir;
    weir.vertex_stage_m = u.length_m(o.number("vertex"));
    weir.notch_angle_deg = o.positive("angle_deg");
    if (auto c = o.optional_positive("coefficient")) weir.discharge_coefficient = *c;
    return weir;
  }
  return std::nullopt;
}

}  // namespace

std::unique_ptr<network::Element> NetworkReader::read_detention(Reader& r, const std::string& id) {
  std::optional<structures::StageStorage> storage;
  if (const toml::table* t = r.optional_table("storage")) {
    Reader s(*t, file_, r.element() + " storage", problems_);
    storage = read_storage(s, units_, r.element());
    s.finish();
  } else {
    r.report_here("is missing required table 'storage'");
  }
  std::vector<structures::Outlet> outlets;
  const toml::array* list = r.optional_array("outlet");
  if (!list || list->empty()) r.report_here("needs at least one [[detention.outlet]]");
  int k = 0;
  for (const toml::node& node : items_of(list)) {
    ++k;
    if (const toml::table* t = node.as_table()) {
      Reader o(*t, file_, r.element() + " outlet " + std::to_string(k), problems_);
      if (auto outlet = read_outlet(o, units_)) outlets.push_back(*outlet);
      o.finish();
    }
  }
  const auto initial = r.optional_number("initial_stage");
  if (initial && storage && units_.length_m(*initial) < storage->bottom_stage_m()) {
    const double bottom = storage->bottom_stage_m() / units_.length_m(1.0);  // file's unit
    r.report("initial_stage", "= " + format_value(*initial) + ": is below the bottom of the "
                              "storage (" + format_value(bottom) + " " + units_.length_unit() +
                              ")");
  }
  if (!storage || outlets.empty() || !clean()) return nullptr;
  auto riser = std::make_unique<structures::Riser>(std::move(outlets), r.element());
  const double start_m = initial ? units_.length_m(*initial) : storage->bottom_stage_m();
  structures::LevelPoolOptions options;
  options.max_substep_s = 10.0;
  return std::make_unique<network::PoolElement>(id, std::move(riser), std::move(*storage), options,
                                                start_m);
}

}  // namespace freshet::io::detail
