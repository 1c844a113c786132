// The study report's figures: hydrographs, hyetographs, long sections and the network
// schematic, each an SVG drawn by svg_plot.cpp from the runs' output series.
#include <algorithm>
#include <cmath>
#include <functional>
#include <map>
#include <optional>
#include <set>

#include "report_page.hpp"

namespace freshet::reporting::detail {

namespace {

constexpr double kSecondsPerHour = 3600.0;
constexpr double kMmPerHourPerMs = 3.6e6;  // m/s -> mm/h
// Drawn at most: more hydrographs than this are left to the NetCDF files (the report says so).
constexpr int kMaxHydrographFigures = 150;
constexpr int kMaxHyetographFigures = 60;

std::vector<double> hours(const std::vector<double>& times_s) {
  std::vector<double> h(times_s.size());
  for (std::size_t k = 0; k < h.size(); ++k) h[k] = times_s[k] / kSecondsPerHour;
  return h;
}

std::string series_key(const std::string& what, const std::string& station,
                       const std::string& scenario, const std::string& storm) {
  return what + "|" + station + "|" + ReportPage::scenario_name(scenario) + "|" + storm;
}

std::string stage_label(const StationDescription& s) {
  if (s.kind == network::ElementKind::culvert) {
    return s.stage_is_elevation ? "headwater elevation (m)" : "headwater depth (m)";
  }
  return s.stage_is_elevation ? "water-surface elevation (m)" : "depth (m)";
}

std::string station_title(const StationDescription& s) { return s.name + " (" + s.id + ")"; }

// Sum of the discharges of the stations feeding station i (subcatchments along a reach
// included): its total inflow at the output times.
std::vector<double> inflow_series(const ReportPage& c, const RunReport& r, std::size_t i) {
  std::vector<double> sum(r.series.times_s.size(), 0.0);
  for (std::size_t u : c.upstream(i)) {
    const std::size_t j = c.index_in(r, c.stations()[u].id);
    if (j >= r.series.stations.size()) continue;
    const std::vector<double>& q = r.series.stations[j].discharge_m3s;
    for (std::size_t k = 0; k < sum.size() && k < q.size(); ++k) sum[k] += q[k];
  }
  return sum;
}

// One figure per point and network: discharge for every storm overlaid.
std::string storms_overlaid(ReportPage& c, std::size_t i, const std::string& scenario) {
  const StationDescription& st = c.stations()[i];
  LineChart chart;
  chart.id = c.next_figure_id();
  chart.title = "Discharge at " + station_title(st) +
                (c.multiple_scenarios() ? ", " + ReportPage::scenario_name(scenario) : "");
  chart.x_label = "time since study start (h)";
  chart.y_label = "discharge (m³/s)";
  std::string storms;
  for (std::size_t k = 0; k < c.in().storms.size(); ++k) {
    const std::string& storm = c.in().storms[k].first;
    const RunReport* r = c.run(scenario, storm);
    if (!r || !r->series.kept()) continue;
    const std::size_t j = c.index_in(*r, st.id);
    if (j >= r->series.stations.size()) continue;
    chart.series.push_back({storm, hours(r->series.times_s), r->series.stations[j].discharge_m3s,
                            static_cast<int>(k), false, series_key("discharge", st.id, scenario, storm)});
    storms += (storms.empty() ? "" : ", ") + storm;
    for (const ObservedFit& o : r->observed) {
      if (o.station_id != st.id || o.times_s.empty()) continue;
      chart.series.push_back({"observed, " + storm, hours(o.times_s), o.observed_m3s,
                              static_cast<int>(k) + 1, false,
                              series_key("observed", st.id, scenario, storm), true});
      storms += " (with its observed hydrograph)";
    }
  }
  if (chart.series.empty()) return {};
  chart.description = "Line chart of the discharge in cubic metres per second against hours "
                      "since the study start at " + station_title(st) + " for the storms " +
                      storms + ". The peaks are listed in the table of peaks.";
  return figure(render_line_chart(chart), escape_html(chart.title) + ": one line per storm.");
}

// Culverts and ponds: inflow against outflow (left axis) and stage (right axis) for one
// storm, with the structure's levels (road crest, spillway, barrel) marked.
std::string pool_figure(ReportPage& c, std::size_t i, const std::string& scenario,
                        std::size_t storm_index) {
  const StationDescription& st = c.stations()[i];
  const std::string& storm = c.in().storms[storm_index].first;
  const RunReport* r = c.run(scenario, storm);
  if (!r || !r->series.kept()) return {};
  const std::size_t j = c.index_in(*r, st.id);
  if (j >= r->series.stations.size()) return {};
  LineChart chart;
  chart.id = c.next_figure_id();
  chart.title = "Inflow, outflow and stage at " + station_title(st) + ", " + storm +
                (c.multiple_scenarios() ? ", " + ReportPage::scenario_name(scenario) : "");
  chart.x_label = "time since study start (h)";
  chart.y_label = "discharge (m³/s)";
  chart.y2_label = stage_label(st);
  const std::vector<double> h = hours(r->series.times_s);
  chart.series.push_back({"inflow", h, inflow_series(c, *r, i), 1, false,
                          series_key("inflow", st.id, scenario, storm)});
  chart.series.push_back({"outflow", h, r->series.stations[j].discharge_m3s, 0, false,
                          series_key("discharge", st.id, scenario, storm)});
  chart.series.push_back({st.kind == network::ElementKind::culvert ? "headwater" : "stage", h,
                          r->series.stations[j].stage_m, 3, true,
                          series_key("stage", st.id, scenario, storm)});
  std::string levels;
  if (j < r->elements.size() && is_pool(r->elements[j].kind)) {
    for (const network::MarkedStage& m : r->elements[j].pool().marked_stages) {
      chart.levels.push_back({m.what, m.stage_m, true});
      levels += ", " + m.what + " " + fixed(m.stage_m, 2) + " m";
    }
  }
  chart.description = "Line chart against hours since the study start at " + station_title(st) +
                      " for storm " + storm + ": inflow and outflow in cubic metres per second "
                      "on the left axis, " + chart.y2_label + " on the right axis" +
                      (levels.empty() ? "" : "; marked levels" + levels) + ".";
  return figure(render_line_chart(chart),
                escape_html(chart.title) + ". The gap between inflow and outflow is the water "
                "the pond stores; the long-dashed lines are the structure's levels on the "
                "right axis.");
}

}  // namespace

std::string hydrograph_section(ReportPage& c) {
  std::string s = "<section id=\"hydrographs\">\n<h2>Hydrographs</h2>\n<p>Discharge at each point "
                  "for every storm, from the samples at the output times (the values in the "
                  "NetCDF files). At culverts and ponds: the inflow against the outflow, with "
                  "the headwater or stage on the right axis and the road crest or spillway "
                  "marked.</p>\n";
  const RunReport* any = c.facts_run();
  if (!any || !any->series.kept()) {
    return s + "<p class=\"none\">The series were not kept for this report (the network "
               "and run are too large to keep in memory); plot them from the NetCDF files.</p>\n"
               "</section>\n";
  }
  int drawn = 0, skipped = 0;
  for (std::size_t i = 0; i < c.stations().size(); ++i) {
    if (!c.is_point(i)) continue;
    const StationDescription& st = c.stations()[i];
    std::string figures;
    for (const auto& [scenario, d] : c.in().scenarios) {
      if (drawn >= kMaxHydrographFigures) {
        ++skipped;
        continue;
      }
      if (is_pool(st.kind)) {
        for (std::size_t k = 0; k < c.in().storms.size(); ++k) {
          const std::string f = pool_figure(c, i, scenario, k);
          if (!f.empty()) ++drawn;
          figures += f;
        }
      } else {
        const std::string f = storms_overlaid(c, i, scenario);
        if (!f.empty()) ++drawn;
        figures += f;
      }
    }
    if (!figures.empty()) s += "<h3>" + escape_html(station_title(st)) + "</h3>\n" + figures;
  }
  if (skipped > 0) {
    s += "<p class=\"none\">" + std::to_string(skipped) + " further hydrograph figures are left "
         "out to keep the report readable; the NetCDF files hold every series.</p>\n";
  }
  return s + "</section>\n";
}

std::string hyetograph_section(ReportPage& c) {
  std::string s = "<section id=\"hyetographs\">\n<h2>Rain, losses and excess</h2>\n<p>For each "
                  "subcatchment and storm: the rain intensity over each output interval, split "
                  "into the excess that runs off and the losses (infiltration, interception and "
                  "depression storage), as means over the interval (drawn over the interval they "
                  "belong to).</p>\n";
  bool any = false;
  int drawn = 0, skipped = 0;
  for (std::size_t i = 0; i < c.stations().size(); ++i) {
    const StationDescription& st = c.stations()[i];
    if (!is_subcatchment(st.kind)) continue;
    std::string figures;
    for (std::size_t k = 0; k < c.in().storms.size(); ++k) {
      if (drawn >= kMaxHyetographFigures) {
        ++skipped;
        continue;
      }
      const std::string& storm = c.in().storms[k].first;
      const std::string& scenario = c.in().scenarios.front().first;
      const RunReport* r = c.run(scenario, storm);
      if (!r || !r->series.kept()) continue;
      const std::size_t j = c.index_in(*r, st.id);
      if (j >= r->series.stations.size() || r->series.stations[j].rain_m_s.empty()) continue;
      const StationSeries& ss = r->series.stations[j];
      BarChart chart;
      chart.id = c.next_figure_id();
      chart.title = "Rain, losses and excess on " + station_title(st) + ", " + storm;
      chart.x_label = "time since study start (h)";
      chart.y_label = "intensity (mm/h)";
      chart.edges = hours(r->series.times_s);
      const std::size_t n = chart.edges.size() < 2 ? 0 : chart.edges.size() - 1;
      std::vector<double> excess(n), loss(n);
      double rain_mm = 0.0, excess_mm = 0.0;
      for (std::size_t q = 0; q < n; ++q) {
        const double dt_s = r->series.times_s[q + 1] - r->series.times_s[q];
        const double rain = ss.rain_m_s[q + 1], ex = ss.excess_m_s[q + 1];
        excess[q] = ex * kMmPerHourPerMs;
        loss[q] = std::max(0.0, rain - ex) * kMmPerHourPerMs;
        if (std::isfinite(rain)) rain_mm += rain * dt_s * 1000.0;
        if (std::isfinite(ex)) excess_mm += ex * dt_s * 1000.0;
      }
      chart.layers.push_back({"excess (runoff)", excess, 0, series_key("excess", st.id, scenario, storm)});
      chart.layers.push_back({"losses", loss, 1, series_key("loss", st.id, scenario, storm)});
      const std::string totals = "rain " + fixed(rain_mm, 1) + " mm, losses " +
                                 fixed(rain_mm - excess_mm, 1) + " mm, excess " +
                                 fixed(excess_mm, 1) + " mm";
      chart.description = "Stacked bar chart of the rain intensity in millimetres per hour over "
                          "each output interval on " + station_title(st) + " for storm " + storm +
                          ", split into excess (solid) and losses (hatched): " + totals + ".";
      figures += figure(render_bar_chart(chart), escape_html(chart.title + ": " + totals + "."));
      ++drawn;
    }
    if (!figures.empty()) {
      s += "<h3>" + escape_html(station_title(st)) + "</h3>\n" + figures;
      any = true;
    }
  }
  if (skipped > 0) {
    s += "<p class=\"none\">" + std::to_string(skipped) + " further hyetograph figures are left "
         "out to keep the report readable; the subcatchment NetCDF files hold every series.</p>\n";
  }
  if (!any) s += "<p class=\"none\">No subcatchment with kept series in these runs.</p>\n";
  return s + "</section>\n";
}

namespace {

// The main flow path to an outlet: from the outlet upstream, always along the feeder with
// the longest channel upstream of it (reach lengths), sources left out. Downstream order.
std::vector<std::size_t> main_path(const ReportPage& c, const RunReport& facts,
                                   std::size_t outlet) {
  const auto length_of = [&](std::size_t i) {
    const std::size_t j = c.index_in(facts, c.stations()[i].id);
    if (j >= facts.elements.size() || !is_reach(facts.elements[j].kind)) return 0.0;
    return facts.elements[j].reach().length_m;
  };
  std::map<std::size_t, double> memo;
  std::function<double(std::size_t)> upstream_length = [&](std::size_t i) -> double {
    if (const auto it = memo.find(i); it != memo.end()) return it->second;
    double best = 0.0;
    for (std::size_t u : c.upstream(i)) {
      if (!c.is_point(u)) continue;
      best = std::max(best, upstream_length(u));
    }
    return memo[i] = best + length_of(i);
  };
  std::vector<std::size_t> path{outlet};
  for (std::size_t i = outlet;;) {
    std::size_t next = i;
    double best = -1.0;
    for (std::size_t u : c.upstream(i)) {
      if (c.is_point(u) && upstream_length(u) > best) {
        best = upstream_length(u);
        next = u;
      }
    }
    if (next == i) break;
    path.push_back(next);
    i = next;
  }
  std::reverse(path.begin(), path.end());
  return path;
}

struct PathGeometry {
  std::vector<double> start_m;          // chainage of each element's upstream end
  std::vector<std::optional<double>> bed_outlet_m;  // reaches: bed at the downstream end
  double total_m = 0.0;
  bool any_datum = false;
};

PathGeometry path_geometry(const ReportPage& c, const RunReport& facts,
                           const std::vector<std::size_t>& path) {
  PathGeometry g;
  for (std::size_t i : path) {
    g.start_m.push_back(g.total_m);
    const std::size_t j = c.index_in(facts, c.stations()[i].id);
    std::optional<double> bed;
    if (j < facts.elements.size() && is_reach(facts.elements[j].kind)) {
      const network::ReachFacts& reach = facts.elements[j].reach();
      bed = reach.outlet_invert_m;
      g.total_m += reach.length_m;
    }
    if (bed) g.any_datum = true;
    g.bed_outlet_m.push_back(bed);
  }
  return g;
}

// Bed line and peak water surface of one run along the path.
void add_path_series(const ReportPage& c, const std::vector<std::size_t>& path,
                     const PathGeometry& g, const RunReport& r, const std::string& label,
                     int style, const std::string& key, LineChart& chart, bool with_bed) {
  PlotSeries bed{"bed", {}, {}, 4, false, "bed|" + key, false};
  PlotSeries wse{label, {}, {}, style, false, "peak-water-surface|" + key};
  for (std::size_t p = 0; p < path.size(); ++p) {
    const StationDescription& st = c.stations()[path[p]];
    const std::size_t j = c.index_in(r, st.id);
    if (j >= r.elements.size()) continue;
    if (is_reach(r.elements[j].kind) && g.bed_outlet_m[p]) {
      const network::ReachFacts& reach = r.elements[j].reach();
      const auto bed_at = [&](double x) { return *g.bed_outlet_m[p] + reach.bed_slope * (reach.length_m - x); };
      bed.x.insert(bed.x.end(), {g.start_m[p], g.start_m[p] + reach.length_m});
      bed.y.insert(bed.y.end(), {bed_at(0.0), bed_at(reach.length_m)});
      for (const ReachPeakProfile& prof : r.series.reach_profiles) {
        if (prof.station != j) continue;
        for (std::size_t k = 0; k < prof.chainage_m.size(); ++k) {
          wse.x.push_back(g.start_m[p] + prof.chainage_m[k]);
          wse.y.push_back(bed_at(prof.chainage_m[k]) + prof.peak_depth_m[k]);
        }
      }
    } else if (is_pool(r.elements[j].kind) && st.stage_is_elevation) {
      wse.x.push_back(g.start_m[p]);
      wse.y.push_back(r.peaks[j].peak_stage_m);
    } else if (is_reach(r.elements[j].kind)) {
      bed.x.push_back(g.start_m[p]);  // no datum: a gap in both lines
      bed.y.push_back(NAN);
      wse.x.push_back(g.start_m[p]);
      wse.y.push_back(NAN);
    }
  }
  if (with_bed) chart.series.push_back(std::move(bed));
  chart.series.push_back(std::move(wse));
}

}  // namespace

std::string long_section_section(ReportPage& c) {
  std::string s = "<section id=\"long-sections\">\n<h2>Long sections</h2>\n<p>Along the main flow "
                  "path to each outlet (from the upstream end, following the longest channel): "
                  "the bed, the highest water surface each run reached in every reach cell at "
                  "the output times, and the culverts with their barrels and road crests. "
                  "Reaches without a bed level (outlet_invert) leave a gap.</p>\n";
  const RunReport* facts = c.facts_run();
  if (!facts || !facts->series.kept()) {
    return s + "<p class=\"none\">The series were not kept for this report.</p>\n</section>\n";
  }
  bool any = false;
  for (std::size_t o = 0; o < c.stations().size(); ++o) {
    if (c.stations()[o].kind != network::ElementKind::outlet) continue;
    const std::vector<std::size_t> path = main_path(c, *facts, o);
    const PathGeometry g = path_geometry(c, *facts, path);
    if (!g.any_datum) {
      s += "<p class=\"none\">No reach on the path to " + escape_html(c.stations()[o].id) +
           " has a bed level; no long section is drawn.</p>\n";
      continue;
    }
    LineChart chart;
    chart.id = c.next_figure_id();
    chart.title = "Long section to " + station_title(c.stations()[o]);
    chart.x_label = "distance along the flow path (m)";
    chart.y_label = "elevation (m)";
    chart.y_from_zero = false;
    int style = 0;
    for (const ReportedRun& r : c.in().runs) {
      if (!r.report || !r.report->series.kept() || style >= 9) continue;
      add_path_series(c, path, g, *r.report, "peak water surface, " + c.run_label(r), style,
                      ReportPage::scenario_name(r.scenario_id) + "|" + r.storm_id, chart,
                      style == 0);
      ++style;
    }
    std::string route;
    for (std::size_t p = 0; p < path.size(); ++p) {
      const std::size_t j = c.index_in(*facts, c.stations()[path[p]].id);
      route += (route.empty() ? "" : " → ") + c.stations()[path[p]].id;
      if (j >= facts->elements.size() || !is_pool(facts->elements[j].kind)) continue;
      MarkedPlace place{c.stations()[path[p]].id, g.start_m[p], 0.0, 0.0, {}};
      for (const network::MarkedStage& m : facts->elements[j].pool().marked_stages) {
        if (m.what == "culvert inlet invert") place.y0 = m.stage_m;
        if (m.what == "barrel crown") place.y1 = m.stage_m;
        if (m.what == "road crest (lowest)" || m.what == "weir crest") {
          place.crests.push_back({m.what, m.stage_m, false});
        }
      }
      chart.places.push_back(std::move(place));
    }
    chart.description = "Line chart of elevation in metres against distance in metres along the "
                        "path " + route + ": the bed, the peak water surface of each run, and "
                        "each structure's barrel (box) and crest (short heavy line).";
    s += figure(render_line_chart(chart), escape_html(chart.title + ": " + route + "."));
    any = true;
  }
  if (!any) s += "<p class=\"none\">No long section could be drawn.</p>\n";
  return s + "</section>\n";
}

namespace {

// Attenuation of station i in one run: 100 (1 - peak outflow / peak total inflow), the run's
// attenuation record (summary.hpp; the report's Attenuation table shows the same number); NaN
// where the element has none.
double attenuation_percent(const ReportPage& c, const RunReport& r, std::size_t i) {
  for (const AttenuationRecord& a : r.summary.attenuation) {
    if (a.element == c.stations()[i].id) return a.attenuation_percent;
  }
  return NAN;
}

// Classes of attenuation and their fills: light to dark, readable in grey.
struct Shade {
  double below;
  const char* fill;
  const char* ink;
  const char* label;
};
constexpr Shade kShades[] = {
    {0.0, "#fbe3c8", "#1b1b1b", "peak grows (< 0 %)"}, {5.0, "#eef3f1", "#1b1b1b", "0 to 5 %"},
    {15.0, "#bcd9d1", "#1b1b1b", "5 to 15 %"},          {30.0, "#6fa89a", "#1b1b1b", "15 to 30 %"},
    {50.0, "#2f6f62", "#ffffff", "30 to 50 %"},          {1e300, "#0d3a32", "#ffffff", "50 % or more"},
};

const Shade* shade_of(double pct) {
  if (!std::isfinite(pct)) return nullptr;
  for (const Shade& s : kShades) {
    if (pct < s.below) return &s;
  }
  return &kShades[5];
}

}  // namespace

std::string schematic_section(ReportPage& c) {
  std::string s = "<section id=\"schematic\">\n<h2>Network schematic</h2>\n<p>Every element and "
                  "where its water goes (arrows point downstream). Reaches, culverts and ponds "
                  "are shaded by how much they lower the peak of their total inflow (upstream "
                  "and lateral together) in the base network under each one's critical storm; "
                  "a heavy dashed outline marks an element with a warning in any run.</p>\n";
  const std::vector<StationDescription>& st = c.stations();
  const std::size_t n = st.size();
  if (n == 0 || n > 400) {
    return s + "<p class=\"none\">The network has " + std::to_string(n) +
           " elements: too many for a readable schematic.</p>\n</section>\n";
  }
  // Column: links to the outlet (outlets at the right); row: leaves in depth-first order, an
  // element midway between its feeders.
  std::vector<int> depth(n, 0);
  std::map<std::string, std::size_t> index;
  for (std::size_t i = 0; i < n; ++i) index.emplace(st[i].id, i);
  std::function<int(std::size_t, int)> depth_of = [&](std::size_t i, int guard) -> int {
    const auto it = index.find(st[i].to);
    if (it == index.end() || guard > static_cast<int>(n)) return 0;
    return 1 + depth_of(it->second, guard + 1);
  };
  int max_depth = 0;
  for (std::size_t i = 0; i < n; ++i) max_depth = std::max(max_depth, depth[i] = depth_of(i, 0));
  std::vector<double> row(n, 0.0);
  double next_row = 0.0;
  std::function<double(std::size_t)> place = [&](std::size_t i) -> double {
    if (c.upstream(i).empty()) return row[i] = next_row++;
    double sum = 0.0;
    for (std::size_t u : c.upstream(i)) sum += place(u);
    return row[i] = sum / static_cast<double>(c.upstream(i).size());
  };
  for (std::size_t i = 0; i < n; ++i) {
    if (!index.count(st[i].to)) place(i);
  }
  const double col_w = 150.0, row_h = 46.0, box_w = 126.0, box_h = 32.0;
  const double width = std::max(720.0, 40.0 + col_w * (max_depth + 1)), height = 60.0 + row_h * std::max(1.0, next_row);
  const auto cx = [&](std::size_t i) { return 20.0 + col_w * (max_depth - depth[i]) + box_w / 2; };
  const auto cy = [&](std::size_t i) { return 30.0 + row_h * row[i] + box_h / 2; };

  // Attenuation under each element's critical storm in the base network; warnings of any run.
  const std::string& base = c.in().scenarios.empty() ? std::string() : c.in().scenarios.front().first;
  std::set<std::string> warned;
  for (const ReportedRun& r : c.in().runs) {
    if (!r.report) continue;
    for (const ApplicabilityWarning& w : r.report->summary.warnings) warned.insert(w.element);
  }
  const std::string id = c.next_figure_id();
  std::string svg = "<svg xmlns=\"http://www.w3.org/2000/svg\" class=\"chart schematic\" id=\"" + id +
                    "\" viewBox=\"0 0 " + fixed(width, 0) + " " + fixed(height + 30, 0) +
                    "\" role=\"img\" aria-labelledby=\"" + id + "-t " + id + "-d\">\n<title id=\"" +
                    id + "-t\">Network schematic</title>\n<desc id=\"" + id + "-d\">";
  std::string desc = "Schematic of the " + std::to_string(n) + " elements, water flowing left "
                     "to right:";
  std::string nodes, links;
  svg += "";
  for (std::size_t i = 0; i < n; ++i) {
    const auto it = index.find(st[i].to);
    if (it != index.end()) {
      links += "<line x1=\"" + fixed(cx(i) + box_w / 2, 1) + "\" y1=\"" + fixed(cy(i), 1) +
               "\" x2=\"" + fixed(cx(it->second) - box_w / 2 - 4, 1) + "\" y2=\"" +
               fixed(cy(it->second), 1) + "\" stroke=\"#333\" stroke-width=\"1.3\" "
               "marker-end=\"url(#" + id + "-arrow)\"/>\n";
    }
    double pct = NAN;
    if (is_reach(st[i].kind) || is_pool(st[i].kind)) {
      const int k = c.critical_storm(i, base);
      const RunReport* r = k >= 0 ? c.run(base, c.in().storms[static_cast<std::size_t>(k)].first) : nullptr;
      if (r) pct = attenuation_percent(c, *r, i);
    }
    const Shade* sh = shade_of(pct);
    const bool warn = warned.count(st[i].id) > 0;
    const std::string label = st[i].id.size() > 18 ? st[i].id.substr(0, 17) + "…" : st[i].id;
    const std::string kind(network::to_string(st[i].kind));
    nodes += "<g class=\"node\" data-element=\"" + escape_html(st[i].id) + "\"><rect x=\"" +
             fixed(cx(i) - box_w / 2, 1) + "\" y=\"" + fixed(cy(i) - box_h / 2, 1) + "\" width=\"" +
             fixed(box_w, 0) + "\" height=\"" + fixed(box_h, 0) + "\" rx=\"" +
             (network::is_source(st[i].kind) ? "14" : is_pool(st[i].kind) ? "2" : "6") +
             "\" fill=\"" + (sh ? sh->fill : "#ffffff") + "\" stroke=\"#1b1b1b\" stroke-width=\"" +
             (warn ? "2.6\" stroke-dasharray=\"6 3" : "1.2") + "\"/><text x=\"" + fixed(cx(i), 1) +
             "\" y=\"" + fixed(cy(i) - 2, 1) + "\" text-anchor=\"middle\" style=\"fill:" +
             (sh ? sh->ink : "#1b1b1b") + "\">" + escape_html(label) + "</text><text x=\"" +
             fixed(cx(i), 1) + "\" y=\"" + fixed(cy(i) + 11, 1) + "\" text-anchor=\"middle\" "
             "style=\"font-size:9px;fill:" + (sh ? sh->ink : "#1b1b1b") + "\">" + kind +
             (std::isfinite(pct) ? ", " + fixed(pct, 0) + " %" : "") + "</text></g>\n";
    desc += " " + st[i].id + " (" + kind +
            (std::isfinite(pct) ? ", attenuates " + fixed(pct, 0) + " %" : "") +
            (warn ? ", warned" : "") + ")" + (st[i].to.empty() ? "" : " to " + st[i].to) + ";";
  }
  svg += escape_html(desc) + "</desc>\n<defs><marker id=\"" + id + "-arrow\" viewBox=\"0 0 10 10\" "
         "refX=\"9\" refY=\"5\" markerWidth=\"7\" markerHeight=\"7\" orient=\"auto\"><path d=\"M0 0L10 "
         "5L0 10Z\" fill=\"#333\"/></marker></defs>\n" + links + nodes;
  // Legend of the shades.
  double lx = 20.0;
  for (const Shade& sh : kShades) {
    svg += "<rect x=\"" + fixed(lx, 0) + "\" y=\"" + fixed(height + 6, 0) + "\" width=\"16\" "
           "height=\"12\" fill=\"" + sh.fill + "\" stroke=\"#1b1b1b\"/><text x=\"" +
           fixed(lx + 20, 0) + "\" y=\"" + fixed(height + 16, 0) + "\">" + escape_html(sh.label) + "</text>";
    lx += 30.0 + 6.2 * static_cast<double>(std::string(sh.label).size());
  }
  svg += "</svg>\n";
  return s + figure(svg, "Network schematic: attenuation of the inflow peak (per cent) under "
                         "each element's critical storm, base network.") + "</section>\n";
}

}  // namespace freshet::reporting::detail
