// Small hand-written SVG figures for the run's HTML report (html_report.hpp): line charts with
// one or two value axes and marked levels, stacked interval bars (hyetographs), and the text
// helpers they share. Each figure is an <svg> with role="img", a <title> and a <desc> (its
// text alternative), axes with tick labels and unit-bearing labels, and a legend. Series are
// told apart by colour, dash pattern and marker shape together, so they stay readable when
// printed in grey.
//
// For checking what a figure shows, the <svg> carries its plot box and axis ranges as data
// attributes (data-plot-box="left top width height", data-x-range="x0 x1",
// data-y-range="y0 y1", data-y2-range) and each polyline its series (data-series, data-axis):
// a value v on an axis [a0, a1] is drawn at left + (v - a0) / (a1 - a0) width, or for values
// at top + height - (v - a0) / (a1 - a0) height, rounded to 0.01 px.
//
//   LineChart c{"Discharge at Mill Lane", "Discharge for three storms ...",
//               "time since study start (h)", "discharge (m³/s)"};
//   c.series.push_back({"aep1-30min", hours, q, 0});
//   std::string svg = render_line_chart(c);
#pragma once

#include <string>
#include <string_view>
#include <vector>

namespace freshet::reporting::detail {

// Escapes & < > " ' for HTML text and attribute values.
std::string escape_html(std::string_view text);
// A number for a figure or table: `decimals` decimals, "-" for NaN or infinity.
std::string fixed(double value, int decimals);

// Tick positions covering [lo, hi] with a "nice" step (1, 2 or 5 times a power of ten), about
// `target` of them; lo and hi are widened to whole steps. Heckbert (1990), "Nice numbers for
// graph labels", in Glassner (ed.), Graphics Gems, pp. 61-63 (loose labelling).
struct Ticks {
  double lo = 0.0, hi = 1.0, step = 1.0;
  int decimals = 0;  // enough to tell neighbouring ticks apart
  [[nodiscard]] std::vector<double> values() const;
};
Ticks nice_ticks(double lo, double hi, int target = 6);

struct PlotSeries {
  std::string label;            // legend text (escaped when drawn)
  std::vector<double> x, y;     // NaN y values break the line
  int style = 0;                // colour, dash and marker: see kStyles in svg_plot.cpp
  bool right_axis = false;      // against the second value axis
  std::string data;             // data-series attribute, e.g. "discharge|mill-lane|base|aep1-60min"
  bool markers = true;
};

// A horizontal level drawn across the plot (a road crest, a spillway), labelled at its end.
struct MarkedLevel {
  std::string label;
  double value = 0.0;
  bool right_axis = false;
};

// A vertical position drawn as a labelled dotted line with an optional box from y0 to y1
// (a culvert barrel on a long section).
struct MarkedPlace {
  std::string label;
  double x = 0.0;
  double y0 = 0.0, y1 = 0.0;  // box from y0 to y1 when y1 > y0
  std::vector<MarkedLevel> crests;  // short heavy ticks across the place (a road crest)
};

struct LineChart {
  std::string title;
  std::string description;  // the text alternative: what the figure shows, in words
  std::string x_label;      // with its unit, e.g. "time since study start (h)"
  std::string y_label;      // e.g. "discharge (m³/s)"
  std::string y2_label;     // empty: no second axis
  std::vector<PlotSeries> series;
  std::vector<MarkedLevel> levels;
  std::vector<MarkedPlace> places;
  bool y_from_zero = true;   // the first value axis starts at 0
  bool y2_from_zero = false;
  std::string id;            // the <svg> id
};
std::string render_line_chart(const LineChart& chart);

// Stacked bars over intervals [edges[k], edges[k+1]]: every layer's value for interval k is
// drawn on top of the layers before it (a hyetograph: excess, then losses, adding to the rain).
struct BarLayer {
  std::string label;
  std::vector<double> values;  // one per interval; NaN draws nothing
  int style = 0;
  std::string data;
};
struct BarChart {
  std::string title, description, x_label, y_label, id;
  std::vector<double> edges;
  std::vector<BarLayer> layers;
};
std::string render_bar_chart(const BarChart& chart);

}  // namespace freshet::reporting::detail
