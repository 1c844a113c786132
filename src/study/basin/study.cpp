#include "freshet/study/study.hpp"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <map>
#include <sstream>

#include "freshet/io/toml_fields.hpp"
#include "freshet/hydrology/design_storm.hpp"
#include "freshet/hydrology/idf_curve.hpp"
#include "freshet/hydrology/nrcs_distribution.hpp"
#include "freshet/io/csv_series.hpp"
#include "freshet/io/input_ranges.hpp"
#include "freshet/io/input_units.hpp"
#include "freshet/io/iso_time.hpp"
#include "gauge_storm.hpp"
#include "ensemble_reader.hpp"
#include "observed_reader.hpp"
#include "network_reader.hpp"

namespace freshet::study {

using detail::FieldReader;
using detail::InputUnits;
using Q = detail::Quantity;
using detail::optional_ranged;
using detail::ranged;

struct Study::Impl {
  std::filesystem::path path;
  std::string file;  // as named in messages
  toml::table root;
  StudySettings settings;
  std::vector<StormDefinition> storms;
  std::vector<ScenarioDefinition> scenarios;
  std::vector<StretchDefinition> stretches;
  std::vector<ObservedSeries> observed;
  // scenario id -> its [scenario.change] table, inside `root` (toml++ copies lose positions)
  std::map<std::string, const toml::table*, std::less<>> changes;
  std::vector<StationDescription> stations;  // the base network's
  std::map<std::string, std::vector<StationDescription>, std::less<>> scenario_stations;
  std::vector<Problem> warnings;  // values outside their plausible ranges
  std::unique_ptr<detail::CrossingCache> crossings = std::make_unique<detail::CrossingCache>();
  std::optional<EnsembleDefinition> ensemble;  // [uncertainty]

