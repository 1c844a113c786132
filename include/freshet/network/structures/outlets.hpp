// Outlet hydraulics of detention basins and culvert crossings: discharge (m3/s) as a
// function of the upstream water-surface stage (m). Every relation is continuous,
// non-decreasing in stage and zero at or below its invert, which the level-pool solver
// relies on. Free discharge is assumed (no tailwater) except where stated.
//
//   RectangularWeir spillway{.crest_stage_m = 103.2, .length_m = 6.0};   // C_w = 1.70 SI
//   Orifice low{.invert_stage_m = 100.0, .shape = OrificeShape::circular, .diameter_m = 0.3};
//   Riser riser({low, spillway}, "basin 'north-lea' riser");
//   double q = riser.discharge_m3s(103.5);
//
// Sources: weir and orifice equations as in Chow (1959), Open-Channel Flow, and
// Henderson (1966), Open Channel Flow; road overtopping as in FHWA HDS-5 (Schall et al.
// 2012, Hydraulic Design of Highway Culverts, 3rd ed., FHWA-HIF-12-026). Coefficients that
// were recalled rather than read from a source at hand are marked "from memory".
#pragma once

#include <optional>
#include <string>
#include <variant>
#include <vector>

#include "freshet/core/error.hpp"
#include "freshet/core/units.hpp"

namespace freshet::network::structures {

// Theoretical broad-crested weir coefficient with critical depth on the crest:
// Q = (2/3)^(3/2) sqrt(g) L H^(3/2), i.e. C_w = 1.7046 m^0.5/s (Henderson 1966, sec. 6.5,
// section number from memory; the formula follows from critical flow, q = sqrt(g yc^3),
// yc = 2H/3).
inline constexpr double kBroadCrestedTheoreticalCoefficientSi = 1.70460;  // (2/3)^1.5 sqrt(9.80665)
// Sharp-crested rectangular weir, Francis (1883) coefficient 3.33 ft^0.5/s = 1.84 m^0.5/s
// (from memory). Equivalent to C_w = (2/3) C_d sqrt(2g) with C_d = 0.62.
inline constexpr double kSharpCrestedWeirCoefficientSi = 1.84;
// Sharp-edged orifice discharge coefficient, about 0.6 (from memory; Chow 1959 gives
// 0.60-0.62 for sharp edges).
inline constexpr double kSharpEdgedOrificeCd = 0.61;
// Road overtopping, FHWA HDS-5 (2012) / HDS-1: deep overtopping of a paved road C_r = 3.0
// ft^0.5/s (US) ~ 1.66 m^0.5/s; HDS-5 quotes about 1.70 m^0.5/s in SI. Both from memory.
inline constexpr double kRoadOvertoppingCoefficientSi = 1.70;

// Q = C_w L H^(3/2), H = stage - crest (rectangular weir, sharp or broad crest; the
// coefficient carries the crest type).
struct RectangularWeir {
  double crest_stage_m = 0.0;
  double length_m = 0.0;
  double coefficient_si = kBroadCrestedTheoreticalCoefficientSi;  // m^0.5/s
  [[nodiscard]] double discharge_m3s(double stage_m) const;
};

// Triangular (V-notch) sharp-crested weir:
// Q = (8/15) C_d sqrt(2g) tan(theta/2) H^(5/2) (Chow 1959; Bos 1989, Discharge Measurement
// Structures, sec. 5.? -- section from memory). C_d ~ 0.58 for a 90 degree notch (from memory).
struct VNotchWeir {
  double vertex_stage_m = 0.0;
  double notch_angle_deg = 90.0;
  double discharge_coefficient = 0.58;
  [[nodiscard]] double discharge_m3s(double stage_m) const;
};

enum class OrificeShape { circular, rectangular };

// Orifice with its invert (lowest point of the opening) at invert_stage_m, discharging
// freely. The discharge integrates the orifice velocity C_d sqrt(2 g (h - z)) over the
// wetted part of the opening:
//   Q = C_d sqrt(2g) * integral over z in opening, z < h, of w(z) sqrt(h - z) dz,
// w(z) the width of the opening at elevation z. Below the crown (partly full opening) this
// is the sharp-crested weir law over the opening's shape; above the crown it is the
// "large orifice" formula, which tends to Q = C_d A sqrt(2 g (h - z_centroid)) as the head
// grows (Chow 1959 / any hydraulics text: rectangular large orifice
// Q = (2/3) C_d b sqrt(2g) (H_bottom^1.5 - H_top^1.5)). The method is therefore continuous
// and increasing through the crown without an ad-hoc switch.
struct Orifice {
  double invert_stage_m = 0.0;
  OrificeShape shape = OrificeShape::circular;
  double diameter_m = 0.0;  // circular
  double width_m = 0.0;     // rectangular
  double height_m = 0.0;    // rectangular
  double discharge_coefficient = kSharpEdgedOrificeCd;
  [[nodiscard]] double discharge_m3s(double stage_m) const;
  [[nodiscard]] double area_m2() const;
  [[nodiscard]] double crown_stage_m() const;
};

using Outlet = std::variant<RectangularWeir, VNotchWeir, Orifice>;

// Several outlets in one riser or outlet structure: discharges add (each outlet sees the
// same pool stage and discharges freely).
class Riser {
 public:
  // Throws InputError naming `element` and the outlet number for every bad field.
  Riser(std::vector<Outlet> outlets, const std::string& element);
  [[nodiscard]] double discharge_m3s(double stage_m) const;
  [[nodiscard]] const std::vector<Outlet>& outlets() const noexcept { return outlets_; }

