// The published problems behind the verification cases, written once. `freshet verify`
// (verification_case.hpp) and the module tests (tests/geometry, routing, hydrology, network)
// build their checks from these set-ups, so a case and its test cannot drift apart. Each
// set-up names its published source beside it, carries the published value where there is
// one, and says when a value was recalled without the source at hand ("from memory").
//
//   const ChowTrapezoidExample ex;                        // Chow (1959) Example 6.2
//   auto y = geometry::normal_depth_m(*ex.section(), ex.bed_slope, ex.discharge_m3s());
//   // *y / units::kMetresPerFoot is within 0.005 ft of ex.normal_depth_ft
#pragma once

#include <memory>
#include <vector>

#include "freshet/geometry/cross_section.hpp"
#include "freshet/geometry/flux_law.hpp"
#include "freshet/hydrology/green_ampt.hpp"
#include "freshet/hydrology/overland_plane.hpp"
#include "freshet/network/structures/culvert.hpp"
#include "freshet/network/structures/level_pool.hpp"

namespace freshet::verification {

// ---- geometry ----------------------------------------------------------------------------

// Chow (1959), Open-Channel Hydraulics, Example 6.2 (from memory): trapezoidal channel
// b = 20 ft, z = 2, S0 = 0.0016, n = 0.025, Q = 400 cfs; normal depth 3.36 ft.
struct ChowTrapezoidExample {
  geometry::TrapezoidalSpec spec_ft{20.0, 2.0, 2.0, 0.025};  // bottom width in ft
  double bed_slope = 0.0016;
  double discharge_cfs = 400.0;
  double normal_depth_ft = 3.36;  // published

  [[nodiscard]] std::shared_ptr<const geometry::CrossSection> section() const;  // in SI
  [[nodiscard]] double discharge_m3s() const;
};

// Part-full circular pipe of constant n: Q is greatest at y/D = 0.938 and is then 1.076 Q_full
// (Chow 1959, hydraulic elements of a circular section; ASCE/WPCF 1969, MOP 37; from memory).
// The pipe (1.2 m, n = 0.013, S0 = 0.002) is invented.
struct PartFullPipeExample {
  geometry::CircularSpec spec{.diameter_m = 1.2, .manning_n = 0.013};
  double bed_slope = 0.002;
  double capacity_depth_ratio = 0.938;      // published y/D
  double capacity_discharge_ratio = 1.076;  // published Q_max / Q_full
};

// ---- routing -----------------------------------------------------------------------------

// Wide rectangular channel, 20 m wide, n = 0.03, S0 = 0.002 (invented):
// Q = (sqrt(S0)/n) B^(-2/3) A^(5/3) (Chow 1959, eq. 5-6 with R = y).
geometry::PowerLawFlux wide_channel();

// A Riemann problem: area a_left upstream of x_jump, a_right downstream, on a reach of
// length_m. Deeper upstream gives a kinematic shock at the Rankine-Hugoniot speed
// U = (Q_L - Q_R) / (A_L - A_R) (Lighthill & Whitham 1955, Proc. R. Soc. A 229, sec. 2.3;
// LeVeque 2002, eq. 11.21); shallower upstream a centred rarefaction c(A) = x / t
// (Lighthill & Whitham 1955; LeVeque 2002, sec. 11.10).
struct RiemannProblem {
  double a_left_m2 = 0.0;
  double a_right_m2 = 0.0;
  double x_jump_m = 0.0;
  double length_m = 0.0;

