#include "gauge_storm.hpp"

#include <algorithm>
#include <cmath>
#include <vector>

#include "freshet/hydrology/areal_rain.hpp"
#include "freshet/io/gauge_record.hpp"
#include "freshet/io/input_units.hpp"
#include "freshet/io/iso_time.hpp"
#include "network_reader.hpp"

namespace freshet::study::detail {

hydrology::Hyetograph hyetograph_of(const io::SeriesTable& t, const std::string& label) {
  std::vector<double> depth_m;
  for (std::size_t k = 1; k < t.times_s.size(); ++k) {
    const double dt = t.times_s[k] - t.times_s[k - 1];
    depth_m.push_back(t.quantity == io::SeriesQuantity::rain_depth
                          ? t.values_si[k]
                          : 0.5 * (t.values_si[k] + t.values_si[k - 1]) * dt);
  }
  return hydrology::Hyetograph::from_depths(t.times_s, depth_m, label);
}

namespace {

// Weights must sum to 1 within this: three-decimal weights of up to a few gauges
// (0.333 + 0.333 + 0.333) pass, a typing slip does not (common practice, no source).
constexpr double kWeightSumTolerance = 1e-3;

struct Gauge {
  std::string id;
  hydrology::Hyetograph rain;
};

std::optional<Gauge> read_gauge(FieldReader& g, const std::filesystem::path& dir,
                                const io::GaugeFormat& base, const std::string& storm_label) {
  Gauge gauge;
  gauge.id = g.text("id");
  if (!gauge.id.empty() && !is_safe_id(gauge.id)) {
    g.report("id", "= '" + gauge.id + "': use letters, digits, '.', '_' and '-' only");
  }
  io::GaugeFormat f = base;
  const std::string unit = g.choice(
      "value_unit", {"depth_mm", "depth_in", "intensity_mm_per_h", "intensity_in_per_h"});
  if (const auto u = io::parse_column_unit(unit)) f.value_unit = *u;
  f.time_column = g.optional_text("time_column").value_or("");
  f.value_column = g.optional_text("value_column").value_or("");
  const std::string sep = g.choice("separator", {"auto", ",", ";"}, "auto");
  f.separator = sep == "," ? ',' : sep == ";" ? ';' : '\0';
  const std::string file = g.text("file");
  const std::size_t before = g.problems().size();
  g.finish();
  if (g.problems().size() != before || file.empty() || unit.empty()) return std::nullopt;
  try {
    const io::SeriesTable t = io::read_gauge_csv(dir / file, f);
    gauge.rain = hyetograph_of(t, storm_label + " gauge '" + gauge.id + "'");
    return gauge;
  } catch (const InputError& e) {
    relocate(e, g, g.problems());
  } catch (const IoError& e) {
    report_file_error(g, e);
  }
  return std::nullopt;
}

std::vector<std::string> subcatchment_ids(const toml::table& root) {
  std::vector<std::string> ids;
  for (const toml::node& node : items_of(root.get_as<toml::array>("subcatchment"))) {
    const toml::table* t = node.as_table();
    if (t && t->get("id")) ids.push_back(t->get("id")->value_or(std::string{}));
  }
  return ids;
}

std::string joined(const std::vector<Gauge>& gauges) {
  std::string out;
  for (const auto& g : gauges) out += (out.empty() ? "" : ", ") + g.id;
  return out;
}

// One subcatchment's weights (`w` reads its inline table); the mix, or nullopt on a problem.
// `parent` reads the weights table, where `id` names the subcatchment.
std::optional<hydrology::Hyetograph> read_weights(FieldReader& w, const toml::table& table,
                                                  FieldReader& parent, const std::string& id,
                                                  const std::vector<Gauge>& gauges,
                                                  const std::string& label) {
  std::vector<std::pair<double, const hydrology::Hyetograph*>> mix;
  double sum = 0.0;
  const std::size_t before = w.problems().size();
  std::vector<std::string> keys;
  for (const auto& item : table) keys.emplace_back(item.first.str());
  for (const std::string& key : keys) {
    const double weight = w.number(key);
    const Gauge* gauge = nullptr;
    for (const auto& g : gauges) {
      if (g.id == key) gauge = &g;
    }
    if (!gauge) {
      w.report(key, "names no gauge of this storm (gauges: " + joined(gauges) + ")");
      continue;
    }
    if (!(weight >= 0.0 && weight <= 1.0)) {
      w.report(key, "= " + format_value(weight) + ": a weight must be between 0 and 1");
      continue;
    }
    sum += weight;
    mix.emplace_back(weight, &gauge->rain);
  }
  if (w.problems().size() != before) return std::nullopt;
  if (std::abs(sum - 1.0) > kWeightSumTolerance) {
    parent.report(id, "weights sum to " + format_value(sum) + ": they must sum to 1 within " +
                          format_value(kWeightSumTolerance));
    return std::nullopt;
  }
  return hydrology::mix_hyetographs(mix, label);
}

}  // namespace

std::optional<GaugeStorm> read_gauge_storm(FieldReader& r, const toml::table& root,
                                           const std::filesystem::path& dir,
                                           const StudySettings& settings,
                                           const std::string& label) {
  const std::size_t before = r.problems().size();
  io::GaugeFormat base;
  base.default_offset_min = settings.time_zone_offset_min;
  base.origin_epoch_s = io::parse_iso_date_time(settings.start_iso, 0).value_or(0.0);
  const std::string rule = r.choice("missing", {"refuse", "zero", "linear"}, "refuse");
  base.missing = io::parse_missing_rule(rule).value_or(io::MissingRule::refuse);
  std::vector<Gauge> gauges;
  const toml::array* list = r.optional_array("gauge");
  if (!list || list->empty()) r.report_here("needs one or more [[storm.gauge]] tables");
  std::size_t k = 0;
  for (const toml::node& node : items_of(list)) {
    ++k;
    const toml::table* t = node.as_table();
    if (!t) continue;
    const toml::node* id_node = t->get("id");
    const std::string gauge_id = id_node ? id_node->value_or(std::string{}) : std::string{};
    FieldReader g = r.nested(*t, gauge_id.empty() ? "gauge " + std::to_string(k)
                                                  : "gauge '" + gauge_id + "'");
    if (auto gauge = read_gauge(g, dir, base, label)) {
      for (const auto& other : gauges) {
        if (other.id == gauge->id) g.report("id", "= '" + gauge->id + "': another gauge has this id");
      }
      gauges.push_back(std::move(*gauge));
    }
  }
  const toml::table* weights = r.optional_table("weights");
  if (r.problems().size() != before) {
    r.consume_all();
    return std::nullopt;
  }
  GaugeStorm storm;
  storm.description = "gauges " + joined(gauges);
  std::vector<std::pair<double, const hydrology::Hyetograph*>> mean;
  for (const auto& g : gauges) mean.emplace_back(1.0 / static_cast<double>(gauges.size()), &g.rain);
  storm.mean = hydrology::mix_hyetographs(mean, label);
  const std::vector<std::string> subcatchments = subcatchment_ids(root);
  if (weights) {
    FieldReader w = r.nested(*weights, "weights");
    std::vector<std::string> keys;
    for (const auto& item : *weights) keys.emplace_back(item.first.str());
    for (const std::string& id : keys) {
      const toml::table* one = w.optional_table(id);
      if (std::find(subcatchments.begin(), subcatchments.end(), id) == subcatchments.end()) {
        w.report(id, "names no subcatchment of the basin");
        continue;
      }
      if (!one) {
        w.report(id, "must be a table of gauge weights, e.g. { " + gauges.front().id + " = 1.0 }");
        continue;
      }
      FieldReader one_reader = w.nested(*one, id);
      auto mix = read_weights(one_reader, *one, w, id, gauges, label + " subcatchment '" + id + "'");
      one_reader.finish();
      if (mix) storm.by_subcatchment.emplace(id, std::move(*mix));
    }
    w.finish();
  }
  for (const std::string& id : subcatchments) {
    if (storm.by_subcatchment.count(id) != 0) continue;
    if (gauges.size() == 1) {
      storm.by_subcatchment.emplace(id, gauges.front().rain);
    } else if (!weights || !weights->get(id)) {
      r.report(weights ? "weights" : "gauge",
               "gives no weights for subcatchment '" + id + "': with " +
                   std::to_string(gauges.size()) + " gauges each subcatchment needs weights." +
                   id + " = { " + gauges.front().id + " = ..., ... }");
    }
  }
  if (r.problems().size() != before) return std::nullopt;
  return storm;
}

hydrology::Hyetograph apply_areal_reduction(FieldReader& r, hydrology::Hyetograph rain,
                                            const StudySettings& settings,
                                            std::string& description) {
  const std::string curve = r.choice("areal_reduction", {"none", "tp29"}, "none");
  if (curve != "tp29") return rain;
  const io::detail::InputUnits u{settings.units};
  const auto area = r.optional_positive("reduction_area");
  if (!area) {
    r.report("areal_reduction", "= \"tp29\" needs reduction_area, the catchment area the "
                                "design depth is averaged over (" +
                                    std::string(u.us() ? "acre" : "ha") + ")");
    return rain;
  }
  const double area_m2 = u.plan_area_m2(*area);
  const std::string out_of_range = hydrology::tp29_range_problem(area_m2, rain.duration_s());
  if (!out_of_range.empty()) {
    r.report("reduction_area", "= " + format_value(*area) + ": " + out_of_range);
    return rain;
  }
  const double factor = hydrology::tp29_areal_reduction_factor(area_m2, rain.duration_s());
  std::vector<double> depths(rain.block_depths_m().begin(), rain.block_depths_m().end());
  for (double& d : depths) d *= factor;
  description += ", areal reduction " + format_fixed(factor, 3) + " (TP-29)";
  return hydrology::Hyetograph::from_depths(
      std::vector<double>(rain.boundary_times_s().begin(), rain.boundary_times_s().end()),
      std::move(depths), "areal-reduced storm");
}

}  // namespace freshet::study::detail
