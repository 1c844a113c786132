// Manning flux laws Q(A) for kinematic-wave routing, built from a cross-section and a bed slope.
//
// Each law satisfies freshet::geometry::FluxLaw (flux_law.hpp): pure and const
//   discharge_m3s(A)          Q = K(h(A)) sqrt(S0)          (Manning, SI, k = 1)
//   celerity_m_s(A)           c = dQ/dA = sqrt(S0) (dK/dh) / T   (kinematic wave speed,
//                             Lighthill & Whitham 1955, Proc. R. Soc. A 229, eq. 8)
//   area_for_discharge_m2(Q)  the inverse of Q(A)
// Q(A) and c(A) of the fast laws are noexcept. An inversion that iterates and does not converge
// (a discharge beyond the double range, for instance) throws NumericalError naming the element,
// the quantity and the discharge (freshet/core/converged_root.hpp), never a silent NaN; so do
// ManningFlux's Q and c, which invert the section's depth.
// Laws:
//   RectangularFlux, TrapezoidalFlux   closed forms (depth from area by the quadratic);
//   PowerLawFlux (flux_law.hpp)        triangles (Q ~ A^(4/3)) and unit-width sheets (~ A^(5/3));
//   TabulatedFlux                      circular conduits and surveyed sections: Q(A) tabulated
//                                      once on a fine monotone table, so no geometry is solved
//                                      in a routing loop;
//   ManningFlux                        the exact law evaluated through any CrossSection (virtual
//                                      calls and a depth iteration per call: reference and
//                                      tests, not inner loops).
// SectionFlux is a std::variant of the fast laws. Choose once per reach, outside hot loops:
//
//   FlowSection reach = make_flow_section(TrapezoidalSpec{3.0, 2.0, 2.0, 0.03}, 0.002);
//   visit_flux(reach.flux, [&](const auto& law) { scheme.advance(law, state); });  // one dispatch
//   double depth = reach.depth_m(area);                      // for stage / velocity output
//
// Closed conduits (circular): with constant n, Q(A) of a part-full pipe is not monotone: it
// peaks at h/D = 0.938, at 1.076 times the full-pipe discharge, then falls towards the crown.
// A kinematic wave needs a non-decreasing Q(A), so freshet holds Q at that peak for all larger
// areas (the capacity cap): above capacity_area_m2() the discharge is max_discharge_m3s() and
// the celerity is 0, so extra inflow is stored, not conveyed. Routing should count areas at or
// above capacity_area_m2() as "conduit at capacity" and CrossSection::is_full(A) as surcharge,
// which a kinematic wave cannot represent. area_for_discharge_m2(Q) with Q above the cap
// returns capacity_area_m2() (callers check max_discharge_m3s() first). docs/sections.md.
#pragma once

#include <cstddef>
#include <limits>
#include <memory>
#include <optional>
#include <string>
#include <utility>
#include <variant>
#include <vector>

#include "freshet/core/error.hpp"
#include "freshet/core/fast_cbrt.hpp"
#include "freshet/geometry/cross_section.hpp"
#include "freshet/geometry/flux_law.hpp"

namespace freshet::geometry {

inline constexpr double kNoDischargeLimit_m3s = std::numeric_limits<double>::infinity();
inline constexpr double kNoCapacityArea_m2 = std::numeric_limits<double>::infinity();

// Q = (sqrt(S0)/n) A^(5/3) / (b + 2 A / b)^(2/3).
// `element` names the law in messages, e.g. "reach 'upper'".
class RectangularFlux {
 public:
  RectangularFlux(double bottom_width_m, double manning_n, double bed_slope,
                  std::string element = "rectangular channel");
  [[nodiscard]] double discharge_m3s(double area_m2) const noexcept;
  [[nodiscard]] double celerity_m_s(double area_m2) const noexcept;
  [[nodiscard]] double area_for_discharge_m2(double discharge_m3s) const;

 private:
  double b_;
  double coefficient_;  // sqrt(S0) / n
  std::shared_ptr<const std::string> element_;
};

// h = 2 A / (b + sqrt(b^2 + 2 (z1 + z2) A)),  P = b + h (sqrt(1+z1^2) + sqrt(1+z2^2)),
// Q = (sqrt(S0)/n) A (A/P)^(2/3). Holds for b = 0 (triangle) and z1 = z2 = 0 (rectangle).
class TrapezoidalFlux {
 public:
  TrapezoidalFlux(double bottom_width_m, double left_side_slope, double right_side_slope,
                  double manning_n, double bed_slope,
                  std::string element = "trapezoidal channel");
  [[nodiscard]] double discharge_m3s(double area_m2) const noexcept;
  [[nodiscard]] double celerity_m_s(double area_m2) const noexcept;
  [[nodiscard]] double area_for_discharge_m2(double discharge_m3s) const;

