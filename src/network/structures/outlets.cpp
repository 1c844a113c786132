#include "freshet/network/structures/outlets.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <numbers>

namespace freshet::network::structures {
namespace {

constexpr double kG = units::kGravity_m_s2;
constexpr int kGaussPoints = 32;

struct GaussRule {
  std::array<double, kGaussPoints> x{};
  std::array<double, kGaussPoints> w{};
};

// Gauss-Legendre nodes and weights on [0, 1] (Newton on P_n; Press et al. 2007, Numerical
// Recipes, 3rd ed., sec. 4.6, gauleg).
GaussRule make_gauss_rule() {
  GaussRule rule;
  const int n = kGaussPoints;
  for (int i = 0; i < (n + 1) / 2; ++i) {
    double z = std::cos(std::numbers::pi * (i + 0.75) / (n + 0.5));
    double dp = 0.0;
    for (int it = 0; it < 100; ++it) {
      double p1 = 1.0, p2 = 0.0;
      for (int j = 0; j < n; ++j) {
        const double p3 = p2;
        p2 = p1;
        p1 = ((2.0 * j + 1.0) * z * p2 - j * p3) / (j + 1.0);
      }
      dp = n * (z * p1 - p2) / (z * z - 1.0);
      const double dz = p1 / dp;
      z -= dz;
      if (std::abs(dz) < 1e-16) break;
    }
    const double w = 2.0 / ((1.0 - z * z) * dp * dp);
    rule.x[static_cast<std::size_t>(i)] = 0.5 * (1.0 - z);
    rule.x[static_cast<std::size_t>(n - 1 - i)] = 0.5 * (1.0 + z);
    rule.w[static_cast<std::size_t>(i)] = 0.5 * w;
    rule.w[static_cast<std::size_t>(n - 1 - i)] = 0.5 * w;
  }
  return rule;
}

const GaussRule& gauss_rule() {
  static const GaussRule rule = make_gauss_rule();
  return rule;
}

// integral over the wetted part of a circular opening of w(z) sqrt(h - z) dz, with
// z = z_c - r cos(theta) and theta = theta_top (1 - u^2), which removes the square-root
// end point behaviour so the Gauss rule converges fast.
double circular_orifice_integral(double r, double head_over_centre_m) {
  const double c = std::clamp(-head_over_centre_m / r, -1.0, 1.0);
  const double theta_top = std::acos(c);  // pi when the stage is at or above the crown
  const GaussRule& g = gauss_rule();
  double sum = 0.0;
  for (std::size_t i = 0; i < g.x.size(); ++i) {
    const double u = g.x[i];
    const double theta = theta_top * (1.0 - u * u);
    const double s = std::sin(theta);
    const double head = std::max(0.0, head_over_centre_m + r * std::cos(theta));
    sum += g.w[i] * 2.0 * r * r * s * s * std::sqrt(head) * 2.0 * theta_top * u;
  }
  return sum;
}

}  // namespace

double RectangularWeir::discharge_m3s(double stage_m) const {
  const double head = stage_m - crest_stage_m;
  return head > 0.0 ? coefficient_si * length_m * head * std::sqrt(head) : 0.0;
}

double VNotchWeir::discharge_m3s(double stage_m) const {
  const double head = stage_m - vertex_stage_m;
  if (!(head > 0.0)) return 0.0;
  const double half_angle = 0.5 * notch_angle_deg * std::numbers::pi / 180.0;
  return 8.0 / 15.0 * discharge_coefficient * std::sqrt(2.0 * kG) * std::tan(half_angle) *
         head * head * std::sqrt(head);
}

double Orifice::area_m2() const {
  return shape == OrificeShape::circular ? 0.25 * std::numbers::pi * diameter_m * diameter_m
                                         : width_m * height_m;
}

double Orifice::crown_stage_m() const {
  return invert_stage_m + (shape == OrificeShape::circular ? diameter_m : height_m);
}

double Orifice::discharge_m3s(double stage_m) const {
  const double h_bottom = stage_m - invert_stage_m;
  if (!(h_bottom > 0.0)) return 0.0;
  const double k = discharge_coefficient * std::sqrt(2.0 * kG);
  if (shape == OrificeShape::rectangular) {
    const double h_top = std::max(0.0, stage_m - crown_stage_m());
    return 2.0 / 3.0 * k * width_m * (h_bottom * std::sqrt(h_bottom) - h_top * std::sqrt(h_top));
  }
  const double r = 0.5 * diameter_m;
  return k * circular_orifice_integral(r, h_bottom - r);
}

void validate_outlet(const Outlet& outlet, const std::string& prefix, ProblemList& p) {
  if (const auto* w = std::get_if<RectangularWeir>(&outlet)) {
    p.require_finite(prefix + "crest_stage_m", w->crest_stage_m);
    p.require_positive(prefix + "length_m", w->length_m);
    p.require_positive(prefix + "weir_coefficient", w->coefficient_si);
  } else if (const auto* v = std::get_if<VNotchWeir>(&outlet)) {
    p.require_finite(prefix + "vertex_stage_m", v->vertex_stage_m);
    p.require(std::isfinite(v->notch_angle_deg) && v->notch_angle_deg > 0.0 &&
                  v->notch_angle_deg < 180.0,
              prefix + "notch_angle_deg", v->notch_angle_deg, "must be in (0, 180)");
    p.require_positive(prefix + "discharge_coefficient", v->discharge_coefficient);
  } else if (const auto* o = std::get_if<Orifice>(&outlet)) {
    p.require_finite(prefix + "invert_stage_m", o->invert_stage_m);
    if (o->shape == OrificeShape::circular) {
      p.require_positive(prefix + "diameter_m", o->diameter_m);
    } else {
      p.require_positive(prefix + "width_m", o->width_m);
      p.require_positive(prefix + "height_m", o->height_m);
    }
    p.require(std::isfinite(o->discharge_coefficient) && o->discharge_coefficient > 0.0 &&
                  o->discharge_coefficient <= 1.0,
              prefix + "discharge_coefficient", o->discharge_coefficient, "must be in (0, 1]");
  }
}

Riser::Riser(std::vector<Outlet> outlets, const std::string& element)
    : outlets_(std::move(outlets)) {
  ProblemList problems(element);
  if (outlets_.empty()) problems.add("outlets", "is empty: needs at least one outlet");
  for (std::size_t k = 0; k < outlets_.size(); ++k)
    validate_outlet(outlets_[k], "outlet " + std::to_string(k + 1) + " ", problems);
  problems.throw_if_any();
}

double Riser::discharge_m3s(double stage_m) const {
  double q = 0.0;
  for (const Outlet& o : outlets_)
    q += std::visit([stage_m](const auto& x) { return x.discharge_m3s(stage_m); }, o);
  return q;
}

double villemonte_factor(double head_up_m, double head_down_m, double exponent) {
  if (!(head_down_m > 0.0)) return 1.0;
  if (head_down_m >= head_up_m) return 0.0;
  return std::pow(1.0 - std::pow(head_down_m / head_up_m, exponent), 0.385);
}

}  // namespace freshet::network::structures

