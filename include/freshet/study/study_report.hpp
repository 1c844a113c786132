// The study report of a `route` or `compare` command: one self-contained HTML page
// (reporting/html_report.hpp) for all of its runs, written atomically (io/atomic_file.hpp)
// after the runs have completed, under the output folder's lock.
//
//   const std::vector<RunOutcome> runs = ...;   // run_study for each (scenario, storm)
//   write_study_report(study, runs, {report_path(out_dir, ""), "route", command_line,
//                                    "freshet 0.1.0", io::Overwrite::no});
#pragma once

#include <filesystem>
#include <string>
#include <vector>

#include "freshet/io/atomic_file.hpp"
#include "freshet/study/study.hpp"
#include "freshet/study/study_run.hpp"

namespace freshet::study {

struct ReportRequest {
  std::filesystem::path path;  // where report.html goes
  std::string command;         // "route" or "compare"
  std::string command_line;    // as typed, for the provenance
  std::string source;          // "freshet <version>"
  io::Overwrite overwrite = io::Overwrite::no;
};

// `route`: out_dir/<scenario or "base">/report.html, beside the runs' files; `compare` (with
// scenario_folder false): out_dir/report.html, above the folders of the networks it compares.
std::filesystem::path report_path(const std::filesystem::path& out_dir,
                                  const std::string& scenario_id, bool scenario_folder = true);

// The page for `runs` (in the order the command ran them), as compose_html_report makes it,
// with the study's settings, its plausibility warnings, and the provenance: version, command
// line, basin file and its SHA-256, date. Throws IoError naming the basin file when it can no
// longer be read, or the report path when it cannot be written (or exists, unless allowed).
std::string study_report_html(const Study& study, const std::vector<RunOutcome>& runs,
                              const ReportRequest& request);
void write_study_report(const Study& study, const std::vector<RunOutcome>& runs,
                        const ReportRequest& request);

}  // namespace freshet::study
