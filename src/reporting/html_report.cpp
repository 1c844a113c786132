// The study report's page and its tables; the figures are in report_figures.cpp.
#include "freshet/reporting/html_report.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <map>

#include "freshet/core/caution.hpp"
#include "report_page.hpp"

namespace freshet::reporting {

namespace detail {

ReportPage::ReportPage(const HtmlReportInput& in) : in_(in), up_(in.stations.size()) {
  for (const ReportedRun& r : in.runs) {
    if (r.report) runs_[{r.scenario_id, r.storm_id}] = r.report;
  }
  std::map<std::string, std::size_t> index;
  for (std::size_t i = 0; i < in.stations.size(); ++i) index.emplace(in.stations[i].id, i);
  for (std::size_t i = 0; i < in.stations.size(); ++i) {
    const auto it = index.find(in.stations[i].to);
    if (it != index.end()) up_[it->second].push_back(i);
  }
}

const RunReport* ReportPage::run(const std::string& scenario, const std::string& storm) const {
  const auto it = runs_.find({scenario, storm});
  return it == runs_.end() ? nullptr : it->second;
}

std::size_t ReportPage::index_in(const RunReport& r, const std::string& id) const {
  auto [it, added] = index_.try_emplace(&r);
  if (added) {
    for (std::size_t k = 0; k < r.peaks.size(); ++k) it->second.emplace(r.peaks[k].id, k);
  }
  const auto found = it->second.find(id);
  return found == it->second.end() ? static_cast<std::size_t>(-1) : found->second;
}

std::string ReportPage::run_label(const ReportedRun& r) const {
  return multiple_scenarios() ? scenario_name(r.scenario_id) + ", " + r.storm_id : r.storm_id;
}

const RunReport* ReportPage::facts_run() const {
  for (const ReportedRun& r : in_.runs) {
    if (r.scenario_id.empty() && r.report) return r.report;
  }
  return in_.runs.empty() ? nullptr : in_.runs.front().report;
}

int ReportPage::critical_storm(std::size_t i, const std::string& scenario) const {
  int best = -1;
  double best_q = -1.0;
  for (std::size_t k = 0; k < in_.storms.size(); ++k) {
    const RunReport* r = run(scenario, in_.storms[k].first);
    if (!r) continue;
    const std::size_t j = index_in(*r, in_.stations[i].id);
    if (j >= r->peaks.size()) continue;
    const double q = r->peaks[j].peak_discharge_m3s;
    if (std::isfinite(q) && q > best_q) {
      best_q = q;
      best = static_cast<int>(k);
    }
  }
  return best;
}

std::string clock_hm(double seconds) {
  if (!std::isfinite(seconds)) return "-";
  const long minutes = std::lround(seconds / 60.0);
  char b[32];
  std::snprintf(b, sizeof b, "%s%ld:%02ld", minutes < 0 ? "-" : "", std::labs(minutes) / 60,
                std::labs(minutes) % 60);
  return b;
}

std::string figure(const std::string& svg, const std::string& caption_html) {
  return "<figure>\n" + svg + "<figcaption>" + caption_html + "</figcaption>\n</figure>\n";
}

}  // namespace detail

namespace {

using detail::clock_hm;
using detail::escape_html;
using detail::fixed;
using detail::ReportPage;

constexpr const char* kStyle = R"(
:root { --ink: #1b1b1b; --rule: #9a9a9a; --soft: #f3f1ec; --warn: #7a1f00; }
body { font: 14px/1.45 "DejaVu Sans", "Liberation Sans", Arial, sans-serif; color: var(--ink);
       margin: 0 auto; max-width: 62rem; padding: 1rem 1.5rem 3rem; }
h1 { font-size: 1.6rem; margin: 0.4rem 0; } h2 { font-size: 1.25rem; margin-top: 2rem;
     border-bottom: 2px solid var(--ink); } h3 { font-size: 1.05rem; margin: 1.2rem 0 0.4rem; }
.caution { border: 3px solid var(--ink); background: var(--soft); padding: 0.6rem 1rem;
           font-weight: bold; }
.warnings li { margin: 0.2rem 0; } .where { color: #555; font-size: 0.9em; }
.none { color: #555; font-style: italic; }
table { border-collapse: collapse; margin: 0.5rem 0 1rem; font-size: 0.86rem; }
th, td { border: 1px solid var(--rule); padding: 0.15rem 0.4rem; vertical-align: top; }
th { background: var(--soft); text-align: center; } td.n { text-align: right;
     font-variant-numeric: tabular-nums; white-space: nowrap; }
th.point { text-align: left; min-width: 7rem; }
td.critical { font-weight: bold; text-decoration: underline; }
.over { color: var(--warn); font-weight: bold; display: block; white-space: normal;
        font-size: 0.8rem; }
figure { margin: 1rem 0; break-inside: avoid; page-break-inside: avoid; }
figcaption { font-size: 0.85rem; color: #333; margin-top: 0.2rem; }
svg.chart { width: 100%; height: auto; max-width: 760px; display: block; }
svg.chart text { font: 11px "DejaVu Sans", "Liberation Sans", Arial, sans-serif; fill: #1b1b1b; }
svg.chart .ctitle { font-size: 13px; font-weight: bold; }
svg.chart .alabel { font-size: 12px; }
svg.chart .grid { stroke: #dddddd; stroke-width: 0.6; }
svg.chart .axes line { stroke: #1b1b1b; } svg.chart .axes line.grid { stroke: #dddddd; }
svg.chart .frame { fill: none; stroke: #1b1b1b; }
dl.facts { display: grid; grid-template-columns: max-content 1fr; gap: 0.1rem 1rem; }
dl.facts dt { font-weight: bold; } dl.facts dd { margin: 0; overflow-wrap: anywhere; }
nav ol { columns: 2; font-size: 0.9rem; }
code { font-size: 0.92em; }
@page { margin: 14mm 12mm; }
@media print {
  body { max-width: none; padding: 0; font-size: 10.5pt; }
  h2 { break-after: avoid; page-break-after: avoid; } nav { display: none; }
  table { break-inside: auto; } tr, figure { break-inside: avoid; page-break-inside: avoid; }
  svg.chart { max-width: 100%; }
}
)";

std::string scenario_name(const std::string& id) { return ReportPage::scenario_name(id); }

std::string html_head(const HtmlReportInput& in) {
  return "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n"
         "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n"
         "<meta http-equiv=\"Content-Security-Policy\" content=\"default-src 'none'; "
         "style-src 'unsafe-inline'; img-src data:\">\n<title>" +
         escape_html(in.title) + " - freshet report</title>\n<style>" + kStyle +
         "</style>\n</head>\n";
}

std::string header(const HtmlReportInput& in) {
  std::string storms, scenarios;
  for (const auto& [id, d] : in.storms) storms += (storms.empty() ? "" : ", ") + escape_html(id);
  for (const auto& [id, d] : in.scenarios) {
    scenarios += (scenarios.empty() ? "" : ", ") + escape_html(scenario_name(id));
  }
  std::string s = "<header>\n<h1>" + escape_html(in.title) + "</h1>\n<p>Report of <code>freshet " +
                  escape_html(in.command) + "</code>: storms " + storms + "; " +
                  (in.scenarios.size() > 1 ? "networks " : "network ") + scenarios +
                  ". Times are hours and minutes since the study start, " +
                  escape_html(in.time_origin_iso) + ".</p>\n</header>\n";
  s += "<nav><ol><li><a href=\"#caution\">Caution and warnings</a></li>"
       "<li><a href=\"#answer\">Peaks at each point</a></li>"
       "<li><a href=\"#hydrographs\">Hydrographs</a></li>"
       "<li><a href=\"#hyetographs\">Rain, losses and excess</a></li>"
       "<li><a href=\"#long-sections\">Long sections</a></li>"
       "<li><a href=\"#schematic\">Network schematic</a></li>"
       "<li><a href=\"#attenuation\">Attenuation</a></li>"
       "<li><a href=\"#findings\">Shocks and element findings</a></li>"
       "<li><a href=\"#checks\">Applicability, numerics, mass balance</a></li>"
       "<li><a href=\"#provenance\">Run settings and provenance</a></li></ol></nav>\n";
  return s;
}

// The caution, then every warning of every run grouped by element (network order), each
// message once with the runs it came from; then the basin file's warnings.
std::string warnings_section(const ReportPage& c) {
  const HtmlReportInput& in = c.in();
  std::string s = "<section id=\"caution\">\n<h2>Caution and warnings</h2>\n<p class=\"caution\">" +
                  escape_html(kCautionText) + "</p>\n";
  std::map<std::string, std::size_t> order;
  for (std::size_t i = 0; i < in.stations.size(); ++i) order.emplace(in.stations[i].id, i);
  // element -> message -> runs
  std::map<std::size_t, std::vector<std::pair<std::string, std::vector<std::string>>>> by_element;
  std::map<std::size_t, std::string> element_id;
  std::size_t count = 0;
  for (const ReportedRun& r : in.runs) {
    if (!r.report) continue;
    for (const ApplicabilityWarning& w : r.report->summary.warnings) {
      const auto it = order.find(w.element);
      const std::size_t key = it == order.end() ? in.stations.size() + 1 : it->second;
      element_id[key] = w.element;
      auto& messages = by_element[key];
      auto m = std::find_if(messages.begin(), messages.end(),
                            [&](const auto& e) { return e.first == w.message; });
      if (m == messages.end()) {
        messages.push_back({w.message, {}});
        m = messages.end() - 1;
        ++count;
      }
      m->second.push_back(c.run_label(r));
    }
  }
  s += "<h3>Warnings of the runs (" + std::to_string(count) + ")</h3>\n";
  if (by_element.empty()) s += "<p class=\"none\">No run gave a warning.</p>\n";
  for (const auto& [key, messages] : by_element) {
    const std::string& id = element_id[key];
    const std::string name = key < in.stations.size() ? in.stations[key].name : std::string();
    s += "<h4>" + escape_html(id.empty() ? "the run" : id) +
         (name.empty() ? "" : " <span class=\"where\">(" + escape_html(name) + ")</span>") +
         "</h4>\n<ul class=\"warnings\">\n";
    for (const auto& [message, runs] : messages) {
      std::string where;
      for (const auto& r : runs) where += (where.empty() ? "" : "; ") + escape_html(r);
      s += "<li>" + escape_html(message) + " <span class=\"where\">[" + where + "]</span></li>\n";
    }
    s += "</ul>\n";
  }
  s += "<h3>Basin file (" + std::to_string(in.input_warnings.size()) + ")</h3>\n";
  if (in.input_warnings.empty()) s += "<p class=\"none\">No value outside its plausible range.</p>\n";
  else {
    s += "<ul class=\"warnings\">\n";
    for (const auto& w : in.input_warnings) s += "<li>" + escape_html(w) + "</li>\n";
    s += "</ul>\n";
  }
  return s + "</section>\n";
}

std::string point_cell(std::size_t i, const HtmlReportInput& in) {
  return "<th scope=\"row\" class=\"point\">" + escape_html(in.stations[i].id) +
         "<br><span class=\"where\">" + escape_html(in.stations[i].name) + "</span></th>";
}

// Peak discharge, time and stage per storm (columns) for each point and scenario (rows), the
// critical storm underlined and named.
std::string answer_table(const ReportPage& c) {
  const HtmlReportInput& in = c.in();
  std::string s = "<table class=\"answer\">\n<thead><tr><th rowspan=\"2\">point</th>";
  if (c.multiple_scenarios()) s += "<th rowspan=\"2\">network</th>";
  for (const auto& [storm, d] : in.storms) {
    s += "<th colspan=\"3\">" + escape_html(storm) + "</th>";
  }
  s += "<th rowspan=\"2\">critical storm</th></tr>\n<tr>";
  for (std::size_t k = 0; k < in.storms.size(); ++k) {
    s += "<th>peak Q (m³/s)</th><th>time (h:mm)</th><th>peak stage (m)</th>";
  }
  s += "</tr></thead>\n<tbody>\n";
  for (std::size_t i = 0; i < in.stations.size(); ++i) {
    if (!c.is_point(i)) continue;
    for (std::size_t sc = 0; sc < in.scenarios.size(); ++sc) {
      const std::string& scenario = in.scenarios[sc].first;
      const int critical = c.critical_storm(i, scenario);
      s += "<tr>";
      if (sc == 0) {
        std::string cell = point_cell(i, in);
        cell.insert(3, " rowspan=\"" + std::to_string(in.scenarios.size()) + "\"");
        s += cell;
      }
      if (c.multiple_scenarios()) s += "<td>" + escape_html(scenario_name(scenario)) + "</td>";
      for (std::size_t k = 0; k < in.storms.size(); ++k) {
        const RunReport* r = c.run(scenario, in.storms[k].first);
        const std::size_t j = r ? c.index_in(*r, in.stations[i].id) : 0;
        if (!r || j >= r->peaks.size()) {
          s += "<td class=\"n\">-</td><td class=\"n\">-</td><td class=\"n\">-</td>";
          continue;
        }
        const StationPeak& p = r->peaks[j];
        const bool crit = static_cast<int>(k) == critical;
        s += std::string("<td class=\"n") + (crit ? " critical" : "") + "\">" +
             fixed(p.peak_discharge_m3s, 3) + "</td><td class=\"n\">" + clock_hm(p.peak_time_s) +
             "</td><td class=\"n\">" + fixed(p.peak_stage_m, 2) +
             (std::isfinite(p.peak_stage_m) ? (p.stage_is_elevation ? " e" : " d") : "");
        if (!p.overtopping.empty() && p.overtopping != "no") {
          s += "<br><span class=\"over\">road overtopped " + escape_html(p.overtopping) + "</span>";
        }
        s += "</td>";
      }
      s += "<td>" + (critical >= 0 ? escape_html(in.storms[static_cast<std::size_t>(critical)].first)
                                   : std::string("-")) +
           "</td></tr>\n";
    }
  }
  return s + "</tbody></table>\n";
}

std::string signed_fixed(double v, int decimals) {
  return std::isfinite(v) ? (v >= 0.0 ? "+" : "") + fixed(v, decimals) : "-";
}

// Each scenario against the base: change in peak discharge (and per cent), peak stage and
// time of the peak, per storm.
std::string change_table(const ReportPage& c) {
  const HtmlReportInput& in = c.in();
  std::string s = "<h3>What each scenario changes, against the base network</h3>\n"
                  "<table class=\"changes\">\n<thead><tr><th rowspan=\"2\">point</th>"
                  "<th rowspan=\"2\">network</th>";
  for (const auto& [storm, d] : in.storms) s += "<th colspan=\"3\">" + escape_html(storm) + "</th>";
  s += "</tr>\n<tr>";
  for (std::size_t k = 0; k < in.storms.size(); ++k) {
    s += "<th>Δ peak Q (m³/s, %)</th><th>Δ peak stage (m)</th><th>Δ time (min)</th>";
  }
  s += "</tr></thead>\n<tbody>\n";
  for (std::size_t i = 0; i < in.stations.size(); ++i) {
    if (!c.is_point(i)) continue;
    for (std::size_t sc = 1; sc < in.scenarios.size(); ++sc) {
      const std::string& scenario = in.scenarios[sc].first;
      s += "<tr>";
      if (sc == 1) {
        std::string cell = point_cell(i, in);
        cell.insert(3, " rowspan=\"" + std::to_string(in.scenarios.size() - 1) + "\"");
        s += cell;
      }
      s += "<td>" + escape_html(scenario) + "</td>";
      for (const auto& [storm, d] : in.storms) {
        const RunReport* r = c.run(scenario, storm);
        const RunReport* b = c.run(in.scenarios[0].first, storm);
        const std::size_t j = r ? c.index_in(*r, in.stations[i].id) : 0;
        const std::size_t jb = b ? c.index_in(*b, in.stations[i].id) : 0;
        if (!r || !b || j >= r->peaks.size() || jb >= b->peaks.size()) {
          s += "<td class=\"n\">-</td><td class=\"n\">-</td><td class=\"n\">-</td>";
          continue;
        }
        const StationPeak& p = r->peaks[j];
        const StationPeak& q = b->peaks[jb];
        const double dq = p.peak_discharge_m3s - q.peak_discharge_m3s;
        const double pct = q.peak_discharge_m3s > 0.0 ? 100.0 * dq / q.peak_discharge_m3s : NAN;
        const std::string dstage = p.stage_is_elevation == q.stage_is_elevation
                                       ? signed_fixed(p.peak_stage_m - q.peak_stage_m, 2)
                                       : std::string("datum differs");
        s += "<td class=\"n\">" + signed_fixed(dq, 3) + " (" + signed_fixed(pct, 1) +
             " %)</td><td class=\"n\">" + dstage + "</td><td class=\"n\">" +
             signed_fixed((p.peak_time_s - q.peak_time_s) / 60.0, 0) + "</td>";
      }
      s += "</tr>\n";
    }
  }
  return s + "</tbody></table>\n";
}

std::string answer_section(const ReportPage& c) {
  std::string s =
      "<section id=\"answer\">\n<h2>Peaks at each point</h2>\n<p>Peak discharge, its time and "
      "the highest stage at every point of the network (not at the subcatchments and inflows "
      "that feed it), for each storm" +
      std::string(c.multiple_scenarios() ? " and network" : "") +
      ". The critical storm (the largest peak discharge) is underlined and named in the last "
      "column. Stage is a water-surface elevation (e) where the point has a datum, else a "
      "depth (d).</p>\n";
  s += answer_table(c);
  if (c.multiple_scenarios()) {
    s += "<p>Scenarios:</p><ul>";
    for (std::size_t k = 1; k < c.in().scenarios.size(); ++k) {
      s += "<li><b>" + escape_html(c.in().scenarios[k].first) + "</b>: " +
           escape_html(c.in().scenarios[k].second) + "</li>";
    }
    s += "</ul>\n" + change_table(c);
  }
  return s + "</section>\n";
}

std::string run_heading(const ReportPage& c, const ReportedRun& r) {
  return "<h3>" + escape_html(c.run_label(r)) + "</h3>\n";
}

std::string findings_section(const ReportPage& c) {
  std::string s = "<section id=\"findings\">\n<h2>Shocks and element findings</h2>\n<p>Where "
                  "each reach's and overland plane's wave breaks (from the characteristics of "
                  "its inflow), the kinematic shocks (steep fronts) that matter to the flood, "
                  "and what each element reported (culvert headwater and road overtopping, "
                  "detention peaks, conduits at capacity).</p>\n";
  for (const ReportedRun& r : c.in().runs) {
    if (!r.report) continue;
    s += run_heading(c, r);
    const RunSummary& sum = r.report->summary;
    if (!sum.breaking.empty()) {
      s += "<ul>\n";
      for (const BreakingRecord& b : sum.breaking) {
        const std::string who = b.plane.empty() ? b.element : b.element + ", plane " + b.plane;
        s += "<li><b>" + escape_html(who) + "</b>: " + escape_html(b.message) + "</li>\n";
      }
      s += "</ul>\n";
    }
    if (sum.shocks.empty()) {
      s += "<p class=\"none\">No significant shock.</p>\n";
    } else {
      s += "<table><thead><tr><th>reach</th><th>formed at (h:mm)</th><th>chainage (m)</th>"
           "<th>finding</th></tr></thead><tbody>\n";
      for (const ShockRecord& k : sum.shocks) {
        const std::string who = k.plane.empty() ? k.element : k.element + ", plane " + k.plane;
        s += "<tr><td>" + escape_html(who) + "</td><td class=\"n\">" + clock_hm(k.time_s) +
             "</td><td class=\"n\">" + fixed(k.chainage_m, 0) + "</td><td>" +
             escape_html(k.message) + "</td></tr>\n";
      }
      s += "</tbody></table>\n";
    }
    if (!r.report->notes.empty()) {
      s += "<ul>\n";
      for (const auto& [id, note] : r.report->notes) {
        s += "<li><b>" + escape_html(id) + "</b>: " + escape_html(note) + "</li>\n";
      }
      s += "</ul>\n";
    }
  }
  return s + "</section>\n";
}

std::string sci(double v) {
  if (!std::isfinite(v)) return "-";
  char b[32];
  std::snprintf(b, sizeof b, "%.1e", v);
  return b;
}

// Every reach, pond and culvert: the peak of its total inflow (upstream plus lateral) against
// its peak outflow, per run; then the stretches the basin file names.
std::string attenuation_section(const ReportPage& c) {
  std::string s =
      "<section id=\"attenuation\">\n<h2>Attenuation</h2>\n<p>For every reach, culvert and "
      "pond: the peak of everything flowing into it (upstream elements and runoff along a "
      "reach, summed into one hydrograph), the part of that peak that is lateral inflow, the "
      "peak outflow, the attenuation as a share of the inflow peak, the delay of the peak, and "
      "the water stored when the outflow peaked. Runoff along a reach is inflow, not negative "
      "attenuation.</p>\n<table class=\"attenuation\"><thead><tr><th>run</th><th>element</th>"
      "<th>kind</th><th>peak in (m³/s)</th><th>of it lateral (m³/s)</th><th>peak out (m³/s)</th>"
      "<th>attenuation (%)</th><th>delay (min)</th><th>stored at peak out (m³)</th></tr></thead>"
      "<tbody>\n";
  bool any_stretch = false;
  for (const ReportedRun& r : c.in().runs) {
    if (!r.report) continue;
    any_stretch = any_stretch || !r.report->summary.stretches.empty();
    for (const AttenuationRecord& a : r.report->summary.attenuation) {
      s += "<tr data-element=\"" + escape_html(a.element) + "\"><td>" +
           escape_html(c.run_label(r)) + "</td><td>" + escape_html(a.element) + "</td><td>" +
           escape_html(a.kind) + "</td><td class=\"n\">" + fixed(a.peak_inflow_m3s, 3) +
           "</td><td class=\"n\">" + fixed(a.peak_lateral_inflow_m3s, 3) + "</td><td class=\"n\">" +
           fixed(a.peak_outflow_m3s, 3) + "</td><td class=\"n\">" + fixed(a.attenuation_percent, 1) +
           "</td><td class=\"n\">" + fixed(a.peak_delay_s / 60.0, 1) + "</td><td class=\"n\">" +
           fixed(a.storage_at_outflow_peak_m3, 0) + "</td></tr>\n";
    }
  }
  s += "</tbody></table>\n";
  if (!any_stretch) return s + "</section>\n";
  s += "<h3>Stretches named in the basin file</h3>\n<p>The upstream element's peak outflow, the "
       "water that joined the path between the two (runoff and tributaries: its volume and "
       "peak), the peak of the two together, the downstream element's peak outflow, and the "
       "attenuation against that combined peak.</p>\n<table><thead><tr><th>run</th><th>path</th>"
       "<th>peak up (m³/s)</th><th>side inflow (m³)</th><th>side peak (m³/s)</th>"
       "<th>combined in (m³/s)</th><th>peak down (m³/s)</th><th>attenuation (%)</th>"
       "<th>shift (min)</th></tr></thead><tbody>\n";
  for (const ReportedRun& r : c.in().runs) {
    if (!r.report) continue;
    for (const StretchRecord& t : r.report->summary.stretches) {
      std::string path;
      for (const auto& id : t.path) path += (path.empty() ? "" : " → ") + escape_html(id);
      s += "<tr><td>" + escape_html(c.run_label(r)) + "</td><td>" + path + "</td><td class=\"n\">" +
           fixed(t.upstream_peak_m3s, 3) + "</td><td class=\"n\">" +
           fixed(t.side_inflow_volume_m3, 0) + "</td><td class=\"n\">" +
           fixed(t.side_inflow_peak_m3s, 3) + "</td><td class=\"n\">" +
           fixed(t.combined_inflow_peak_m3s, 3) + "</td><td class=\"n\">" +
           fixed(t.downstream_peak_m3s, 3) + "</td><td class=\"n\">" +
           fixed(t.attenuation_percent, 1) + "</td><td class=\"n\">" +
           fixed(t.peak_shift_s / 60.0, 1) + "</td></tr>\n";
    }
  }
  return s + "</tbody></table>\n</section>\n";
}

// Ponce numbers and reach numerics per run; volume balance as one table (element x run).
std::string checks_section(const ReportPage& c) {
  const HtmlReportInput& in = c.in();
  std::string s =
      "<section id=\"checks\">\n<h2>Applicability, numerics and mass balance</h2>\n"
      "<h3>Kinematic-wave applicability</h3>\n<p>Ponce (1989) time-of-rise numbers at each reach "
      "outlet at its peak: the kinematic wave applies when t<sub>r</sub> S<sub>0</sub> "
      "u<sub>0</sub>/d<sub>0</sub> ≥ 85, a diffusion wave when t<sub>r</sub> S<sub>0</sub> "
      "(g/d<sub>0</sub>)<sup>1/2</sup> ≥ 15.</p>\n<table><thead><tr><th>run</th><th>reach</th>"
      "<th>time of rise (min)</th><th>kinematic number</th><th>diffusion number</th></tr></thead>"
      "<tbody>\n";
  for (const ReportedRun& r : in.runs) {
    if (!r.report) continue;
    for (const WaveNumberRecord& w : r.report->summary.wave_numbers) {
      const bool low = std::isfinite(w.kinematic_number) && w.kinematic_number < 85.0;
      s += "<tr><td>" + escape_html(c.run_label(r)) + "</td><td>" + escape_html(w.element) +
           "</td><td class=\"n\">" + fixed(w.time_of_rise_s / 60.0, 1) + "</td><td class=\"n" +
           (low ? " critical" : "") + "\">" + fixed(w.kinematic_number, 0) +
           "</td><td class=\"n\">" + fixed(w.diffusion_number, 1) + "</td></tr>\n";
    }
  }
  s += "</tbody></table>\n<h3>Reach numerics</h3>\n<table><thead><tr><th>run</th><th>reach</th>"
       "<th>scheme, steps, Courant number, balance, shocks, time</th></tr></thead><tbody>\n";
  for (const ReportedRun& r : in.runs) {
    if (!r.report) continue;
    for (const auto& [id, d] : r.report->reach_numerics) {
      s += "<tr><td>" + escape_html(c.run_label(r)) + "</td><td>" + escape_html(id) + "</td><td>" +
           escape_html(d.brief_report()) + "</td></tr>\n";
    }
  }
  s += "</tbody></table>\n<h3>Mass balance</h3>\n<p>Each element's volume error, inflow − "
       "outflow − losses − storage change, relative to the water that passed it (a run stops "
       "above 1e-9).</p>\n<table><thead><tr><th>element</th>";
  for (const ReportedRun& r : in.runs) s += "<th>" + escape_html(c.run_label(r)) + "</th>";
  s += "</tr></thead><tbody>\n";
  for (const StationDescription& st : in.stations) {
    s += "<tr><td>" + escape_html(st.id) + "</td>";
    for (const ReportedRun& r : in.runs) {
      double e = NAN;
      if (r.report) {
        // One record per element, in model order.
        const std::size_t j = c.index_in(*r.report, st.id);
        const auto& balance = r.report->summary.mass_balance;
        if (j < balance.size() && balance[j].element == st.id) e = balance[j].relative_error;
      }
      s += "<td class=\"n\">" + sci(e) + "</td>";
    }
    s += "</tr>\n";
  }
  return s + "</tbody></table>\n</section>\n";
}

std::string facts_list(const std::vector<std::pair<std::string, std::string>>& facts) {
  std::string s = "<dl class=\"facts\">\n";
  for (const auto& [k, v] : facts) s += "<dt>" + escape_html(k) + "</dt><dd>" + escape_html(v) + "</dd>\n";
  return s + "</dl>\n";
}

std::string provenance_section(const HtmlReportInput& in) {
  std::string s = "<section id=\"provenance\">\n<h2>Run settings and provenance</h2>\n<h3>Settings</h3>\n" +
                  facts_list(in.settings) + "<h3>Storms</h3>\n<ul>\n";
  for (const auto& [id, d] : in.storms) s += "<li><b>" + escape_html(id) + "</b>: " + escape_html(d) + "</li>\n";
  s += "</ul>\n<h3>Provenance</h3>\n" + facts_list(in.provenance);
  s += "<p class=\"caution\">" + escape_html(kCautionText) + "</p>\n";
  return s + "</section>\n";
}

}  // namespace

std::string compose_html_report(const HtmlReportInput& input) {
  ReportPage c(input);
  std::string body = header(input) + warnings_section(c) + answer_section(c);
  body += detail::hydrograph_section(c);
  body += detail::hyetograph_section(c);
  body += detail::long_section_section(c);
  body += detail::schematic_section(c);
  body += attenuation_section(c);
  body += findings_section(c) + checks_section(c) + provenance_section(input);
  return html_head(input) + "<body>\n<main data-figures=\"" + std::to_string(c.figures()) +
         "\">\n" + body + "</main>\n</body>\n</html>\n";
}

}  // namespace freshet::reporting
