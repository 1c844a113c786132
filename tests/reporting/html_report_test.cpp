// The study report's page, composed in memory from runs driven through the recording sink:
// every section and figure present, tags balanced, every user string escaped, units in the
// axis labels, and a plotted line that lands where the values it claims to show belong.
//
// Sources of the checks:
//  - A junction passes its inflow unchanged (continuity, no storage), and the inflow is a
//    piecewise-linear hydrograph given at its breakpoints: the junction's discharge at the
//    output times is the triangle's value there (plane geometry).
//  - The drawing maps a value v on an axis [a0, a1] to left + (v - a0)/(a1 - a0) width (or
//    top + height - ... for values), rounded to 0.01 px: the figure's own stated convention
//    (src/reporting/svg_plot.hpp), the same one the NetCDF read-back test in tests/outputs
//    inverts.
//  - HTML escaping of & < > " ': WHATWG HTML Living Standard, sec. 13.1.2.6 (text and
//    attribute values), common practice.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <memory>
#include <sstream>
#include <string>
#include <vector>

#include "freshet/core/caution.hpp"
#include "freshet/core/error.hpp"
#include "freshet/geometry/section_flux.hpp"
#include "freshet/network/elements.hpp"
#include "freshet/network/simple_elements.hpp"
#include "freshet/reporting/html_report.hpp"
#include "freshet/reporting/run_recorder.hpp"
#include "freshet/reporting/run_report.hpp"
#include "freshet/routing/make_reach.hpp"

