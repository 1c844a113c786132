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
#include "freshet/network/run_budget.hpp"
#include "freshet/network/simple_elements.hpp"
#include "freshet/routing/make_reach.hpp"
#include "freshet/io/input_ranges.hpp"

namespace freshet::study::detail {

namespace structures = network::structures;
using network::ElementKind;
using Q = Quantity;

void relocate(const InputError& e, const FieldReader& at, std::vector<Problem>& problems) {
  relocate(e.problems(), at, problems);
}

void relocate(const std::vector<Problem>& found, const FieldReader& at,
              std::vector<Problem>& problems) {
  for (Problem p : found) {
    if (p.file.empty()) {
      p.file = at.file();
      p.line = at.line();
      p.column = at.column();
    }
    if (p.element.empty()) p.element = at.element();
    problems.push_back(std::move(p));
  }
}

void report_file_error(FieldReader& at, const IoError& e) {
  if (at.has("file")) {
    at.report("file", "= '" + at.optional_text("file").value_or("") + "': " + e.what());
  } else {
    at.report_here(e.what());
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
                             const StudySettings& settings, const StormDefinition& storm,
                             std::vector<Problem>& problems, CrossingCache* cache,
                             std::string cache_scope, std::vector<Problem>* warnings)
    : root_(root),
      changes_(changes),
      cache_(cache),
      cache_scope_(std::move(cache_scope)),
      file_(std::move(file)),
      base_dir_(std::move(base_dir)),
      settings_(settings),
      units_{settings.units},
      storm_(storm),
      problems_(problems),
      warnings_(warnings) {}

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
  if (complete_) check_work();
  if (!complete_) return {};
  return std::move(model_);
}

constexpr double kBytesPerMegabyte = 1024.0 * 1024.0;

// Counts an element's cells towards the run's memory before anything is allocated; false,
// with a problem on 'cells', when the network would no longer fit the budget.
// Reported once: the elements after the first that does not fit are not built either.
bool NetworkReader::admit_cells(Reader& r, int cells) {
  if (over_memory_budget_) return false;
  size_.cells += std::max(cells, 0);
  const network::RunEstimate e = network::estimate_run(size_, settings_.clock());
  if (network::exceeds_memory(e, settings_.budget)) {
    over_memory_budget_ = true;
    r.report("cells", "= " + std::to_string(cells) + ": the network would hold at least " +
                          format_value(size_.cells) + " cells, an estimated " +
                          format_fixed(e.memory_bytes / kBytesPerMegabyte, 0) + " MB (" +
                          format_value(network::kBytesPerCell) + " B per cell), more than the "
                          "memory budget of " +
                          format_fixed(settings_.budget.max_memory_bytes / kBytesPerMegabyte, 0) +
                          " MB; use fewer cells (or a longer cell_length), or raise "
                          "max_memory_mb in [study] to lift the limit");
  } else {
    return true;
  }
  complete_ = false;
  return false;
}

// The run's work, once every element is counted: refused beyond the budget, before a run is
// started that could not finish.
void NetworkReader::check_work() {
  // A clock with problems has them reported where its keys are read; no work to judge.
  if (!settings_.clock().problems().empty()) return;
  size_.elements = static_cast<double>(model_.links.size());
  const network::RunEstimate e = network::estimate_run(size_, settings_.clock());
  if (!network::exceeds_work(e, settings_.budget)) return;
  const toml::node* study = root_.get("study");
  const auto where = study ? study->source().begin : toml::source_position{};
  problems_.push_back(
      {file_, static_cast<int>(where.line), static_cast<int>(where.column), "study", "",
       "the run would take at least " + format_value(e.cell_steps) + " cell updates (" +
           format_value(size_.cells) + " cells and " + format_value(size_.elements) +
           " elements x " + format_value(e.coupling_steps) + " coupling steps), more than the "
           "work budget of " + format_value(settings_.budget.max_cell_steps) +
           "; shorten duration_h, lengthen coupling_step_s, use fewer cells, or raise "
           "max_cell_steps in [study] to lift the limit"});
  complete_ = false;
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

namespace {

// `location = { longitude = .., latitude = .. }`: where the element is on the map, WGS 84
// degrees (a GeoJSON position's order, RFC 7946 sec. 3.1.1).
void read_location(FieldReader l, StationDescription& station) {
  const double longitude = l.number("longitude");
  const double latitude = l.number("latitude");
  l.finish();
  bool ok = std::isfinite(longitude) && std::isfinite(latitude);
  if (std::isfinite(longitude) && (longitude < -180.0 || longitude > 180.0)) {
    l.report("longitude", "= " + format_value(longitude) + ": must be in [-180, 180] degrees east "
                          "(WGS 84)");
    ok = false;
  }
  if (std::isfinite(latitude) && (latitude < -90.0 || latitude > 90.0)) {
    l.report("latitude", "= " + format_value(latitude) + ": must be in [-90, 90] degrees north "
                         "(WGS 84)");
    ok = false;
  }
  if (!ok) return;
  station.longitude_deg = longitude;
  station.latitude_deg = latitude;
}

}  // namespace

template <class ReadFn>
void NetworkReader::element(const toml::table& table, ElementKind kind, ReadFn&& read) {
  const auto* id_node = table.get("id");
  const std::string id = id_node && id_node->is_string() ? id_node->value_or(std::string{}) : "";
  const toml::table* changed = changes_ ? changes_->get_as<toml::table>(id) : nullptr;
  // An element a scenario changes is named with the scenario: its problems are the scenario's.
  const std::string label = (changed ? "scenario '" + cache_scope_ + "', " : std::string{}) +
                            std::string(network::to_string(kind)) + " '" + id + "'";
  Reader r(table, file_, label, problems_, changed);
  r.set_warnings(warnings_);
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
  StationDescription station{link.id, kind,
                             r.optional_text("name").value_or(link.id), link.to, false};
  if (const toml::table* where = r.optional_table("location")) {
    read_location(r.nested(*where, "location"), station);
  }
  const std::size_t before = problems_.size();
  element_start_ = before;
  std::unique_ptr<network::Element> e;
  try {
    e = read(r, link.id);
  } catch (const InputError& error) {
    relocate(error, r, problems_);
    r.consume_all();  // reading stopped here: the keys not yet read cannot be judged
  } catch (const IoError& error) {  // a file named by the element (an inflow's CSV)
    report_file_error(r, error);
    r.consume_all();
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
  return std::make_unique<network::InflowHydrograph>(id, io::read_hydrograph_csv(path));
}

// ---- subcatchment ------------------------------------------------------------------------

namespace {

// "= 0.5 in/h" style: a value quoted as the file gives it.
std::string quoted(double value, const char* unit) {
  return "= " + format_value(value) + (unit && *unit ? std::string(" ") + unit : "");
}


// NRCS curve number. `curve_number_for_ratio` says for which lambda the CN was derived: 0.2
// (the default: a tabulated TR-55 value), converted to the 0.05 basis by Hawkins et al.
// (2002) when initial_abstraction_ratio = 0.05; or 0.05 (a CN already on that basis).
hydrology::CurveNumberParameters read_curve_number(FieldReader& l) {
  hydrology::CurveNumberParameters p;
  const InputUnits ratios;  // the keys here are dimensionless
  p.curve_number = ranged(l, ratios, "curve_number", Q::curve_number);
  const auto ratio =
      optional_ranged(l, ratios, "initial_abstraction_ratio", Q::initial_abstraction_ratio);
  p.initial_abstraction_ratio = ratio.value_or(0.2);
  const double basis = l.optional_number("curve_number_for_ratio").value_or(0.2);
  if (std::isfinite(basis) && basis != 0.2 && basis != 0.05) {
    l.report("curve_number_for_ratio",
             quoted(basis, "") + ": must be 0.2 (a tabulated curve number) or 0.05 (a curve "
                                 "number derived for initial_abstraction_ratio = 0.05)");
  } else if (basis == 0.05 && p.initial_abstraction_ratio != 0.05) {
    l.report("curve_number_for_ratio",
             "= 0.05 needs initial_abstraction_ratio = 0.05 (found " +
                 format_value(p.initial_abstraction_ratio) +
                 "); freshet converts a curve number only from the 0.2 basis to 0.05");
  }
  p.convert_storage_for_ratio_0_05 = p.initial_abstraction_ratio == 0.05 && basis == 0.2;
  const std::string season =
      l.choice("antecedent_season", {"none", "dormant", "growing"}, std::string("none"));
  p.antecedent.season = season == "dormant"   ? hydrology::GrowingSeason::dormant
                        : season == "growing" ? hydrology::GrowingSeason::growing
                                              : hydrology::GrowingSeason::none;
  const auto gap_h = optional_ranged(l, ratios, "event_gap_h", Q::event_gap_h);
  if (gap_h && p.antecedent.season == hydrology::GrowingSeason::none) {
    l.report("event_gap_h", quoted(*gap_h, "h") +
                                ": has no effect without antecedent_season (give \"dormant\" "
                                "or \"growing\", or remove this key)");
  }
  p.antecedent.event_gap_s = gap_h.value_or(6.0) * units::kSecondsPerHour;
  return p;
}

hydrology::GreenAmptParameters read_green_ampt(FieldReader& l, const InputUnits& u) {
  hydrology::GreenAmptParameters p;
  p.hydraulic_conductivity_m_s = u.rate_m_s(ranged(l, u, "conductivity", Q::conductivity));
  p.suction_head_m = u.rain_depth_m(ranged(l, u, "suction_head", Q::suction_head));
  p.porosity = ranged(l, u, "porosity", Q::porosity);
  p.effective_porosity = ranged(l, u, "effective_porosity", Q::porosity);
  if (p.effective_porosity > p.porosity) {  // false when either is NaN
    l.report("effective_porosity", quoted(p.effective_porosity, "") +
                                       ": must not exceed porosity = " +
                                       format_value(p.porosity));
  }
  p.initial_effective_saturation = ranged(l, u, "initial_saturation", Q::initial_saturation);
  p.recovery_rate_per_s =
      optional_ranged(l, u, "recovery_per_h", Q::green_ampt_recovery).value_or(0.0) /
      units::kSecondsPerHour;
  return p;
}

hydrology::HortonParameters read_horton(FieldReader& l, const InputUnits& u) {
  const double f0 = ranged(l, u, "initial_rate", Q::horton_initial_rate);
  const double fc = ranged(l, u, "final_rate", Q::horton_final_rate);
  if (f0 < fc) {  // false when either is NaN
    l.report("initial_rate", quoted(f0, u.rate_unit()) + ": must be >= final_rate = " +
                                 format_value(fc) + " " + u.rate_unit());
  }
  hydrology::HortonParameters p;
  p.initial_capacity_m_s = u.rate_m_s(f0);
  p.final_capacity_m_s = u.rate_m_s(fc);
  p.decay_rate_per_s = ranged(l, u, "decay_per_h", Q::horton_decay) / units::kSecondsPerHour;
  p.recovery_rate_per_s =
      optional_ranged(l, u, "recovery_per_h", Q::horton_recovery).value_or(0.0) /
      units::kSecondsPerHour;
  return p;
}

// Ranges are checked here, under the file's own field names and units; the loss models
// check the physics again when they are built (a safety net: their messages use SI names).
std::unique_ptr<hydrology::LossModel> read_pervious_loss(FieldReader& l, const InputUnits& u,
                                                         const std::string& element) {
  const std::size_t before = l.problems().size();
  const std::string method =
      l.choice("method", {"curve-number", "green-ampt", "horton", "initial-continuing", "none"});
  if (method.empty()) {
    l.consume_all();  // without a method, its keys cannot be judged
    return nullptr;
  }
  if (method == "curve-number") {
    const auto p = read_curve_number(l);
    if (l.problems().size() != before) return nullptr;
    return std::make_unique<hydrology::CurveNumberLoss>(p, element);
  }
  if (method == "green-ampt") {
    const auto p = read_green_ampt(l, u);
    if (l.problems().size() != before) return nullptr;
    return std::make_unique<hydrology::GreenAmptLoss>(p, element);
  }
  if (method == "horton") {
    const auto p = read_horton(l, u);
    if (l.problems().size() != before) return nullptr;
    return std::make_unique<hydrology::HortonLoss>(p, element);
  }
  hydrology::InitialContinuingParameters p;
  if (method == "initial-continuing") {
    p.initial_loss_m = u.rain_depth_m(ranged(l, u, "initial_loss", Q::initial_loss));
    p.continuing_loss_m_s = u.rate_m_s(ranged(l, u, "continuing_rate", Q::continuing_rate));
  }
  if (l.problems().size() != before) return nullptr;
  return std::make_unique<hydrology::InitialContinuingLoss>(p, element);
}

}  // namespace

std::unique_ptr<hydrology::LossModel> read_loss(FieldReader& l, const InputUnits& u,
                                                const std::string& element) {
  auto pervious = read_pervious_loss(l, u, element);
  const auto fraction = optional_ranged(l, u, "impervious_fraction", Q::impervious_fraction);
  const auto storage = optional_ranged(l, u, "impervious_storage", Q::impervious_storage);
  const auto evaporation =
      optional_ranged(l, u, "impervious_evaporation", Q::impervious_evaporation);
  if (storage && !fraction) {
    l.report("impervious_storage",
             quoted(*storage, u.depth_unit()) + ": has no effect without impervious_fraction "
                                                "(give the impervious share, or remove this key)");
  }
  if (evaporation && !storage) {
    l.report("impervious_evaporation",
             quoted(*evaporation, u.rate_unit()) +
                 ": has no effect without impervious_storage (give the depression storage it "
                 "empties, or remove this key)");
  }
  if (!pervious || (fraction && !(*fraction <= 1.0)) || (storage && !fraction) ||
      (evaporation && !storage)) {
    return nullptr;
  }
  if (!fraction) return pervious;
  hydrology::ImperviousCover cover;
  cover.fraction = *fraction;
  cover.depression_storage_m = u.rain_depth_m(storage.value_or(0.0));
  cover.evaporation_m_s = u.rate_m_s(evaporation.value_or(0.0));
  return std::make_unique<hydrology::CompositeLoss>(cover, std::move(pervious), element);
}

namespace {

// The planes' width is the area over their length (hydrology/subcatchment.hpp). Overland
// flow reaches a channel within a plane length, so the width is about twice the channel
// length in the subcatchment (Horton 1945: overland flow length = 1 / (2 x drainage
// density), from memory); a width 10000 times the plane length means far more channel than
// any subcatchment holds. The usual cause is an area in m2 (or ft2) typed where ha (acre) are
// expected. Our criterion: the demo's planes are 38 to 122 times wider than long.
constexpr double kMaxPlaneAspect = 1e4;

void check_plane_shape(FieldReader& r, const hydrology::SubcatchmentSpec& spec,
                       const InputUnits& u) {
  double length_m = 0.0;
  for (const auto& p : spec.planes) length_m += p.length_m;
  if (!(length_m > 0.0) || !(spec.area_m2 / (length_m * length_m) > kMaxPlaneAspect)) return;
  const double width_m = spec.area_m2 / length_m;
  r.warn("area", "= " + readable_number(spec.area_m2 / u.plan_area_m2(1.0)) + " " +
                     (u.us() ? "acre" : "ha") + ": its planes (" +
                     format_value(u.length_in_file(length_m)) + " " + u.length_unit() +
                     " long) would be " + format_fixed(width_m / 1000.0, 0) + " km wide, over " +
                     format_value(kMaxPlaneAspect) + " times their length (a width is about "
                     "twice the channel length it drains to; Horton 1945, from memory): is the "
                     "area in " + (u.us() ? "ft2" : "m2") + " instead of " +
                     (u.us() ? "acres" : "ha") + "?");
}

}  // namespace

std::unique_ptr<network::Element> NetworkReader::read_subcatchment(Reader& r,
                                                                  const std::string& id) {
  hydrology::SubcatchmentSpec spec;
  spec.name = id;
  spec.area_m2 = units_.plan_area_m2(ranged(r, units_, "area", Q::subcatchment_area));
  spec.drain.kind = hydrology::DrainKind::node;
  spec.drain.target = id;
  const toml::array* planes = r.optional_array("plane");
  if (!planes || planes->empty()) r.report_here("needs at least one [[subcatchment.plane]]");
  bool fits = true;  // within the memory budget
  int k = 0;
  for (const toml::node& node : items_of(planes)) {
    ++k;
    const toml::table* t = node.as_table();
    if (!t) continue;
    Reader p = r.nested(*t, "plane " + std::to_string(k));
    hydrology::OverlandPlaneSpec plane;
    plane.name = id + "/" + std::to_string(k);
    plane.length_m = units_.length_m(ranged(p, units_, "length", Q::plane_length));
    plane.slope = ranged(p, units_, "slope", Q::plane_slope);
    plane.manning_n = ranged(p, units_, "manning_n", Q::plane_manning_n);
    plane.cell_count =
        static_cast<int>(optional_ranged_integer(p, "cells", Q::plane_cells).value_or(100));
    fits = admit_cells(p, plane.cell_count) && fits;
    p.finish();
    spec.planes.push_back(plane);
  }
  std::unique_ptr<hydrology::LossModel> losses;
  if (const toml::table* loss = r.optional_table("loss")) {
    Reader l = r.nested(*loss, "loss");
    losses = read_loss(l, units_, r.element());
    l.finish();
  } else {
    r.report_here("is missing required table 'loss' (use method = \"none\" for no losses)");
  }
  if (!losses || !clean() || !fits) return nullptr;
  check_plane_shape(r, spec, units_);
  const auto own = storm_.subcatchment_rain.find(id);
  const hydrology::Hyetograph& rain =
      own == storm_.subcatchment_rain.end() ? storm_.rain : own->second;
  auto model = std::make_unique<hydrology::Subcatchment>(spec, rain, std::move(losses),
                                                         settings_.plane_routing);
  return std::make_unique<network::SubcatchmentElement>(id, std::move(model));
}

// ---- reach -------------------------------------------------------------------------------

namespace {

// A value whose range starts at 0 but must not be 0 here (a rectangle's width, a triangle's
// sides).
double positive_ranged(FieldReader& s, const InputUnits& u, std::string_view key, Quantity q) {
  const double v = ranged(s, u, key, q);
  if (v == 0.0) s.report(key, "= 0: must be > 0");
  return v == 0.0 ? std::numeric_limits<double>::quiet_NaN() : v;
}

// A surveyed section's rules in the file's keys and units (geometry checks them again in SI):
// at least 3 points, offsets not decreasing (an equal offset is a vertical wall), the channel
// limits in order and inside the survey.
void check_survey(FieldReader& s, const std::vector<double>& offsets, double left, double right,
                  const InputUnits& u) {
  const char* unit = u.length_unit();
  if (offsets.size() < 3) {
    s.report("offsets", "has " + std::to_string(offsets.size()) + " values: needs >= 3");
  }
  for (std::size_t k = 1; k < offsets.size(); ++k) {
    if (offsets[k] < offsets[k - 1]) {
      s.report_item("offsets", k, quoted(offsets[k], unit) + ": offsets must not decrease "
                                      "from left to right (the one before is " +
                                      format_value(offsets[k - 1]) + " " + unit + ")");
    }
  }
  if (left > right) {
    s.report("channel_left", quoted(left, unit) + ": must not exceed channel_right = " +
                                 format_value(right) + " " + unit);
  }
  if (offsets.empty()) return;
  const double first = offsets.front(), last = offsets.back();
  for (const auto& [key, v] : {std::pair{"channel_left", left}, std::pair{"channel_right", right}}) {
    if (v < first || v > last) {
      s.report(key, quoted(v, unit) + ": must lie within the survey's offsets (" +
                        format_value(first) + " to " + format_value(last) + " " + unit + ")");
    }
  }
}

// `manning_n` is the reach's n (read by the caller so it is checked whatever the shape).
std::optional<geometry::SectionSpec> read_section(FieldReader& s, FieldReader& reach,
                                                  std::optional<double> manning_n,
                                                  const InputUnits& u) {
  const std::string shape = s.choice(
      "shape", {"rectangular", "trapezoidal", "triangular", "circular", "irregular"});
  if (shape == "irregular" && manning_n) {
    reach.report("manning_n", "is not used by an irregular section: give left_floodplain_n, "
                              "channel_n and right_floodplain_n in the section");
  }
  auto n = [&] {
    if (!manning_n) reach.report_here("is missing required field 'manning_n'");
    return manning_n.value_or(std::numeric_limits<double>::quiet_NaN());
  };
  if (shape == "rectangular") {
    return geometry::RectangularSpec{u.length_m(positive_ranged(s, u, "bottom_width",
                                                                Q::channel_width)), n()};
  }
  if (shape == "trapezoidal") {
    return geometry::TrapezoidalSpec{u.length_m(ranged(s, u, "bottom_width", Q::channel_width)),
                                     ranged(s, u, "left_side_slope", Q::side_slope),
                                     ranged(s, u, "right_side_slope", Q::side_slope), n()};
  }
  if (shape == "triangular") {
    return geometry::TriangularSpec{positive_ranged(s, u, "left_side_slope", Q::side_slope),
                                    positive_ranged(s, u, "right_side_slope", Q::side_slope),
                                    n()};
  }
  if (shape == "circular") {
    return geometry::CircularSpec{u.length_m(ranged(s, u, "diameter", Q::conduit_size)), n()};
  }
  if (shape == "irregular") {
    geometry::IrregularSpec spec;
    // A survey: offsets across the section (left to right) and the bed level at each; the
    // main channel lies between two offsets, with its own n and one for each floodplain.
    const auto offsets = ranged_numbers(s, u, "offsets", Q::section_offset);
    const auto levels = ranged_numbers(s, u, "levels", Q::elevation);
    if (offsets.size() != levels.size()) {
      s.report("levels", "has " + std::to_string(levels.size()) + " values but offsets has " +
                             std::to_string(offsets.size()) + ": give one level per offset");
    }
    for (std::size_t i = 0; i < std::min(offsets.size(), levels.size()); ++i) {
      spec.points.push_back({u.length_m(offsets[i]), u.length_m(levels[i])});
    }
    const double left = ranged(s, u, "channel_left", Q::section_offset);
    const double right = ranged(s, u, "channel_right", Q::section_offset);
    check_survey(s, offsets, left, right, u);
    spec.left_bank_station_m = u.length_m(left);
    spec.right_bank_station_m = u.length_m(right);
    spec.left_overbank_n = ranged(s, u, "left_floodplain_n", Q::reach_manning_n);
    spec.main_channel_n = ranged(s, u, "channel_n", Q::reach_manning_n);
    spec.right_overbank_n = ranged(s, u, "right_floodplain_n", Q::reach_manning_n);
    return spec;
  }
  return std::nullopt;
}

}  // namespace

std::unique_ptr<network::Element> NetworkReader::read_reach(Reader& r, const std::string& id) {
  const double length_m = units_.length_m(ranged(r, units_, "length", Q::reach_length));
  const double slope = ranged(r, units_, "slope", Q::reach_slope);
  const std::optional<double> manning_n =
      optional_ranged(r, units_, "manning_n", Q::reach_manning_n);
  std::optional<geometry::SectionSpec> spec;
  if (const toml::table* section = r.optional_table("section")) {
    Reader s = r.nested(*section, "section");
    spec = read_section(s, r, manning_n, units_);
    if (spec) s.finish();  // with an unknown shape, its other keys cannot be judged
  } else {
    r.report_here("is missing required table 'section'");
  }
  const auto cells = optional_ranged_integer(r, "cells", Q::reach_cells);
  const auto cell_length = optional_ranged(r, units_, "cell_length", Q::cell_length);
  const auto invert = optional_ranged(r, units_, "outlet_invert", Q::elevation);
  routing::RoutingOptions options = settings_.channel_routing;
  if (r.optional_node("scheme")) {
    const std::string scheme = r.choice("scheme", routing::scheme_names());
    if (!scheme.empty()) options.scheme = routing::parse_scheme_kind(scheme);
  }
  if (!spec || !clean()) return nullptr;
  if (reach_scheme_) options.scheme = (*reach_scheme_)(id, options.scheme);

  int cell_count = 0;
  if (cells) {
    cell_count = static_cast<int>(*cells);
  } else {
    const double dx = cell_length ? units_.length_m(*cell_length) : settings_.default_cell_length_m;
    const double count = std::ceil(length_m / dx - 1e-9);
    if (count > static_cast<double>(kMaxCells)) {
      const std::string why = "gives " + format_fixed(count, 0) + " cells over the reach's " +
                              format_value(units_.length_in_file(length_m)) + " " +
                              units_.length_unit() + ": at most " + std::to_string(kMaxCells) +
                              " (the memory of one run); give a longer cell_length or cells";
      if (cell_length) {
        r.report("cell_length", quoted(*cell_length, units_.length_unit()) + ": " + why);
      } else {
        r.report("length", "with the default cell_length (" +
                               format_value(units_.length_in_file(dx)) + " " +
                               units_.length_unit() + ") " + why);
      }
      return nullptr;
    }
    cell_count = std::max(4, static_cast<int>(count));
  }
  if (!admit_cells(r, cell_count)) return nullptr;
  geometry::FlowSection section = geometry::make_flow_section(*spec, slope, {}, r.element());
  auto reach = routing::make_reach({id, length_m, cell_count}, section, options);
  std::optional<double> invert_m;
  if (invert) invert_m = units_.length_m(*invert);
  return std::make_unique<network::ReachElement>(id, std::move(section), std::move(reach),
                                                 invert_m);
}

// ---- culvert crossing and detention basin --------------------------------------------------

namespace {

// A pool's stage-storage relation with its limits as the file gives them (file units), so
// the checks where storage meets outflow quote the user's own numbers.
struct PoolStorage {
  structures::StageStorage relation;
  double bottom = 0.0;        // first stage of the table, or the prismatic bottom
  std::optional<double> top;  // last stage of a table (a prismatic pond has no top)

  // Reports `message` at the bottom's key (stages[1] or bottom).
  void report_bottom(FieldReader& s, const std::string& message) const {
    if (top) {
      s.report_item("stages", 0, message);
    } else {
      s.report("bottom", message);
    }
  }
};

// The rules of StageStorage::from_table, in the file's keys and units.
void check_storage_table(FieldReader& s, const std::vector<double>& h,
                         const std::vector<double>& v, const InputUnits& u) {
  if (h.size() != v.size()) {
    s.report("storages", "has " + std::to_string(v.size()) + " values but stages has " +
                             std::to_string(h.size()) + ": give one storage per stage");
  }
  if (h.size() < 2) s.report("stages", "has " + std::to_string(h.size()) + " values: needs >= 2");
  for (std::size_t k = 1; k < h.size(); ++k) {
    if (h[k] <= h[k - 1]) {
      s.report_item("stages", k, quoted(h[k], u.length_unit()) +
                                     ": stages must strictly increase (the one before is " +
                                     format_value(h[k - 1]) + " " + u.length_unit() + ")");
    }
  }
  if (!v.empty() && v.front() != 0.0 && std::isfinite(v.front())) {
    s.report_item("storages", 0, quoted(v.front(), u.volume_unit()) +
                                     ": must be 0 (the empty pond at the first stage)");
  }
  for (std::size_t k = 1; k < v.size(); ++k) {
    if (v[k] < v[k - 1]) {
      s.report_item("storages", k, quoted(v[k], u.volume_unit()) +
                                       ": storage must not decrease (the one before is " +
                                       format_value(v[k - 1]) + " " + u.volume_unit() + ")");
    } else if (k + 1 == v.size() && k + 1 == h.size() && !(v[k] > v[k - 1])) {
      s.report_item("storages", k, quoted(v[k], u.volume_unit()) +
                                       ": must exceed the storage before it (" +
                                       format_value(v[k - 1]) + " " + u.volume_unit() +
                                       "): above its last point the table continues with the "
                                       "last surface area, which must not be 0");
    }
  }
}

std::optional<PoolStorage> read_storage(FieldReader& s, const InputUnits& u,
                                        const std::string& element) {
  const std::size_t before = s.problems().size();
  if (s.optional_node("stages")) {
    std::vector<double> stage = ranged_numbers(s, u, "stages", Q::elevation);
    std::vector<double> volume = ranged_numbers(s, u, "storages", Q::storage_volume);
    if (s.problems().size() == before) check_storage_table(s, stage, volume, u);
    if (s.problems().size() != before) return std::nullopt;
    const double bottom = stage.front(), top = stage.back();
    for (double& v : stage) v = u.length_m(v);
    for (double& v : volume) v = u.volume_m3(v);
    try {
      return PoolStorage{structures::StageStorage::from_table(
                             std::move(stage), std::move(volume),
                             structures::StorageInterpolation::monotone_cubic, element),
                         bottom, top};
    } catch (const InputError& e) {
      relocate(e, s, s.problems());
      return std::nullopt;
    }
  }
  const double bottom = ranged(s, u, "bottom", Q::elevation);
  const double area = ranged(s, u, "area", Q::pond_area);
  const double growth =
      optional_ranged(s, u, "area_growth", Q::pond_area_growth).value_or(0.0);
  if (s.problems().size() != before) return std::nullopt;
  return PoolStorage{structures::StageStorage::prismatic(u.length_m(bottom),
                                                         u.length_m(u.length_m(area)),
                                                         u.length_m(growth), element),
                     bottom, std::nullopt};
}

// The tables of a culvert crossing as read, in file units where the checks need them.
struct CrossingInput {
  structures::CulvertSpec spec;
  double inlet_invert = std::numeric_limits<double>::quiet_NaN();  // file units
  std::optional<double> tailwater;                                 // file units
};

void read_barrel(FieldReader& b, const InputUnits& u, CrossingInput& in) {
  structures::CulvertSpec& spec = in.spec;
  const std::string shape = b.choice("shape", {"circular", "box"});
  spec.shape = shape == "box" ? structures::BarrelShape::box : structures::BarrelShape::circular;
  if (shape == "box") {
    spec.rise_m = u.length_m(ranged(b, u, "rise", Q::conduit_size));
    spec.span_m = u.length_m(ranged(b, u, "span", Q::conduit_size));
  } else {
    spec.rise_m = u.length_m(ranged(b, u, "diameter", Q::conduit_size));
  }
  spec.barrel_count =
      static_cast<int>(optional_ranged_integer(b, "count", Q::barrel_count).value_or(1));
  spec.length_m = u.length_m(ranged(b, u, "length", Q::barrel_length));
  in.inlet_invert = ranged(b, u, "inlet_invert", Q::elevation);
  spec.inlet_invert_stage_m = u.length_m(in.inlet_invert);
  spec.outlet_invert_stage_m = u.length_m(ranged(b, u, "outlet_invert", Q::elevation));
  spec.manning_n = ranged(b, u, "manning_n", Q::barrel_manning_n);
  const std::string inlet = b.text("inlet");
  if (auto type = structures::parse_inlet_type(inlet)) {
    spec.inlet = *type;
    if (!shape.empty() && structures::inlet_coefficients(*type).shape != spec.shape) {
      b.report("inlet", "= '" + inlet + "': inlet type is for the other barrel shape (shape = '" +
                            shape + "')");
    }
  } else if (!inlet.empty()) {
    b.report("inlet", "= '" + inlet + "': unknown inlet type (see docs/basin-file.md)");
  }
  spec.entrance_loss = optional_ranged(b, u, "entrance_loss", Q::entrance_loss);
}

// The barrels must start from the pond: its relation reaches down to the inlet invert.
void check_ponding_floor(FieldReader& p, const PoolStorage& ponding, const CrossingInput& in,
                         const InputUnits& u) {
  if (!(ponding.bottom > in.inlet_invert)) return;
  const std::string what = ponding.top ? "the ponding table starts" : "the ponding bottom is";
  ponding.report_bottom(
      p, quoted(ponding.bottom, u.length_unit()) + ": " + what + " above the barrel inlet "
             "invert " + format_value(in.inlet_invert) + " " + u.length_unit() +
             ", so the barrels would discharge from an empty pond: extend the " +
             (ponding.top ? "table down to the invert (storage 0 there)"
                          : "pond down to the invert (bottom = inlet_invert)"));
}

// The pond starts at the tailwater when it stands above the inlet invert.
void check_tailwater(FieldReader& r, const PoolStorage& ponding, const CrossingInput& in,
                     const InputUnits& u) {
  if (!in.tailwater || !ponding.top || !(*in.tailwater > *ponding.top) ||
      !(*in.tailwater > in.inlet_invert)) {
    return;
  }
  r.report("tailwater", quoted(*in.tailwater, u.length_unit()) +
                            ": the pond starts at the tailwater, above the top of the ponding "
                            "table (" + format_value(*ponding.top) + " " + u.length_unit() +
                            "): extend the table up to the tailwater level");
}

std::optional<structures::RoadOvertopping> read_road(FieldReader& rd, const InputUnits& u,
                                                     const CrossingInput& in,
                                                     const std::optional<PoolStorage>& ponding) {
  const std::size_t before = rd.problems().size();
  // The crest profile: offsets along the road and the crest level at each.
  const std::vector<double> station = ranged_numbers(rd, u, "offsets", Q::road_offset);
  const std::vector<double> crest = ranged_numbers(rd, u, "levels", Q::elevation);
  const auto c = optional_ranged(rd, u, "coefficient", Q::weir_coefficient);
  if (rd.problems().size() != before) return std::nullopt;
  if (station.size() != crest.size()) {
    rd.report("levels", "has " + std::to_string(crest.size()) + " values but offsets has " +
                            std::to_string(station.size()) + ": give one level per offset");
  }
  if (station.size() < 2) {
    rd.report("offsets", "has " + std::to_string(station.size()) + " values: needs >= 2");
  }
  for (std::size_t k = 1; k < station.size(); ++k) {
    if (station[k] <= station[k - 1]) {
      rd.report_item("offsets", k, quoted(station[k], u.length_unit()) +
                                       ": offsets must strictly increase");
    }
  }
  if (rd.problems().size() != before) return std::nullopt;
  const auto low = static_cast<std::size_t>(std::min_element(crest.begin(), crest.end()) -
                                            crest.begin());
  const std::string at = quoted(crest[low], u.length_unit()) + ": the lowest road crest is below ";
  const std::string advice =
      ": water would cross the road before it fills the pond; check that the road survey, the "
      "barrel and the ponding table use the same datum";
  if (crest[low] < in.inlet_invert) {
    rd.report_item("levels", low, at + "the barrel inlet invert " +
                                          format_value(in.inlet_invert) + " " + u.length_unit() +
                                          advice);
  } else if (ponding && crest[low] < ponding->bottom) {
    rd.report_item("levels", low, at + "the ponding relation's first stage " +
                                          format_value(ponding->bottom) + " " + u.length_unit() +
                                          advice);
  }
  if (rd.problems().size() != before) return std::nullopt;
  std::vector<double> station_m = station, crest_m = crest;
  for (double& v : station_m) v = u.length_m(v);
  for (double& v : crest_m) v = u.length_m(v);
  const double c_file = c.value_or(u.us() ? structures::kRoadOvertoppingCoefficientSi /
                                                std::sqrt(units::kMetresPerFoot)
                                          : structures::kRoadOvertoppingCoefficientSi);
  std::optional<double> tailwater_m;
  if (in.tailwater) tailwater_m = u.length_m(*in.tailwater);
  return structures::RoadOvertopping(std::move(station_m), std::move(crest_m),
                                     u.weir_coefficient_si(c_file), rd.element(), tailwater_m);
}

// The safety net behind the checks above: whatever the outlets, an empty pool discharges
// nothing.
bool empty_pool_is_dry(FieldReader& r, double outflow_m3s, const PoolStorage& storage,
                       const InputUnits& u) {
  if (!(outflow_m3s > 0.0)) return true;
  r.report_here("discharges " + format_value(u.discharge_in_file(outflow_m3s)) + " " +
                u.discharge_unit() + " with its pond empty (stage " +
                format_value(storage.bottom) + " " + u.length_unit() +
                ", the bottom of its storage relation): an outlet or barrel sits below the "
                "storage relation; extend the relation down to the lowest outlet");
  return false;
}

}  // namespace

std::unique_ptr<network::Element> NetworkReader::read_culvert(Reader& r, const std::string& id) {
  CrossingInput in;
  const toml::table* barrel = r.optional_table("barrel");
  if (!barrel) r.report_here("is missing required table 'barrel'");
  if (barrel) {
    Reader b = r.nested(*barrel, "barrel");
    read_barrel(b, units_, in);
    b.finish();
  }
  // The tailwater (a fixed downstream water level) acts on the barrels' outlet control and
  // submerges the road weir when it stands above the crest.
  in.tailwater = optional_ranged(r, units_, "tailwater", Q::elevation);
  std::optional<PoolStorage> ponding;
  if (const toml::table* t = r.optional_table("ponding")) {
    Reader p = r.nested(*t, "ponding");
    ponding = read_storage(p, units_, r.element());
    if (ponding) check_ponding_floor(p, *ponding, in, units_);
    p.finish();
  } else {
    r.report_here("is missing required table 'ponding' (the storage upstream of the road)");
  }
  if (ponding) check_tailwater(r, *ponding, in, units_);
  std::optional<structures::RoadOvertopping> road;
  if (const toml::table* t = r.optional_table("road")) {
    Reader rd = r.nested(*t, "road");
    road = read_road(rd, units_, in, ponding);
    rd.finish();
  }
  if (!barrel || !ponding || !clean()) return nullptr;
  const structures::CulvertSpec& spec = in.spec;
  // Rate to above anything the pond, the road or the barrels will see (above the table the
  // barrels are computed directly, more slowly).
  double top_m = std::max(spec.inlet_invert_stage_m + 3.0 * spec.rise_m,
                          ponding->relation.top_stage_m() + 1.0);
  if (road) top_m = std::max(top_m, road->lowest_crest_stage_m() + 3.0);
  std::optional<double> tailwater_m;
  if (in.tailwater) tailwater_m = units_.length_m(*in.tailwater);
  auto build = [&]() -> CrossingCache::Crossing {
    return std::make_shared<const structures::CulvertCrossing>(
        structures::Culvert(spec, r.element()), road, tailwater_m, top_m, r.element());
  };
  CrossingCache::Crossing crossing =
      cache_ ? cache_->get_or_build(cache_scope_ + "/" + id, build) : build();
  if (!empty_pool_is_dry(r, crossing->discharge_m3s(ponding->relation.bottom_stage_m()),
                         *ponding, units_)) {
    return nullptr;
  }
  structures::LevelPoolOptions options;
  options.max_substep_s = 10.0;
  return std::make_unique<network::PoolElement>(id, ElementKind::culvert, std::move(crossing),
                                                std::move(ponding->relation), options);
}

namespace {

// One outlet as read, with the key and file value of its lowest point.
struct OutletInput {
  structures::Outlet outlet;
  std::string floor_key;
  double floor = 0.0;
};

std::optional<OutletInput> read_outlet(FieldReader& o, const InputUnits& u) {
  const std::string type = o.choice("type", {"orifice", "weir", "v-notch"});
  if (type == "orifice") {
    structures::Orifice orifice;
    const double invert = ranged(o, u, "invert", Q::elevation);
    orifice.invert_stage_m = u.length_m(invert);
    if (o.has("diameter")) {
      orifice.shape = structures::OrificeShape::circular;
      orifice.diameter_m = u.length_m(ranged(o, u, "diameter", Q::orifice_size));
    } else if (!o.has("width") && !o.has("height")) {  // no size at all: say both ways
      o.report_here("is missing the size of the opening: give 'diameter' (a circular orifice) "
                    "or 'width' and 'height' (a rectangular one)");
    } else {
      orifice.shape = structures::OrificeShape::rectangular;
      orifice.width_m = u.length_m(ranged(o, u, "width", Q::orifice_size));
      orifice.height_m = u.length_m(ranged(o, u, "height", Q::orifice_size));
    }
    if (auto cd = optional_ranged(o, u, "coefficient", Q::orifice_coefficient)) {
      orifice.discharge_coefficient = *cd;
    }
    return OutletInput{orifice, "invert", invert};
  }
  if (type == "weir") {
    structures::RectangularWeir weir;
    const double crest = ranged(o, u, "crest", Q::elevation);
    weir.crest_stage_m = u.length_m(crest);
    weir.length_m = u.length_m(ranged(o, u, "length", Q::weir_length));
    if (auto c = optional_ranged(o, u, "coefficient", Q::weir_coefficient)) {
      weir.coefficient_si = u.weir_coefficient_si(*c);
    }
    return OutletInput{weir, "crest", crest};
  }
  if (type == "v-notch") {
    structures::VNotchWeir weir;
    const double vertex = ranged(o, u, "vertex", Q::elevation);
    weir.vertex_stage_m = u.length_m(vertex);
    weir.notch_angle_deg = ranged(o, u, "angle_deg", Q::notch_angle);
    if (auto c = optional_ranged(o, u, "coefficient", Q::notch_coefficient)) {
      weir.discharge_coefficient = *c;
    }
    return OutletInput{weir, "vertex", vertex};
  }
  o.consume_all();  // without a type, the outlet's keys cannot be judged
  return std::nullopt;
}

// An outlet below the storage relation would discharge from an empty pond.
void check_outlet_floor(FieldReader& o, const OutletInput& outlet, const PoolStorage& storage,
                        const InputUnits& u) {
  if (!(outlet.floor < storage.bottom)) return;
  const std::string unit = u.length_unit();
  o.report(outlet.floor_key,
           quoted(outlet.floor, unit.c_str()) + ": is below " +
               (storage.top ? "the first stage of the storage table (" : "the pond bottom (") +
               format_value(storage.bottom) + " " + unit +
               "), so the outlet would discharge from an empty pond: " +
               (storage.top ? "extend the table down to " + format_value(outlet.floor) + " " +
                                  unit + " (storage 0 there)"
                            : "lower 'bottom' to " + format_value(outlet.floor) + " " + unit) +
               ", or raise the outlet");
}

// initial_stage must lie within the storage relation.
void check_initial_stage(FieldReader& r, double initial, const PoolStorage& storage,
                         const InputUnits& u) {
  const std::string unit = u.length_unit();
  if (initial < storage.bottom) {
    r.report("initial_stage", quoted(initial, unit.c_str()) +
                                  ": is below the bottom of the storage (" +
                                  format_value(storage.bottom) + " " + unit + ")");
  } else if (storage.top && initial > *storage.top) {
    r.report("initial_stage", quoted(initial, unit.c_str()) +
                                  ": is above the top of the storage table (" +
                                  format_value(*storage.top) + " " + unit +
                                  "): extend the table up to the starting level, or lower "
                                  "initial_stage");
  }
}

}  // namespace

std::unique_ptr<network::Element> NetworkReader::read_detention(Reader& r, const std::string& id) {
  std::optional<PoolStorage> storage;
  if (const toml::table* t = r.optional_table("storage")) {
    Reader s = r.nested(*t, "storage");
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
      Reader o = r.nested(*t, "outlet " + std::to_string(k));
      if (auto outlet = read_outlet(o, units_)) {
        if (storage) check_outlet_floor(o, *outlet, *storage, units_);
        outlets.push_back(outlet->outlet);
      }
      o.finish();
    }
  }
  const auto initial = optional_ranged(r, units_, "initial_stage", Q::elevation);
  if (initial && storage) check_initial_stage(r, *initial, *storage, units_);
  if (!storage || outlets.empty() || !clean()) return nullptr;
  auto riser = std::make_unique<structures::Riser>(std::move(outlets), r.element());
  const double bottom_m = storage->relation.bottom_stage_m();
  if (!empty_pool_is_dry(r, riser->discharge_m3s(bottom_m), *storage, units_)) return nullptr;
  const double start_m = initial ? units_.length_m(*initial) : bottom_m;
  structures::LevelPoolOptions options;
  options.max_substep_s = 10.0;
  return std::make_unique<network::PoolElement>(id, std::move(riser),
                                                std::move(storage->relation), options, start_m);
}

}  // namespace freshet::study::detail
