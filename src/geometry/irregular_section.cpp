// Surveyed (irregular) section, divided-channel conveyance (Chow 1959, Open-Channel
// Hydraulics, sec. 6-8): K = sum_i A_i R_i^(2/3) / n_i over left overbank, main channel and
// right overbank, divided by vertical lines at the bank stations that add no wetted perimeter.
//
// Each survey segment is clipped by the level water surface at elevation eta:
//   dry        eta below the segment: nothing;
//   full       eta above both ends:   A += (eta - mean y) dx,  P += L,  T += dx;
//   partial    eta between the ends:  wet fraction f = (eta - y_low) / dy,
//                                     A += f dx (eta - y_low) / 2,  P += f L,  T += f dx,
//                                     dP/dh += L / dy.
// Vertical walls close the section above its two end points.
#include <algorithm>
#include <cmath>

#include "freshet/core/converged_root.hpp"
#include "freshet/core/root_finding.hpp"
#include "freshet/geometry/cross_section.hpp"

namespace freshet::geometry {

namespace {

bool finite_point(const SurveyPoint& p) {
  return std::isfinite(p.station_m) && std::isfinite(p.elevation_m);
}

void validate_points(const std::vector<SurveyPoint>& pts, ProblemList& problems) {
  if (pts.size() < 3) {
    problems.add("points", "has " + std::to_string(pts.size()) + " points: needs at least 3");
  }
  for (std::size_t i = 0; i < pts.size(); ++i) {
    const std::string at = "points[" + std::to_string(i) + "]";
    problems.require_finite(at + ".station_m", pts[i].station_m);
    problems.require_finite(at + ".elevation_m", pts[i].elevation_m);
    if (i > 0 && finite_point(pts[i]) && finite_point(pts[i - 1]) &&
        pts[i].station_m < pts[i - 1].station_m) {
      problems.add(at + ".station_m", "= " + format_value(pts[i].station_m) +
                                          ": stations must not decrease (previous station " +
                                          format_value(pts[i - 1].station_m) + ")");
    }
  }
  if (pts.size() >= 3 && pts.front().station_m == pts.back().station_m) {
    problems.add("points", "span zero width: the first and last stations are equal");
  }
}

void validate_bank(std::string_view field, double station, const std::vector<SurveyPoint>& pts,
                   ProblemList& problems) {
  problems.require_finite(field, station);
  if (pts.empty() || !std::isfinite(station)) return;
  const double first = pts.front().station_m;
  const double last = pts.back().station_m;
  if (station < first || station > last) {
    problems.add(field, "= " + format_value(station) + ": must lie within the survey stations [" +
                            format_value(first) + ", " + format_value(last) + "]");
  }
}

}  // namespace

void IrregularSpec::validate(ProblemList& problems) const {
  validate_points(points, problems);
  validate_bank("left_bank_station_m", left_bank_station_m, points, problems);
  validate_bank("right_bank_station_m", right_bank_station_m, points, problems);
  if (left_bank_station_m > right_bank_station_m) {
    problems.add("right_bank_station_m",
                 "= " + format_value(right_bank_station_m) +
                     ": must not be less than left_bank_station_m = " +
                     format_value(left_bank_station_m));
  }
  problems.require_positive("left_overbank_n", left_overbank_n);
  problems.require_positive("main_channel_n", main_channel_n);
  problems.require_positive("right_overbank_n", right_overbank_n);
}

struct IrregularSection::Hydraulics {
  std::array<double, 3> area{}, perimeter{}, width{}, perimeter_slope{};
};

IrregularSection::IrregularSection(const IrregularSpec& spec, std::string element)
    : n_{spec.left_overbank_n, spec.main_channel_n, spec.right_overbank_n} {
  element_ = element;
  ProblemList problems(std::move(element));
  spec.validate(problems);
  problems.throw_if_any();

  // Elevations are stored relative to the thalweg, so that the water level is the depth itself
  // and shallow depths keep full relative precision.
  thalweg_m_ = std::min_element(spec.points.begin(), spec.points.end(),
                                [](const auto& a, const auto& b) {
                                  return a.elevation_m < b.elevation_m;
                                })->elevation_m;
  build_segments(spec);
  relief_m_ = 0.0;
  for (const auto& p : spec.points) {
    relief_m_ = std::max(relief_m_, p.elevation_m - thalweg_m_);
    if (p.elevation_m > thalweg_m_) breakpoints_m_.push_back(p.elevation_m - thalweg_m_);
  }
  std::sort(breakpoints_m_.begin(), breakpoints_m_.end());
  breakpoints_m_.erase(std::unique(breakpoints_m_.begin(), breakpoints_m_.end()),
                       breakpoints_m_.end());
  left_end_elevation_m_ = spec.points.front().elevation_m - thalweg_m_;
  right_end_elevation_m_ = spec.points.back().elevation_m - thalweg_m_;
  left_wall_subsection_ = segments_.front().subsection;
  right_wall_subsection_ = segments_.back().subsection;
}

// Segments between consecutive points, split at bank stations strictly inside them, each
// assigned to the subsection that holds its midpoint (a vertical segment at a bank station
// belongs to the main channel).
void IrregularSection::build_segments(const IrregularSpec& spec) {
  const double banks[2] = {spec.left_bank_station_m, spec.right_bank_station_m};
  auto push = [&](double x0, double y0, double x1, double y1) {
    if (x0 == x1 && y0 == y1) return;  // repeated point: no segment
    const double mid = 0.5 * (x0 + x1);
    const int subsection = mid < banks[0] ? 0 : (mid > banks[1] ? 2 : 1);
    segments_.push_back({x0, y0, x1, y1, subsection});
  };
  for (std::size_t i = 1; i < spec.points.size(); ++i) {
    double x0 = spec.points[i - 1].station_m, y0 = spec.points[i - 1].elevation_m - thalweg_m_;
    const double x1 = spec.points[i].station_m, y1 = spec.points[i].elevation_m - thalweg_m_;
    for (double xb : banks) {
      if (xb > x0 && xb < x1) {
        const double yb = y0 + (y1 - y0) * (xb - x0) / (x1 - x0);
        push(x0, y0, xb, yb);
        x0 = xb;
        y0 = yb;
      }
    }
    push(x0, y0, x1, y1);
  }
}

// Hydraulics at depth h. At a survey vertex the top width and dP/dh jump; `limit` chooses the
// side: from_below treats a segment whose lower end is exactly at the surface as still dry.
IrregularSection::Hydraulics IrregularSection::evaluate(double h, Limit limit) const noexcept {
  Hydraulics out;
  if (h < 0.0 || (h == 0.0 && limit == Limit::from_below)) return out;
  const double eta = h;  // water level above the thalweg
  const bool above = limit == Limit::from_above;
  for (const auto& s : segments_) {
    const double y_low = std::min(s.y0, s.y1), y_high = std::max(s.y0, s.y1);
    const double dx = s.x1 - s.x0;
    const int i = s.subsection;
    if (eta < y_low || (eta == y_low && !above)) continue;  // dry
    const double length = std::hypot(dx, s.y1 - s.y0);
    if (eta > y_high || (eta == y_high && above)) {         // fully wet
      out.area[i] += (eta - 0.5 * (s.y0 + s.y1)) * dx;
      out.perimeter[i] += length;
      out.width[i] += dx;
      continue;
    }
    const double dy = y_high - y_low;  // partly wet; dy > 0 here
    const double f = (eta - y_low) / dy;
    out.area[i] += 0.5 * f * dx * (eta - y_low);
    out.perimeter[i] += f * length;
    out.width[i] += f * dx;
    out.perimeter_slope[i] += length / dy;
  }
  auto wall = [&](double y_end, int i) {
    if (eta > y_end || (eta == y_end && above)) {
      out.perimeter[i] += eta - y_end;
      out.perimeter_slope[i] += 1.0;
    }
  };
  wall(left_end_elevation_m_, left_wall_subsection_);
  wall(right_end_elevation_m_, right_wall_subsection_);
  return out;
}

double IrregularSection::area_m2(double h) const noexcept {
  const auto g = evaluate(h, Limit::from_below);
  return g.area[0] + g.area[1] + g.area[2];
}

double IrregularSection::wetted_perimeter_m(double h) const noexcept {
  const auto g = evaluate(h, Limit::from_below);
  return g.perimeter[0] + g.perimeter[1] + g.perimeter[2];
}

double IrregularSection::top_width_m(double h) const noexcept {
  const auto g = evaluate(h, Limit::from_below);
  return g.width[0] + g.width[1] + g.width[2];
}

double IrregularSection::subsection_conveyance_m3s(int i, double h) const noexcept {
  if (i < 0 || i > 2) return 0.0;
  const auto g = evaluate(h, Limit::from_below);
  const double a = g.area[i], p = g.perimeter[i];
  return (a > 0.0 && p > 0.0) ? a * std::cbrt((a / p) * (a / p)) / n_[i] : 0.0;
}

double IrregularSection::conveyance_m3s(double h) const noexcept {
  return subsection_conveyance_m3s(0, h) + subsection_conveyance_m3s(1, h) +
         subsection_conveyance_m3s(2, h);
}

// dK/dh = sum_i K_i ((5/3) T_i / A_i - (2/3) (dP_i/dh) / P_i).
double IrregularSection::conveyance_slope(double h, Limit limit) const noexcept {
  const auto g = evaluate(h, limit);
  double slope = 0.0;
  for (int i = 0; i < 3; ++i) {
    const double a = g.area[i], p = g.perimeter[i];
    if (a <= 0.0 || p <= 0.0) continue;
    const double k = a * std::cbrt((a / p) * (a / p)) / n_[i];
    slope += k * ((5.0 / 3.0) * g.width[i] / a - (2.0 / 3.0) * g.perimeter_slope[i] / p);
  }
  return slope;
}

double IrregularSection::conveyance_slope_m2s(double h) const noexcept {
  return conveyance_slope(h, Limit::from_below);
}

double IrregularSection::conveyance_slope_above_m2s(double h) const noexcept {
  return conveyance_slope(h, Limit::from_above);
}

// Above the end points the walls are vertical, so every finite area has a finite depth; an
// area that is not a number or infinite has none, and is a NumericalError, not a NaN depth.
double IrregularSection::depth_from_area_m(double a) const {
  if (a <= 0.0) return 0.0;
  auto area = [this](double h) { return area_m2(h); };
  const double hi = expand_upper_bracket(area, a, depth_scale_m());
  auto fdf = [&](double h, double& f, double& df) {
    const auto g = evaluate(h, Limit::from_below);
    f = g.area[0] + g.area[1] + g.area[2] - a;
    df = g.width[0] + g.width[1] + g.width[2];
  };
  RootResult r = std::isfinite(hi) ? solve_bracketed_newton(fdf, 0.0, hi) : RootResult{};
  if (!r.converged && std::isfinite(hi)) {  // a nearly dry section: bracket the depth closely
    double top = hi;
    const double lo = tighten_bracket_below(area, a, top);
    r = solve_bracketed_newton(fdf, lo, top);
  }
  return converged_root(r, element_, "depth for area (m)",
                        [a] { return "flow area " + format_value(a) + " m2"; });
}

double IrregularSection::depth_scale_m() const noexcept {
  if (relief_m_ > 0.0) return relief_m_;
  return segments_.back().x1 - segments_.front().x0;
}

std::vector<double> IrregularSection::breakpoint_depths_m() const { return breakpoints_m_; }

}  // namespace freshet::geometry
