// Closed-form Manning flux laws, the exact ManningFlux, normal depth and the factories.
// Manning's equation in SI (k = 1): Q = (1/n) A R^(2/3) sqrt(S0) (Chow 1959, eq. 5-6);
// celerity c = dQ/dA (Lighthill & Whitham 1955).
#include "freshet/geometry/section_flux.hpp"

#include <cmath>

#include "freshet/core/converged_root.hpp"
#include "freshet/core/root_finding.hpp"

namespace freshet::geometry {

namespace {

// Inverts a non-decreasing law with Q(0) = 0: bracket [0, hi] from `start`, then rtsafe.
// No bracket (Q overflows before it reaches q, or q is infinite) or no convergence is a
// NumericalError naming `element`.
template <class Law>
double invert_discharge(const Law& law, double q, double start, const std::string& element) {
  if (!(q > 0.0)) return 0.0;
  const double hi =
      expand_upper_bracket([&](double a) { return law.discharge_m3s(a); }, q, start);
  auto fdf = [&](double a, double& f, double& df) {
    f = law.discharge_m3s(a) - q;
    df = law.celerity_m_s(a);
  };
  RootResult r = std::isfinite(hi) ? solve_bracketed_newton(fdf, 0.0, hi) : RootResult{};
  if (!r.converged && std::isfinite(hi)) {  // a tiny discharge: bracket the area closely
    double top = hi;
    const double lo =
        tighten_bracket_below([&](double a) { return law.discharge_m3s(a); }, q, top);
    r = solve_bracketed_newton(fdf, lo, top);
  }
  return converged_root(r, element, "area for discharge (m2)",
                        [q] { return "discharge " + format_value(q) + " m3/s"; });
}

void require_slope(ProblemList& problems, double bed_slope) {
  problems.require_positive("bed_slope", bed_slope);
}

void throw_if_bad_slope(double bed_slope, const std::string& element) {
  ProblemList problems(element);
  require_slope(problems, bed_slope);
  problems.throw_if_any();
}

}  // namespace

// ---- Rectangle ----------------------------------------------------------------------------

RectangularFlux::RectangularFlux(double bottom_width_m, double manning_n, double bed_slope,
                                 std::string element)
    : b_(bottom_width_m),
      coefficient_(std::sqrt(bed_slope) / manning_n),
      element_(std::make_shared<const std::string>(std::move(element))) {}

double RectangularFlux::area_for_discharge_m2(double q) const {
  // Start from the wide-channel area b (q n / (b sqrt S))^(3/5), which conveys at most q.
  const double start = b_ * std::pow(q / (coefficient_ * b_), 0.6);
  return invert_discharge(*this, q, start > 0.0 ? start : b_, *element_);
}

// ---- Trapezoid ----------------------------------------------------------------------------

TrapezoidalFlux::TrapezoidalFlux(double bottom_width_m, double left_side_slope,
                                 double right_side_slope, double manning_n, double bed_slope,
                                 std::string element)
    : b_(bottom_width_m),
      z_sum_(left_side_slope + right_side_slope),
      side_length_per_depth_(std::hypot(1.0, left_side_slope) + std::hypot(1.0, right_side_slope)),
      coefficient_(std::sqrt(bed_slope) / manning_n),
      element_(std::make_shared<const std::string>(std::move(element))) {}

double TrapezoidalFlux::area_for_discharge_m2(double q) const {
  const double scale = b_ > 0.0 ? b_ : 1.0;
  const double start = scale * std::pow(q / (coefficient_ * scale), 0.6);
  return invert_discharge(*this, q, start > 0.0 ? start : scale, *element_);
}

// ---- Power laws ---------------------------------------------------------------------------

PowerLawFlux make_triangular_flux(double left_side_slope, double right_side_slope,
                                  double manning_n, double bed_slope) {
  const double z_sum = left_side_slope + right_side_slope;
  const double s = std::hypot(1.0, left_side_slope) + std::hypot(1.0, right_side_slope);
  const double alpha = std::sqrt(bed_slope) / manning_n * std::cbrt(0.5 * z_sum) /
                       std::cbrt(s * s);
  return PowerLawFlux(alpha, 4.0 / 3.0);
}

PowerLawFlux make_sheet_flux(double manning_n, double bed_slope) {
  return PowerLawFlux(std::sqrt(bed_slope) / manning_n, 5.0 / 3.0);
}

// ---- Exact law through a section ----------------------------------------------------------

ManningFlux::ManningFlux(std::shared_ptr<const CrossSection> section, double bed_slope,
                         std::string element)
    : section_((throw_if_bad_slope(bed_slope, element), std::move(section))),
      sqrt_slope_(std::sqrt(bed_slope)),
      capacity_depth_m_(section_->capacity_depth_m()),
      capacity_area_m2_(std::isfinite(capacity_depth_m_) ? section_->area_m2(capacity_depth_m_)
                                                         : kNoCapacityArea_m2),
      max_discharge_m3s_(std::isfinite(capacity_depth_m_)
                             ? sqrt_slope_ * section_->conveyance_m3s(capacity_depth_m_)
                             : kNoDischargeLimit_m3s),
      element_(std::move(element)) {}

double ManningFlux::discharge_m3s(double a) const {
  if (!(a > 0.0)) return 0.0;
  if (a >= capacity_area_m2_) return max_discharge_m3s_;
  return sqrt_slope_ * section_->conveyance_m3s(section_->depth_from_area_m(a));
}

double ManningFlux::celerity_m_s(double a) const {
  if (!(a > 0.0) || a >= capacity_area_m2_) return 0.0;
  const double h = section_->depth_from_area_m(a);
  const double t = section_->top_width_m(h);
  return t > 0.0 ? sqrt_slope_ * section_->conveyance_slope_m2s(h) / t : 0.0;
}

double ManningFlux::area_for_discharge_m2(double q) const {
  if (!(q > 0.0)) return 0.0;
  if (q >= max_discharge_m3s_) return capacity_area_m2_;
  const auto h = normal_depth_m(*section_, sqrt_slope_ * sqrt_slope_, q, element_);
  return h ? section_->area_m2(*h) : capacity_area_m2_;
}

std::optional<double> normal_depth_m(const CrossSection& section, double bed_slope,
                                     double discharge, const std::string& element) {
  if (!(discharge > 0.0)) return 0.0;
  const double k_target = discharge / std::sqrt(bed_slope);
  double hi = section.capacity_depth_m();
  if (std::isfinite(hi)) {
    if (k_target > section.conveyance_m3s(hi)) return std::nullopt;
  } else {
    hi = expand_upper_bracket([&](double h) { return section.conveyance_m3s(h); }, k_target,
                              section.depth_scale_m());
    if (!std::isfinite(hi)) return std::nullopt;
  }
  auto fdf = [&](double h, double& f, double& df) {
    f = section.conveyance_m3s(h) - k_target;
    df = section.conveyance_slope_m2s(h);
  };
  RootResult r = solve_bracketed_newton(fdf, 0.0, hi);
  if (!r.converged) {  // a tiny discharge: bracket the depth closely (root_finding.hpp)
    const double lo = tighten_bracket_below(
        [&](double h) { return section.conveyance_m3s(h); }, k_target, hi);
    r = solve_bracketed_newton(fdf, lo, hi);
  }
  return converged_root(r, element, "normal depth (m)", [&] {
    return "discharge " + format_value(discharge) + " m3/s";
  });
}

// ---- Factories ----------------------------------------------------------------------------

namespace {

SectionFlux closed_form_or_table(const CrossSection& section, double s,
                                 const TableOptions& options, const std::string& element) {
  switch (section.shape()) {
    case SectionShape::rectangular: {
      const auto& r = static_cast<const TrapezoidalSection&>(section);
      return RectangularFlux(r.bottom_width_m(), r.manning_n(), s, element);
    }
    case SectionShape::trapezoidal: {
      const auto& t = static_cast<const TrapezoidalSection&>(section);
      return TrapezoidalFlux(t.bottom_width_m(), t.left_side_slope(), t.right_side_slope(),
                             t.manning_n(), s, element);
    }
    case SectionShape::triangular: {
      const auto& t = static_cast<const TrapezoidalSection&>(section);
      return make_triangular_flux(t.left_side_slope(), t.right_side_slope(), t.manning_n(), s);
    }
    case SectionShape::sheet:
      return make_sheet_flux(static_cast<const SheetSection&>(section).manning_n(), s);
    case SectionShape::circular:
    case SectionShape::irregular:
      break;
  }
  return TabulatedFlux::from_section(section, s, options, element);
}

}  // namespace

SectionFlux make_section_flux(const CrossSection& section, double bed_slope,
                              const TableOptions& options, std::string element) {
  ProblemList problems(element);
  require_slope(problems, bed_slope);
  options.validate(problems);
  problems.throw_if_any();
  return closed_form_or_table(section, bed_slope, options, element);
}

FlowSection make_flow_section(const SectionSpec& spec, double bed_slope,
                              const TableOptions& options, std::string element) {
  ProblemList problems(element);
  std::visit([&](const auto& s) { s.validate(problems); }, spec);
  require_slope(problems, bed_slope);
  options.validate(problems);
  problems.throw_if_any();
  auto section = make_section(spec, element);
  SectionFlux flux = closed_form_or_table(*section, bed_slope, options, element);
  return FlowSection{std::move(section), std::move(flux), bed_slope};
}

double FlowSection::velocity_m_s(double area_m2) const noexcept {
  return area_m2 > 0.0 ? geometry::discharge_m3s(flux, area_m2) / area_m2 : 0.0;
}

// ---- Convenience dispatch -----------------------------------------------------------------

double discharge_m3s(const SectionFlux& flux, double a) noexcept {
  return visit_flux(flux, [a](const auto& law) { return law.discharge_m3s(a); });
}

double celerity_m_s(const SectionFlux& flux, double a) noexcept {
  return visit_flux(flux, [a](const auto& law) { return law.celerity_m_s(a); });
}

double area_for_discharge_m2(const SectionFlux& flux, double q) {
  return visit_flux(flux, [q](const auto& law) { return law.area_for_discharge_m2(q); });
}

double max_discharge_m3s(const SectionFlux& flux) noexcept {
  const auto* table = std::get_if<TabulatedFlux>(&flux);
  return table ? table->max_discharge_m3s() : kNoDischargeLimit_m3s;
}

double capacity_area_m2(const SectionFlux& flux) noexcept {
  const auto* table = std::get_if<TabulatedFlux>(&flux);
  return table ? table->capacity_area_m2() : kNoCapacityArea_m2;
}

}  // namespace freshet::geometry
