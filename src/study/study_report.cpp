#include "freshet/study/study_report.hpp"

#include <cerrno>
#include <cstring>
#include <ctime>
#include <fstream>
#include <sstream>

#include "freshet/core/error.hpp"
#include "freshet/io/state_file.hpp"
#include "freshet/reporting/html_report.hpp"
#include "freshet/routing/routing_options.hpp"

namespace freshet::study {

namespace {

std::string utc_now() {
  const std::time_t t = std::time(nullptr);
  char buf[32];
  std::strftime(buf, sizeof buf, "%Y-%m-%dT%H:%M:%SZ", std::gmtime(&t));
  return buf;
}

std::vector<std::pair<std::string, std::string>> settings_facts(const StudySettings& s) {
  return {{"title", s.title},
          {"units of the basin file", std::string(units::to_string(s.units))},
          {"study start (time origin)", s.start_iso},
          {"duration", format_value(s.duration_s / 3600.0) + " h"},
          {"output interval", format_value(s.output_interval_s / 60.0) + " min"},
          {"coupling step (at most)", format_value(s.coupling_step_s) + " s"},
          {"default cell length", format_value(s.default_cell_length_m) + " m"},
          {"channel scheme", std::string(routing::to_string(s.channel_routing.scheme))},
          {"overland plane scheme", std::string(routing::to_string(s.plane_routing.scheme))}};
}

}  // namespace

std::filesystem::path report_path(const std::filesystem::path& out_dir,
                                  const std::string& scenario_id, bool scenario_folder) {
  if (!scenario_folder) return out_dir / "report.html";
  return out_dir / (scenario_id.empty() ? "base" : scenario_id) / "report.html";
}

std::string study_report_html(const Study& study, const std::vector<RunOutcome>& runs,
                              const ReportRequest& request) {
  reporting::HtmlReportInput in;
  in.title = study.settings().title;
  in.command = request.command;
  in.stations = study.stations();
  in.time_origin_iso = study.settings().start_iso;
  for (const RunOutcome& r : runs) {
    in.runs.push_back({r.scenario_id, r.storm_id, &r});
    const auto add = [](auto& list, const std::string& id, const std::string& description) {
      for (const auto& [k, d] : list) {
        if (k == id) return;
      }
      list.emplace_back(id, description);
    };
    add(in.storms, r.storm_id, study.storm(r.storm_id).description);
    add(in.scenarios, r.scenario_id,
        r.scenario_id.empty() ? std::string("the base network")
                              : study.scenario(r.scenario_id).description);
  }
  for (const Problem& w : study.warnings()) in.input_warnings.push_back(w.to_string());
  in.settings = settings_facts(study.settings());
  in.provenance = {{"freshet version", request.source},
                   {"command line", request.command_line},
                   {"basin file", study.file().string()},
                   {"basin file SHA-256", io::file_sha256(study.file())},
                   {"report written (UTC)", utc_now()}};
  return reporting::compose_html_report(in);
}

void write_study_report(const Study& study, const std::vector<RunOutcome>& runs,
                        const ReportRequest& request) {
  const std::string html = study_report_html(study, runs, request);
  const io::OutputFolderLock::Handle lock =
      io::OutputFolderLock::acquire(request.path.parent_path());
  io::write_file_atomically(request.path, html, request.overwrite);
}

}  // namespace freshet::study
