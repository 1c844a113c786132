// Parameter validation, the section factory, the US customary edge, and the prismatic shapes
// (trapezoid, rectangle, triangle, unit-width sheet). Equations: docs/sections.md.
#include "freshet/geometry/cross_section.hpp"

#include <cmath>
#include <utility>

namespace freshet::geometry {

namespace {

constexpr std::array<std::pair<SectionShape, std::string_view>, 6> kShapeNames{{
    {SectionShape::rectangular, "rectangular"},
    {SectionShape::trapezoidal, "trapezoidal"},
    {SectionShape::triangular, "triangular"},
    {SectionShape::circular, "circular"},
    {SectionShape::irregular, "irregular"},
    {SectionShape::sheet, "sheet"},
}};

// R^(2/3) as cbrt(R^2): one cube root, no pow.
double two_thirds_power(double x) { return std::cbrt(x * x); }

void throw_if_invalid(const auto& spec, const std::string& element) {
  ProblemList problems(element);
  spec.validate(problems);
  problems.throw_if_any();
}

}  // namespace

std::string_view to_string(SectionShape shape) {
  for (const auto& [s, name] : kShapeNames) {
    if (s == shape) return name;
  }
  return "unknown";
}

std::optional<SectionShape> parse_section_shape(std::string_view text) {
  for (const auto& [s, name] : kShapeNames) {
    if (name == text) return s;
  }
  return std::nullopt;
}

// ---- CrossSection -------------------------------------------------------------------------

double CrossSection::hydraulic_radius_m(double depth_m) const noexcept {
  const double p = wetted_perimeter_m(depth_m);
  return p > 0.0 ? area_m2(depth_m) / p : 0.0;
}

double CrossSection::normal_discharge_m3s(double depth_m, double bed_slope) const noexcept {
  return conveyance_m3s(depth_m) * std::sqrt(bed_slope);
}

bool CrossSection::is_full(double area_m2_value) const noexcept {
  const auto crown = full_depth_m();
  if (!crown) return false;
  constexpr double kFullFraction = 1.0 - 1e-9;  // round-off margin for "reached full area"
  return area_m2_value >= kFullFraction * area_m2(*crown);
}

// ---- Specs --------------------------------------------------------------------------------

void RectangularSpec::validate(ProblemList& problems) const {
  problems.require_positive("bottom_width_m", bottom_width_m);
  problems.require_positive("manning_n", manning_n);
}

void TrapezoidalSpec::validate(ProblemList& problems) const {
  problems.require_non_negative("bottom_width_m", bottom_width_m);
  problems.require_non_negative("left_side_slope", left_side_slope);
  problems.require_non_negative("right_side_slope", right_side_slope);
  problems.require_positive("manning_n", manning_n);
  if (bottom_width_m == 0.0 && left_side_slope == 0.0 && right_side_slope == 0.0) {
    problems.add("bottom_width_m",
                 "= 0: must be > 0 when both side slopes are 0 (the section has no width)");
  }
}

void TriangularSpec::validate(ProblemList& problems) const {
  problems.require_non_negative("left_side_slope", left_side_slope);
  problems.require_non_negative("right_side_slope", right_side_slope);
  problems.require_positive("manning_n", manning_n);
  if (left_side_slope == 0.0 && right_side_slope == 0.0) {
    problems.add("left_side_slope", "= 0: at least one side slope must be > 0");
  }
}

void CircularSpec::validate(ProblemList& problems) const {
  problems.require_positive("diameter_m", diameter_m);
  problems.require_positive("manning_n", manning_n);
}

void SheetSpec::validate(ProblemList& problems) const {
  problems.require_positive("manning_n", manning_n);
}

std::shared_ptr<const CrossSection> make_section(const SectionSpec& spec, std::string element) {
  struct Builder {
    std::string& element;
    std::shared_ptr<const CrossSection> operator()(const RectangularSpec& s) const {
      return std::make_shared<RectangularSection>(s, element);
    }
    std::shared_ptr<const CrossSection> operator()(const TrapezoidalSpec& s) const {
      return std::make_shared<TrapezoidalSection>(s, element);
    }
    std::shared_ptr<const CrossSection> operator()(const TriangularSpec& s) const {
      return std::make_shared<TriangularSection>(s, element);
    }
    std::shared_ptr<const CrossSection> operator()(const CircularSpec& s) const {
      return std::make_shared<CircularSection>(s, element);
    }
    std::shared_ptr<const CrossSection> operator()(const IrregularSpec& s) const {
      return std::make_shared<IrregularSection>(s, element);
    }
    std::shared_ptr<const CrossSection> operator()(const SheetSpec& s) const {
      return std::make_shared<SheetSection>(s, element);
    }
  };
  return std::visit(Builder{element}, spec);
}

SectionSpec section_spec_to_si(SectionSpec spec, units::System system) {
  const auto len = [system](double& v) { v = units::length_to_m(v, system); };
  struct Converter {
    decltype(len)& to_m;
    void operator()(RectangularSpec& s) const { to_m(s.bottom_width_m); }
    void operator()(TrapezoidalSpec& s) const { to_m(s.bottom_width_m); }
    void operator()(TriangularSpec&) const {}
    void operator()(CircularSpec& s) const { to_m(s.diameter_m); }
    void operator()(IrregularSpec& s) const {
      for (auto& p : s.points) {
        to_m(p.station_m);
        to_m(p.elevation_m);
      }
      to_m(s.left_bank_station_m);
      to_m(s.right_bank_station_m);
    }
    void operator()(SheetSpec&) const {}
  };
  std::visit(Converter{len}, spec);
  return spec;
}

// ---- Trapezoid, rectangle, triangle -------------------------------------------------------

TrapezoidalSection::TrapezoidalSection(SectionShape shape, const TrapezoidalSpec& spec)
    : shape_(shape),
      b_(spec.bottom_width_m),
      z1_(spec.left_side_slope),
      z2_(spec.right_side_slope),
      n_(spec.manning_n),
      side_length_per_depth_(std::hypot(1.0, z1_) + std::hypot(1.0, z2_)) {}

TrapezoidalSection::TrapezoidalSection(const TrapezoidalSpec& spec, std::string element)
    : TrapezoidalSection((throw_if_invalid(spec, element), SectionShape::trapezoidal), spec) {}

RectangularSection::RectangularSection(const RectangularSpec& spec, std::string element)
    : TrapezoidalSection((throw_if_invalid(spec, element), SectionShape::rectangular),
                         TrapezoidalSpec{spec.bottom_width_m, 0.0, 0.0, spec.manning_n}) {}

TriangularSection::TriangularSection(const TriangularSpec& spec, std::string element)
    : TrapezoidalSection(
          (throw_if_invalid(spec, element), SectionShape::triangular),
          TrapezoidalSpec{0.0, spec.left_side_slope, spec.right_side_slope, spec.manning_n}) {}

double TrapezoidalSection::area_m2(double h) const noexcept {
  return h > 0.0 ? h * (b_ + 0.5 * (z1_ + z2_) * h) : 0.0;
}

double TrapezoidalSection::wetted_perimeter_m(double h) const noexcept {
  return h > 0.0 ? b_ + side_length_per_depth_ * h : 0.0;
}

double TrapezoidalSection::top_width_m(double h) const noexcept {
  return h > 0.0 ? b_ + (z1_ + z2_) * h : 0.0;
}

double TrapezoidalSection::conveyance_m3s(double h) const noexcept {
  if (h <= 0.0) return 0.0;
  const double a = area_m2(h);
  return a * two_thirds_power(a / wetted_perimeter_m(h)) / n_;
}

// dK/dh = K ((5/3) T / A - (2/3) (dP/dh) / P).
double TrapezoidalSection::conveyance_slope_m2s(double h) const noexcept {
  if (h <= 0.0) return 0.0;
  const double a = area_m2(h);
  const double p = wetted_perimeter_m(h);
  const double k = a * two_thirds_power(a / p) / n_;
  return k * ((5.0 / 3.0) * top_width_m(h) / a - (2.0 / 3.0) * side_length_per_depth_ / p);
}

// Positive root of (z1 + z2)/2 h^2 + b h - A = 0, written without cancellation so that it
// also holds for z1 + z2 = 0 (rectangle) and b = 0 (triangle).
double TrapezoidalSection::depth_from_area_m(double a) const noexcept {
  if (a <= 0.0) return 0.0;
  return 2.0 * a / (b_ + std::sqrt(b_ * b_ + 2.0 * (z1_ + z2_) * a));
}

double TrapezoidalSection::depth_scale_m() const noexcept {
  return b_ > 0.0 ? b_ : 1.0;
}

// ---- Unit-width sheet ---------------------------------------------------------------------

SheetSection::SheetSection(const SheetSpec& spec, std::string element)
    : n_((throw_if_invalid(spec, element), spec.manning_n)) {}

double SheetSection::area_m2(double h) const noexcept { return h > 0.0 ? h : 0.0; }
double SheetSection::wetted_perimeter_m(double h) const noexcept { return h > 0.0 ? 1.0 : 0.0; }
double SheetSection::top_width_m(double h) const noexcept { return h > 0.0 ? 1.0 : 0.0; }

double SheetSection::conveyance_m3s(double h) const noexcept {
  return h > 0.0 ? h * two_thirds_power(h) / n_ : 0.0;
}

double SheetSection::conveyance_slope_m2s(double h) const noexcept {
  return h > 0.0 ? (5.0 / 3.0) * two_thirds_power(h) / n_ : 0.0;
}

double SheetSection::depth_from_area_m(double a) const noexcept { return a > 0.0 ? a : 0.0; }

}  // namespace freshet::geometry
