// Cross-sections of channels, conduits and overland planes, as functions of flow depth.
//
// A CrossSection answers the hydraulic questions a kinematic-wave model asks of a shape: for a
// depth h (m, measured from the lowest point of the section) it gives the flow area A (m2), the
// wetted perimeter P (m), the top width T (m), the hydraulic radius R = A / P (m) and Manning's
// conveyance K (m3/s), so that uniform-flow discharge is Q = K sqrt(S0). Everything is SI with
// Manning's unit factor k = 1:
//
//   K(h) = A R^(2/3) / n                      (Chow 1959, Open-Channel Hydraulics, eq. 6-8)
//
// For a surveyed (irregular) section K is the sum of the conveyances of the left overbank, the
// main channel and the right overbank, each with its own n (Chow 1959, sec. 6-8). Shapes:
//   rectangular, trapezoidal (two side slopes), triangular (two side slopes), circular conduit
//   flowing part full, irregular surveyed section, unit-width sheet for overland planes.
// The inverse depth_from_area_m(A) is closed-form for the prismatic shapes and a safeguarded
// Newton iteration otherwise. docs/sections.md gives every equation.
//
// Build sections from a SectionSpec (plain parameters, validated as a whole; bad input raises
// freshet::InputError naming field and value) or construct a concrete class directly:
//
//   auto s = make_section(TrapezoidalSpec{.bottom_width_m = 6.0, .left_side_slope = 2.0,
//                                         .right_side_slope = 2.0, .manning_n = 0.025});
//   double a = s->area_m2(1.2);                  // 10.08 m2
//   double q = s->conveyance_m3s(1.2) * std::sqrt(0.001);
//
// Lengths given in feet are converted once with section_spec_to_si (see units.hpp).
#pragma once

#include <array>
#include <limits>
#include <memory>
#include <optional>
#include <string>
#include <string_view>
#include <variant>
#include <vector>

#include "freshet/core/error.hpp"
#include "freshet/core/units.hpp"

namespace freshet::geometry {

enum class SectionShape { rectangular, trapezoidal, triangular, circular, irregular, sheet };

std::string_view to_string(SectionShape shape);
// "rectangular", "trapezoidal", "triangular", "circular", "irregular", "sheet"; nullopt otherwise.
std::optional<SectionShape> parse_section_shape(std::string_view text);

inline constexpr double kInfiniteDepth_m = std::numeric_limits<double>::infinity();

// The interface. All members are pure, and all but depth_from_area_m are noexcept; a depth
// <= 0 gives zero area, perimeter and conveyance. Depths above the top of a closed conduit are
// treated as the full depth. depth_from_area_m is closed-form (noexcept) for the prismatic
// shapes; where it iterates (circular, irregular) an inversion that does not converge (an area
// that is not a number, or beyond any depth) throws NumericalError naming the element, the
// quantity and the area (freshet/core/converged_root.hpp), never a silent NaN.
class CrossSection {
 public:
  virtual ~CrossSection() = default;

  [[nodiscard]] virtual SectionShape shape() const noexcept = 0;
  [[nodiscard]] virtual double area_m2(double depth_m) const noexcept = 0;
  [[nodiscard]] virtual double wetted_perimeter_m(double depth_m) const noexcept = 0;
  [[nodiscard]] virtual double top_width_m(double depth_m) const noexcept = 0;
  // K = sum over subsections of A_i R_i^(2/3) / n_i (m3/s); Q = K sqrt(S0).
  [[nodiscard]] virtual double conveyance_m3s(double depth_m) const noexcept = 0;
  // dK/dh (m2/s), analytic.
  [[nodiscard]] virtual double conveyance_slope_m2s(double depth_m) const noexcept = 0;
  // One-sided dK/dh just above `depth_m`; differs from conveyance_slope_m2s (the limit from
  // below) only at a corner of the geometry (a survey vertex). Tables use it so that a corner
  // falls on a node with the right slope on each side.
  [[nodiscard]] virtual double conveyance_slope_above_m2s(double depth_m) const noexcept {
    return conveyance_slope_m2s(depth_m);
  }
  // The depth whose area is `area_m2` (m); round trip A -> h -> A within 1e-12 relative.
  [[nodiscard]] virtual double depth_from_area_m(double area_m2) const = 0;