 private:
  double b_, z_sum_, side_length_per_depth_;
  double coefficient_;  // sqrt(S0) / n
  std::shared_ptr<const std::string> element_;
};

// The closed-form laws are evaluated in every cell of every step: defined here so that the
// schemes' cell loops inline them, with the cube root of freshet/core/fast_cbrt.hpp
// ((A/P)^(2/3) = cbrt((A/P)^2); within 1 ulp of the exact root).
inline double RectangularFlux::discharge_m3s(double a) const noexcept {
  if (!(a > 0.0)) return 0.0;
  const double r = a / (b_ + 2.0 * a / b_);
  return coefficient_ * a * cbrt_fast(r * r);
}

// c = Q ((5/3)/A - (2/3) (dP/dA) / P), dP/dA = 2 / b.
inline double RectangularFlux::celerity_m_s(double a) const noexcept {
  if (!(a > 0.0)) return 0.0;
  const double p = b_ + 2.0 * a / b_;
  const double r = a / p;
  const double q = coefficient_ * a * cbrt_fast(r * r);
  return q * ((5.0 / 3.0) / a - (4.0 / 3.0) / (b_ * p));
}

inline double TrapezoidalFlux::discharge_m3s(double a) const noexcept {
  if (!(a > 0.0)) return 0.0;
  const double h = 2.0 * a / (b_ + std::sqrt(b_ * b_ + 2.0 * z_sum_ * a));
  const double r = a / (b_ + side_length_per_depth_ * h);
  return coefficient_ * a * cbrt_fast(r * r);
}

// c = Q ((5/3)/A - (2/3) (dP/dh) / (P T)), T = b + (z1 + z2) h.
inline double TrapezoidalFlux::celerity_m_s(double a) const noexcept {
  if (!(a > 0.0)) return 0.0;
  const double root = std::sqrt(b_ * b_ + 2.0 * z_sum_ * a);  // = T
  const double h = 2.0 * a / (b_ + root);
  const double p = b_ + side_length_per_depth_ * h;
  const double r = a / p;
  const double q = coefficient_ * a * cbrt_fast(r * r);
  return q * ((5.0 / 3.0) / a - (2.0 / 3.0) * side_length_per_depth_ / (p * root));
}

// Triangle of side slopes z1, z2: Q = alpha A^(4/3), alpha = (sqrt(S0)/n) ((z1+z2)/2)^(1/3) /
// (sqrt(1+z1^2) + sqrt(1+z2^2))^(2/3).
PowerLawFlux make_triangular_flux(double left_side_slope, double right_side_slope,
                                  double manning_n, double bed_slope);
// Unit-width sheet: q = (sqrt(S0)/n) h^(5/3), with A = h.
PowerLawFlux make_sheet_flux(double manning_n, double bed_slope);

// Table options for TabulatedFlux. The defaults hold the table within about 1e-8 of the exact
// Q and 1e-6 of the exact c (relative to the mean velocity) at every interval midpoint.
struct TableOptions {
  double top_depth_m = 0.0;             // deepest node (m); 0 = automatic: 3 x the section's
                                        // depth scale (open), the capacity depth (conduits)
  double bottom_depth_ratio = 1e-6;     // shallowest node as a fraction of the top depth
  int nodes_per_decade = 32;            // initial geometric depth spacing between the two
  double discharge_tolerance = 1e-8;    // refine while |Q_table / Q - 1| exceeds this ...
  double celerity_tolerance = 1e-6;     // ... or |c_table - c| / (Q / A) exceeds this
  int max_nodes = 4000;                 // refinement stops at this many nodes
  void validate(ProblemList& problems) const;
};

// Q(A) on a table of depths h_j, interpolated as a monotone cubic Hermite curve in
// (ln A, ln Q) with slopes d ln Q / d ln A = c A / Q from the exact law on each side of every
// node, limited after Fritsch & Carlson (1980, SIAM J. Numer. Anal. 17(2), 238-246) so that the
// curve never decreases. Nodes: a geometric depth grid (refined towards the bed) plus every
// corner of the geometry, then intervals are halved until the table meets the tolerances at
// their midpoints. The celerity is the exact derivative of the curve, so Q and c are
// consistent. Below the first node and above the last, Q is the power law through the end node
// with the end slope (exact where the shape is a power law). Any drop of the exact Q (a
// conveyance that falls as a flat bench inside one subsection floods) is replaced by its running
// maximum and counted in monotone_corrections(). Copies share the table (immutable).
class TabulatedFlux {
 public:
  // Throws InputError naming `element` (field "section") when the section's table cannot be
  // built from finite values: every node's area and discharge finite and > 0, areas strictly
  // increasing, slopes finite.
  static TabulatedFlux from_section(const CrossSection& section, double bed_slope,
                                    const TableOptions& options = {},
                                    const std::string& element = "cross-section");

  [[nodiscard]] double discharge_m3s(double area_m2) const noexcept;
  [[nodiscard]] double celerity_m_s(double area_m2) const noexcept;
  [[nodiscard]] double area_for_discharge_m2(double discharge_m3s) const;

