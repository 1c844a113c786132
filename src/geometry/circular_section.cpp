// Circular conduit flowing part full (Chow 1959, Open-Channel Hydraulics, Table 2-1):
//   theta = 4 asin(sqrt(h/D)),  A = D^2 (theta - sin theta) / 8,  P = D theta / 2,
//   T = 2 sqrt(h (D - h)),  dP/dh = 2 D / T.
#include <cmath>
#include <numbers>
#include <string>

#include "freshet/core/converged_root.hpp"
#include "freshet/core/root_finding.hpp"
#include "freshet/geometry/cross_section.hpp"

namespace freshet::geometry {

namespace {

// theta - sin(theta), with a Taylor series below 0.25 rad where the difference cancels
// (truncation error < 1e-15 relative there).
double theta_minus_sin(double theta) {
  if (theta >= 0.25) return theta - std::sin(theta);
  const double t2 = theta * theta;
  double term = theta * t2 / 6.0;
  double sum = term;
  for (int k = 2; k <= 5; ++k) {  // terms theta^5/5! ... theta^11/11!
    term *= -t2 / static_cast<double>((2 * k) * (2 * k + 1));
    sum += term;
  }
  return sum;
}

// Central angle of the water surface; cancellation-free near the invert.
double central_angle(double h, double d) {
  return 4.0 * std::asin(std::sqrt(h / d));
}

double unit_area(double y) { return theta_minus_sin(central_angle(y, 1.0)) / 8.0; }
double unit_perimeter(double y) { return 0.5 * central_angle(y, 1.0); }
double unit_top_width(double y) { return 2.0 * std::sqrt(y * (1.0 - y)); }

// d/dy of A^(5/3) P^(-2/3) for the unit circle (n = 1), valid for 0 < y < 1.
double unit_conveyance_slope(double y) {
  const double a = unit_area(y);
  const double p = unit_perimeter(y);
  const double t = unit_top_width(y);
  const double k = a * std::cbrt((a / p) * (a / p));
  return k * ((5.0 / 3.0) * t / a - (2.0 / 3.0) * (2.0 / t) / p);
}

// y/D of greatest conveyance, the root of dK/dy = 0 between 0.9 and 0.99 (by bisection:
// the derivative is passed as zero so the solver only halves the bracket).
double capacity_depth_ratio() {
  static const double ratio = [] {
    auto fdf = [](double y, double& f, double& df) {
      f = unit_conveyance_slope(y);
      df = 0.0;
    };
    return converged_root(solve_bracketed_newton(fdf, 0.9, 0.99), "circular section",
                          "relative depth of greatest conveyance (y/D)",
                          [] { return std::string("dK/dy = 0 between y/D = 0.9 and 0.99"); });
  }();
  return ratio;
}

}  // namespace

CircularSection::CircularSection(const CircularSpec& spec, std::string element)
    : d_([&] {
        ProblemList problems(element);
        spec.validate(problems);
        problems.throw_if_any();
        return spec.diameter_m;
      }()),
      n_(spec.manning_n),
      capacity_depth_m_(capacity_depth_ratio() * spec.diameter_m),
      element_(std::move(element)) {}

double CircularSection::full_area_m2() const noexcept {
  return std::numbers::pi * d_ * d_ / 4.0;
}

double CircularSection::area_m2(double h) const noexcept {
  if (h <= 0.0) return 0.0;
  if (h >= d_) return full_area_m2();
  return d_ * d_ * unit_area(h / d_);
}

double CircularSection::wetted_perimeter_m(double h) const noexcept {
  if (h <= 0.0) return 0.0;
  if (h >= d_) return std::numbers::pi * d_;
  return d_ * unit_perimeter(h / d_);
}

double CircularSection::top_width_m(double h) const noexcept {
  if (h <= 0.0 || h >= d_) return 0.0;
  return 2.0 * std::sqrt(h * (d_ - h));
}

double CircularSection::conveyance_m3s(double h) const noexcept {
  if (h <= 0.0) return 0.0;
  const double a = area_m2(h);
  const double r = a / wetted_perimeter_m(h);
  return a * std::cbrt(r * r) / n_;
}

// dK/dh = K ((5/3) T / A - (2/3) (2 D / T) / P); 0 once the conduit is full.
double CircularSection::conveyance_slope_m2s(double h) const noexcept {
  if (h <= 0.0 || h >= d_) return 0.0;
  // K scales as D^(8/3) and h as D, so dK/dh = D^(5/3) (dK/dy of the unit circle) / n.
  return std::cbrt(d_ * d_ * d_ * d_ * d_) * unit_conveyance_slope(h / d_) / n_;
}

// [0, D] brackets every area between 0 and full; an area that is not a number does not
// converge and is a NumericalError, not a NaN depth.
double CircularSection::depth_from_area_m(double a) const {
  if (a <= 0.0) return 0.0;
  if (a >= full_area_m2()) return d_;
  auto fdf = [&](double h, double& f, double& df) {
    f = area_m2(h) - a;
    df = top_width_m(h);
  };
  RootResult r = solve_bracketed_newton(fdf, 0.0, d_);
  if (!r.converged && std::isfinite(a)) {  // a nearly dry pipe: bracket the depth closely
    double hi = d_;
    const double lo = tighten_bracket_below([this](double h) { return area_m2(h); }, a, hi);
    r = solve_bracketed_newton(fdf, lo, hi);
  }
  return converged_root(r, element_, "depth for area (m)",
                        [a] { return "flow area " + format_value(a) + " m2"; });
}

}  // namespace freshet::geometry