  // Closed conduits: the crown depth (diameter). Open sections: nullopt.
  [[nodiscard]] virtual std::optional<double> full_depth_m() const noexcept { return {}; }
  // Depth of greatest conveyance: above it a closed conduit conveys less (see circular).
  // Open sections: infinity.
  [[nodiscard]] virtual double capacity_depth_m() const noexcept { return kInfiniteDepth_m; }
  // A depth scale for tables and brackets: the width or diameter, or the survey's relief.
  [[nodiscard]] virtual double depth_scale_m() const noexcept = 0;
  // Depths (m) at which the geometry has a corner (survey vertices); empty for smooth shapes.
  [[nodiscard]] virtual std::vector<double> breakpoint_depths_m() const { return {}; }

  // R = A / P (m); 0 for a dry section.
  [[nodiscard]] double hydraulic_radius_m(double depth_m) const noexcept;
  // Uniform-flow (normal-flow) discharge Q = K sqrt(S0) (m3/s).
  [[nodiscard]] double normal_discharge_m3s(double depth_m, double bed_slope) const noexcept;
  // True when a closed conduit holds at least its full area (surcharge, which a kinematic
  // wave cannot represent). Always false for open sections.
  [[nodiscard]] bool is_full(double area_m2) const noexcept;
};

// ---- Parameter structs (plain data; validate() appends every problem found) ----------------

struct RectangularSpec {
  double bottom_width_m = 0.0;
  double manning_n = 0.0;
  void validate(ProblemList& problems) const;
};

// Side slopes z are horizontal distance per unit vertical (z H : 1 V), each side its own.
struct TrapezoidalSpec {
  double bottom_width_m = 0.0;
  double left_side_slope = 0.0;
  double right_side_slope = 0.0;
  double manning_n = 0.0;
  void validate(ProblemList& problems) const;
};

struct TriangularSpec {
  double left_side_slope = 0.0;
  double right_side_slope = 0.0;
  double manning_n = 0.0;
  void validate(ProblemList& problems) const;
};

struct CircularSpec {
  double diameter_m = 0.0;
  double manning_n = 0.0;
  void validate(ProblemList& problems) const;
};

struct SurveyPoint {
  double station_m = 0.0;    // horizontal distance, increasing from left to right bank
  double elevation_m = 0.0;  // ground elevation
};

// A surveyed section. Stations must not decrease (equal stations make a vertical wall). The
// bank stations divide left overbank / main channel / right overbank by vertical lines.
struct IrregularSpec {
  std::vector<SurveyPoint> points;
  double left_bank_station_m = 0.0;
  double right_bank_station_m = 0.0;
  double left_overbank_n = 0.0;
  double main_channel_n = 0.0;
  double right_overbank_n = 0.0;
  void validate(ProblemList& problems) const;
};

// Overland sheet flow per unit width: area (m2 per m) = depth, R = depth.
struct SheetSpec {
  double manning_n = 0.0;
  void validate(ProblemList& problems) const;
};

using SectionSpec = std::variant<RectangularSpec, TrapezoidalSpec, TriangularSpec, CircularSpec,
                                 IrregularSpec, SheetSpec>;

// Validates (all problems at once, InputError) and builds the section. `element` names the
// owner in messages, e.g. "reach 'upper-mill'".
std::shared_ptr<const CrossSection> make_section(const SectionSpec& spec,
                                                 std::string element = "cross-section");

// US customary edge: every length in `spec` (widths, diameter, stations, elevations) is read
// in the length unit of `system` (feet for us_customary) and returned in metres, converted once
// with units::kMetresPerFoot. Side slopes and Manning's n are unit-free here and unchanged
// (freshet applies Manning's law in SI, so n carries over; see units.hpp).
SectionSpec section_spec_to_si(SectionSpec spec, units::System system);

// ---- Concrete sections --------------------------------------------------------------------

// Trapezoid with bottom width b >= 0 and side slopes z1, z2 >= 0 (b + z1 + z2 > 0):
//   A = b h + (z1 + z2) h^2 / 2,  P = b + h (sqrt(1 + z1^2) + sqrt(1 + z2^2)),  T = b + (z1+z2) h
//   h(A) = 2 A / (b + sqrt(b^2 + 2 (z1 + z2) A))   (root of the quadratic, cancellation-free)
// Rectangles (z1 = z2 = 0) and triangles (b = 0) are the special cases below.
class TrapezoidalSection : public CrossSection {
 public:
  explicit TrapezoidalSection(const TrapezoidalSpec& spec, std::string element = "cross-section");

