// TabulatedFlux: Q(A) on a monotone cubic Hermite table in (ln A, ln Q), slopes limited after
// Fritsch & Carlson (1980), "Monotone piecewise cubic interpolation", SIAM J. Numer. Anal.
// 17(2), 238-246; Hermite basis as in Burden & Faires, Numerical Analysis, sec. 3.5. The table
// is refined by halving intervals whose midpoint misses the exact law by more than a tolerance.
#include <algorithm>
#include <cmath>

#include "freshet/core/converged_root.hpp"
#include "freshet/core/root_finding.hpp"
#include "freshet/geometry/section_flux.hpp"

namespace freshet::geometry {

void TableOptions::validate(ProblemList& problems) const {
  problems.require_non_negative("top_depth_m", top_depth_m);
  problems.require(std::isfinite(bottom_depth_ratio) && bottom_depth_ratio > 0.0 &&
                       bottom_depth_ratio <= 0.1,
                   "bottom_depth_ratio", bottom_depth_ratio, "must be in (0, 0.1]");
  problems.require(nodes_per_decade >= 4 && nodes_per_decade <= 10000, "nodes_per_decade",
                   nodes_per_decade, "must be in [4, 10000]");
  problems.require_positive("discharge_tolerance", discharge_tolerance);
  problems.require_positive("celerity_tolerance", celerity_tolerance);
  problems.require(max_nodes >= 16, "max_nodes", max_nodes, "must be >= 16");
}

namespace {

using Data = TabulatedFlux::Data;

// The exact law at one depth: ln A, ln Q and d ln Q / d ln A from each side.
struct Sample {
  double depth_m, log_area, log_q, slope_below, slope_above;
};

// d ln Q / d ln A = (dK/dh) A / (T K).
double log_slope(double dk_dh, double area, double width, double k) {
  return (width > 0.0 && k > 0.0) ? dk_dh * area / (width * k) : 0.0;
}

Sample sample(const CrossSection& s, double sqrt_slope, double h) {
  const double a = s.area_m2(h), k = s.conveyance_m3s(h), w = s.top_width_m(h);
  return {h, std::log(a), std::log(sqrt_slope * k), log_slope(s.conveyance_slope_m2s(h), a, w, k),
          log_slope(s.conveyance_slope_above_m2s(h), a, w, k)};
}

double top_depth(const CrossSection& section, const TableOptions& o) {
  if (std::isfinite(section.capacity_depth_m())) return section.capacity_depth_m();
  return o.top_depth_m > 0.0 ? o.top_depth_m : 3.0 * section.depth_scale_m();
}

// Geometric depths from bottom to top, plus every corner of the geometry in between; a
// geometric node that nearly coincides with a corner is dropped so intervals stay well shaped.
// The count is judged as a double before it becomes an int (a depth scale of inf or NaN
// would otherwise convert NaN to int).
std::vector<double> initial_depths(const CrossSection& section, const TableOptions& o,
                                   const std::string& element) {
  const double top = top_depth(section, o);
  const double bottom = o.bottom_depth_ratio * top;
  const double decades = std::ceil(std::log10(top / bottom) * o.nodes_per_decade);
  if (!(std::isfinite(top) && bottom > 0.0 && decades >= 0.0 && decades <= o.max_nodes)) {
    ProblemList p(element);
    p.add("section", "has a depth range from " + format_value(bottom) + " to " +
                         format_value(top) + " m that no discharge table can span: its "
                         "dimensions are outside the physical range");
    p.throw_if_any();
  }
  const int count = std::max(2, static_cast<int>(decades));
  const double ratio = std::pow(top / bottom, 1.0 / count);
  std::vector<double> corners;
  for (double b : section.breakpoint_depths_m()) {
    if (b > bottom && b < top) corners.push_back(b);
  }
  std::vector<double> depths = corners;
  for (int k = 0; k <= count; ++k) {
    const double g = k == count ? top : bottom * std::pow(ratio, k);
    const double keep_out = 0.25 * (ratio - 1.0) * g;
    const bool near_corner = std::any_of(corners.begin(), corners.end(),
                                         [&](double c) { return std::abs(c - g) < keep_out; });
    if (!near_corner) depths.push_back(g);
  }
  std::sort(depths.begin(), depths.end());
  return depths;
}

// Fritsch-Carlson: with secant delta, slopes m0, m1 give a monotone cubic when both are >= 0
// and (m0/delta)^2 + (m1/delta)^2 <= 9; scale them onto that circle otherwise.
void limit_slopes(double delta, double& m0, double& m1) {
  m0 = std::max(m0, 0.0);
  m1 = std::max(m1, 0.0);
  if (delta <= 0.0) {
    m0 = m1 = 0.0;
    return;
  }
  const double r2 = (m0 / delta) * (m0 / delta) + (m1 / delta) * (m1 / delta);
  if (r2 > 9.0) {
    const double tau = 3.0 / std::sqrt(r2);
    m0 *= tau;
    m1 *= tau;
  }
}

// A table is only used once its own values are usable: finite nodes with areas strictly
// increasing (the searches in evaluate() and area_for_discharge_m2() rely on both) and finite,
// non-negative slopes. An extreme section (an elevation of -1e308, an n of 1e300) gives areas
// or discharges of 0 or inf, so the section is refused, naming the depth where it failed.
void check_table(const Data& d, const std::vector<Sample>& samples, const std::string& element) {
  ProblemList p(element);
  const auto refuse = [&](std::size_t j, const std::string& what) {
    p.add("section", "gives a discharge table whose " + what + " at depth " +
                         format_value(samples[j].depth_m) + " m (area " +
                         format_value(std::exp(d.log_area[j])) + " m2, discharge " +
                         format_value(std::exp(d.log_q[j])) + " m3/s): the section's "
                         "dimensions, roughness or slope are outside the physical range");
    p.throw_if_any();
  };
  for (std::size_t j = 0; j < samples.size(); ++j) {
    if (!std::isfinite(d.log_area[j]) || !std::isfinite(d.log_q[j])) {
      refuse(j, "area or discharge is zero or not finite");
    }
    if (j > 0 && !(d.log_area[j] > d.log_area[j - 1])) refuse(j, "area does not increase");
  }
  for (std::size_t j = 0; j + 1 < samples.size(); ++j) {
    const bool ok = d.slope_start[j] >= 0.0 && d.slope_end[j] >= 0.0 &&
                    std::isfinite(d.slope_start[j]) && std::isfinite(d.slope_end[j]);
    if (!ok) refuse(j, "slope d ln Q / d ln A is not finite");
  }
  if (!std::isfinite(d.exponent_below) || !std::isfinite(d.exponent_above)) {
    refuse(0, "end exponents are not finite");
  }
}

// Nodes from samples: running maximum of ln Q, limited interval slopes, end behaviour.
std::shared_ptr<const Data> assemble(const std::vector<Sample>& samples, bool closed,
                                     const std::string& element) {
  auto d = std::make_shared<Data>();
  d->element = element;
  for (const Sample& s : samples) {
    d->log_area.push_back(s.log_area);
    d->log_q.push_back(s.log_q);
  }
  for (std::size_t j = 0; j + 1 < samples.size(); ++j) {
    if (d->log_q[j + 1] < d->log_q[j]) {
      d->log_q[j + 1] = d->log_q[j];
      ++d->monotone_corrections;
    }
    double m0 = samples[j].slope_above;
    // dK/dh = 0 at a conduit's capacity depth, exactly.
    double m1 = (closed && j + 2 == samples.size()) ? 0.0 : samples[j + 1].slope_below;
    limit_slopes((d->log_q[j + 1] - d->log_q[j]) / (d->log_area[j + 1] - d->log_area[j]), m0, m1);
    d->slope_start.push_back(m0);
    d->slope_end.push_back(m1);
  }
  d->exponent_below = d->slope_start.front();
  d->exponent_above = closed ? 0.0 : d->slope_end.back();
  if (closed) {
    d->capacity_area_m2 = std::exp(d->log_area.back());
    d->max_discharge_m3s = std::exp(d->log_q.back());
  }
  check_table(*d, samples, element);
  return d;
}

// Halves every interval whose midpoint misses the exact law; false when none does. Intervals
// where the exact Q falls (replaced by the running maximum) are left alone.
bool refine(const CrossSection& s, double sqrt_slope, const TabulatedFlux& table,
            const TableOptions& o, std::vector<Sample>& samples) {
  std::vector<Sample> added;
  for (std::size_t j = 0; j + 1 < samples.size(); ++j) {
    const double h0 = samples[j].depth_m, h1 = samples[j + 1].depth_m;
    if (h1 - h0 <= 1e-9 * h1) continue;
    const double h = 0.5 * (h0 + h1), a = s.area_m2(h), t = s.top_width_m(h);
    const double q = sqrt_slope * s.conveyance_m3s(h);
    const double c = t > 0.0 ? sqrt_slope * s.conveyance_slope_m2s(h) / t : 0.0;
    if (c < 0.0 || q < table.discharge_m3s(std::exp(samples[j].log_area))) continue;
    const bool q_off = std::abs(table.discharge_m3s(a) / q - 1.0) > o.discharge_tolerance;
    const bool c_off = std::abs(table.celerity_m_s(a) - c) > o.celerity_tolerance * q / a;
    if (q_off || c_off) added.push_back(sample(s, sqrt_slope, h));
  }
  if (added.empty()) return false;
  samples.insert(samples.end(), added.begin(), added.end());
  std::sort(samples.begin(), samples.end(),
            [](const Sample& x, const Sample& y) { return x.depth_m < y.depth_m; });
  return true;
}

}  // namespace

TabulatedFlux TabulatedFlux::from_section(const CrossSection& section, double bed_slope,
                                          const TableOptions& options,
                                          const std::string& element) {
  const double sqrt_slope = std::sqrt(bed_slope);
  const bool closed = std::isfinite(section.capacity_depth_m());
  std::vector<Sample> samples;
  for (double h : initial_depths(section, options, element)) {
    samples.push_back(sample(section, sqrt_slope, h));
  }
  TabulatedFlux table(assemble(samples, closed, element));
  constexpr int kMaxPasses = 40;
  for (int pass = 0; pass < kMaxPasses; ++pass) {
    if (samples.size() >= static_cast<std::size_t>(options.max_nodes)) break;
    if (!refine(section, sqrt_slope, table, options, samples)) break;
    table = TabulatedFlux(assemble(samples, closed, element));
  }
  return table;
}

// The comparisons are written so that NaN takes the first branch (NaN in, NaN out) and an
// interval index is always inside the table, whatever x is.
TabulatedFlux::LogEval TabulatedFlux::evaluate(double x) const noexcept {
  const Data& d = *data_;
  if (!(x > d.log_area.front())) {
    return {d.log_q.front() + d.exponent_below * (x - d.log_area.front()), d.exponent_below};
  }
  if (x >= d.log_area.back()) {
    // A zero exponent (a conduit's cap) holds Q at the cap even for an infinite area.
    const double rise = d.exponent_above == 0.0 ? 0.0 : d.exponent_above * (x - d.log_area.back());
    return {d.log_q.back() + rise, d.exponent_above};
  }
  const auto k = std::clamp<std::size_t>(
      static_cast<std::size_t>(std::upper_bound(d.log_area.begin(), d.log_area.end(), x) -
                               d.log_area.begin()),
      1, d.log_area.size() - 1);
  const std::size_t j = k - 1;
  const double dx = d.log_area[k] - d.log_area[j];
  const double u = (x - d.log_area[j]) / dx, v = 1.0 - u;
  const double y0 = d.log_q[j], y1 = d.log_q[k];
  const double m0 = d.slope_start[j] * dx, m1 = d.slope_end[j] * dx;
  // Cubic Hermite basis h00, h10, h01, h11 and their derivatives in u; written with
  // h00 = 1 - h01 so that a flat interval (y0 = y1, m0 = m1 = 0) returns y0 exactly.
  const double y = y0 + u * u * (3.0 - 2.0 * u) * (y1 - y0) + u * v * v * m0 + u * u * (u - 1.0) * m1;
  const double dy_du =
      6.0 * u * v * (y1 - y0) + v * (1.0 - 3.0 * u) * m0 + u * (3.0 * u - 2.0) * m1;
  return {y, dy_du / dx};
}

double TabulatedFlux::discharge_m3s(double a) const noexcept {
  if (!(a > 0.0)) return 0.0;
  return std::exp(evaluate(std::log(a)).log_q);
}

// c = dQ/dA = (Q / A) d ln Q / d ln A.
double TabulatedFlux::celerity_m_s(double a) const noexcept {
  if (!(a > 0.0)) return 0.0;
  const LogEval e = evaluate(std::log(a));
  return std::exp(e.log_q) / a * e.dlogq_dloga;
}

double TabulatedFlux::area_for_discharge_m2(double q) const {
  if (!(q > 0.0)) return 0.0;
  const Data& d = *data_;
  const double y = std::log(q);
  if (y <= d.log_q.front()) {
    return d.exponent_below > 0.0
               ? std::exp(d.log_area.front() + (y - d.log_q.front()) / d.exponent_below)
               : std::exp(d.log_area.front());
  }
  if (y >= d.log_q.back()) {
    return d.exponent_above > 0.0
               ? std::exp(d.log_area.back() + (y - d.log_q.back()) / d.exponent_above)
               : std::exp(d.log_area.back());  // at or above the cap: the capacity area
  }
  // log_q.front() < y < log_q.back() here, so k is in [1, n - 1]; the clamp keeps it there
  // by construction.
  const auto k = std::clamp<std::size_t>(
      static_cast<std::size_t>(std::lower_bound(d.log_q.begin(), d.log_q.end(), y) -
                               d.log_q.begin()),
      1, d.log_q.size() - 1);
  if (d.log_q[k] == y) return std::exp(d.log_area[k]);  // smallest area on a plateau
  auto fdf = [&](double x, double& f, double& df) {
    const LogEval e = evaluate(x);
    f = e.log_q - y;
    df = e.dlogq_dloga;
  };
  // The interval brackets the root (the table is monotone, checked when it is built), so this
  // converges; if it ever does not, it says so instead of returning a NaN area.
  const double log_area =
      converged_root(solve_bracketed_newton(fdf, d.log_area[k - 1], d.log_area[k]), d.element,
                     "area for discharge (m2)",
                     [q] { return "discharge " + format_value(q) + " m3/s"; });
  return std::exp(log_area);
}

}  // namespace freshet::geometry