namespace freshet::network::structures {
namespace {

// integral over one straight crest segment of (h - z(x))^1.5 dx, exact (z linear in x).
double segment_head_integral(double length_m, double z_a, double z_b, double stage_m) {
  const double z_lo = std::min(z_a, z_b), z_hi = std::max(z_a, z_b);
  if (!(stage_m > z_lo)) return 0.0;
  if (z_hi - z_lo <= 1e-12 * std::max(1.0, std::abs(z_hi))) {
    const double head = stage_m - 0.5 * (z_lo + z_hi);
    return length_m * head * std::sqrt(head);
  }
  const double h_lo = stage_m - z_lo;
  const double h_hi = std::max(0.0, stage_m - z_hi);
  const double p_lo = h_lo * h_lo * std::sqrt(h_lo), p_hi = h_hi * h_hi * std::sqrt(h_hi);
  return length_m / (z_hi - z_lo) * 0.4 * (p_lo - p_hi);
}

}  // namespace

RoadOvertopping::RoadOvertopping(std::vector<double> station_m, std::vector<double> crest_stage_m,
                                 double coefficient_si, const std::string& element,
                                 std::optional<double> tailwater_stage_m)
    : station_m_(std::move(station_m)),
      crest_m_(std::move(crest_stage_m)),
      coefficient_si_(coefficient_si),
      tailwater_stage_m_(tailwater_stage_m) {
  ProblemList p(element);
  if (station_m_.size() != crest_m_.size())
    p.add("road_station_m", "has " + std::to_string(station_m_.size()) +
                                " values but road_crest_stage_m has " +
                                std::to_string(crest_m_.size()) + ": sizes must match");
  else if (station_m_.size() < 2)
    p.add("road_station_m", "has " + std::to_string(station_m_.size()) + " values: needs >= 2");
  for (std::size_t k = 0; k < std::min(station_m_.size(), crest_m_.size()); ++k) {
    const std::string at = "[" + std::to_string(k + 1) + "]";
    p.require_finite("road_station_m" + at, station_m_[k]);
    p.require_finite("road_crest_stage_m" + at, crest_m_[k]);
    if (k > 0 && std::isfinite(station_m_[k]) && std::isfinite(station_m_[k - 1]))
      p.require(station_m_[k] > station_m_[k - 1], "road_station_m" + at, station_m_[k],
                "stations must strictly increase");
  }
  p.require_positive("overtopping_coefficient", coefficient_si_);
  if (tailwater_stage_m_) p.require_finite("tailwater_stage_m", *tailwater_stage_m_);
  p.throw_if_any();
  lowest_crest_m_ = *std::min_element(crest_m_.begin(), crest_m_.end());
}

double RoadOvertopping::free_discharge_m3s(double stage_m) const {
  if (!(stage_m > lowest_crest_m_)) return 0.0;
  double sum = 0.0;
  for (std::size_t k = 0; k + 1 < station_m_.size(); ++k)
    sum += segment_head_integral(station_m_[k + 1] - station_m_[k], crest_m_[k], crest_m_[k + 1],
                                 stage_m);
  return coefficient_si_ * sum;
}

double RoadOvertopping::discharge_m3s(double stage_m) const {
  const double q = free_discharge_m3s(stage_m);
  if (!tailwater_stage_m_ || q == 0.0) return q;
  return q * villemonte_factor(stage_m - lowest_crest_m_, *tailwater_stage_m_ - lowest_crest_m_,
                               1.5);
}

double RoadOvertopping::overtopped_length_m(double stage_m) const {
  double length = 0.0;
  for (std::size_t k = 0; k + 1 < station_m_.size(); ++k) {
    const double z_a = crest_m_[k], z_b = crest_m_[k + 1], dx = station_m_[k + 1] - station_m_[k];
    if (stage_m >= std::max(z_a, z_b)) length += dx;
    else if (stage_m > std::min(z_a, z_b)) length += dx * (stage_m - std::min(z_a, z_b)) / std::abs(z_b - z_a);
  }
  return length;
}

}  // namespace freshet::network::structures