  [[nodiscard]] SectionShape shape() const noexcept override { return shape_; }
  [[nodiscard]] double area_m2(double depth_m) const noexcept override;
  [[nodiscard]] double wetted_perimeter_m(double depth_m) const noexcept override;
  [[nodiscard]] double top_width_m(double depth_m) const noexcept override;
  [[nodiscard]] double conveyance_m3s(double depth_m) const noexcept override;
  [[nodiscard]] double conveyance_slope_m2s(double depth_m) const noexcept override;
  [[nodiscard]] double depth_from_area_m(double area_m2) const noexcept override;
  [[nodiscard]] double depth_scale_m() const noexcept override;

  [[nodiscard]] double bottom_width_m() const noexcept { return b_; }
  [[nodiscard]] double left_side_slope() const noexcept { return z1_; }
  [[nodiscard]] double right_side_slope() const noexcept { return z2_; }
  [[nodiscard]] double manning_n() const noexcept { return n_; }

 protected:
  TrapezoidalSection(SectionShape shape, const TrapezoidalSpec& spec);

 private:
  SectionShape shape_;
  double b_, z1_, z2_, n_;
  double side_length_per_depth_;  // sqrt(1 + z1^2) + sqrt(1 + z2^2) = dP/dh
};

class RectangularSection final : public TrapezoidalSection {
 public:
  explicit RectangularSection(const RectangularSpec& spec, std::string element = "cross-section");
};

class TriangularSection final : public TrapezoidalSection {
 public:
  explicit TriangularSection(const TriangularSpec& spec, std::string element = "cross-section");
};

// Unit-width sheet: A = h, P = 1, T = 1, R = h, K = h^(5/3) / n (per metre of width).
class SheetSection final : public CrossSection {
 public:
  explicit SheetSection(const SheetSpec& spec, std::string element = "cross-section");

  [[nodiscard]] SectionShape shape() const noexcept override { return SectionShape::sheet; }
  [[nodiscard]] double area_m2(double depth_m) const noexcept override;
  [[nodiscard]] double wetted_perimeter_m(double depth_m) const noexcept override;
  [[nodiscard]] double top_width_m(double depth_m) const noexcept override;
  [[nodiscard]] double conveyance_m3s(double depth_m) const noexcept override;
  [[nodiscard]] double conveyance_slope_m2s(double depth_m) const noexcept override;
  [[nodiscard]] double depth_from_area_m(double area_m2) const noexcept override;
  [[nodiscard]] double depth_scale_m() const noexcept override { return 1.0; }
  [[nodiscard]] double manning_n() const noexcept { return n_; }

 private:
  double n_;
};

// Circular conduit of diameter D flowing part full. With theta the angle subtended at the
// centre by the water surface, theta = 4 asin(sqrt(h / D)):
//   A = D^2 (theta - sin theta) / 8,  P = D theta / 2,  T = D sin(theta / 2)
// (Chow 1959, Table 2-1). Depth from area solves A(h) = A by safeguarded Newton.
// With constant n the conveyance peaks below the crown, at h / D = 0.938 (capacity_depth_m);
// the flux laws built from this section hold Q at that peak for larger areas (see
// section_flux.hpp and docs/sections.md).
class CircularSection final : public CrossSection {
 public:
  explicit CircularSection(const CircularSpec& spec, std::string element = "cross-section");