namespace freshet::reporting {
namespace {

using network::ElementKind;

const std::string kAwkwardName = "Mill <Lane> & \"Co\" culvert #2 'old'";
const std::string kAwkwardEscaped = "Mill &lt;Lane&gt; &amp; &quot;Co&quot; culvert #2 &#39;old&#39;";

// in -> meet (junction) -> ch (reach with a bed level) -> out; runs one triangle.
struct Run {
  network::Model model;
  std::unique_ptr<RunRecorder> recorder;
  RunReport report;
};

std::unique_ptr<Run> route_triangle(double peak_m3s, double peak_time_s) {
  auto r = std::make_unique<Run>();
  r->model.links = {{"in", ElementKind::inflow, "meet", {}},
                    {"meet", ElementKind::junction, "ch", {}},
                    {"ch", ElementKind::reach, "out", {}},
                    {"out", ElementKind::outlet, "", {}}};
  r->model.elements.push_back(std::make_unique<network::InflowHydrograph>(
      "in", PiecewiseLinearSeries({0.0, peak_time_s, 3.0 * peak_time_s}, {0.0, peak_m3s, 0.0})));
  r->model.elements.push_back(std::make_unique<network::PassThrough>("meet", ElementKind::junction));
  geometry::FlowSection flow = geometry::make_flow_section(geometry::RectangularSpec{4.0, 0.035}, 0.004);
  auto reach = routing::make_reach({"ch", 1000.0, 40}, flow.flux);
  r->model.elements.push_back(
      std::make_unique<network::ReachElement>("ch", std::move(flow), std::move(reach), 100.0));
  r->model.elements.push_back(std::make_unique<network::PassThrough>("out", ElementKind::outlet));
  r->model.finalize();
  const std::vector<StationDescription> stations = {
      {"in", ElementKind::inflow, "inflow", "meet", false},
      {"meet", ElementKind::junction, kAwkwardName, "ch", false},
      {"ch", ElementKind::reach, "channel", "out", true},
      {"out", ElementKind::outlet, "outlet", "", false}};
  r->recorder = std::make_unique<RunRecorder>(r->model, stations);
  r->recorder->keep_output_series();
  const network::ClockOptions clock{0.0, 4.0 * peak_time_s, 300.0, 60.0};
  const network::RunSummary numerics = network::simulate(r->model, clock, *r->recorder);
  r->report = report_run(r->model, numerics, *r->recorder,
                         {"test", "freshet test", clock, "2026-07-14T00:00:00Z"});
  return r;
}

struct Page {
  std::unique_ptr<Run> small, large;
  std::string html;
};

Page compose() {
  Page p;
  p.small = route_triangle(4.0, 1800.0);
  p.large = route_triangle(6.0, 1800.0);
  HtmlReportInput in;
  in.title = "Study <of> & \"things\"";
  in.command = "route";
  in.stations = p.small->recorder->stations();
  in.storms = {{"s1", "small triangle"}, {"s2", "large <triangle>"}};
  in.scenarios = {{"", "the base network"}};
  in.runs = {{"", "s1", &p.small->report}, {"", "s2", &p.large->report}};
  in.input_warnings = {"basin.toml:3:1: reach 'ch', field 'n' = 0.2 & more"};
  in.settings = {{"duration", "2 h"}};
  in.provenance = {{"command line", "freshet route 'a b.toml' --out \"x\""}};
  in.time_origin_iso = "2026-07-14T00:00:00Z";
  p.html = compose_html_report(in);
  return p;
}

std::size_t count(const std::string& text, const std::string& what) {
  std::size_t n = 0;
  for (std::size_t at = text.find(what); at != std::string::npos; at = text.find(what, at + 1)) ++n;
  return n;
}

TEST(HtmlReport, HasEverySectionAndFigureWithBalancedTags) {
  const Page p = compose();
  const std::string& h = p.html;
  EXPECT_EQ(h.rfind("<!DOCTYPE html>", 0), 0u);
  for (const char* id : {"caution", "answer", "hydrographs", "hyetographs", "long-sections",
                         "schematic", "attenuation", "findings", "checks", "provenance"}) {
    EXPECT_NE(h.find(std::string("<section id=\"") + id + "\">"), std::string::npos) << id;
  }
  // The attenuation table: one row per run for the one reach (not for the junction, a source
  // or the outlet), its percentage that of the run's attenuation record.
  EXPECT_EQ(count(h, "<tr data-element=\"ch\">"), 2u);
  EXPECT_EQ(count(h, "<tr data-element=\"meet\">"), 0u);
  ASSERT_EQ(p.small->report.summary.attenuation.size(), 1u);
  const std::size_t row = h.find("<tr data-element=\"ch\">");
  const std::string pct = format_fixed(p.small->report.summary.attenuation[0].attenuation_percent, 1);
  EXPECT_NE(h.substr(row, h.find("</tr>", row) - row).find("<td class=\"n\">" + pct + "</td>"),
            std::string::npos);
  // Hydrographs at meet, ch and out (the inflow is a source, not a point); the long section
  // to out (ch has a bed level); the schematic. No subcatchment: no hyetograph.
  const std::size_t figures = count(h, "<svg ");
  EXPECT_EQ(figures, 5u);
  EXPECT_NE(h.find("data-figures=\"5\""), std::string::npos);
  EXPECT_EQ(count(h, "<figure>"), figures);
  EXPECT_EQ(count(h, "role=\"img\""), figures);
  EXPECT_EQ(count(h, "<desc id="), figures);
  for (const char* tag : {"section", "figure", "svg", "table", "ul", "g", "figcaption", "title",
                          "desc", "h2", "h3", "tr", "td", "th", "dl", "text"}) {
    EXPECT_EQ(count(h, std::string("<") + tag + ">") + count(h, std::string("<") + tag + " "),
              count(h, std::string("</") + tag + ">"))
        << tag;
  }
  // The caution up front, before the answer, and again at the end.
  const std::size_t caution = h.find(std::string(kCautionText));
  ASSERT_NE(caution, std::string::npos);
  EXPECT_LT(caution, h.find("<section id=\"answer\">"));
  EXPECT_EQ(count(h, std::string(kCautionText)), 2u);
}

TEST(HtmlReport, EscapesEveryUserString) {
  const Page p = compose();
  const std::string& h = p.html;
  EXPECT_EQ(h.find(kAwkwardName), std::string::npos);
  EXPECT_EQ(h.find("<Lane>"), std::string::npos);
  EXPECT_EQ(h.find("<of>"), std::string::npos);
  EXPECT_EQ(h.find("<triangle>"), std::string::npos);
  EXPECT_NE(h.find(kAwkwardEscaped), std::string::npos);
  EXPECT_NE(h.find("Study &lt;of&gt; &amp; &quot;things&quot;"), std::string::npos);
  EXPECT_NE(h.find("0.2 &amp; more"), std::string::npos);
  EXPECT_NE(h.find("--out &quot;x&quot;"), std::string::npos);
  // Outside tags, no bare '<' that is not the start of markup: every '<' is followed by a
  // tag name, '/' or '!'.
  for (std::size_t at = h.find('<'); at != std::string::npos; at = h.find('<', at + 1)) {
    const char next = h[at + 1];
    EXPECT_TRUE(std::isalpha(static_cast<unsigned char>(next)) || next == '/' || next == '!')
        << h.substr(at, 40);
  }
}

TEST(HtmlReport, AxisLabelsCarryUnits) {
  const Page p = compose();
  std::vector<std::string> labels;
  // Plain string search: std::regex trips GCC 12's -Wmaybe-uninitialized in the sanitizer
  // build (a false positive inside libstdc++).
  const std::string open = "<text class=\"alabel\"";
  for (std::size_t at = p.html.find(open); at != std::string::npos;
       at = p.html.find(open, at + 1)) {
    const std::size_t begin = p.html.find('>', at) + 1;
    labels.push_back(p.html.substr(begin, p.html.find('<', begin) - begin));
  }
  ASSERT_GE(labels.size(), 8u);  // two per chart
  for (const std::string& l : labels) {
    constexpr std::string_view kUnits[] = {"(m³/s)", "(m)", "(h)", "(mm/h)"};
    const bool with_unit = std::any_of(std::begin(kUnits), std::end(kUnits),
                                       [&l](std::string_view unit) { return l.ends_with(unit); });
    EXPECT_TRUE(with_unit) << l;
  }
  for (const char* l : {"discharge (m³/s)", "time since study start (h)", "elevation (m)",
                        "distance along the flow path (m)"}) {
    EXPECT_NE(std::find(labels.begin(), labels.end(), l), labels.end()) << l;
  }
}

// The figure's numbers for one attribute, e.g. data-y-range="0 8".
std::vector<double> numbers(const std::string& svg, const std::string& attribute) {
  const std::size_t at = svg.find(attribute + "=\"");
  if (at == std::string::npos) return {};
  std::istringstream in(svg.substr(at + attribute.size() + 2, svg.find('"', at + attribute.size() + 2) -
                                                                  at - attribute.size() - 2));
  std::vector<double> v;
  for (double x; in >> x;) v.push_back(x);
  return v;
}

// The junction's line for the larger storm, read back through the figure's axes, is the
// inflow triangle at the output times (continuity through a junction; plane geometry).
TEST(HtmlReport, APlottedLineShowsTheValuesItClaims) {
  const Page p = compose();
  const std::string& h = p.html;
  const std::size_t line = h.find("data-series=\"discharge|meet|base|s2\"");
  ASSERT_NE(line, std::string::npos);
  const std::size_t svg_start = h.rfind("<svg ", line);
  const std::string svg = h.substr(svg_start, h.find("</svg>", line) - svg_start);
  const std::vector<double> box = numbers(svg, "data-plot-box");
  const std::vector<double> xr = numbers(svg, "data-x-range"), yr = numbers(svg, "data-y-range");
  ASSERT_EQ(box.size(), 4u);
  ASSERT_EQ(xr.size(), 2u);
  ASSERT_EQ(yr.size(), 2u);
  const std::size_t pts = h.find("points=\"", line) + 8;
  std::istringstream in(h.substr(pts, h.find('"', pts) - pts));
  std::vector<std::pair<double, double>> points;
  for (std::string xy; in >> xy;) {
    const std::size_t comma = xy.find(',');
    points.emplace_back(std::stod(xy.substr(0, comma)), std::stod(xy.substr(comma + 1)));
  }
  ASSERT_EQ(points.size(), 25u);  // 0 to 2 h every 5 min
  // 0.01 px rounding in each direction, in axis units.
  const double tol_h = 0.006 * (xr[1] - xr[0]) / box[2];
  const double tol_q = 0.006 * (yr[1] - yr[0]) / box[3];
  for (std::size_t k = 0; k < points.size(); ++k) {
    const double t_h = xr[0] + (points[k].first - box[0]) / box[2] * (xr[1] - xr[0]);
    const double q = yr[0] + (box[1] + box[3] - points[k].second) / box[3] * (yr[1] - yr[0]);
    const double t_s = 300.0 * static_cast<double>(k);
    const double expected = t_s <= 1800.0 ? 6.0 * t_s / 1800.0 : 6.0 * (5400.0 - t_s) / 3600.0;
    EXPECT_NEAR(t_h, t_s / 3600.0, tol_h) << k;
    EXPECT_NEAR(q, std::max(0.0, expected), tol_q) << k;
  }
}

// The answer table names the storm with the larger peak as critical at every point.
TEST(HtmlReport, TheCriticalStormIsTheOneWithTheLargestPeak) {
  const Page p = compose();
  const std::string& h = p.html;
  const std::size_t table = h.find("<table class=\"answer\">");
  ASSERT_NE(table, std::string::npos);
  const std::string answer = h.substr(table, h.find("</table>", table) - table);
  EXPECT_EQ(count(answer, "scope=\"row\""), 3u);  // meet, ch, out
  EXPECT_EQ(count(answer, "<td>s2</td></tr>"), 3u);       // critical storm column
  EXPECT_EQ(count(answer, "<td class=\"n critical\">"), 3u);
  EXPECT_NE(answer.find(">6.000</td>"), std::string::npos);  // the junction's peak, m3/s
}

}  // namespace
}  // namespace freshet::reporting