  // Cell-centred initial areas on `cells` equal cells.
  [[nodiscard]] std::vector<double> initial_areas_m2(int cells) const;
  // U = (Q_L - Q_R) / (A_L - A_R) for `law`.
  [[nodiscard]] double shock_speed_m_s(const geometry::PowerLawFlux& law) const;
  // The exact area at x - x_jump = xi t for a rarefaction of a power law
  // (A_L outside the fan upstream, A_R downstream, c(A) = xi inside).
  [[nodiscard]] double rarefaction_area_m2(const geometry::PowerLawFlux& law,
                                           double xi_m_s) const;
};

// On the wide channel: the shock (40 -> 10 m2, jump at 1000 m) and the fan (10 -> 40 m2,
// jump at 500 m), both on 4000 m (invented).
inline constexpr RiemannProblem kShockProblem{40.0, 10.0, 1000.0, 4000.0};
inline constexpr RiemannProblem kFanProblem{10.0, 40.0, 500.0, 4000.0};

// Burgers' equation (Q = A^2/2, c = A) from A0 = 1 + exp(-((x - x0)/w)^2), x0 = 3, w = 1:
// characteristics first cross at t_b = -1 / min A0' = w e^(1/2) / sqrt(2), from
// xi* = x0 + w / sqrt(2), at x_b = xi* + A0(xi*) t_b (Whitham 1974, Linear and Nonlinear
// Waves, eq. 2.14; LeVeque 2002, sec. 11.3).
struct BurgersBump {
  double centre_m = 3.0;
  double width_m = 1.0;

  [[nodiscard]] static geometry::PowerLawFlux flux() { return {0.5, 2.0}; }
  [[nodiscard]] double initial_area_m2(double x_m) const;
  [[nodiscard]] double breaking_time_s() const;
  [[nodiscard]] double breaking_position_m() const;
};

// Ponce, Li & Simons (1978), J. Hydraulics Div. ASCE 104(HY3): a kinematic wave is accurate
// when T S0 u0/d0 >= 171 (T the wave period). Invented reach S0 = 0.002, u0 = 1.8 m/s,
// d0 = 2.4 m; with T = 2 t_r, freshet's time-of-rise number (Ponce 1989, Engineering
// Hydrology) is 171/2 = 85.5 on that boundary.
struct PonceReach {
  double bed_slope = 0.002;
  double velocity_m_s = 1.8;
  double depth_m = 2.4;
  double kinematic_period_number = 171.0;  // published, with the wave period T

  // The time of rise t_r = T / 2 of the wave on the kinematic boundary (s).
  [[nodiscard]] double kinematic_boundary_rise_s() const;
};

// ---- hydrology ---------------------------------------------------------------------------

// USDA SCS (1986) TR-55, Table 2-1 "Runoff depth for selected CNs and rainfall amounts"
// (lambda = 0.2): eq. 2-3 rounded to 0.01 in. Entries from memory, each checked by evaluating
// eq. 2-3 by hand.
struct Tr55Entry {
  double curve_number, rain_in, runoff_in;
};
inline constexpr Tr55Entry kTr55Table2_1[] = {{75, 4.0, 1.67}, {80, 5.0, 2.89}, {90, 3.0, 1.98},
                                              {98, 1.0, 0.79}, {60, 2.0, 0.06}, {40, 1.0, 0.00}};

// USDA SCS (1986) TR-55, Appendix B, Type II distribution: 0.663 of the 24-hour depth has
// fallen by 12.0 h.
inline constexpr double kTypeIIFractionAtNoon = 0.663;

// Silt loam of Chow, Maidment & Mays (1988), Applied Hydrology, Examples 4.3.1 and 4.4.1:
// K = 0.65 cm/h, psi = 16.7 cm, theta_e = 0.486, S_e = 0.3 (dtheta = 0.340); porosity 0.501
// (Rawls, Brakensiek & Miller 1983, J. Hydraulic Eng. 109(1)). Published (from memory): after
// 1 h of ponding F = 3.17 cm (Example 4.3.1); ponding time 0.17 h under 5 cm/h
// (Example 4.4.1).
hydrology::GreenAmptParameters silt_loam();
inline constexpr double kSiltLoamPondedDepthAfter1h_cm = 3.17;
inline constexpr double kSiltLoamPondingTimeUnder5cmh_h = 0.17;

// Kinematic plane under constant excess from a dry start (Wooding 1965, J. Hydrol. 3; Singh
// 1996, Kinematic Wave Modeling in Water Resources, ch. 5). Invented plane: L = 100 m,
// S = 0.01, n = 0.1 (alpha = 1 m^(1/3)/s), excess 50 mm/h.
hydrology::OverlandPlaneSpec kinematic_test_plane(int cells = 200);
inline constexpr double kTestPlaneExcess_m_s = 50e-3 / 3600.0;

// ---- network (structures) ----------------------------------------------------------------

// Chow, Maidment & Mays (1988), Applied Hydrology, Examples 8.2.1-8.2.2 (from memory): a
// detention basin with vertical walls and 1 acre of surface drains through a pipe whose
// outflow is tabulated at 0.5 ft stage steps; the inflow rises by 60 cfs every 10 min to
// 360 cfs at 60 min and falls by 40 cfs every 10 min to zero at 150 min. Storage-indication
// routing with dt = 10 min peaks at about 270 cfs at 80 min; the first 2S/dt + O values are
// 75.6, 153.2, 234.8 and 320.4 cfs.
struct ChowDetentionExample {
  double dt_s = 600.0;
  double area_ft2 = 43560.0;  // 1 acre
  std::vector<double> stage_ft;     // 0, 0.5, ..., 10
  std::vector<double> outflow_cfs;  // at stage_ft
  std::vector<double> inflow_cfs;   // every dt_s from 0
  double peak_outflow_cfs = 270.0;  // published
  double peak_time_s = 4800.0;      // published, 80 min
  std::vector<double> storage_indication_cfs{75.6, 153.2, 234.8, 320.4};  // rows 1-4

