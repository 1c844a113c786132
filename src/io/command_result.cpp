#include "freshet/io/command_result.hpp"

#include <cmath>
#include <nlohmann/json.hpp>

#include "freshet/core/caution.hpp"
#include "freshet/io/csv_table.hpp"

namespace freshet::io {

namespace {

nlohmann::json number_or_null(double v) {
  return std::isfinite(v) ? nlohmann::json(v) : nlohmann::json(nullptr);
}

nlohmann::json run_json(const CommandRun& run) {
  nlohmann::json peaks = nlohmann::json::array(), warnings = nlohmann::json::array();
  for (const reporting::StationSummary& s : run.summary.stations) {
    peaks.push_back({{"station_id", s.station_id},
                     {"name", s.name},
                     {"peak_discharge_m3s", number_or_null(s.peak_discharge_m3s)},
                     {"peak_time_s", number_or_null(s.peak_time_s)},
                     {"peak_stage_m", number_or_null(s.peak_stage_m)},
                     {"volume_m3", number_or_null(s.runoff_volume_m3)}});
  }
  for (const reporting::ApplicabilityWarning& w : run.summary.warnings) {
    warnings.push_back({{"element", w.element}, {"message", w.message}});
  }
  return {{"scenario", run.scenario.empty() ? std::string("base") : run.scenario},
          {"storm", run.storm},
          {"time_origin", run.summary.time_origin_iso},
          {"peaks", std::move(peaks)},
          {"warnings", std::move(warnings)}};
}

}  // namespace

std::string format_command_json(const CommandResult& r) {
  nlohmann::json j;
  j["format"] = "freshet command result";
  j["format_version"] = kOutputFormatVersion;
  j["command"] = r.command;
  j["basin"] = r.basin;
  j["exit_status"] = r.exit_status;
  j["error"] = r.error.empty() ? nlohmann::json(nullptr) : nlohmann::json(r.error);
  j["cautions"] = nlohmann::json::array({std::string(kCautionText)});
  j["input_warnings"] = r.input_warnings;
  j["units"] = {{"discharge", "m3 s-1"}, {"time", "s"}, {"stage", "m"}, {"volume", "m3"}};
  nlohmann::json runs = nlohmann::json::array();
  for (const CommandRun& run : r.runs) runs.push_back(run_json(run));
  j["runs"] = std::move(runs);
  if (r.command == "ensemble") {
    nlohmann::json ensembles = nlohmann::json::array();
    for (const CommandEnsemble& e : r.ensembles) {
      ensembles.push_back(nlohmann::json::parse(format_ensemble_json(e.summary, e.description)));
    }
    j["ensembles"] = std::move(ensembles);
  }
  j["files"] = r.files;
  if (r.command == "check") {
    nlohmann::json facts = nlohmann::json::object();
    for (const auto& [key, value] : r.facts) facts[key] = value;
    j["basin_facts"] = std::move(facts);
    j["storms"] = r.storms;
    j["scenarios"] = r.scenarios;
  }
  return j.dump(2) + "\n";
}

}  // namespace freshet::io
