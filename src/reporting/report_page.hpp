// What the sections of the HTML report share (html_report.cpp, report_figures.cpp): the
// input, runs found by scenario and storm, stations by id, the network's links, and the
// running figure count.
#pragma once

#include <cstddef>
#include <map>
#include <string>
#include <unordered_map>
#include <vector>

#include "freshet/reporting/html_report.hpp"
#include "freshet/reporting/reported_as.hpp"
#include "svg_plot.hpp"

namespace freshet::reporting::detail {

class ReportPage {
 public:
  explicit ReportPage(const HtmlReportInput& in);

  [[nodiscard]] const HtmlReportInput& in() const { return in_; }
  [[nodiscard]] const std::vector<StationDescription>& stations() const { return in_.stations; }
  // The run of (scenario, storm), or nullptr.
  [[nodiscard]] const RunReport* run(const std::string& scenario, const std::string& storm) const;
  // Station `id`'s index in `r`'s records (its peaks, series, elements), or npos. Each
  // run's index is built once (the pages of large networks look up every station).
  [[nodiscard]] std::size_t index_in(const RunReport& r, const std::string& id) const;
  // Elements whose `to` is station i (its feeders, subcatchments along a reach included).
  [[nodiscard]] const std::vector<std::size_t>& upstream(std::size_t i) const { return up_[i]; }
  // "base" or the scenario id; "storm s, scenario c" for captions.
  [[nodiscard]] static std::string scenario_name(const std::string& id) {
    return id.empty() ? "base" : id;
  }
  [[nodiscard]] std::string run_label(const ReportedRun& r) const;
  // A point of interest: every element that is not a source of water.
  [[nodiscard]] bool is_point(std::size_t i) const {
    return !network::is_source(in_.stations[i].kind);
  }
  [[nodiscard]] bool multiple_scenarios() const { return in_.scenarios.size() > 1; }
  // Any run with its element facts (the first run of the base, else the first run).
  [[nodiscard]] const RunReport* facts_run() const;
  // The index of station i's peak discharge storm in scenario s (-1 when none).
  [[nodiscard]] int critical_storm(std::size_t i, const std::string& scenario) const;

  // Counts a figure and returns its id ("fig-<n>").
  std::string next_figure_id() { return "fig-" + std::to_string(++figures_); }
  [[nodiscard]] int figures() const { return figures_; }

 private:
  const HtmlReportInput& in_;
  std::map<std::pair<std::string, std::string>, const RunReport*> runs_;
  std::vector<std::vector<std::size_t>> up_;
  mutable std::map<const RunReport*, std::unordered_map<std::string, std::size_t>> index_;
  int figures_ = 0;
};

// Time since the study start as h:mm ("1:05"), "-" for NaN.
std::string clock_hm(double seconds);
// <figure> with the SVG and a caption.
std::string figure(const std::string& svg, const std::string& caption_html);

// The figure sections (report_figures.cpp).
std::string hydrograph_section(ReportPage& c);
std::string hyetograph_section(ReportPage& c);
std::string long_section_section(ReportPage& c);
std::string schematic_section(ReportPage& c);

}  // namespace freshet::reporting::detail