  ChowDetentionExample();
  // The tables in SI: storage at stage_ft (m3), outflow at stage_ft (m3/s), inflow (m3/s).
  [[nodiscard]] std::vector<double> storage_m3() const;
  [[nodiscard]] std::vector<double> outflow_m3s() const;
  [[nodiscard]] std::vector<double> inflow_m3s() const;
};

// Linear reservoir O = S / K from empty under constant inflow I: O(t) = I (1 - exp(-t/K))
// (Chow, Maidment & Mays 1988, Applied Hydrology, ch. 8, section from memory; Dooge 1973,
// Linear Theory of Hydrologic Systems). A prismatic pool of 1 m2 whose outflow is stage / K.
network::structures::LevelPool linear_reservoir(double k_s,
                                                network::structures::LevelPoolOptions options = {});

// A prismatic pool behind a rectangular weir Q = C L H^1.5 (weir law as Henderson 1966, Open
// Channel Flow, ch. 6); under a constant inflow Q it settles at H = (Q / (C L))^(2/3), and
// draining with no inflow from H0, H(t) = H0 / (1 + C L sqrt(H0) t / (2 A))^2 (separation of
// variables). Invented pool: 5000 m2, C = 1.70, L = 3 m, crest at 100 m.
struct WeirPool {
  double area_m2 = 5000.0;
  double coefficient_si = 1.70;
  double length_m = 3.0;
  double crest_stage_m = 100.0;

  [[nodiscard]] network::structures::LevelPool make(double max_substep_s) const;
  [[nodiscard]] double equilibrium_head_m(double inflow_m3s) const;
  [[nodiscard]] double draining_head_m(double initial_head_m, double t_s) const;
};

// FHWA HDS-5 (Schall et al. 2012), Appendix A, submerged inlet control
// HW/D = c (K_u Q / (A D^0.5))^2 + Y - 0.5 S with K_u = 1.811 (SI) and the Table A.1
// constants c = 0.0398, Y = 0.67 for a concrete pipe, square edge with headwall (recalled,
// then matched against a third-party reproduction of Table A.1; HDS-5 original not at hand).
// A concrete pipe of diameter d_m and length_m falling fall_m, n = 0.012, inlet invert at
// 100 m (invented).
network::structures::CulvertSpec concrete_pipe(double d_m, double length_m, double fall_m);
// The submerged form evaluated for a circular barrel of diameter d_m on slope s (m).
double hds5_submerged_headwater_m(double discharge_m3s, double d_m, double slope);

}  // namespace freshet::verification
