// The study report: one self-contained HTML page for the runs of one `route` or `compare`
// command, composed in memory from their reports (run_report.hpp), with no file and no
// network access. Figures are inline SVG drawn here (no script, no external style, font or
// image), and the page prints on A4 or Letter.
//
// Reading order: the caution and every warning (grouped by element); the answer (peak
// discharge, peak stage and time at each point for each storm and scenario, the critical
// storm, what each scenario changed); hydrographs per station (all storms overlaid; inflow,
// outflow and stage at culverts and ponds with their crests marked); hyetographs with losses
// and excess per subcatchment; a long section along each main flow path; a schematic of the
// network coloured by how much each element attenuates its inflow peak; shocks and element
// findings, applicability numbers, reach numerics, mass balance; run settings and provenance.
// Every text that comes from the study (names, ids, descriptions, messages) is escaped.
//
//   HtmlReportInput in;
//   in.title = study title;  in.stations = study.stations();
//   in.runs.push_back({"", "aep1-60min", &outcome});    // one per (scenario, storm)
//   std::string html = compose_html_report(in);       // io writes it atomically
#pragma once

#include <string>
#include <utility>
#include <vector>

#include "freshet/reporting/run_report.hpp"
#include "freshet/reporting/station.hpp"

namespace freshet::reporting {

struct ReportedRun {
  std::string scenario_id;  // empty: the base network
  std::string storm_id;
  const RunReport* report = nullptr;  // must outlive compose_html_report()
};

struct HtmlReportInput {
  std::string title;    // the study's title
  std::string command;  // "route" or "compare"
  std::vector<StationDescription> stations;  // the base network, model order
  // (id, description) of the storms and of the scenarios, in the order the tables show them;
  // the base network is the scenario with the empty id.
  std::vector<std::pair<std::string, std::string>> storms;
  std::vector<std::pair<std::string, std::string>> scenarios;
  std::vector<ReportedRun> runs;
  std::vector<std::string> input_warnings;  // the basin file's plausibility warnings
  // (name, value) lines: run settings (with units) and provenance (version, command line,
  // input file and its SHA-256, date).
  std::vector<std::pair<std::string, std::string>> settings;
  std::vector<std::pair<std::string, std::string>> provenance;
  std::string time_origin_iso;  // the study start that times count from
};

// The whole page. Every figure is an <svg role="img"> with a <title> and <desc>; the <main>
// element's data-figures attribute holds their number (the browser check counts them).
std::string compose_html_report(const HtmlReportInput& input);

}  // namespace freshet::reporting
