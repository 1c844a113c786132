// Culvert barrels per FHWA HDS-5 (Schall, Thompson, Zerges, Kilgore and Morris 2012,
// Hydraulic Design of Highway Culverts, 3rd ed., FHWA-HIF-12-026): headwater for a given
// discharge under inlet control and under outlet control, the higher governing, and the
// inverse (discharge for a given headwater) used to build a crossing's rating curve.
// Circular and box barrels, several identical barrels side by side (the discharge divides
// equally). Stages in metres above a common datum; headwater depths in metres above the
// inlet invert; discharges in m3/s for all barrels together.
//
//   CulvertSpec spec;
//   spec.shape = BarrelShape::circular;  spec.rise_m = 1.2;  spec.length_m = 30.0;
//   spec.inlet_invert_stage_m = 100.0;   spec.outlet_invert_stage_m = 99.7;
//   spec.manning_n = 0.012;  spec.inlet = InletType::concrete_square_edge_headwall;
//   Culvert c(spec, "crossing 'miller-lane'");
//   Headwater hw = c.headwater(2.0, std::nullopt);  // hw.depth_m, hw.control
//   double q = c.discharge_for_headwater_m3s(101.8, std::nullopt);
#pragma once

#include <limits>
#include <optional>
#include <string>
#include <string_view>

namespace freshet::network::structures {

enum class BarrelShape { circular, box };

// Inlet configurations of HDS-5 Appendix A, Table A.1 carried by freshet.
enum class InletType {
  concrete_square_edge_headwall,
  concrete_groove_end_headwall,
  concrete_groove_end_projecting,
  corrugated_metal_headwall,
  corrugated_metal_mitered,
  corrugated_metal_projecting,
  box_wingwall_30_to_75_deg,
  box_wingwall_90_or_15_deg,
  box_wingwall_0_deg,
};

// Constants of the inlet-control equations (HDS-5 2012, Appendix A, Table A.1) and the
// entrance-loss coefficient k_e (HDS-5 2012, Appendix C, Table C.2, values from memory).
struct InletCoefficients {
  BarrelShape shape = BarrelShape::circular;
  int equation_form = 1;   // unsubmerged form 1 or 2
  double k = 0.0;          // unsubmerged K
  double m = 0.0;          // unsubmerged M
  double c = 0.0;          // submerged c
  double y = 0.0;          // submerged Y
  double slope_term = -0.5;  // K_s: -0.5, or +0.7 for mitered inlets
  double entrance_loss = 0.5;  // k_e
};

[[nodiscard]] InletCoefficients inlet_coefficients(InletType inlet);
[[nodiscard]] std::string_view to_string(InletType inlet);
[[nodiscard]] std::optional<InletType> parse_inlet_type(std::string_view text);

// HDS-5 SI unit constant of the inlet-control equations, K_u = 1.811 (HDS-5 2012, Appendix A;
// 1.811 is (1/0.3048)^0.5 = 1.81130 rounded, so SI and US forms differ by ~1.6e-4 in Q).
inline constexpr double kInletUnitFactorSi = 1.811;
// Inlet-control regime limits on K_u Q / (A D^0.5) (HDS-5 2012, Appendix A, from memory):
// unsubmerged at or below 3.5, submerged at or above 4.0, linear transition in between.
inline constexpr double kUnsubmergedLimit = 3.5;
inline constexpr double kSubmergedLimit = 4.0;

enum class Control { inlet, outlet };
[[nodiscard]] std::string_view to_string(Control control);

struct CulvertSpec {
  BarrelShape shape = BarrelShape::circular;
  double rise_m = 0.0;   // D: diameter (circular) or inside height (box)
  double span_m = 0.0;   // B: inside width, box only
  int barrel_count = 1;
  double length_m = 0.0;
  double inlet_invert_stage_m = 0.0;
  double outlet_invert_stage_m = 0.0;  // slope S = (inlet - outlet) / length
  double manning_n = 0.012;
  InletType inlet = InletType::concrete_square_edge_headwall;
  std::optional<double> entrance_loss;  // overrides the table's k_e
};

struct Headwater {
  double depth_m = 0.0;          // governing headwater above the inlet invert
  double stage_m = 0.0;          // inlet invert + depth
  double inlet_control_m = 0.0;  // depth under inlet control
  double outlet_control_m = 0.0; // depth under outlet control
  Control control = Control::inlet;  // the higher one (inlet on a tie)
};

class Culvert {
 public:
  // Throws InputError naming `element` for every bad field, including an inlet type that
  // belongs to the other barrel shape.
  Culvert(CulvertSpec spec, const std::string& element);

  [[nodiscard]] const CulvertSpec& spec() const noexcept { return spec_; }
  [[nodiscard]] const InletCoefficients& coefficients() const noexcept { return coef_; }
  [[nodiscard]] double slope() const noexcept { return slope_; }
  [[nodiscard]] double full_area_m2() const noexcept { return full_area_m2_; }  // one barrel
  [[nodiscard]] double full_hydraulic_radius_m() const noexcept { return full_radius_m_; }

  // Critical depth in one barrel carrying q (Q^2 T = g A^3), capped at the rise.
  [[nodiscard]] double critical_depth_m(double barrel_discharge_m3s) const;
  // Normal depth in one barrel (Manning, open channel); +inf when q exceeds the largest
  // part-full capacity or the slope is not positive.
  [[nodiscard]] double normal_depth_m(double barrel_discharge_m3s) const;

  // Headwater depths (m above the inlet invert) for the total discharge of all barrels.
  [[nodiscard]] double inlet_control_depth_m(double discharge_m3s) const;
  [[nodiscard]] double outlet_control_depth_m(double discharge_m3s,
                                              std::optional<double> tailwater_stage_m) const;
  [[nodiscard]] Headwater headwater(double discharge_m3s,
                                    std::optional<double> tailwater_stage_m) const;
  // Inverse of headwater(): total discharge for a headwater stage (0 at or below the level
  // that the tailwater alone would hold). Throws NumericalError only if no bracket is found.
  [[nodiscard]] double discharge_for_headwater_m3s(double headwater_stage_m,
                                                   std::optional<double> tailwater_stage_m) const;

  // Part-full geometry of one barrel at depth y (m).
  [[nodiscard]] double flow_area_m2(double depth_m) const;
  [[nodiscard]] double top_width_m(double depth_m) const;
  [[nodiscard]] double wetted_perimeter_m(double depth_m) const;

 private:
  [[nodiscard]] double unsubmerged_depth_m(double barrel_q) const;
  [[nodiscard]] double submerged_depth_m(double barrel_q) const;
  [[nodiscard]] double full_flow_depth_m(double barrel_q, double tailwater_depth_m) const;
  [[nodiscard]] double part_full_depth_m(double barrel_q, double tailwater_depth_m) const;
  [[nodiscard]] double manning_discharge_m3s(double depth_m) const;

  CulvertSpec spec_;
  InletCoefficients coef_;
  std::string element_;
  double slope_ = 0.0;
  double full_area_m2_ = 0.0;
  double full_radius_m_ = 0.0;
  double max_part_full_depth_m_ = 0.0;  // depth of the largest part-full Manning discharge
};

}  // namespace freshet::network::structures