  // Closed conduits: the area where Q reaches its cap, and the cap. Open: infinity.
  [[nodiscard]] double capacity_area_m2() const noexcept { return data_->capacity_area_m2; }
  [[nodiscard]] double max_discharge_m3s() const noexcept { return data_->max_discharge_m3s; }
  [[nodiscard]] std::size_t node_count() const noexcept { return data_->log_area.size(); }
  [[nodiscard]] int monotone_corrections() const noexcept { return data_->monotone_corrections; }

  struct Data {
    std::vector<double> log_area, log_q;         // nodes
    std::vector<double> slope_start, slope_end;  // per interval: d ln Q / d ln A at its ends
    double exponent_below = 1.0, exponent_above = 1.0;
    double capacity_area_m2 = kNoCapacityArea_m2;
    double max_discharge_m3s = kNoDischargeLimit_m3s;
    int monotone_corrections = 0;
    std::string element = "cross-section";  // for messages
  };

 private:
  explicit TabulatedFlux(std::shared_ptr<const Data> data) : data_(std::move(data)) {}
  struct LogEval {
    double log_q;
    double dlogq_dloga;
  };
  [[nodiscard]] LogEval evaluate(double log_area) const noexcept;

  std::shared_ptr<const Data> data_;
};

// The exact law through any section, with the closed-conduit cap described above.
class ManningFlux {
 public:
  ManningFlux(std::shared_ptr<const CrossSection> section, double bed_slope,
              std::string element = "cross-section");
  [[nodiscard]] double discharge_m3s(double area_m2) const;
  [[nodiscard]] double celerity_m_s(double area_m2) const;
  [[nodiscard]] double area_for_discharge_m2(double discharge_m3s) const;
  [[nodiscard]] double capacity_area_m2() const noexcept { return capacity_area_m2_; }
  [[nodiscard]] double max_discharge_m3s() const noexcept { return max_discharge_m3s_; }

 private:
  std::shared_ptr<const CrossSection> section_;
  double sqrt_slope_;
  double capacity_depth_m_, capacity_area_m2_, max_discharge_m3s_;
  std::string element_;
};

static_assert(FluxLaw<RectangularFlux>);
static_assert(FluxLaw<TrapezoidalFlux>);
static_assert(FluxLaw<TabulatedFlux>);
static_assert(FluxLaw<ManningFlux>);

using SectionFlux = std::variant<RectangularFlux, TrapezoidalFlux, PowerLawFlux, TabulatedFlux>;

// Calls fn(law) with the concrete law; do this once per reach, outside inner loops.
template <class Fn>
decltype(auto) visit_flux(const SectionFlux& flux, Fn&& fn) {
  return std::visit(std::forward<Fn>(fn), flux);
}

// The fast law for a section: closed forms for rectangles, trapezoids, triangles and sheets,
// a table for circular and irregular sections. Raises InputError for a bed slope that is not
// finite and > 0, or bad table options.
SectionFlux make_section_flux(const CrossSection& section, double bed_slope,
                              const TableOptions& options = {},
                              std::string element = "cross-section");

// Convenience (one dispatch per call; not for inner loops).
double discharge_m3s(const SectionFlux& flux, double area_m2) noexcept;
double celerity_m_s(const SectionFlux& flux, double area_m2) noexcept;
double area_for_discharge_m2(const SectionFlux& flux, double discharge_m3s);
double max_discharge_m3s(const SectionFlux& flux) noexcept;  // infinity for open sections
double capacity_area_m2(const SectionFlux& flux) noexcept;   // infinity for open sections

// Normal (uniform-flow) depth: the h with K(h) sqrt(S0) = Q (m). For a closed conduit, the
// depth on the rising branch (h <= capacity depth); nullopt when Q exceeds the capacity.
// A depth it brackets but cannot converge to is a NumericalError naming `element`.
std::optional<double> normal_depth_m(const CrossSection& section, double bed_slope,
                                     double discharge_m3s,
                                     const std::string& element = "cross-section");

// A reach's section and flux law together, for routing (flux) and output (depth, velocity).
struct FlowSection {
  std::shared_ptr<const CrossSection> section;
  SectionFlux flux;
  double bed_slope = 0.0;

  // NumericalError when the section's inversion fails (cross_section.hpp).
  [[nodiscard]] double depth_m(double area_m2) const {
    return section->depth_from_area_m(area_m2);
  }
  [[nodiscard]] double top_width_m(double area_m2) const {
    return section->top_width_m(depth_m(area_m2));
  }
  // Mean velocity Q / A (m/s); 0 when dry.
  [[nodiscard]] double velocity_m_s(double area_m2) const noexcept;
  [[nodiscard]] bool at_capacity(double area_m2) const noexcept {
    return area_m2 >= capacity_area_m2(flux);
  }
  [[nodiscard]] bool is_full(double area_m2) const noexcept { return section->is_full(area_m2); }
};

// Validates spec, slope and options together (all problems in one InputError), then builds.
FlowSection make_flow_section(const SectionSpec& spec, double bed_slope,
                              const TableOptions& options = {},
                              std::string element = "cross-section");

}  // namespace freshet::geometry
