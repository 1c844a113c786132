// A study read from a basin file: run settings, design storms, the network, and the
// scenarios that change it. The format (TOML, keys of freshet's own) is documented in
// docs/basin-file.md.
//
// Loading checks everything at once: syntax, unknown keys, values out of range, unknown or
// duplicate ids, cycles, CSV files named by the study, and every scenario applied to the base.
// Problems are reported together in one InputError, each with file, line, element and field.
// Every number is checked against a hard range (an error) and a plausible range (a warning,
// kept in warnings()); the ranges are one table, src/io/input_ranges.cpp.
// US customary input (units = "us") is converted to SI here, once.
//
//   Study study = Study::load("basins/tansy-brook.toml");
//   for (const StormDefinition& storm : study.storms()) {
//     network::Model model = study.build_model("", storm);   // "" = the base network
//     ...
//   }
#pragma once

#include <filesystem>
#include <functional>
#include <map>
#include <memory>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "freshet/core/error.hpp"
#include "freshet/core/time_series.hpp"
#include "freshet/core/units.hpp"
#include "freshet/hydrology/hyetograph.hpp"
#include "freshet/network/driver.hpp"
#include "freshet/network/run_budget.hpp"
#include "freshet/reporting/station.hpp"
#include "freshet/routing/routing_options.hpp"
#include "freshet/study/ensemble.hpp"

namespace freshet::study {

struct StudySettings {
  std::string title;
  // Who made the study and on what terms its outputs may be used (optional keys; written as
  // the ACDD attributes creator_name, creator_email, creator_institution and license of every
  // NetCDF file; empty = not written).
  std::string creator_name;
  std::string creator_email;
  std::string creator_institution;
  std::string license;
  units::System units = units::System::si;
  std::string start_iso = "2000-01-01T00:00:00Z";  // the time origin of every output
  // time_zone: how far local time is ahead of UTC (min); dated records (gauges, observed
  // hydrographs) and `start` written without a zone are read in it.
  int time_zone_offset_min = 0;
  double duration_s = 0.0;
  double output_interval_s = 300.0;
  double coupling_step_s = 60.0;
  double default_cell_length_m = 25.0;      // reaches without cells / cell_length
  routing::RoutingOptions channel_routing;  // reaches
  routing::RoutingOptions plane_routing;    // overland planes
  network::RunBudget budget;                // max_cell_steps, max_memory_mb
  // wave_choice = "automatic": each reach routed by the kinematic or the diffusion wave as
  // Ponce's criteria judge its flood (a first pass with the kinematic wave measures it).
  bool automatic_wave_choice = false;
  // backwater = "level-pool": a pond or culvert pool backs water into the reach that feeds
  // it as a level pool over the reach's drowned length (network/backwater.hpp); the default
  // "warn-only" routes reaches without it and warns where the pond stood higher.
  bool level_pool_backwater = false;

  // The clock of every run: from time 0 to duration_s, samples at the output interval,
  // elements coupled at the step the driver takes.
  [[nodiscard]] network::ClockOptions clock() const {
    return {0.0, duration_s, output_interval_s, coupling_step_s};
  }
};

struct StormDefinition {
  std::string id;
  std::string description;  // e.g. "alternating block, 60 min, 5 min blocks"
  hydrology::Hyetograph rain;
  // Rain of each subcatchment when it differs from `rain` (a gauge storm: the weighted mix of
  // its gauges; `rain` is then the plain mean of the gauges, shown by check and the report).
  std::map<std::string, hydrology::Hyetograph, std::less<>> subcatchment_rain;
  // Set when some of the storm's rain falls after the run ends: a command that would route
  // this storm stops with this problem before routing anything (the file's other storms can
  // still be routed on their own, with --storm); `freshet check` warns.
  std::optional<Problem> ends_after_run;
};

// A stretch the basin file names ([[stretch]]): two elements on one flow path, the upstream
// one first; `path` holds every element from upstream to downstream (model order indices of
// the base network; scenarios cannot relink elements, so the path is the same in each).
struct StretchDefinition {
  std::string upstream;
  std::string downstream;
  std::vector<std::size_t> path;
};

// An observed hydrograph ([[observed]], docs/inputs.md): a dated discharge record attached to
// a station for one storm; routed against it in the run's outputs and report.
struct ObservedSeries {
  std::string station_id;
  std::string storm_id;
  std::string file;                  // as named in messages and outputs
  PiecewiseLinearSeries flow;        // m3 s-1, times in s since the study start
  std::vector<std::string> notes;    // gaps filled
};

struct ScenarioDefinition {
  std::string id;
  std::string description;
};

using reporting::StationDescription;

// The scheme a reach is built with, from its id and the scheme the file gives it (a run may
// choose per reach, as wave_choice = "automatic" does).
using ReachSchemeFn = std::function<routing::SchemeKind(const std::string& reach_id,
                                                        routing::SchemeKind given)>;

class Study {
 public:
  // Reads and checks the file; throws InputError listing every problem found.
  static Study load(const std::filesystem::path& basin_file);

  [[nodiscard]] const std::filesystem::path& file() const noexcept;
  [[nodiscard]] const StudySettings& settings() const noexcept;
  // Values outside their plausible ranges (docs/basin-file.md, "Ranges"), each naming file,
  // line, element, field, value and the published source of the range; in file order per
  // element kind. `freshet check` prints them, and `route` and `compare` before routing.
  [[nodiscard]] const std::vector<Problem>& warnings() const noexcept;
  [[nodiscard]] const std::vector<StormDefinition>& storms() const noexcept;
  [[nodiscard]] const std::vector<ScenarioDefinition>& scenarios() const noexcept;
  [[nodiscard]] const std::vector<StretchDefinition>& stretches() const noexcept;
  // Observed hydrographs, in file order.
  [[nodiscard]] const std::vector<ObservedSeries>& observed() const noexcept;
  [[nodiscard]] const StormDefinition& storm(std::string_view id) const;  // InputError if unknown
  [[nodiscard]] const ScenarioDefinition& scenario(std::string_view id) const;  // likewise
  // Stations of the base network (scenario_id empty) or of a scenario, in model order (one per
  // element). A scenario may rename an element or give it a datum. InputError if unknown.
  [[nodiscard]] std::vector<StationDescription> stations(std::string_view scenario_id = {}) const;

  // A fresh model of the base network (scenario_id empty) or of a scenario, with every
  // subcatchment receiving `storm`. Throws InputError for an unknown scenario.
  [[nodiscard]] network::Model build_model(std::string_view scenario_id,
                                           const StormDefinition& storm,
                                           const ReachSchemeFn& reach_scheme = {}) const;

  // The [uncertainty] section, if the file has one (docs/uncertainty.md).
  [[nodiscard]] const std::optional<EnsembleDefinition>& ensemble() const noexcept;
  // Member `member` (0-based, < ensemble()->members) of the base network or of a scenario: the
  // model with every varied parameter at the member's value, and those values. The members'
  // extremes are built once at load, so a member's build does not fail on the input.
  [[nodiscard]] network::Model build_member_model(std::string_view scenario_id,
                                                  const StormDefinition& storm,
                                                  std::size_t member,
                                                  const ReachSchemeFn& reach_scheme = {}) const;
  [[nodiscard]] std::vector<MemberValue> member_values(std::string_view scenario_id,
                                                       std::size_t member) const;

  Study(Study&&) noexcept;
  Study& operator=(Study&&) noexcept;
  ~Study();

 private:
  struct Impl;
  explicit Study(std::unique_ptr<Impl> impl);
  std::unique_ptr<Impl> impl_;
};

}  // namespace freshet::study
