#include "ensemble_reader.hpp"

#include <algorithm>
#include <cmath>

#include "freshet/io/toml_fields.hpp"
#include "network_reader.hpp"

namespace freshet::study {

double curve_number_dry(double cn_average) {
  return 4.2 * cn_average / (10.0 - 0.058 * cn_average);
}

double curve_number_wet(double cn_average) {
  return 23.0 * cn_average / (10.0 + 0.13 * cn_average);
}

namespace detail {

const toml::table* find_element(const toml::table& root, std::string_view id) {
  for (std::string_view array : kElementArrays) {
    for (const toml::node& node : items_of(root.get_as<toml::array>(array))) {
      const toml::table* t = node.as_table();
      if (t && t->get("id") && t->get("id")->value_or(std::string{}) == id) return t;
    }
  }
  return nullptr;
}

namespace {

// The element's value of `key`: the member's (or scenario's) change if it has one, else the
// base table's.
const toml::node* effective(const toml::table& base, const toml::table* changed,
                            std::string_view key) {
  if (changed) {
    if (const toml::node* n = changed->get(key)) return n;
  }
  return base.get(key);
}

std::optional<double> number_of(const toml::node* node) {
  if (!node) return std::nullopt;
  if (node->is_floating_point() || node->is_integer()) return node->value<double>();
  return std::nullopt;
}

// "loss.curve_number" -> {"loss", "curve_number"}; "manning_n" -> {"", "manning_n"}.
std::pair<std::string, std::string> split_field(const std::string& field) {
  const auto dot = field.find('.');
  if (dot == std::string::npos) return {"", field};
  return {field.substr(0, dot), field.substr(dot + 1)};
}

double member_value(const VariedParameter& p, double probability, double own_value) {
  switch (p.as) {
    case VaryAs::value: return uncertainty::quantile(p.distribution, probability);
    case VaryAs::factor: return own_value * uncertainty::quantile(p.distribution, probability);
    case VaryAs::antecedent_moisture: {
      if (own_value >= 100.0) return own_value;  // impervious: no antecedent effect
      const uncertainty::Triangular t{curve_number_dry(own_value), own_value,
                                      curve_number_wet(own_value)};
      return uncertainty::quantile(t, probability);
    }
  }
  return own_value;
}

// Calls `visit(own_value) -> new value` on each value `field` names in element `id` (one, or
// one per plane), writing the results into `out[id]`. Returns a message when the element has
// no such number.
std::optional<std::string> vary_element(const toml::table& base, toml::table& out,
                                        const std::string& id, const std::string& field,
                                        const std::function<double(double)>& visit) {
  if (!out.get_as<toml::table>(id)) out.insert_or_assign(id, toml::table{});
  toml::table& changed = *out.get_as<toml::table>(id);
  const auto [group, key] = split_field(field);
  if (group.empty()) {
    const auto own = number_of(effective(base, &changed, key));
    if (!own) return "has no number '" + key + "'";
    changed.insert_or_assign(key, visit(*own));
    return std::nullopt;
  }
  if (group == "loss") {
    const toml::node* loss_node = effective(base, &changed, "loss");
    const toml::table* loss = loss_node ? loss_node->as_table() : nullptr;
    const auto own = loss ? number_of(loss->get(key)) : std::nullopt;
    if (!own) return "has no number '" + key + "' in its loss table";
    toml::table copy = *loss;
    copy.insert_or_assign(key, visit(*own));
    changed.insert_or_assign("loss", std::move(copy));
    return std::nullopt;
  }
  if (group == "plane") {
    const toml::node* planes_node = effective(base, &changed, "plane");
    const toml::array* planes = planes_node ? planes_node->as_array() : nullptr;
    if (!planes || planes->empty()) return "has no planes";
    toml::array copy = *planes;
    for (toml::node& item : copy) {
      toml::table* plane = item.as_table();
      const auto own = plane ? number_of(plane->get(key)) : std::nullopt;
      if (!own) return "has a plane with no number '" + key + "'";
      plane->insert_or_assign(key, visit(*own));
    }
    changed.insert_or_assign("plane", std::move(copy));
    return std::nullopt;
  }
  return "field '" + field + "': give a key of the element, loss.<key> or plane.<key>";
}

uncertainty::Distribution read_distribution(FieldReader& r, VaryAs& as) {
  const std::string d = r.choice(
      "distribution", {"uniform", "triangular", "normal", "lognormal", "antecedent-moisture"});
  if (d == "antecedent-moisture") {
    as = VaryAs::antecedent_moisture;
    return uncertainty::Uniform{};
  }
  const double inf = uncertainty::kUnbounded;
  if (d == "uniform") return uncertainty::Uniform{r.number("low"), r.number("high")};
  if (d == "triangular") {
    return uncertainty::Triangular{r.number("low"), r.number("normal"), r.number("high")};
  }
  if (d == "normal") {
    return uncertainty::Normal{r.number("mean"), r.number("sd"),
                               r.optional_number("low").value_or(-inf),
                               r.optional_number("high").value_or(inf)};
  }
  if (d == "lognormal") {
    return uncertainty::LogNormal{r.number("median"), r.number("log_sd"),
                                  r.optional_number("low").value_or(0.0),
                                  r.optional_number("high").value_or(inf)};
  }
  return uncertainty::Uniform{};  // unknown choice, already reported
}

// [[uncertainty.threshold]]: name, station, and one of stage or discharge (file units).
std::vector<ThresholdDefinition> read_thresholds(const toml::table& root, FieldReader& r,
                                                 units::System units) {
  std::vector<ThresholdDefinition> out;
  std::size_t index = 0;
  for (const toml::node& node : items_of(r.optional_array("threshold"))) {
    ++index;
    const toml::table* t = node.as_table();
    if (!t) {
      r.report_item("threshold", index - 1, "must be a table");
      continue;
    }
    FieldReader v(*t, r.file(), "uncertainty threshold[" + std::to_string(index) + "]",
                  r.problems());
    ThresholdDefinition d;
    d.line = v.line();
    d.name = v.text("name");
    for (const ThresholdDefinition& earlier : out) {
      if (!d.name.empty() && earlier.name == d.name) {
        v.report("name", "= '" + d.name + "': another threshold has this name");
      }
    }
    d.station_id = v.text("station");
    if (!d.station_id.empty() && !find_element(root, d.station_id)) {
      v.report("station", "= '" + d.station_id + "': names no element of the basin");
    }
    const bool stage = v.has("stage"), discharge = v.has("discharge");
    if (stage == discharge) {
      v.report_here("give one of 'stage' (a level, such as a road crest) or 'discharge' (a "
                    "capacity, such as a pipe's)");
      v.consume_all();
    } else if (stage) {
      d.quantity = uncertainty::PeakQuantity::stage;
      d.value_si = units::length_to_m(v.number("stage"), units);
    } else {
      d.quantity = uncertainty::PeakQuantity::discharge;
      d.value_si = units::discharge_to_m3s(v.positive("discharge"), units);
    }
    v.finish();
    out.push_back(std::move(d));
  }
  return out;
}

}  // namespace

std::optional<EnsembleDefinition> read_ensemble(const toml::table& root, const std::string& file,
                                                units::System units,
                                                std::vector<Problem>& problems) {
  const toml::table* section = root.get_as<toml::table>("uncertainty");
  if (!section) return std::nullopt;
  FieldReader r(*section, file, "uncertainty", problems);
  EnsembleDefinition e;
  e.line = r.line();
  e.members = static_cast<std::size_t>(r.integer("members", 1));
  if (e.members > 100000) {
    r.report("members", "= " + std::to_string(e.members) + ": at most 100000");
    e.members = 0;
  }
  e.method = r.choice("sampling", {"latin-hypercube", "monte-carlo"}, "latin-hypercube") ==
                     "monte-carlo"
                 ? uncertainty::SamplingMethod::monte_carlo
                 : uncertainty::SamplingMethod::latin_hypercube;
  e.seed = static_cast<std::uint64_t>(r.optional_integer("seed", 0).value_or(1));
  if (r.has("percentiles")) {
    e.percentiles = r.numbers("percentiles");
    for (std::size_t i = 0; i < e.percentiles.size(); ++i) {
      const double q = e.percentiles[i];
      if (!(q >= 0.0 && q <= 100.0)) {
        r.report_item("percentiles", i, "= " + format_value(q) + ": must be in [0, 100]");
      } else if (i > 0 && !(q > e.percentiles[i - 1])) {
        r.report_item("percentiles", i, "= " + format_value(q) + ": list them in increasing "
                                        "order, each once");
      }
    }
  }
  const toml::array* vary = r.optional_array("vary");
  if (!vary || vary->empty()) r.report_here("needs at least one [[uncertainty.vary]] table");
  std::size_t index = 0;
  for (const toml::node& node : items_of(vary)) {
    ++index;
    const toml::table* t = node.as_table();
    if (!t) {
      r.report_item("vary", index - 1, "must be a table");
      continue;
    }
    VariedParameter p;
    FieldReader v(*t, file, "uncertainty vary[" + std::to_string(index) + "]", problems);
    p.line = v.line();
    p.field = v.text("field");
    p.name = "vary[" + std::to_string(index) + "] " + p.field;
    const std::string as = v.choice("as", {"value", "factor"}, "value");
    p.as = as == "factor" ? VaryAs::factor : VaryAs::value;
    p.distribution = read_distribution(v, p.as);
    if (p.as == VaryAs::antecedent_moisture && p.field != "loss.curve_number") {
      v.report("distribution", "= 'antecedent-moisture' varies field 'loss.curve_number' only");
    }
    if (p.as != VaryAs::antecedent_moisture) {
      ProblemList dist_problems(v.element());
      uncertainty::check(p.distribution, "distribution", dist_problems);
      for (const Problem& q : dist_problems.problems()) v.report("distribution", q.message);
    }
    // Which elements: a list of ids, or every element of a kind.
    if (const toml::array* ids = v.optional_array("elements")) {
      for (std::size_t i = 0; i < ids->size(); ++i) {
        const std::string id = (*ids)[i].value_or(std::string{});
        if (id.empty() || !find_element(root, id)) {
          v.report_item("elements", i, "names no element of the basin");
        } else {
          p.element_ids.push_back(id);
        }
      }
    }
    if (auto kind = v.optional_text("kind")) {
      if (!p.element_ids.empty() || v.has("elements")) {
        v.report("kind", "give 'elements' or 'kind', not both");
      }
      bool known = false;
      for (std::string_view array : kElementArrays) known = known || array == *kind;
      if (!known) {
        v.report("kind", "= '" + *kind + "': one of subcatchment, reach, culvert, detention, "
                         "inflow, junction, outlet");
      }
      for (const toml::node& el : items_of(root.get_as<toml::array>(*kind))) {
        const toml::table* et = el.as_table();
        if (et && et->get("id")) p.element_ids.push_back(et->get("id")->value_or(std::string{}));
      }
    }
    if (p.element_ids.empty() && !v.has("elements") && !v.has("kind")) {
      v.report_here("needs 'elements' (a list of ids) or 'kind' (every element of a kind)");
    }
    // The field must be a number of every element named, in the base network.
    for (const std::string& id : p.element_ids) {
      toml::table scratch;
      const auto problem = vary_element(*find_element(root, id), scratch, id, p.field,
                                        [](double x) { return x; });
      if (problem) v.report("field", "element '" + id + "' " + *problem);
    }
    v.finish();
    e.parameters.push_back(std::move(p));
  }
  e.thresholds = read_thresholds(root, r, units);
  r.finish();
  if (e.members > 0 && !e.parameters.empty()) {
    e.probabilities =
        uncertainty::draw_probabilities(e.parameters.size(), e.members, e.method, e.seed);
  }
  return e;
}

toml::table member_changes(const toml::table& root, const toml::table* scenario_changes,
                           const EnsembleDefinition& ensemble,
                           const std::vector<double>& probabilities,
                           std::vector<MemberValue>* values) {
  toml::table out = scenario_changes ? *scenario_changes : toml::table{};
  for (std::size_t k = 0; k < ensemble.parameters.size(); ++k) {
    const VariedParameter& p = ensemble.parameters[k];
    for (const std::string& id : p.element_ids) {
      const toml::table* base = find_element(root, id);
      FRESHET_ASSERT(base, "a varied element vanished after load");
      const auto problem = vary_element(*base, out, id, p.field, [&](double own) {
        const double v = member_value(p, probabilities[k], own);
        if (values) values->push_back({p.name, id, p.field, v});
        return v;
      });
      FRESHET_ASSERT(!problem, "a varied field checked at load is missing");
    }
  }
  return out;
}

}  // namespace detail
}  // namespace freshet::study
