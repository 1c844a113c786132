#include "freshet/network/structures/culvert.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <numbers>

#include "bracketed_solve.hpp"
#include "freshet/core/converged_root.hpp"
#include "freshet/core/error.hpp"
#include "freshet/core/units.hpp"

namespace freshet::network::structures {
namespace {

constexpr double kG = units::kGravity_m_s2;
constexpr double kInf = std::numeric_limits<double>::infinity();

struct InletRow {
  InletType type;
  std::string_view name;
  InletCoefficients coef;
};

// HDS-5 (2012) Appendix A, Table A.1 (form, K, M, c, Y, K_s). The values were written from
// memory and then matched, entry by entry, against a third-party reproduction of Table A.1
// (tbn2net.com, "Inlet Control Coefficients"); the HDS-5 original was not at hand.
// k_e: HDS-5 (2012) Appendix C, Table C.2 entrance-loss coefficients, from memory.
constexpr BarrelShape kC = BarrelShape::circular;
constexpr BarrelShape kB = BarrelShape::box;
constexpr std::array<InletRow, 9> kInletTable{{
    {InletType::concrete_square_edge_headwall, "concrete-square-edge-headwall",
     {kC, 1, 0.0098, 2.0, 0.0398, 0.67, -0.5, 0.5}},
    {InletType::concrete_groove_end_headwall, "concrete-groove-end-headwall",
     {kC, 1, 0.0018, 2.0, 0.0292, 0.74, -0.5, 0.2}},
    {InletType::concrete_groove_end_projecting, "concrete-groove-end-projecting",
     {kC, 1, 0.0045, 2.0, 0.0317, 0.69, -0.5, 0.2}},
    {InletType::corrugated_metal_headwall, "corrugated-metal-headwall",
     {kC, 1, 0.0078, 2.0, 0.0379, 0.69, -0.5, 0.5}},
    {InletType::corrugated_metal_mitered, "corrugated-metal-mitered",
     {kC, 1, 0.0210, 1.33, 0.0463, 0.75, 0.7, 0.7}},
    {InletType::corrugated_metal_projecting, "corrugated-metal-projecting",
     {kC, 1, 0.0340, 1.50, 0.0553, 0.54, -0.5, 0.9}},
    {InletType::box_wingwall_30_to_75_deg, "box-wingwall-30-to-75-deg",
     {kB, 1, 0.026, 1.0, 0.0347, 0.81, -0.5, 0.4}},
    {InletType::box_wingwall_90_or_15_deg, "box-wingwall-90-or-15-deg",
     {kB, 1, 0.061, 0.75, 0.0400, 0.80, -0.5, 0.5}},
    {InletType::box_wingwall_0_deg, "box-wingwall-0-deg",
     {kB, 1, 0.061, 0.75, 0.0423, 0.82, -0.5, 0.7}},
}};

const InletRow& row_for(InletType t) {
  for (const InletRow& r : kInletTable)
    if (r.type == t) return r;
  FRESHET_ASSERT(false, "every InletType has a table row");
  return kInletTable.front();
}

// Circular segment at depth y: central angle theta = 2 acos(1 - 2y/D).
double segment_angle(double y, double d) {
  return 2.0 * std::acos(std::clamp(1.0 - 2.0 * y / d, -1.0, 1.0));
}

}  // namespace

InletCoefficients inlet_coefficients(InletType inlet) { return row_for(inlet).coef; }
std::string_view to_string(InletType inlet) { return row_for(inlet).name; }

std::optional<InletType> parse_inlet_type(std::string_view text) {
  for (const InletRow& r : kInletTable)
    if (r.name == text) return r.type;
  return std::nullopt;
}

std::string_view to_string(Control control) {
  return control == Control::inlet ? "inlet" : "outlet";
}

Culvert::Culvert(CulvertSpec spec, const std::string& element)
    : spec_(std::move(spec)), coef_(inlet_coefficients(spec_.inlet)), element_(element) {
  ProblemList p(element);
  p.require_positive("rise_m", spec_.rise_m);
  if (spec_.shape == BarrelShape::box) p.require_positive("span_m", spec_.span_m);
  p.require(spec_.barrel_count >= 1, "barrel_count", spec_.barrel_count, "must be >= 1");
  p.require_positive("length_m", spec_.length_m);
  p.require_finite("inlet_invert_stage_m", spec_.inlet_invert_stage_m);
  p.require_finite("outlet_invert_stage_m", spec_.outlet_invert_stage_m);
  p.require_positive("manning_n", spec_.manning_n);
  if (spec_.entrance_loss) p.require_non_negative("entrance_loss", *spec_.entrance_loss);
  if (coef_.shape != spec_.shape)
    p.add("inlet", "= " + std::string(to_string(spec_.inlet)) +
                       ": inlet type is for the other barrel shape");
  p.throw_if_any();
  if (spec_.entrance_loss) coef_.entrance_loss = *spec_.entrance_loss;
  slope_ = (spec_.inlet_invert_stage_m - spec_.outlet_invert_stage_m) / spec_.length_m;
  const double d = spec_.rise_m;
  if (spec_.shape == BarrelShape::circular) {
    full_area_m2_ = 0.25 * std::numbers::pi * d * d;
    full_radius_m_ = 0.25 * d;
  } else {
    full_area_m2_ = spec_.span_m * d;
    full_radius_m_ = full_area_m2_ / (2.0 * (spec_.span_m + d));
  }
  // Largest part-full Manning discharge: golden-section search on the unimodal A R^(2/3).
  if (spec_.shape == BarrelShape::box) {
    max_part_full_depth_m_ = d;
  } else {
    double a = 0.5 * d, b = d;
    const double r = 0.5 * (std::sqrt(5.0) - 1.0);
    auto conveyance = [&](double y) {
      const double area = flow_area_m2(y);
      return area * std::cbrt(std::pow(area / wetted_perimeter_m(y), 2.0));
    };
    for (int it = 0; it < 100; ++it) {
      const double x1 = b - r * (b - a), x2 = a + r * (b - a);
      if (conveyance(x1) < conveyance(x2)) a = x1; else b = x2;
    }
    max_part_full_depth_m_ = 0.5 * (a + b);
  }
}

double Culvert::flow_area_m2(double y) const {
  const double d = spec_.rise_m;
  y = std::clamp(y, 0.0, d);
  if (spec_.shape == BarrelShape::box) return spec_.span_m * y;
  const double th = segment_angle(y, d);
  return d * d / 8.0 * (th - std::sin(th));
}

double Culvert::top_width_m(double y) const {
  const double d = spec_.rise_m;
  if (spec_.shape == BarrelShape::box) return spec_.span_m;
  y = std::clamp(y, 0.0, d);
  return 2.0 * std::sqrt(y * (d - y));
}

double Culvert::wetted_perimeter_m(double y) const {
  const double d = spec_.rise_m;
  y = std::clamp(y, 0.0, d);
  if (spec_.shape == BarrelShape::box) return spec_.span_m + 2.0 * y;
  return 0.5 * d * segment_angle(y, d);
}

double Culvert::critical_depth_m(double q) const {
  const double d = spec_.rise_m;
  if (!(q > 0.0)) return 0.0;
  if (spec_.shape == BarrelShape::box)
    return std::min(d, std::cbrt(q * q / (kG * spec_.span_m * spec_.span_m)));
  // Critical discharge Q_c(y) = A sqrt(g A / T) increases from 0 to infinity on (0, D).
  auto critical_q = [&](double y) {
    const double a = flow_area_m2(y), t = top_width_m(y);
    if (!(a > 0.0)) return 0.0;
    return t > 0.0 ? a * std::sqrt(kG * a / t) : kInf;
  };
  const double y_top = d * (1.0 - 1e-9);
  if (critical_q(y_top) <= q) return d;
  const RootResult r = detail::solve_monotone([&](double y) { return critical_q(y) - q; }, 0.0,
                                              y_top);
  return converged_root(r, element_, "critical depth (m)",
                        [&] { return "barrel discharge " + format_value(q) + " m3/s"; });
}

double Culvert::manning_discharge_m3s(double y) const {
  const double a = flow_area_m2(y);
  if (!(a > 0.0) || !(slope_ > 0.0)) return 0.0;
  const double r = a / wetted_perimeter_m(y);
  return a * std::cbrt(r * r) * std::sqrt(slope_) / spec_.manning_n;
}

double Culvert::normal_depth_m(double q) const {
  if (!(q > 0.0)) return 0.0;
  if (!(slope_ > 0.0) || manning_discharge_m3s(max_part_full_depth_m_) < q) return kInf;
  const RootResult r = detail::solve_monotone(
      [&](double y) { return manning_discharge_m3s(y) - q; }, 0.0, max_part_full_depth_m_);
  return converged_root(r, element_, "normal depth (m)",
                        [&] { return "barrel discharge " + format_value(q) + " m3/s"; });
}

}  // namespace freshet::network::structures