  void read_settings(FieldReader& r, std::vector<Problem>& problems);
  void read_storms(std::vector<Problem>& problems);
  void read_scenarios(std::vector<Problem>& problems);
  void read_stretches(std::vector<Problem>& problems);
  [[nodiscard]] const toml::table* checked_changes(std::string_view scenario_id,
                                                   std::vector<Problem>& problems) const;
  network::Model build(std::string_view scenario_id, const StormDefinition& storm,
                       std::vector<Problem>& problems,
                       std::vector<StationDescription>* stations_out = nullptr,
                       std::vector<Problem>* warnings_out = nullptr,
                       const ReachSchemeFn* reach_scheme = nullptr,
                       const std::vector<double>* member_probabilities = nullptr) const;
  void check_ensemble_extremes(const StormDefinition& storm,
                               std::vector<Problem>& problems) const;
};

// ---- settings ------------------------------------------------------------------------------

namespace {

// The study start in UTC, "YYYY-MM-DDThh:mm:ssZ". A date-time with an offset is converted to
// UTC; a local date-time (no offset) is in the study's time_zone (UTC when not given).
std::string utc_iso_of(const toml::date_time& dt, int default_offset_min) {
  using namespace std::chrono;
  const sys_days date{year_month_day{year{dt.date.year}, month{dt.date.month},
                                     std::chrono::day{dt.date.day}}};
  sys_seconds t = date + hours{dt.time.hour} + minutes{dt.time.minute} + seconds{dt.time.second};
  t -= minutes{dt.offset ? dt.offset->minutes : default_offset_min};
  const sys_days utc_day = floor<days>(t);
  const year_month_day ymd{utc_day};
  const hh_mm_ss hms{t - utc_day};
  char buf[32];
  std::snprintf(buf, sizeof buf, "%04d-%02u-%02uT%02ld:%02ld:%02ldZ", static_cast<int>(ymd.year()),
                static_cast<unsigned>(ymd.month()), static_cast<unsigned>(ymd.day()),
                static_cast<long>(hms.hours().count()), static_cast<long>(hms.minutes().count()),
                static_cast<long>(hms.seconds().count()));
  return buf;
}

routing::SchemeKind read_scheme(FieldReader& r, std::string_view key, routing::SchemeKind fallback,
                                std::vector<std::string> names = routing::scheme_names()) {
  const std::string text = r.choice(key, names, std::string(routing::to_string(fallback)));
  return text.empty() ? fallback : routing::parse_scheme_kind(text);
}

// Overland planes route the kinematic wave only: the diffusion-wave scheme needs a channel's
// section and is not offered for them.
std::vector<std::string> plane_scheme_names() {
  std::vector<std::string> names = routing::scheme_names();
  std::erase(names, std::string(routing::to_string(routing::SchemeKind::kMuskingumCunge)));
  return names;
}

// The clock's rules on its counts (network::ClockOptions::count_fault), said with the file's
// keys, at their lines and in the file's units; the clock's own wording names its fields in s.
void report_clock_counts(FieldReader& r, const StudySettings& s) {
  const auto positive = [](double v) { return std::isfinite(v) && v > 0.0; };
  if (!positive(s.duration_s) || !positive(s.output_interval_s)) return;  // reported already
  const std::string interval =
      "= " + format_value(s.output_interval_s / units::kSecondsPerMinute) + " min: ";
  const std::string divide = "must divide the run (duration_h = " +
                             format_value(s.duration_s / units::kSecondsPerHour) + ", i.e. " +
                             format_value(s.duration_s / units::kSecondsPerMinute) +
                             " min) into whole output intervals";
  const network::ClockOptions clock = s.clock();
  using Fault = network::ClockOptions::CountFault;
  switch (clock.count_fault()) {
    case Fault::none:
      return;
    case Fault::output_interval_longer_than_run:
      r.report("output_interval_min", interval + divide + "; it is longer than the run");
      return;
    case Fault::output_interval_not_whole:
      r.report("output_interval_min", interval + divide);
      return;
    case Fault::too_many_outputs:
      r.report("output_interval_min", interval + "gives " + format_value(clock.output_count()) +
                                          " output times, more than can be counted exactly "
                                          "(2^53)");
      return;
    case Fault::too_many_coupling_steps:
      if (!positive(s.coupling_step_s)) return;  // reported already
      r.report("coupling_step_s", "= " + format_value(s.coupling_step_s) + " s: gives " +
                                      format_value(clock.coupling_step_count()) +
                                      " coupling steps over the run, more than can be counted "
                                      "exactly (2^53); use a longer step");
      return;
  }
}

}  // namespace

void Study::Impl::read_settings(FieldReader& top, std::vector<Problem>& problems) {
  const toml::table* t = top.optional_table("study");
  if (!t) {
    top.report_here("is missing the [study] table (title, units, duration, output interval)");
    return;
  }
  FieldReader r(*t, file, "study", problems);
  r.set_warnings(&warnings);
  const std::size_t before = problems.size();
  settings.title = r.text("title");
  settings.creator_name = r.optional_text("creator_name").value_or("");
  settings.creator_email = r.optional_text("creator_email").value_or("");
  settings.creator_institution = r.optional_text("creator_institution").value_or("");
  settings.license = r.optional_text("license").value_or("");
  const std::string system = r.choice("units", {"si", "us"});
  settings.units = units::parse_system(system).value_or(units::System::si);
  const InputUnits u{settings.units};
  if (auto zone = r.optional_text("time_zone")) {
    if (auto offset = io::parse_utc_offset(*zone)) {
      settings.time_zone_offset_min = *offset;
    } else {
      r.report("time_zone", "= '" + *zone + "': must be \"UTC\", \"Z\" or an offset from UTC "
                            "such as \"+01:00\" or \"-05:30\" (at most 14 h)");
    }
  }
  if (const toml::node* start = r.optional_node("start")) {
    if (auto dt = start->value<toml::date_time>()) {
      settings.start_iso = utc_iso_of(*dt, settings.time_zone_offset_min);
    } else {
      r.report("start", "must be a date and time, e.g. 2026-07-14T00:00:00Z (an offset such as "
                        "+02:00 is converted to UTC; no offset means UTC)");
    }
  }
  settings.duration_s = ranged(r, u, "duration_h", Q::duration_h) * units::kSecondsPerHour;
  settings.output_interval_s =
      ranged(r, u, "output_interval_min", Q::output_interval_min) * units::kSecondsPerMinute;
  settings.coupling_step_s =
      optional_ranged(r, u, "coupling_step_s", Q::coupling_step_s).value_or(60.0);
  report_clock_counts(r, settings);
  if (settings.coupling_step_s > settings.output_interval_s) {  // false when either is NaN
    r.report("coupling_step_s",
             "= " + format_value(settings.coupling_step_s) + " s: must be <= the output "
             "interval (output_interval_min = " +
                 format_value(settings.output_interval_s / units::kSecondsPerMinute) +
                 ", i.e. " + format_value(settings.output_interval_s) +
                 " s): elements exchange water at least once per output interval");
  }
  if (auto dx = optional_ranged(r, u, "cell_length", Q::cell_length)) {
    settings.default_cell_length_m = u.length_m(*dx);
  }
  settings.channel_routing.scheme =
      read_scheme(r, "channel_scheme", routing::SchemeKind::kMusclHeun);
  // Overland planes: MUSCL-Heun by default, the scheme that meets the analytical plane
  // solution within 1% on modest grids (tests/hydrology).
  settings.plane_routing.scheme =
      read_scheme(r, "plane_scheme", routing::SchemeKind::kMusclHeun, plane_scheme_names());
  // Implicit upwind is stable at any Courant number but smears a wave by about
  // c dx (1 + C) / 2 (its modified equation; LeVeque 2002, Finite Volume Methods for
  // Hyperbolic Problems, sec. 8.6, from memory), so basin files default to C = 2, not the
  // library's 10; larger values suit only short, stiff reaches.
  const double implicit_courant =
      optional_ranged(r, u, "implicit_courant", Q::implicit_courant).value_or(2.0);
  settings.channel_routing.implicit_courant = implicit_courant;
  settings.plane_routing.implicit_courant = implicit_courant;
  settings.automatic_wave_choice =
      r.choice("wave_choice", {"as-given", "automatic"}, "as-given") == "automatic";
  settings.level_pool_backwater =
      r.choice("backwater", {"warn-only", "level-pool"}, "warn-only") == "level-pool";
  // The run budget (network/run_budget.hpp): refused runs name these keys to lift the limit.
  if (auto w = r.optional_positive("max_cell_steps")) settings.budget.max_cell_steps = *w;
  if (auto mb = r.optional_positive("max_memory_mb")) {
    settings.budget.max_memory_bytes = *mb * 1024.0 * 1024.0;
  }
  r.finish();
  if (problems.size() != before) return;  // the clock's own checks would repeat them
  // Every rule of the clock is said above with the file's keys; this guard stays so that a
  // rule added to the clock later is still refused (at the [study] line, in its own words).
  detail::relocate(settings.clock().problems(), r, problems);
}

// ---- storms --------------------------------------------------------------------------------

namespace {

// The block rules of the design-storm library (hydrology::DesignStormOptions, the alternating
// block's whole blocks), said with the file's keys at step_min's line.
void check_blocks(FieldReader& r, const hydrology::DesignStormOptions& o, bool whole_blocks) {
  const double blocks = o.duration_s / o.step_s;  // NaN when either key is bad
  if (!std::isfinite(blocks) || !(blocks > 0.0)) return;
  const std::string step = format_value(o.step_s / units::kSecondsPerMinute);
  const std::string duration = format_value(o.duration_s / units::kSecondsPerMinute);
  if (blocks < 1.0) {
    r.report("step_min", "= " + step + " min: must not exceed duration_min = " + duration);
  } else if (whole_blocks && std::abs(blocks - std::round(blocks)) > 1e-9 * blocks) {
    r.report("step_min", "= " + step + " min: must divide duration_min = " + duration +
                             " into whole blocks (alternating block method)");
  }
}

hydrology::Hyetograph read_series_storm(FieldReader& r, const std::filesystem::path& dir,
                                        const std::string& label) {
  return detail::hyetograph_of(io::read_hyetograph_csv(dir / r.text("file")), label);
}

// A storm must fall inside the run: rain before the study start would be dropped without a
// trace (an error), and so would rain after the run's end (returned as a problem that stops
// only the runs of this storm, since the run length is shared by all storms of a file).
std::optional<Problem> check_storm_within_run(const hydrology::Hyetograph& rain,
                                              const StudySettings& settings, const InputUnits& u,
                                              FieldReader& r, const toml::table& storm_table) {
  const auto depth = [&u](double m) {
    return format_fixed(m / u.rain_depth_m(1.0), u.us() ? 2 : 1) + " " + u.depth_unit();
  };
  if (rain.start_s() < 0.0 && rain.cumulative_depth_m(0.0) > 0.0) {
    r.report_here("starts at t = " + format_fixed(rain.start_s() / 60.0, 0) +
                  " min, before the study start: " + depth(rain.cumulative_depth_m(0.0)) +
                  " of its " + depth(rain.total_depth_m()) + " would fall before the run "
                  "begins; storms start at time 0, so shift the series");
  }
  if (!(settings.duration_s > 0.0)) return std::nullopt;  // missing or bad: reported already
  const double lost_m = rain.total_depth_m() - rain.cumulative_depth_m(settings.duration_s);
  if (!(lost_m > 0.0)) return std::nullopt;
  const auto& where = storm_table.source().begin;
  return Problem{r.file(), static_cast<int>(where.line), static_cast<int>(where.column),
                 r.element(), "",
                 "ends at " + format_fixed(rain.end_s() / 3600.0, 2) + " h, after the run (" +
                     "duration_h = " + format_value(settings.duration_s / 3600.0) + "): " +
                     depth(lost_m) + " of its " + depth(rain.total_depth_m()) +
                     " would not be routed; set duration_h to at least the storm's end plus "
                     "the time the basin takes to drain"};
}

// The IDF table's rules, checked on the values as the file gives them (minutes, mm/h or in/h)
// so that messages quote what the engineer typed: durations positive and increasing,
// intensities positive, and the depth i d never decreasing with duration.
void check_idf_table_as_written(FieldReader& f, const std::vector<double>& duration_min,
                                const std::vector<double>& intensity, const InputUnits& u) {
  if (duration_min.size() != intensity.size()) {
    f.report("intensities", "has " + std::to_string(intensity.size()) + " values for " +
                                std::to_string(duration_min.size()) + " durations_min");
    return;
  }
  if (duration_min.size() < 2) f.report("durations_min", "needs at least 2 durations");
  const std::string rate = u.rate_unit();
  for (std::size_t k = 0; k < duration_min.size(); ++k) {
    const double d = duration_min[k], i = intensity[k];
    if (!(std::isfinite(d) && d > 0.0)) {
      f.report_item("durations_min", k, "= " + format_value(d) + " min: must be > 0");
    } else if (k > 0 && !(d > duration_min[k - 1])) {
      f.report_item("durations_min", k, "= " + format_value(d) + " min: must be greater than "
                                            "the one before (" + format_value(duration_min[k - 1]) +
                                            " min)");
    }
    if (!(std::isfinite(i) && i > 0.0)) {
      f.report_item("intensities", k, "= " + format_value(i) + " " + rate + ": must be > 0");
    } else if (k > 0 && i * d < intensity[k - 1] * duration_min[k - 1]) {
      f.report_item("intensities", k,
                    "= " + format_value(i) + " " + rate + ": the depth i x d over " +
                        format_value(d) + " min would be less than over " +
                        format_value(duration_min[k - 1]) + " min; depth must not decrease "
                        "with duration");
    }
  }
}

// Empty when the table has problems (already reported, in the file's units).
std::optional<hydrology::IdfCurve> read_idf(FieldReader& r, const InputUnits& u,
                                            const std::string& label) {
  if (const toml::table* t = r.optional_table("idf")) {
    FieldReader f = r.nested(*t, "idf");
    hydrology::IdfFormula formula;
    // to mm/h: a scales the intensity
    formula.a = u.rain_depth_m(ranged(f, u, "a", Q::idf_a)) * 1000.0;
    formula.b_min = ranged(f, u, "b", Q::idf_b);
    formula.c = ranged(f, u, "c", Q::idf_c);
    f.finish();
    return hydrology::IdfCurve::from_formula(formula, label);
  }
  if (const toml::table* t = r.optional_table("idf_table")) {
    FieldReader f = r.nested(*t, "idf_table");
    std::vector<double> duration_s =
        detail::ranged_numbers(f, u, "durations_min", Q::idf_duration_min);
    std::vector<double> intensity = detail::ranged_numbers(f, u, "intensities", Q::idf_intensity);
    const std::size_t reported = f.problems().size();
    check_idf_table_as_written(f, duration_s, intensity, u);
    for (double& d : duration_s) d *= units::kSecondsPerMinute;
    for (double& i : intensity) i = u.rate_m_s(i);
    f.finish();
    if (f.problems().size() != reported) return std::nullopt;
    return hydrology::IdfCurve::from_table(std::move(duration_s), std::move(intensity), label);
  }
  throw InputError(Problem{r.file(), r.line(), r.column(), label, "idf",
                           "is missing: give idf = {a, b, c} or idf_table"});
}

}  // namespace

void Study::Impl::read_storms(std::vector<Problem>& problems) {
  const toml::array* list = root.get_as<toml::array>("storm");
  const InputUnits u{settings.units};
  for (const toml::node& node : detail::items_of(list)) {
    const toml::table* t = node.as_table();
    if (!t) continue;
    const std::string id = t->get("id") ? t->get("id")->value_or(std::string{}) : "";
    const std::string label = "storm '" + id + "'";
    FieldReader r(*t, file, label, problems);
    r.set_warnings(&warnings);
    r.text("id");
    if (!id.empty() && !detail::is_safe_id(id)) {
      r.report("id", "= '" + id + "': use letters, digits, '.', '_' and '-' only (storm ids "
                     "name output files)");
    }
    for (const auto& other : storms) {
      if (other.id == id) r.report("id", "= '" + id + "': another storm has this id");
    }
    const std::string method =
        r.choice("method", {"alternating-block", "chicago", "nrcs-24h", "series", "gauges"});
    std::string description = r.optional_text("description").value_or(method);
    try {
      std::optional<hydrology::Hyetograph> rain;
      std::map<std::string, hydrology::Hyetograph, std::less<>> subcatchment_rain;
      if (method == "series") {
        rain = read_series_storm(r, path.parent_path(), label);
      } else if (method == "gauges") {
        if (auto g = detail::read_gauge_storm(r, root, path.parent_path(), settings, label)) {
          rain = std::move(g->mean);
          subcatchment_rain = std::move(g->by_subcatchment);
          if (!r.has("description")) description = g->description;
        }
      } else if (method == "nrcs-24h") {
        const std::string type = r.text("distribution");
        const auto parsed = hydrology::parse_nrcs_rain_type(type);
        if (!parsed) r.report("distribution", "= '" + type + "': must be one of I, IA, II, III");
        const double depth = u.rain_depth_m(r.positive("depth"));
        const double step = ranged(r, u, "step_min", Q::storm_step_min) * units::kSecondsPerMinute;
        if (parsed) rain = hydrology::nrcs_24h_storm(*parsed, depth, step, label);
      } else if (!method.empty()) {
        const std::size_t before = problems.size();
        hydrology::DesignStormOptions o;
        o.duration_s = ranged(r, u, "duration_min", Q::storm_duration_min) *
                       units::kSecondsPerMinute;
        o.step_s = ranged(r, u, "step_min", Q::storm_step_min) * units::kSecondsPerMinute;
        o.peak_ratio = optional_ranged(r, u, "peak_ratio", Q::peak_ratio).value_or(0.5);
        check_blocks(r, o, method == "alternating-block");
        const std::optional<hydrology::IdfCurve> idf = read_idf(r, u, label);
        // The storm is built only from clean keys: the library would repeat their problems
        // under its own names (duration_s = nan) at the storm's first line.
        if (idf && problems.size() == before) {
          rain = method == "chicago" ? hydrology::chicago_storm(*idf, o, label)
                                     : hydrology::alternating_block_storm(*idf, o, label);
        }
      }
      const bool design = method != "series" && method != "gauges";
      if (rain && design) {
        rain = detail::apply_areal_reduction(r, std::move(*rain), settings, description);
      }
      if (rain) {
        const char* key = method == "series"    ? "file"
                          : method == "gauges"  ? "gauge"
                          : method == "nrcs-24h" ? "depth"
                          : r.has("idf")         ? "idf"
                                                 : "idf_table";
        detail::check_storm_depth(r, u, key, *rain, design);
        for (const auto& item : subcatchment_rain) {
          detail::check_storm_depth(r, u, key, item.second, false);
        }
        auto late = check_storm_within_run(*rain, settings, u, r, *t);
        storms.push_back({id, description, std::move(*rain), std::move(subcatchment_rain),
                          std::move(late)});
      }
    } catch (const InputError& e) {
      detail::relocate(e, r, problems);
    } catch (const IoError& e) {  // the series storm's CSV file
      detail::report_file_error(r, e);
    }
    if (!method.empty()) r.finish();  // an unknown method's other keys cannot be judged
  }
}

// ---- scenarios -------------------------------------------------------------------------------

void Study::Impl::read_scenarios(std::vector<Problem>& problems) {
  const toml::array* list = root.get_as<toml::array>("scenario");
  for (const toml::node& node : detail::items_of(list)) {
    const toml::table* t = node.as_table();
    if (!t) continue;
    const std::string id = t->get("id") ? t->get("id")->value_or(std::string{}) : "";
    FieldReader r(*t, file, "scenario '" + id + "'", problems);
    ScenarioDefinition s;
    s.id = r.text("id");
    s.description = r.optional_text("description").value_or("");
    const toml::table* change = r.optional_table("change");
    if (!change || change->empty()) r.report_here("needs a [scenario.change.<element-id>] table");
    if (change) changes.emplace(s.id, change);
    for (const auto& other : scenarios) {
      if (other.id == s.id) r.report("id", "= '" + s.id + "': another scenario has this id");
    }
    if (s.id == "base") r.report("id", "= 'base': reserved for the base network's results");
    if (!s.id.empty() && !detail::is_safe_id(s.id)) {
      r.report("id", "= '" + s.id + "': use letters, digits, '.', '_' and '-' only (scenario "
                     "ids name output folders)");
    }
    r.finish();
    scenarios.push_back(std::move(s));
  }
}

// ---- stretches -------------------------------------------------------------------------------

namespace {

// The elements from `up` down to `down` following each element's `to`; empty when `down` is
// not downstream of `up`.
std::vector<std::size_t> flow_path(const std::vector<StationDescription>& stations,
                                   std::size_t up, std::size_t down) {
  std::map<std::string_view, std::size_t> index;
  for (std::size_t i = 0; i < stations.size(); ++i) index.emplace(stations[i].id, i);
  std::vector<std::size_t> path{up};
  while (path.back() != down && path.size() <= stations.size()) {
    const auto next = index.find(stations[path.back()].to);
    if (next == index.end()) return {};
    path.push_back(next->second);
  }
  return path.back() == down ? path : std::vector<std::size_t>{};
}

}  // namespace

// Needs the base network's stations (read after it is built).
void Study::Impl::read_stretches(std::vector<Problem>& problems) {
  const toml::array* list = root.get_as<toml::array>("stretch");
  std::size_t n = 0;
  for (const toml::node& node : detail::items_of(list)) {
    const toml::table* t = node.as_table();
    ++n;
    if (!t) continue;
    FieldReader r(*t, file, "stretch " + std::to_string(n), problems);
    StretchDefinition d;
    d.upstream = r.text("upstream");
    d.downstream = r.text("downstream");
    r.finish();
    const auto find = [this](const std::string& id) {
      for (std::size_t i = 0; i < stations.size(); ++i) {
        if (stations[i].id == id) return i;
      }
      return stations.size();
    };
    const std::size_t up = find(d.upstream), down = find(d.downstream);
    if (!d.upstream.empty() && up == stations.size()) {
      r.report("upstream", "= '" + d.upstream + "': no element has this id");
    }
    if (!d.downstream.empty() && down == stations.size()) {
      r.report("downstream", "= '" + d.downstream + "': no element has this id");
    }
    if (up == stations.size() || down == stations.size()) continue;
    if (up == down) {
      r.report("downstream", "= '" + d.downstream + "': the same element as upstream");
      continue;
    }
    d.path = flow_path(stations, up, down);
    if (d.path.empty()) {
      r.report("downstream", "= '" + d.downstream + "': not downstream of '" + d.upstream +
                                 "' (following each element's 'to'): the two must lie on one "
                                 "flow path, upstream first");
      continue;
    }
    stretches.push_back(std::move(d));
  }
}

namespace {

bool element_exists(const toml::table& root, std::string_view id) {
  return detail::find_element(root, id) != nullptr;
}

}  // namespace

// The change table of a scenario, after checking that it names existing elements and leaves
// their ids and links alone. Each key given replaces the element's key whole (a table is not
// merged), so a scenario states every field of what it changes.
const toml::table* Study::Impl::checked_changes(std::string_view scenario_id,
                                                std::vector<Problem>& problems) const {
  if (scenario_id.empty()) return nullptr;
  const auto it = changes.find(scenario_id);
  if (it == changes.end()) {
    problems.push_back({file, 0, 0, "scenario '" + std::string(scenario_id) + "'", "",
                        "is not defined in this basin file"});
    return nullptr;
  }
  const std::string label = "scenario '" + std::string(scenario_id) + "'";
  for (const auto& [element_id, value] : *it->second) {
    const auto& where = value.source().begin;
    const std::string field = "change." + std::string(element_id.str());  // clang < 16 cannot
    auto report = [&](std::string message) {                               // capture a binding
      problems.push_back({file, static_cast<int>(where.line), static_cast<int>(where.column),
                          label, field, std::move(message)});
    };
    if (!element_exists(root, element_id.str())) {
      report("names no element of the basin");
    } else if (!value.is_table()) {
      report("must be a table");
    } else if (value.as_table()->get("id") || value.as_table()->get("to")) {
      report("cannot change an element's id or its 'to' link");
    }
  }
  return it->second;
}

network::Model Study::Impl::build(std::string_view scenario_id,
                                  const StormDefinition& storm,
                                  std::vector<Problem>& problems,
                                  std::vector<StationDescription>* stations_out,
                                  std::vector<Problem>* warnings_out,
                                  const ReachSchemeFn* reach_scheme,
                                  const std::vector<double>* member_probabilities) const {
  const std::size_t before = problems.size();
  const toml::table* changes_table = checked_changes(scenario_id, problems);
  if (problems.size() != before) return {};
  // An ensemble member lays its values over the scenario's changes. Its culvert crossings are
  // built for it alone (a member may vary their fields), not kept in the study's cache.
  toml::table member_table;
  std::string scope(scenario_id);
  detail::CrossingCache* cache = crossings.get();
  if (member_probabilities) {
    member_table = detail::member_changes(root, changes_table, *ensemble, *member_probabilities,
                                          nullptr);
    changes_table = &member_table;
    scope = scope.empty() ? "ensemble member" : scope + ", ensemble member";
    cache = nullptr;
  }
  detail::NetworkReader builder(root, changes_table, file, path.parent_path(), settings, storm,
                                problems, cache, scope, warnings_out);
  if (reach_scheme && *reach_scheme) builder.set_reach_scheme(reach_scheme);
  network::Model model = builder.build();
  if (settings.level_pool_backwater && !model.elements.empty()) {
    network::represent_backwater(model);  // reaches without an invert are warned about
  }
  if (stations_out) *stations_out = builder.stations();
  return model;
}

// Every member's values are valid input if each parameter's lowest and highest drawn values
// are (with the other parameters at their middle member): the quantiles rise with the
// probability, and the basin reader's range checks are per field. Problems are the varied
// parameter's, at its line.
void Study::Impl::check_ensemble_extremes(const StormDefinition& storm,
                                          std::vector<Problem>& problems) const {
  const EnsembleDefinition& e = *ensemble;
  if (e.probabilities.empty()) return;
  const std::size_t n = e.parameters.size();
  std::vector<double> middle(n);
  std::vector<double> lowest(n, 1.0);
  std::vector<double> highest(n, 0.0);
  for (std::size_t k = 0; k < n; ++k) {
    std::vector<double> column;
    for (const auto& member : e.probabilities) column.push_back(member[k]);
    std::sort(column.begin(), column.end());
    middle[k] = column[column.size() / 2];
    lowest[k] = column.front();
    highest[k] = column.back();
  }
  std::vector<std::string> scenario_ids = {""};
  for (const auto& s : scenarios) scenario_ids.push_back(s.id);
  for (std::size_t k = 0; k < n; ++k) {
    for (const double p : {lowest[k], highest[k]}) {
      std::vector<double> probabilities = middle;
      probabilities[k] = p;
      for (const std::string& scenario_id : scenario_ids) {
        std::vector<Problem> found;
        (void)build(scenario_id, storm, found, nullptr, nullptr, nullptr, &probabilities);
        const VariedParameter& varied = e.parameters[k];
        const std::string entry = varied.name.substr(0, varied.name.find(' '));  // "vary[2]"
        const std::string where =
            scenario_id.empty() ? "" : " in scenario '" + scenario_id + "'";
        for (const Problem& q : found) {
          problems.push_back({file, varied.line, 0, "uncertainty " + entry, "distribution",
                              "the member with " + varied.field + " at its " +
                                  (p == lowest[k] ? "lowest" : "highest") +
                                  " drawn value is not valid input" + where + ": " +
                                  q.to_string()});
        }
        if (!found.empty()) break;
      }
    }
  }
}

// ---- Study -----------------------------------------------------------------------------------

Study::Study(std::unique_ptr<Impl> impl) : impl_(std::move(impl)) {}
Study::Study(Study&&) noexcept = default;
Study& Study::operator=(Study&&) noexcept = default;
Study::~Study() = default;

Study Study::load(const std::filesystem::path& basin_file) {
  auto impl = std::make_unique<Impl>();
  impl->path = basin_file;
  impl->file = basin_file.string();
  std::vector<Problem> problems;
  try {
    impl->root = toml::parse_file(impl->file);
  } catch (const toml::parse_error& e) {
    const auto& where = e.source().begin;
    throw InputError(Problem{impl->file, static_cast<int>(where.line),
                             static_cast<int>(where.column), "", "",
                             std::string(e.description())});
  }
  FieldReader top(impl->root, impl->file, "", problems);
  impl->read_settings(top, problems);
  for (std::string_view key : detail::kElementArrays) top.optional_node(key);
  top.optional_node("storm");
  top.optional_node("scenario");
  top.optional_node("stretch");
  top.optional_node("uncertainty");
  top.optional_node("observed");
  top.finish();
  impl->read_storms(problems);
  impl->read_scenarios(problems);
  {
    std::vector<std::string> element_ids;
    for (std::string_view array : detail::kElementArrays) {
      for (const toml::node& node : detail::items_of(impl->root.get_as<toml::array>(array))) {
        const toml::table* t = node.as_table();
        if (t && t->get("id")) element_ids.push_back(t->get("id")->value_or(std::string{}));
      }
    }
    impl->observed = detail::read_observed(impl->root, impl->file, impl->path.parent_path(),
                                           impl->settings, impl->storms, element_ids, problems);
  }
  const std::size_t before_ensemble = problems.size();
  impl->ensemble = detail::read_ensemble(impl->root, impl->file, impl->settings.units, problems);
  const bool ensemble_sound = problems.size() == before_ensemble;
  if (!impl->root.get("storm")) {
    problems.push_back({impl->file, 0, 0, "", "storm", "no [[storm]] is defined"});
  }
  // The network is checked even when settings or storms have problems, so that one pass
  // reports everything; without a valid storm, subcatchments are built with no rain.
  StormDefinition no_rain;
  no_rain.rain = hydrology::Hyetograph::from_uniform_intensities(0.0, 60.0, {0.0}, "no rain");
  const StormDefinition& rain = impl->storms.empty() ? no_rain : impl->storms.front();
  const std::size_t before = problems.size();
  std::vector<Problem> warnings;
  impl->build("", rain, problems, &impl->stations, &warnings);
  if (problems.size() == before) impl->read_stretches(problems);
  if (problems.size() == before) {  // scenarios only add news when the base is sound
    for (const auto& s : impl->scenarios) {
      impl->build(s.id, rain, problems, &impl->scenario_stations[s.id], &warnings);
    }
  }
  if (problems.size() == before && impl->ensemble && ensemble_sound) {
    impl->check_ensemble_extremes(rain, problems);
  }
  if (!problems.empty()) throw InputError(std::move(problems));
  // Each scenario reads the whole network again: an element it leaves alone repeats the
  // base's warnings word for word, and is listed once.
  for (Problem& w : warnings) {
    const std::string text = w.to_string();
    const bool seen = std::any_of(impl->warnings.begin(), impl->warnings.end(),
                                  [&text](const Problem& p) { return p.to_string() == text; });
    if (!seen) impl->warnings.push_back(std::move(w));
  }
  return Study(std::move(impl));
}

const std::filesystem::path& Study::file() const noexcept { return impl_->path; }
const std::optional<EnsembleDefinition>& Study::ensemble() const noexcept {
  return impl_->ensemble;
}

network::Model Study::build_member_model(std::string_view scenario_id,
                                         const StormDefinition& storm, std::size_t member,
                                         const ReachSchemeFn& reach_scheme) const {
  FRESHET_ASSERT(impl_->ensemble && member < impl_->ensemble->members,
                 "ensemble member out of range");
  std::vector<Problem> problems;
  network::Model model = impl_->build(scenario_id, storm, problems, nullptr, nullptr,
                                      &reach_scheme, &impl_->ensemble->probabilities[member]);
  if (!problems.empty()) throw InputError(std::move(problems));
  return model;
}

std::vector<MemberValue> Study::member_values(std::string_view scenario_id,
                                              std::size_t member) const {
  FRESHET_ASSERT(impl_->ensemble && member < impl_->ensemble->members,
                 "ensemble member out of range");
  std::vector<Problem> problems;
  const toml::table* changes = impl_->checked_changes(scenario_id, problems);
  if (!problems.empty()) throw InputError(std::move(problems));
  std::vector<MemberValue> values;
  (void)detail::member_changes(impl_->root, changes, *impl_->ensemble,
                               impl_->ensemble->probabilities[member], &values);
  return values;
}
const StudySettings& Study::settings() const noexcept { return impl_->settings; }
const std::vector<Problem>& Study::warnings() const noexcept { return impl_->warnings; }
const std::vector<StormDefinition>& Study::storms() const noexcept { return impl_->storms; }
const std::vector<ObservedSeries>& Study::observed() const noexcept { return impl_->observed; }
const std::vector<ScenarioDefinition>& Study::scenarios() const noexcept {
  return impl_->scenarios;
}
const std::vector<StretchDefinition>& Study::stretches() const noexcept {
  return impl_->stretches;
}
std::vector<StationDescription> Study::stations(std::string_view scenario_id) const {
  if (scenario_id.empty()) return impl_->stations;
  (void)scenario(scenario_id);  // InputError if unknown
  return impl_->scenario_stations.find(scenario_id)->second;
}

const StormDefinition& Study::storm(std::string_view id) const {
  for (const auto& s : impl_->storms) {
    if (s.id == id) return s;
  }
  throw InputError(Problem{impl_->file, 0, 0, "storm '" + std::string(id) + "'", "",
                           "is not defined in this basin file"});
}

const ScenarioDefinition& Study::scenario(std::string_view id) const {
  for (const auto& s : impl_->scenarios) {
    if (s.id == id) return s;
  }
  std::string known;
  for (const auto& s : impl_->scenarios) known += (known.empty() ? "" : ", ") + s.id;
  throw InputError(Problem{impl_->file, 0, 0, "scenario '" + std::string(id) + "'", "",
                           "is not defined in this basin file (scenarios: " +
                               (known.empty() ? std::string("none") : known) + ")"});
}

network::Model Study::build_model(std::string_view scenario_id,
                                  const StormDefinition& storm,
                                  const ReachSchemeFn& reach_scheme) const {
  std::vector<Problem> problems;
  network::Model model =
      impl_->build(scenario_id, storm, problems, nullptr, nullptr, &reach_scheme);
  if (!problems.empty()) throw InputError(std::move(problems));
  return model;
}

}  // namespace freshet::study
