// TabulatedFlux: Q(A) on a monotone cubic Hermite table in (ln A, ln Q), slopes limited after
// Fritsch & Carlson (1980), "Monotone piecewise cubic interpolation", SIAM J. Numer. Anal.
// 17(2), 238-246. Hermite basis: Burden & Faires, Numerical Analysis, sec. 3.4.
#include <algorithm>
#include <cmath>

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
}

namespace {

// Geometric depths from bottom to top, plus every corner of the geometry in between; a
// geometric node that nearly coincides with a corner is dropped so intervals stay well shaped.
std::vector<double> table_depths(const CrossSection& section, const TableOptions& o) {
  const bool closed = std::isfinite(section.capacity_depth_m());
  const double top = closed ? section.capacity_depth_m()
                            : (o.top_depth_m > 0.0 ? o.top_depth_m : 3.0 * section.depth_scale_m());
  const double bottom = o.bottom_depth_ratio * top;
  const int count = std::max(
      2, static_cast<int>(std::ceil(std::log10(top / bottom) * o.nodes_per_decade)));
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

// d ln Q / d ln A = (dK/dh) A / (T K).
double log_slope(double dk_dh, double area, double width, double k) {
  return (width > 0.0 && k > 0.0) ? dk_dh * area / (width * k) : 0.0;
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

}  // namespace

TabulatedFlux TabulatedFlux::from_section(const CrossSection& section, double bed_slope,
                                          const TableOptions& options) {
  const std::vector<double> depths = table_depths(section, options);
  const std::size_t n = depths.size();
  const double sqrt_s = std::sqrt(bed_slope);
  TabulatedFlux t;
  std::vector<double> slope_below(n), slope_above(n);
  for (std::size_t j = 0; j < n; ++j) {
    const double h = depths[j];
    const double a = section.area_m2(h), k = section.conveyance_m3s(h);
    const double w = section.top_width_m(h);
    t.log_area_.push_back(std::log(a));
    t.log_q_.push_back(std::log(sqrt_s * k));
    slope_below[j] = log_slope(section.conveyance_slope_m2s(h), a, w, k);
    slope_above[j] = log_slope(section.conveyance_slope_above_m2s(h), a, w, k);
  }
  const bool closed = std::isfinite(section.capacity_depth_m());
  if (closed) slope_below[n - 1] = 0.0;  // dK/dh = 0 at the capacity depth, exactly

  for (std::size_t j = 0; j + 1 < n; ++j) {
    if (t.log_q_[j + 1] < t.log_q_[j]) {
      t.log_q_[j + 1] = t.log_q_[j];  // running maximum keeps Q non-decreasing
      ++t.monotone_corrections_;
    }
    double m0 = slope_above[j], m1 = slope_below[j + 1];
    limit_slopes((t.log_q_[j + 1] - t.log_q_[j]) / (t.log_area_[j + 1] - t.log_area_[j]), m0, m1);
    t.slope_start_.push_back(m0);
    t.slope_end_.push_back(m1);
  }
  t.exponent_below_ = t.slope_start_.front();
  t.exponent_above_ = closed ? 0.0 : t.slope_end_.back();
  if (closed) {
    t.capacity_area_m2_ = std::exp(t.log_area_.back());
    t.max_discharge_m3s_ = std::exp(t.log_q_.back());
  }
  return t;
}

TabulatedFlux::LogEval TabulatedFlux::evaluate(double x) const noexcept {
  if (x <= log_area_.front()) {
    return {log_q_.front() + exponent_below_ * (x - log_area_.front()), exponent_below_};
  }
  if (x >= log_area_.back()) {
    return {log_q_.back() + exponent_above_ * (x - log_area_.back()), exponent_above_};
  }
  const auto k = static_cast<std::size_t>(
      std::upper_bound(log_area_.begin(), log_area_.end(), x) - log_area_.begin());
  const std::size_t j = k - 1;
  const double dx = log_area_[k] - log_area_[j];
  const double u = (x - log_area_[j]) / dx;
  const double y0 = log_q_[j], y1 = log_q_[k];
  const double m0 = slope_start_[j] * dx, m1 = slope_end_[j] * dx;
  // Cubic Hermite basis h00, h10, h01, h11 and their derivatives in u.
  const double v = 1.0 - u;
  const double y = (1.0 + 2.0 * u) * v * v * y0 + u * v * v * m0 + u * u * (3.0 - 2.0 * u) * y1 +
                   u * u * (u - 1.0) * m1;
  const double dy_du = 6.0 * u * v * (y1 - y0) + v * (1.0 - 3.0 * u) * m0 + u * (3.0 * u - 2.0) * m1;
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

double TabulatedFlux::area_for_discharge_m2(double q) const noexcept {
  if (!(q > 0.0)) return 0.0;
  const double y = std::log(q);
  if (y <= log_q_.front()) {
    return exponent_below_ > 0.0
               ? std::exp(log_area_.front() + (y - log_q_.front()) / exponent_below_)
               : std::exp(log_area_.front());
  }
  if (y >= log_q_.back()) {
    return exponent_above_ > 0.0
               ? std::exp(log_area_.back() + (y - log_q_.back()) / exponent_above_)
               : std::exp(log_area_.back());  // at or above the cap: the capacity area
  }
  const auto k = static_cast<std::size_t>(
      std::lower_bound(log_q_.begin(), log_q_.end(), y) - log_q_.begin());
  if (log_q_[k] == y) return std::exp(log_area_[k]);  // smallest area on a plateau
  auto fdf = [&](double x, double& f, double& df) {
    const LogEval e = evaluate(x);
    f = e.log_q - y;
    df = e.dlogq_dloga;
  };
  return std::exp(solve_bracketed_newton(fdf, log_area_[k - 1], log_area_[k]).x);
}

}  // namespace freshet::geometry
