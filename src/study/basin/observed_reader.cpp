#include "observed_reader.hpp"

#include <algorithm>

#include "freshet/io/gauge_record.hpp"
#include "freshet/io/iso_time.hpp"
#include "network_reader.hpp"

namespace freshet::study::detail {

namespace {

std::optional<ObservedSeries> read_one(FieldReader& r, const std::filesystem::path& dir,
                                       const StudySettings& settings,
                                       const std::vector<StormDefinition>& storms,
                                       const std::vector<std::string>& element_ids) {
  ObservedSeries o;
  o.station_id = r.text("station");
  o.storm_id = r.text("storm");
  if (!o.station_id.empty() &&
      std::find(element_ids.begin(), element_ids.end(), o.station_id) == element_ids.end()) {
    r.report("station", "= '" + o.station_id + "': names no element of the basin");
  }
  const bool storm_known = std::any_of(storms.begin(), storms.end(),
                                       [&o](const StormDefinition& s) { return s.id == o.storm_id; });
  if (!o.storm_id.empty() && !storm_known) {
    r.report("storm", "= '" + o.storm_id + "': names no storm of this file");
  }
  io::GaugeFormat f;
  f.default_offset_min = settings.time_zone_offset_min;
  f.origin_epoch_s = io::parse_iso_date_time(settings.start_iso, 0).value_or(0.0);
  const std::string unit = r.choice("value_unit", {"discharge_m3s", "discharge_cfs"});
  if (const auto u = io::parse_column_unit(unit)) f.value_unit = *u;
  f.time_column = r.optional_text("time_column").value_or("");
  f.value_column = r.optional_text("value_column").value_or("");
  const std::string sep = r.choice("separator", {"auto", ",", ";"}, "auto");
  f.separator = sep == "," ? ',' : sep == ";" ? ';' : '\0';
  // A missing flow is not zero: gaps are refused or filled linearly in time.
  const std::string rule = r.choice("missing", {"refuse", "linear"}, "refuse");
  f.missing = io::parse_missing_rule(rule).value_or(io::MissingRule::refuse);
  const std::string file = r.text("file");
  const std::size_t before = r.problems().size();
  r.finish();
  if (r.problems().size() != before || file.empty() || unit.empty()) return std::nullopt;
  o.file = (dir / file).string();
  try {
    io::SeriesTable t = io::read_gauge_csv(dir / file, f);
    o.flow = PiecewiseLinearSeries(std::move(t.times_s), std::move(t.values_si),
                                   "observed hydrograph '" + o.file + "'");
    o.notes = std::move(t.metadata);
    return o;
  } catch (const InputError& e) {
    relocate(e, r, r.problems());
  } catch (const IoError& e) {
    report_file_error(r, e);
  }
  return std::nullopt;
}

}  // namespace

std::vector<ObservedSeries> read_observed(const toml::table& root, const std::string& file,
                                          const std::filesystem::path& dir,
                                          const StudySettings& settings,
                                          const std::vector<StormDefinition>& storms,
                                          const std::vector<std::string>& element_ids,
                                          std::vector<Problem>& problems) {
  std::vector<ObservedSeries> out;
  for (const toml::node& node : items_of(root.get_as<toml::array>("observed"))) {
    const toml::table* t = node.as_table();
    if (!t) continue;
    const toml::node* at = t->get("station");
    const std::string station = at ? at->value_or(std::string{}) : std::string{};
    FieldReader r(*t, file, "observed '" + station + "'", problems);
    auto o = read_one(r, dir, settings, storms, element_ids);
    if (!o) continue;
    for (const auto& other : out) {
      if (other.station_id == o->station_id && other.storm_id == o->storm_id) {
        r.report("storm", "= '" + o->storm_id + "': station '" + o->station_id +
                              "' already has an observed hydrograph for this storm");
      }
    }
    out.push_back(std::move(*o));
  }
  return out;
}

}  // namespace freshet::study::detail