  [[nodiscard]] SectionShape shape() const noexcept override { return SectionShape::circular; }
  [[nodiscard]] double area_m2(double depth_m) const noexcept override;
  [[nodiscard]] double wetted_perimeter_m(double depth_m) const noexcept override;
  [[nodiscard]] double top_width_m(double depth_m) const noexcept override;
  [[nodiscard]] double conveyance_m3s(double depth_m) const noexcept override;
  [[nodiscard]] double conveyance_slope_m2s(double depth_m) const noexcept override;
  [[nodiscard]] double depth_from_area_m(double area_m2) const override;
  [[nodiscard]] std::optional<double> full_depth_m() const noexcept override { return d_; }
  [[nodiscard]] double capacity_depth_m() const noexcept override { return capacity_depth_m_; }
  [[nodiscard]] double depth_scale_m() const noexcept override { return d_; }

  [[nodiscard]] double diameter_m() const noexcept { return d_; }
  [[nodiscard]] double full_area_m2() const noexcept;
  [[nodiscard]] double manning_n() const noexcept { return n_; }

 private:
  double d_, n_;
  double capacity_depth_m_;
  std::string element_;  // for messages: "pipe 'p'"
};

// A surveyed section. Depth is measured from the lowest survey point; the water surface is
// level across the whole section and every survey segment below it is wet (no ineffective
// areas). Above the end points the section is closed by vertical walls at the first and last
// stations. Each subsection (left overbank, main channel, right overbank, divided by vertical
// lines at the bank stations) has its own area, wetted perimeter (its wetted bed only, never the
// dividing lines) and n; K = sum K_i (Chow 1959, sec. 6-8, divided-channel method).
class IrregularSection final : public CrossSection {
 public:
  explicit IrregularSection(const IrregularSpec& spec, std::string element = "cross-section");

  [[nodiscard]] SectionShape shape() const noexcept override { return SectionShape::irregular; }
  [[nodiscard]] double area_m2(double depth_m) const noexcept override;
  [[nodiscard]] double wetted_perimeter_m(double depth_m) const noexcept override;
  [[nodiscard]] double top_width_m(double depth_m) const noexcept override;
  [[nodiscard]] double conveyance_m3s(double depth_m) const noexcept override;
  [[nodiscard]] double conveyance_slope_m2s(double depth_m) const noexcept override;
  [[nodiscard]] double depth_from_area_m(double area_m2) const override;
  [[nodiscard]] double depth_scale_m() const noexcept override;
  [[nodiscard]] std::vector<double> breakpoint_depths_m() const override;

  [[nodiscard]] double conveyance_slope_above_m2s(double depth_m) const noexcept override;
  // Conveyance of one subsection: 0 = left overbank, 1 = main channel, 2 = right overbank.
  [[nodiscard]] double subsection_conveyance_m3s(int subsection, double depth_m) const noexcept;
  [[nodiscard]] double thalweg_elevation_m() const noexcept { return thalweg_m_; }

 private:
  struct Segment {
    double x0, y0, x1, y1;  // station and height above the thalweg of both ends, x0 <= x1
    int subsection;         // 0 left overbank, 1 main channel, 2 right overbank
  };
  struct Hydraulics;  // per-subsection A, P, T, dP/dh at one water level
  enum class Limit { from_below, from_above };
  void build_segments(const IrregularSpec& spec);
  [[nodiscard]] Hydraulics evaluate(double depth_m, Limit limit) const noexcept;
  [[nodiscard]] double conveyance_slope(double depth_m, Limit limit) const noexcept;

  std::vector<Segment> segments_;
  std::array<double, 3> n_;
  double thalweg_m_;
  double left_end_elevation_m_, right_end_elevation_m_;  // above the thalweg
  int left_wall_subsection_, right_wall_subsection_;
  double relief_m_;
  std::vector<double> breakpoints_m_;
  std::string element_;  // for messages: "reach 'r'"
};

}  // namespace freshet::geometry
