#include "svg_plot.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>

namespace freshet::reporting::detail {

namespace {

// The report's own series styles: colours far apart in lightness as well as hue, each with its
// own dash pattern and marker, so a grey print still tells them apart.
struct Style {
  const char* colour;
  const char* dash;  // stroke-dasharray, "" for solid
  char marker;       // o circle, s square, t triangle, d diamond, x cross, v down triangle
};
constexpr Style kStyles[] = {
    {"#17324d", "", 'o'},         {"#c0631b", "8 4", 's'},   {"#3f7f3a", "2 3", 't'},
    {"#7b3f78", "10 3 2 3", 'd'}, {"#5d5d5d", "5 2", 'x'},   {"#1f8896", "1 3", 'v'},
    {"#9b2226", "12 4", 'o'},     {"#6b6b00", "4 2 1 2", 's'}, {"#2a4fa0", "3 5", 't'},
};
constexpr int kStyleCount = static_cast<int>(sizeof kStyles / sizeof kStyles[0]);
const Style& style_of(int k) { return kStyles[((k % kStyleCount) + kStyleCount) % kStyleCount]; }

constexpr double kWidth = 760.0;
constexpr double kLeft = 72.0;
constexpr double kTop = 44.0;
constexpr double kPlotHeight = 240.0;
constexpr double kLegendRow = 18.0;

std::string px(double v) {
  char b[32];
  std::snprintf(b, sizeof b, "%.2f", v);
  return b;
}

// Where the plot box sits and how values map into it.
struct Frame {
  double left = kLeft, top = kTop, width = 0.0, height = kPlotHeight;
  Ticks x, y, y2;
  bool has_y2 = false;
  [[nodiscard]] double sx(double v) const { return left + (v - x.lo) / (x.hi - x.lo) * width; }
  [[nodiscard]] double sy(double v, bool right = false) const {
    const Ticks& t = right ? y2 : y;
    return top + height - (v - t.lo) / (t.hi - t.lo) * height;
  }
};

struct Range {
  double lo = std::numeric_limits<double>::infinity();
  double hi = -std::numeric_limits<double>::infinity();
  void add(double v) {
    if (!std::isfinite(v)) return;
    lo = std::min(lo, v);
    hi = std::max(hi, v);
  }
  [[nodiscard]] bool empty() const { return lo > hi; }
};

Ticks axis_ticks(Range r, bool from_zero) {
  if (r.empty()) r = {0.0, 1.0};
  if (from_zero) r.lo = std::min(r.lo, 0.0);
  if (r.hi - r.lo <= 1e-12 * std::max(1.0, std::abs(r.hi))) {
    r.hi = r.lo + std::max(1.0, std::abs(r.lo) * 0.1);
  }
  return nice_ticks(r.lo, r.hi);
}

std::string svg_open(const std::string& id, double height, const Frame& f,
                     const std::string& title, const std::string& description) {
  std::string s = "<svg xmlns=\"http://www.w3.org/2000/svg\" class=\"chart\" id=\"" +
                  escape_html(id) + "\" viewBox=\"0 0 " + px(kWidth) + " " + px(height) +
                  "\" role=\"img\" aria-labelledby=\"" + escape_html(id) + "-t " +
                  escape_html(id) + "-d\" data-plot-box=\"" + px(f.left) + " " + px(f.top) + " " +
                  px(f.width) + " " + px(f.height) + "\" data-x-range=\"" + fixed(f.x.lo, 6) +
                  " " + fixed(f.x.hi, 6) + "\" data-y-range=\"" + fixed(f.y.lo, 6) + " " +
                  fixed(f.y.hi, 6) + "\"";
  if (f.has_y2) s += " data-y2-range=\"" + fixed(f.y2.lo, 6) + " " + fixed(f.y2.hi, 6) + "\"";
  s += ">\n<title id=\"" + escape_html(id) + "-t\">" + escape_html(title) + "</title>\n<desc id=\"" +
       escape_html(id) + "-d\">" + escape_html(description) + "</desc>\n";
  s += "<text class=\"ctitle\" x=\"" + px(kWidth / 2) + "\" y=\"20\" text-anchor=\"middle\">" +
       escape_html(title) + "</text>\n";
  return s;
}

// Grid, ticks, tick labels and the axis labels.
std::string axes(const Frame& f, const std::string& x_label, const std::string& y_label,
                 const std::string& y2_label) {
  std::string s = "<g class=\"axes\">\n";
  const double bottom = f.top + f.height, right = f.left + f.width;
  for (double v : f.x.values()) {
    const double x = f.sx(v);
    s += "<line class=\"grid\" x1=\"" + px(x) + "\" y1=\"" + px(f.top) + "\" x2=\"" + px(x) +
         "\" y2=\"" + px(bottom) + "\"/><line x1=\"" + px(x) + "\" y1=\"" + px(bottom) +
         "\" x2=\"" + px(x) + "\" y2=\"" + px(bottom + 5) + "\"/><text x=\"" + px(x) + "\" y=\"" +
         px(bottom + 18) + "\" text-anchor=\"middle\">" + fixed(v, f.x.decimals) + "</text>\n";
  }
  for (double v : f.y.values()) {
    const double y = f.sy(v);
    s += "<line class=\"grid\" x1=\"" + px(f.left) + "\" y1=\"" + px(y) + "\" x2=\"" + px(right) +
         "\" y2=\"" + px(y) + "\"/><line x1=\"" + px(f.left - 5) + "\" y1=\"" + px(y) +
         "\" x2=\"" + px(f.left) + "\" y2=\"" + px(y) + "\"/><text x=\"" + px(f.left - 8) +
         "\" y=\"" + px(y + 4) + "\" text-anchor=\"end\">" + fixed(v, f.y.decimals) + "</text>\n";
  }
  if (f.has_y2) {
    for (double v : f.y2.values()) {
      const double y = f.sy(v, true);
      s += "<line x1=\"" + px(right) + "\" y1=\"" + px(y) + "\" x2=\"" + px(right + 5) +
           "\" y2=\"" + px(y) + "\"/><text x=\"" + px(right + 8) + "\" y=\"" + px(y + 4) +
           "\" text-anchor=\"start\">" + fixed(v, f.y2.decimals) + "</text>\n";
    }
  }
  s += "<rect class=\"frame\" x=\"" + px(f.left) + "\" y=\"" + px(f.top) + "\" width=\"" +
       px(f.width) + "\" height=\"" + px(f.height) + "\"/>\n";
  s += "<text class=\"alabel\" x=\"" + px(f.left + f.width / 2) + "\" y=\"" + px(bottom + 38) +
       "\" text-anchor=\"middle\">" + escape_html(x_label) + "</text>\n";
  const double mid = f.top + f.height / 2;
  s += "<text class=\"alabel\" transform=\"translate(16 " + px(mid) +
       ") rotate(-90)\" text-anchor=\"middle\">" + escape_html(y_label) + "</text>\n";
  if (f.has_y2) {
    s += "<text class=\"alabel\" transform=\"translate(" + px(kWidth - 10) + " " + px(mid) +
         ") rotate(90)\" text-anchor=\"middle\">" + escape_html(y2_label) + "</text>\n";
  }
  return s + "</g>\n";
}

std::string marker(char kind, double x, double y, const char* colour) {
  const std::string c = colour;
  switch (kind) {
    case 's':
      return "<rect x=\"" + px(x - 3.5) + "\" y=\"" + px(y - 3.5) +
             "\" width=\"7\" height=\"7\" fill=\"white\" stroke=\"" + c + "\"/>";
    case 't':
      return "<path d=\"M" + px(x) + " " + px(y - 4.5) + "L" + px(x + 4.5) + " " + px(y + 3.5) +
             "L" + px(x - 4.5) + " " + px(y + 3.5) + "Z\" fill=\"" + c + "\" stroke=\"" + c + "\"/>";
    case 'v':
      return "<path d=\"M" + px(x) + " " + px(y + 4.5) + "L" + px(x + 4.5) + " " + px(y - 3.5) +
             "L" + px(x - 4.5) + " " + px(y - 3.5) + "Z\" fill=\"white\" stroke=\"" + c + "\"/>";
    case 'd':
      return "<path d=\"M" + px(x) + " " + px(y - 5) + "L" + px(x + 4) + " " + px(y) + "L" +
             px(x) + " " + px(y + 5) + "L" + px(x - 4) + " " + px(y) + "Z\" fill=\"" + c +
             "\" stroke=\"" + c + "\"/>";
    case 'x':
      return "<path d=\"M" + px(x - 4) + " " + px(y - 4) + "L" + px(x + 4) + " " + px(y + 4) +
             "M" + px(x - 4) + " " + px(y + 4) + "L" + px(x + 4) + " " + px(y - 4) +
             "\" stroke=\"" + c + "\" stroke-width=\"1.5\"/>";
    default:
      return "<circle cx=\"" + px(x) + "\" cy=\"" + px(y) + "\" r=\"3.5\" fill=\"" + c +
             "\" stroke=\"" + c + "\"/>";
  }
}

std::string polyline(const Frame& f, const PlotSeries& s, std::size_t begin, std::size_t end) {
  const Style& st = style_of(s.style);
  std::string out = "<polyline class=\"series\" data-series=\"" + escape_html(s.data) +
                    "\" data-axis=\"" + (s.right_axis ? "y2" : "y") + "\" fill=\"none\" stroke=\"" +
                    st.colour + "\" stroke-width=\"" + (s.right_axis ? "1.4" : "2") + "\"";
  if (*st.dash) out += std::string(" stroke-dasharray=\"") + st.dash + "\"";
  out += " points=\"";
  for (std::size_t k = begin; k < end; ++k) {
    if (k > begin) out += ' ';
    out += px(f.sx(s.x[k])) + "," + px(f.sy(s.y[k], s.right_axis));
  }
  return out + "\"/>\n";
}

// The series' line (split where a value is missing) and its markers, about ten of them,
// staggered between series so they do not sit on one another.
std::string series_svg(const Frame& f, const PlotSeries& s) {
  std::string out;
  const std::size_t n = std::min(s.x.size(), s.y.size());
  std::size_t k = 0;
  while (k < n) {
    while (k < n && !std::isfinite(s.y[k])) ++k;
    std::size_t e = k;
    while (e < n && std::isfinite(s.y[e])) ++e;
    if (e > k) out += polyline(f, s, k, e);
    k = e;
  }
  if (!s.markers || n == 0) return out;
  const std::size_t every = std::max<std::size_t>(1, n / 10);
  const Style& st = style_of(s.style);
  out += "<g class=\"markers\">";
  for (std::size_t j = (static_cast<std::size_t>(s.style) * every / 4) % every; j < n; j += every) {
    if (std::isfinite(s.y[j])) out += marker(st.marker, f.sx(s.x[j]), f.sy(s.y[j], s.right_axis), st.colour);
  }
  return out + "</g>\n";
}

struct LegendEntry {
  std::string label;
  int style = 0;
  bool line = true;     // a line sample (else a filled box)
  bool markers = true;
};

// Entries laid out in rows under the x-axis label; returns the SVG and the rows used.
std::string legend(const std::vector<LegendEntry>& entries, double top, int& rows,
                   const std::string& fill_prefix = {}) {
  std::string s = "<g class=\"legend\">\n";
  double x = kLeft;
  rows = entries.empty() ? 0 : 1;
  for (std::size_t k = 0; k < entries.size(); ++k) {
    const LegendEntry& e = entries[k];
    const double w = 44.0 + 6.6 * static_cast<double>(e.label.size());
    if (x + w > kWidth - 10 && x > kLeft) {
      x = kLeft;
      ++rows;
    }
    const double y = top + (rows - 1) * kLegendRow;
    const Style& st = style_of(e.style);
    if (e.line) {
      s += "<line x1=\"" + px(x) + "\" y1=\"" + px(y) + "\" x2=\"" + px(x + 32) + "\" y2=\"" +
           px(y) + "\" stroke=\"" + st.colour + "\" stroke-width=\"2\"" +
           (*st.dash ? std::string(" stroke-dasharray=\"") + st.dash + "\"" : std::string()) + "/>";
      if (e.markers) s += marker(st.marker, x + 16, y, st.colour);
    } else {
      s += "<rect x=\"" + px(x + 4) + "\" y=\"" + px(y - 6) + "\" width=\"24\" height=\"12\" fill=\"url(#" +
           fill_prefix + std::to_string(k) + ")\" stroke=\"" + st.colour + "\"/>";
    }
    s += "<text x=\"" + px(x + 38) + "\" y=\"" + px(y + 4) + "\">" + escape_html(e.label) + "</text>\n";
    x += w;
  }
  return s + "</g>\n";
}

std::string levels_svg(const Frame& f, const LineChart& c) {
  std::string s;
  for (const MarkedLevel& l : c.levels) {
    if (l.right_axis && !f.has_y2) continue;
    const double y = f.sy(l.value, l.right_axis);
    if (!std::isfinite(y) || y < f.top - 0.5 || y > f.top + f.height + 0.5) continue;
    s += "<g class=\"level\" data-level=\"" + escape_html(l.label) + "\"><line x1=\"" + px(f.left) +
         "\" y1=\"" + px(y) + "\" x2=\"" + px(f.left + f.width) + "\" y2=\"" + px(y) +
         "\" stroke=\"#555\" stroke-width=\"0.9\" stroke-dasharray=\"14 4\"/><text x=\"" +
         px(f.left + f.width - 4) + "\" y=\"" + px(y - 4) + "\" text-anchor=\"end\">" +
         escape_html(l.label) + " " + fixed(l.value, 2) + "</text></g>\n";
  }
  for (const MarkedPlace& p : c.places) {
    const double x = f.sx(p.x);
    s += "<g class=\"place\" data-place=\"" + escape_html(p.label) + "\"><line x1=\"" + px(x) +
         "\" y1=\"" + px(f.top) + "\" x2=\"" + px(x) + "\" y2=\"" + px(f.top + f.height) +
         "\" stroke=\"#444\" stroke-dasharray=\"2 3\"/>";
    if (p.y1 > p.y0) {
      s += "<rect x=\"" + px(x - 4) + "\" y=\"" + px(f.sy(p.y1)) + "\" width=\"8\" height=\"" +
           px(f.sy(p.y0) - f.sy(p.y1)) + "\" fill=\"white\" stroke=\"#222\" stroke-width=\"1.5\"/>";
    }
    for (const MarkedLevel& crest : p.crests) {
      const double y = f.sy(crest.value);
      s += "<line x1=\"" + px(x - 14) + "\" y1=\"" + px(y) + "\" x2=\"" + px(x + 14) + "\" y2=\"" +
           px(y) + "\" stroke=\"#1b1b1b\" stroke-width=\"3\"/><text x=\"" + px(x + 18) +
           "\" y=\"" + px(y + 4) + "\">" + escape_html(crest.label) + " " + fixed(crest.value, 2) +
           "</text>";
    }
    s += "<text x=\"" + px(x + 4) + "\" y=\"" + px(f.top + 12) + "\">" + escape_html(p.label) +
         "</text></g>\n";
  }
  return s;
}

}  // namespace

std::string escape_html(std::string_view text) {
  std::string out;
  out.reserve(text.size());
  for (char c : text) {
    switch (c) {
      case '&': out += "&amp;"; break;
      case '<': out += "&lt;"; break;
      case '>': out += "&gt;"; break;
      case '"': out += "&quot;"; break;
      case '\'': out += "&#39;"; break;
      default: out += c;
    }
  }
  return out;
}

std::string fixed(double value, int decimals) {
  if (!std::isfinite(value)) return "-";
  char b[64];
  std::snprintf(b, sizeof b, "%.*f", std::clamp(decimals, 0, 12), value);
  std::string s = b;
  if (s.find_first_of("123456789") == std::string::npos && s.front() == '-') s.erase(0, 1);
  return s;
}

std::vector<double> Ticks::values() const {
  std::vector<double> v;
  const auto n = static_cast<long>(std::llround((hi - lo) / step));
  for (long k = 0; k <= n; ++k) v.push_back(lo + static_cast<double>(k) * step);
  return v;
}

namespace {
// Heckbert (1990): the nice number (1, 2, 5 or 10 times a power of ten) near x, rounded or
// taken at or above x.
double nice_number(double x, bool round) {
  const double e = std::floor(std::log10(x));
  const double f = x / std::pow(10.0, e);
  double nf;
  if (round) {
    nf = f < 1.5 ? 1.0 : f < 3.0 ? 2.0 : f < 7.0 ? 5.0 : 10.0;
  } else {
    nf = f <= 1.0 ? 1.0 : f <= 2.0 ? 2.0 : f <= 5.0 ? 5.0 : 10.0;
  }
  return nf * std::pow(10.0, e);
}
}  // namespace

Ticks nice_ticks(double lo, double hi, int target) {
  Ticks t;
  const double range = nice_number(hi - lo, false);
  t.step = nice_number(range / std::max(1, target - 1), true);
  t.lo = std::floor(lo / t.step) * t.step;
  t.hi = std::ceil(hi / t.step) * t.step;
  t.decimals = std::max(0, static_cast<int>(-std::floor(std::log10(t.step) + 1e-9)));
  return t;
}

std::string render_line_chart(const LineChart& c) {
  Frame f;
  f.has_y2 = !c.y2_label.empty();
  f.width = kWidth - kLeft - (f.has_y2 ? 72.0 : 24.0);
  Range rx, ry, ry2;
  for (const PlotSeries& s : c.series) {
    for (double v : s.x) rx.add(v);
    for (double v : s.y) (s.right_axis ? ry2 : ry).add(v);
  }
  for (const MarkedLevel& l : c.levels) (l.right_axis ? ry2 : ry).add(l.value);
  for (const MarkedPlace& p : c.places) {
    rx.add(p.x);
    if (p.y1 > p.y0) {
      ry.add(p.y0);
      ry.add(p.y1);
    }
    for (const MarkedLevel& crest : p.crests) ry.add(crest.value);
  }
  if (!rx.empty() && rx.hi > rx.lo) {
    f.x = nice_ticks(rx.lo, rx.hi, 8);
  } else {
    f.x = axis_ticks(rx, false);
  }
  f.y = axis_ticks(ry, c.y_from_zero);
  if (f.has_y2) f.y2 = axis_ticks(ry2, c.y2_from_zero);

  std::vector<LegendEntry> entries;
  for (const PlotSeries& s : c.series) entries.push_back({s.label, s.style, true, s.markers});
  int rows = 0;
  const std::string legend_svg = legend(entries, f.top + f.height + 58, rows);
  const double height = f.top + f.height + 58 + rows * kLegendRow + 4;

  std::string s = svg_open(c.id, height, f, c.title, c.description);
  s += axes(f, c.x_label, c.y_label, c.y2_label);
  s += "<g class=\"data\">\n";
  for (const PlotSeries& p : c.series) s += series_svg(f, p);
  s += "</g>\n" + levels_svg(f, c) + legend_svg + "</svg>\n";
  return s;
}

std::string render_bar_chart(const BarChart& c) {
  Frame f;
  f.width = kWidth - kLeft - 24.0;
  Range rx, ry;
  for (double e : c.edges) rx.add(e);
  const std::size_t n = c.edges.size() < 2 ? 0 : c.edges.size() - 1;
  for (std::size_t k = 0; k < n; ++k) {
    double sum = 0.0;
    for (const BarLayer& l : c.layers) {
      if (k < l.values.size() && std::isfinite(l.values[k])) sum += std::max(0.0, l.values[k]);
    }
    ry.add(sum);
  }
  f.x = rx.empty() || !(rx.hi > rx.lo) ? axis_ticks(rx, false) : nice_ticks(rx.lo, rx.hi, 8);
  f.y = axis_ticks(ry, true);

  std::vector<LegendEntry> entries;
  for (const BarLayer& l : c.layers) entries.push_back({l.label, l.style, false, false});
  int rows = 0;
  const std::string prefix = c.id + "-fill";
  const std::string legend_svg = legend(entries, f.top + f.height + 58, rows, prefix);
  const double height = f.top + f.height + 58 + rows * kLegendRow + 4;

  std::string s = svg_open(c.id, height, f, c.title, c.description);
  // Fills: the first layer solid, the others hatched at different angles (grey-safe).
  s += "<defs>";
  for (std::size_t j = 0; j < c.layers.size(); ++j) {
    const Style& st = style_of(c.layers[j].style);
    const std::string pid = escape_html(prefix) + std::to_string(j);
    if (j == 0) {
      s += "<pattern id=\"" + pid + "\" width=\"4\" height=\"4\" patternUnits=\"userSpaceOnUse\">"
           "<rect width=\"4\" height=\"4\" fill=\"" + std::string(st.colour) + "\"/></pattern>";
    } else {
      s += "<pattern id=\"" + pid + "\" width=\"6\" height=\"6\" patternUnits=\"userSpaceOnUse\" "
           "patternTransform=\"rotate(" + std::to_string(j % 2 ? 45 : -45) + ")\">"
           "<rect width=\"6\" height=\"6\" fill=\"white\"/><line x1=\"0\" y1=\"0\" x2=\"0\" "
           "y2=\"6\" stroke=\"" + std::string(st.colour) + "\" stroke-width=\"2.5\"/></pattern>";
    }
  }
  s += "</defs>\n";
  s += axes(f, c.x_label, c.y_label, "");
  s += "<g class=\"data\">\n";
  std::vector<double> base(n, 0.0);
  for (std::size_t j = 0; j < c.layers.size(); ++j) {
    const BarLayer& l = c.layers[j];
    s += "<g class=\"bars\" data-series=\"" + escape_html(l.data) + "\" stroke=\"" +
         style_of(l.style).colour + "\" stroke-width=\"0.6\" fill=\"url(#" + escape_html(prefix) +
         std::to_string(j) + ")\">";
    for (std::size_t k = 0; k < n && k < l.values.size(); ++k) {
      const double v = l.values[k];
      if (!std::isfinite(v) || v <= 0.0) continue;
      const double x0 = f.sx(c.edges[k]), x1 = f.sx(c.edges[k + 1]);
      const double y_top = f.sy(base[k] + v), y_bottom = f.sy(base[k]);
      s += "<rect x=\"" + px(x0) + "\" y=\"" + px(y_top) + "\" width=\"" + px(x1 - x0) +
           "\" height=\"" + px(y_bottom - y_top) + "\"/>";
      base[k] += v;
    }
    s += "</g>\n";
  }
  s += "</g>\n" + legend_svg + "</svg>\n";
  return s;
}

}  // namespace freshet::reporting::detail