 private:
  std::vector<Outlet> outlets_;
};

// Villemonte (1947, "Submerged weir discharge studies", Engineering News-Record 139)
// submergence factor Q_s / Q_free = (1 - (H2/H1)^n)^0.385 with n the weir exponent
// (1.5 rectangular, 2.5 V-notch). H1, H2 are upstream and downstream heads over the crest.
// Returns 1 for H2 <= 0 and 0 for H2 >= H1.
[[nodiscard]] double villemonte_factor(double head_up_m, double head_down_m, double exponent);

// Flow over a road embankment: a broad-crested weir over the road crest profile, given as
// station-elevation points (station_m strictly increasing, crest_stage_m finite, linear in
// between). Each profile segment contributes C_r * integral of (h - z(x))^1.5 over its
// wetted length, integrated in closed form per segment (FHWA HDS-5 2012 roadway
// overtopping: Q = C_d L HW_r^1.5 with the road split into segments of local head).
// Optional tailwater submergence uses the Villemonte factor with heads over the lowest
// crest (a substitute for the HDS-5 k_t chart, which is not reproduced here).
class RoadOvertopping {
 public:
  RoadOvertopping(std::vector<double> station_m, std::vector<double> crest_stage_m,
                  double coefficient_si, const std::string& element,
                  std::optional<double> tailwater_stage_m = std::nullopt);
  [[nodiscard]] double discharge_m3s(double stage_m) const;
  [[nodiscard]] double lowest_crest_stage_m() const noexcept { return lowest_crest_m_; }
  // Length of road under water at this stage (m).
  [[nodiscard]] double overtopped_length_m(double stage_m) const;

 private:
  [[nodiscard]] double free_discharge_m3s(double stage_m) const;
  std::vector<double> station_m_;
  std::vector<double> crest_m_;
  double coefficient_si_;
  std::optional<double> tailwater_stage_m_;
  double lowest_crest_m_ = 0.0;
};

// Appends the problems of one outlet (prefix e.g. "outlet 2 ") to `problems`.
void validate_outlet(const Outlet& outlet, const std::string& prefix, ProblemList& problems);

}  // namespace freshet::network::structures
