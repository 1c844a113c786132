// The verification cases of `freshet verify`: one small function per case, each computing
// freshet's value live through the library and stating its published reference beside it.
// The problems and the published values are those used by the module tests (tests/<module>/),
// with the same sources; "from memory" marks a value recalled without the source at hand, as
// the tests mark it. Registration is the single table at the end of this file.
#include "verification_cases.hpp"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <exception>
#include <limits>
#include <numbers>
#include <vector>

#include "freshet/core/time_series.hpp"
#include "freshet/core/units.hpp"
#include "freshet/geometry/cross_section.hpp"
#include "freshet/geometry/flux_law.hpp"
#include "freshet/geometry/section_flux.hpp"
#include "freshet/hydrology/curve_number.hpp"
#include "freshet/hydrology/green_ampt.hpp"
#include "freshet/hydrology/nrcs_distribution.hpp"
#include "freshet/hydrology/overland_plane.hpp"
#include "freshet/network/structures/culvert.hpp"
#include "freshet/network/structures/level_pool.hpp"
#include "freshet/network/structures/outlets.hpp"
#include "freshet/network/structures/stage_storage.hpp"
#include "freshet/routing/applicability.hpp"
#include "freshet/routing/kinematic_reach.hpp"
#include "freshet/routing/lateral_inflow.hpp"

namespace freshet::cli {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kHour_s = 3600.0;
constexpr double kCm_m = 0.01;

// ---- geometry ----------------------------------------------------------------------------

// Chow (1959), Open-Channel Hydraulics, Example 6.2 (from memory): trapezoidal channel
// b = 20 ft, z = 2, S0 = 0.0016, n = 0.025, Q = 400 cfs; normal depth 3.36 ft.
CaseValues chow_normal_depth() {
  using units::System;
  const auto section = geometry::make_section(
      geometry::section_spec_to_si(geometry::TrapezoidalSpec{20.0, 2.0, 2.0, 0.025},
                                   System::us_customary),
      "Chow example channel");
  const auto depth = geometry::normal_depth_m(*section, 0.0016,
                                              units::discharge_to_m3s(400.0, System::us_customary));
  return {3.36, depth.value_or(kNaN) / units::kMetresPerFoot};
}

// Part-full circular pipe, constant n: Q is greatest at y/D = 0.938 (Chow 1959, hydraulic
// elements of a circular section; ASCE/WPCF 1969 MOP 37; from memory).
CaseValues pipe_capacity_depth_ratio() {
  const geometry::CircularSection pipe({.diameter_m = 1.2, .manning_n = 0.013}, "pipe");
  return {0.938, pipe.capacity_depth_m() / pipe.diameter_m()};
}

// Same source: the greatest part-full discharge is 1.076 Q_full. freshet's value is the cap of
// the routing flux law (the tabulated Q(A) used in reaches), divided by Manning's full flow.
CaseValues pipe_capacity_discharge_ratio() {
  constexpr double kSlope = 0.002;
  const geometry::FlowSection flow =
      geometry::make_flow_section(geometry::CircularSpec{.diameter_m = 1.2, .manning_n = 0.013},
                                  kSlope, {}, "pipe");
  const double q_full = flow.section->normal_discharge_m3s(1.2, kSlope);
  return {1.076, geometry::max_discharge_m3s(flow.flux) / q_full};
}

// ---- routing -----------------------------------------------------------------------------

// Wide rectangular channel, 20 m wide, n = 0.03, S = 0.002 (invented; as tests/routing):
// Q = (sqrt(S)/n) B^(-2/3) A^(5/3) (Chow 1959, eq. 5-6 with R = y).
geometry::PowerLawFlux wide_channel() {
  return {std::sqrt(0.002) / (0.03 * std::pow(20.0, 2.0 / 3.0)), 5.0 / 3.0};
}

std::vector<double> step_profile(int cells, double dx_m, double x_jump_m, double a_left,
                                 double a_right) {
  std::vector<double> a(static_cast<std::size_t>(cells));
  for (std::size_t i = 0; i < a.size(); ++i) {
    a[i] = (static_cast<double>(i) + 0.5) * dx_m < x_jump_m ? a_left : a_right;
  }
  return a;
}

routing::RoutingOptions scheme_options(routing::SchemeKind scheme) {
  routing::RoutingOptions options;
  options.scheme = scheme;
  return options;
}

// Riemann problem, deeper state upstream: a kinematic shock at the Rankine-Hugoniot speed
// U = (Q_L - Q_R) / (A_L - A_R) (Lighthill & Whitham 1955, Proc. R. Soc. A 229, sec. 2.3;
// LeVeque 2002, eq. 11.21). freshet's value: the speed fitted to the detected shock path.
CaseValues riemann_shock_speed() {
  const geometry::PowerLawFlux law = wide_channel();
  const double a_left = 40.0, a_right = 10.0, length = 4000.0;
  const int cells = 800;
  routing::KinematicReach<geometry::PowerLawFlux> reach(
      {"riemann", length, cells}, law, scheme_options(routing::SchemeKind::kExplicitUpwind));
  reach.set_initial_areas(step_profile(cells, length / cells, 1000.0, a_left, a_right));
  const double q_left = law.discharge_m3s(a_left);
  const auto inflow = PiecewiseLinearSeries::constant(q_left);
  for (double t = 0.0; t < 800.0; t += 20.0) {
    (void)reach.advance(t, t + 20.0, inflow, routing::LateralInflow::none());
  }
  const double exact = (q_left - law.discharge_m3s(a_right)) / (a_left - a_right);
  const routing::ShockReport& shock = reach.shock_report();
  return {exact, shock.formed ? shock.speed_m_s : kNaN};
}

// Burgers' equation (Q = A^2/2) from A0 = 1 + exp(-(x - 3)^2): characteristics first cross at
// t_b = -1 / min A0' = e^(1/2) / sqrt(2) (Whitham 1974, Linear and Nonlinear Waves, eq. 2.14).
// freshet's value: the formation time of the shock detected in the computed solution.
CaseValues burgers_breaking_time() {
  const double length = 10.0, dx = 0.0025;
  const int cells = static_cast<int>(length / dx);
  routing::KinematicReach<geometry::PowerLawFlux> reach(
      {"burgers", length, cells}, geometry::PowerLawFlux{0.5, 2.0},
      scheme_options(routing::SchemeKind::kExplicitUpwind));
  std::vector<double> a0(static_cast<std::size_t>(cells));
  for (std::size_t i = 0; i < a0.size(); ++i) {
    const double x = (static_cast<double>(i) + 0.5) * dx;
    a0[i] = 1.0 + std::exp(-(x - 3.0) * (x - 3.0));
  }
  reach.set_initial_areas(a0);
  const double exact = std::exp(0.5) / std::sqrt(2.0);
  const auto inflow = PiecewiseLinearSeries::constant(0.5);  // Q(1) upstream
  const double dt_obs = exact / 400.0;
  for (int k = 0; k < 600; ++k) {
    (void)reach.advance(k * dt_obs, (k + 1) * dt_obs, inflow, routing::LateralInflow::none());
  }
  const routing::ShockReport& shock = reach.shock_report();
  return {exact, shock.formed ? shock.formation_time_s : kNaN};
}

// Riemann problem, shallower state upstream: a centred rarefaction fan with c(A) = x / t
// between c(A_L) and c(A_R) (Lighthill & Whitham 1955; LeVeque 2002, sec. 11.10). Compared:
// the area in the cell nearest the middle of the fan after 600 s (MUSCL-Heun, dx = 2.5 m).
CaseValues rarefaction_fan_area() {
  const geometry::PowerLawFlux law = wide_channel();
  const double a_left = 10.0, a_right = 40.0, x_jump = 500.0, length = 4000.0, t_end = 600.0;
  const int cells = 1600;
  const double dx = length / cells;
  routing::KinematicReach<geometry::PowerLawFlux> reach(
      {"fan", length, cells}, law, scheme_options(routing::SchemeKind::kMusclHeun));
  reach.set_initial_areas(step_profile(cells, dx, x_jump, a_left, a_right));
  (void)reach.advance(0.0, t_end, PiecewiseLinearSeries::constant(law.discharge_m3s(a_left)),
                      routing::LateralInflow::none());
  const double xi_mid = 0.5 * (law.celerity_m_s(a_left) + law.celerity_m_s(a_right));
  const auto cell = static_cast<std::size_t>((x_jump + xi_mid * t_end) / dx);
  const double xi = ((static_cast<double>(cell) + 0.5) * dx - x_jump) / t_end;
  const double m = law.exponent();
  const double exact = std::pow(xi / (m * law.alpha()), 1.0 / (m - 1.0));
  return {exact, reach.cell_area_m2()[cell]};
}

// ---- hydrology ---------------------------------------------------------------------------

// USDA SCS (1986) TR-55, Table 2-1 (lambda = 0.2): CN 75 and 4.0 in of rain give 1.67 in of
// runoff (from memory, checked against eq. 2-3 by hand, as tests/hydrology).
CaseValues tr55_runoff() {
  const double runoff_m = hydrology::curve_number_runoff_m({.curve_number = 75.0},
                                                           4.0 * units::kMetresPerInch);
  return {1.67, runoff_m / units::kMetresPerInch};
}

// Silt loam of Chow, Maidment & Mays (1988), Applied Hydrology, Examples 4.3.1 and 4.4.1:
// K = 0.65 cm/h, psi = 16.7 cm, theta_e = 0.486, S_e = 0.3; porosity 0.501 (Rawls,
// Brakensiek & Miller 1983).
hydrology::GreenAmptParameters silt_loam() {
  return {.hydraulic_conductivity_m_s = 0.65 * kCm_m / kHour_s,
          .suction_head_m = 16.7 * kCm_m,
          .porosity = 0.501,
          .effective_porosity = 0.486,
          .initial_effective_saturation = 0.3};
}

// CMM 1988 Example 4.3.1 (from memory): after 1 h of ponding F = 3.17 cm.
CaseValues green_ampt_ponded_depth() {
  return {3.17, hydrology::green_ampt_ponded_infiltration_m(silt_loam(), kHour_s) / kCm_m};
}

// CMM 1988 Example 4.4.1 (from memory): ponding time 0.17 h under 5 cm/h.
CaseValues green_ampt_ponding_time() {
  return {0.17, hydrology::green_ampt_ponding_time_s(silt_loam(), 5.0 * kCm_m / kHour_s) /
                    kHour_s};
}

// USDA SCS (1986) TR-55, Appendix B, Type II distribution: 0.663 of the 24-hour depth has
// fallen by 12.0 h. freshet's value: from a 15-minute design storm of 5 in.
CaseValues nrcs_type_ii_noon_fraction() {
  const double depth_m = 5.0 * units::kMetresPerInch;
  const hydrology::Hyetograph storm =
      hydrology::nrcs_24h_storm(hydrology::NrcsRainType::type_ii, depth_m, 900.0, "Type II storm");
  return {0.663, storm.cumulative_depth_m(12.0 * kHour_s) / storm.total_depth_m()};
}

// Kinematic plane under constant excess from a dry start (Wooding 1965, J. Hydrol. 3; Singh
// 1996, Kinematic Wave Modeling in Water Resources, ch. 5): equilibrium discharge q_e = i L,
// reached at t_e = (L i^(1-m) / alpha)^(1/m); the rising limb is alpha (i t)^m, so the outlet
// reaches 0.99 q_e at 0.99^(3/5) t_e. Invented plane: L = 100 m, S = 0.01, n = 0.1, 50 mm/h,
// MUSCL-Heun on 200 cells, outlet sampled every 10 s for 1.6 t_e.
struct PlaneRun {
  double equilibrium_time_s = 0.0;      // closed form
  double time_to_99_percent_s = kNaN;   // computed, linear between samples
  double final_outflow_m2s = 0.0;       // computed, at 1.6 t_e
};

PlaneRun run_test_plane(double excess_m_s, double length_m) {
  hydrology::OverlandPlane plane({.name = "verification plane", .length_m = length_m,
                                  .slope = 0.01, .manning_n = 0.1, .cell_count = 200},
                                 scheme_options(routing::SchemeKind::kMusclHeun));
  PlaneRun run;
  run.equilibrium_time_s =
      hydrology::kinematic_plane_equilibrium_time_s(plane.spec().flux(), length_m, excess_m_s);
  const double target = 0.99 * excess_m_s * length_m, end_s = 1.6 * run.equilibrium_time_s;
  double t = 0.0, q_previous = 0.0;
  while (t < end_s) {
    const double t1 = std::min(t + 10.0, end_s);
    plane.advance(t, t1, excess_m_s);
    const double q = plane.outflow_m2s();
    if (std::isnan(run.time_to_99_percent_s) && q >= target) {
      run.time_to_99_percent_s = t + (t1 - t) * (target - q_previous) / (q - q_previous);
    }
    q_previous = q;
    t = t1;
  }
  run.final_outflow_m2s = plane.outflow_m2s();
  return run;
}

constexpr double kPlaneExcess_m_s = 50e-3 / kHour_s;
constexpr double kPlaneLength_m = 100.0;

// Equilibrium discharge per metre of width, in litres per second per metre.
CaseValues plane_equilibrium_discharge() {
  const PlaneRun run = run_test_plane(kPlaneExcess_m_s, kPlaneLength_m);
  return {kPlaneExcess_m_s * kPlaneLength_m * 1e3, run.final_outflow_m2s * 1e3};
}

// Time to equilibrium, from the computed time to 99 % of q_e, in minutes.
CaseValues plane_equilibrium_time() {
  const PlaneRun run = run_test_plane(kPlaneExcess_m_s, kPlaneLength_m);
  return {run.equilibrium_time_s / 60.0, run.time_to_99_percent_s / std::pow(0.99, 0.6) / 60.0};
}

// ---- network (structures) ----------------------------------------------------------------

// A prismatic pool (5000 m2) behind a rectangular weir Q = C L H^1.5 (C = 1.70, L = 3 m)
// under a constant inflow Q settles where outflow equals inflow: H = (Q / (C L))^(2/3)
// (steady state of the storage equation; weir law as Henderson 1966, Open Channel Flow, ch. 6).
CaseValues weir_pool_equilibrium_head() {
  using namespace network::structures;
  const double area = 5000.0, c = 1.70, length = 3.0, crest = 100.0, inflow = 4.0;
  const RectangularWeir weir{.crest_stage_m = crest, .length_m = length, .coefficient_si = c};
  LevelPoolOptions options;
  options.max_substep_s = 10.0;
  LevelPool pool("verification pond", StageStorage::prismatic(crest, area, 0.0, "pond"),
                 [weir](double h) { return weir.discharge_m3s(h); }, options);
  pool.reset(0.0, crest + 1.2);
  for (int j = 0; j < 460; ++j) pool.advance(j * 60.0, (j + 1) * 60.0, inflow);
  return {std::pow(inflow / (c * length), 2.0 / 3.0), pool.state().stage_m - crest};
}

// Linear reservoir O = S / K from empty under constant inflow I: O(t) = I (1 - exp(-t/K))
// (Chow, Maidment & Mays 1988, Applied Hydrology, ch. 8, section from memory; Dooge 1973,
// Linear Theory of Hydrologic Systems). K = 1 h, I = 2 m3/s, 80 steps to t = 3 K.
CaseValues linear_reservoir_outflow() {
  using namespace network::structures;
  const double k = 3600.0, inflow = 2.0, t_end = 3.0 * k;
  LevelPool pool("linear reservoir", StageStorage::prismatic(0.0, 1.0, 0.0, "linear reservoir"),
                 [k](double h) { return h > 0.0 ? h / k : 0.0; });
  const int steps = 80;
  const double dt = t_end / steps;
  for (int j = 0; j < steps; ++j) pool.advance(j * dt, (j + 1) * dt, inflow);
  return {inflow * (1.0 - std::exp(-t_end / k)), pool.state().outflow_m3s};
}

// Chow, Maidment & Mays (1988) Applied Hydrology, Examples 8.2.1-8.2.2 (from memory): a
// 1-acre vertical-walled basin, outflow tabulated at 0.5 ft steps, inflow 0-360-0 cfs at
// 10-min intervals; storage-indication routing peaks at about 270 cfs at 80 min
// (as tests/network/structures/level_pool_test.cpp).
CaseValues chow_detention_peak_outflow() {
  const double ft3 = units::kCubicMetresPerCubicFoot, dt_s = 600.0;
  const std::vector<double> outflow_cfs{0,   3,   8,   17,  30,  43,  60,  78,  97,  117, 137,
                                        156, 173, 190, 205, 218, 231, 242, 253, 264, 275};
  const std::vector<double> inflow_cfs{0,   60,  120, 180, 240, 300, 360, 320, 280, 240, 200,
                                       160, 120, 80,  40,  0,   0,   0,   0,   0,   0};
  std::vector<double> storage_m3, outflow_m3s, inflow_m3s;
  for (std::size_t k = 0; k < outflow_cfs.size(); ++k) {
    storage_m3.push_back(43560.0 * 0.5 * static_cast<double>(k) * ft3);
    outflow_m3s.push_back(outflow_cfs[k] * ft3);
  }
  for (double q : inflow_cfs) inflow_m3s.push_back(q * ft3);
  const std::vector<double> out = network::structures::route_storage_indication(
      storage_m3, outflow_m3s, dt_s, inflow_m3s, 0.0);
  double peak_m3s = 0.0;
  for (double q : out) peak_m3s = std::max(peak_m3s, q);
  return {270.0, peak_m3s / ft3};
}

// Ponce, Li & Simons (1978), J. Hydraulics Div. ASCE 104(HY3): a kinematic wave is accurate
// when T S0 u0/d0 >= 171 (T the wave period). On an invented reach (S0 = 0.002, u0 = 1.8 m/s,
// d0 = 2.4 m), the wave on that boundary has T = 171 d0/(S0 u0); with T = 2 t_r freshet's
// time-of-rise number (Ponce 1989, Engineering Hydrology) must then be 171/2 = 85.5.
CaseValues ponce_kinematic_boundary() {
  const double s0 = 0.002, u0 = 1.8, d0 = 2.4;
  const double time_of_rise_s = 171.0 * d0 / (s0 * u0) / 2.0;
  return {85.5, routing::wave_applicability(time_of_rise_s, s0, u0, d0).kinematic_number};
}

// FHWA HDS-5 (Schall et al. 2012), Appendix A, submerged inlet control
// HW/D = c (K_u Q / (A D^0.5))^2 + Y - 0.5 S with K_u = 1.811 (SI) and Table A.1 constants
// c = 0.0398, Y = 0.67 for a concrete pipe, square edge with headwall. D = 1.2 m, S = 0.01,
// Q = 3 m3/s. The form is evaluated here with the Table A.1 constants (recalled, then matched
// against a third-party reproduction of Table A.1; HDS-5 original not at hand), as in
// tests/network/structures.
CaseValues hds5_inlet_control_headwater() {
  using namespace network::structures;
  CulvertSpec spec;
  spec.shape = BarrelShape::circular;
  spec.rise_m = 1.2;
  spec.length_m = 40.0;
  spec.inlet_invert_stage_m = 100.0;
  spec.outlet_invert_stage_m = 99.6;
  spec.manning_n = 0.012;
  spec.inlet = InletType::concrete_square_edge_headwall;
  const Culvert pipe(spec, "culvert 'verification'");
  const double q = 3.0, d = 1.2, area = std::numbers::pi * d * d / 4.0;
  const double x = 1.811 * q / (area * std::sqrt(d));
  return {d * (0.0398 * x * x + 0.67 - 0.5 * 0.01), pipe.inlet_control_depth_m(q)};
}

using TK = ToleranceKind;

// The registration table: id, module, quantity, unit, tolerance, its kind, source, function.
const VerificationCase kCases[] = {
    {"chow-6.2-normal-depth", "geometry", "normal depth, trapezoid 20 ft, z 2, 400 cfs", "ft",
     0.005, TK::absolute,
     "Chow (1959) Open-Channel Hydraulics, Example 6.2 (from memory)", chow_normal_depth},
    {"pipe-capacity-depth", "geometry", "y/D at the greatest part-full discharge", "-", 0.0005,
     TK::absolute,
     "Chow (1959) hydraulic elements of a circular section; ASCE/WPCF (1969) MOP 37 "
     "(from memory)",
     pipe_capacity_depth_ratio},
    {"pipe-capacity-discharge", "geometry", "greatest part-full Q / Q_full", "-", 0.0005,
     TK::absolute,
     "Chow (1959) hydraulic elements of a circular section; ASCE/WPCF (1969) MOP 37 "
     "(from memory)",
     pipe_capacity_discharge_ratio},
    {"riemann-shock-speed", "routing", "kinematic shock speed (explicit upwind)", "m/s", 0.01,
     TK::relative,
     "Rankine-Hugoniot speed: Lighthill & Whitham (1955) Proc. R. Soc. A 229, sec. 2.3; "
     "LeVeque (2002) eq. 11.21",
     riemann_shock_speed},
    {"burgers-breaking-time", "routing", "shock formation time, Burgers (explicit upwind)", "s",
     0.02, TK::relative,
     "Whitham (1974) Linear and Nonlinear Waves, eq. 2.14: t_b = -1/min A0'",
     burgers_breaking_time},
    {"rarefaction-fan-area", "routing", "area mid-fan after 600 s (MUSCL-Heun)", "m2", 0.01,
     TK::relative,
     "centred rarefaction c(A) = x/t: Lighthill & Whitham (1955); LeVeque (2002) sec. 11.10",
     rarefaction_fan_area},
    {"tr55-runoff-cn75", "hydrology", "runoff depth, CN 75, 4.0 in of rain", "in", 0.005,
     TK::absolute, "USDA SCS (1986) TR-55, Table 2-1 / eq. 2-3 (from memory)", tr55_runoff},
    {"green-ampt-ponded-depth", "hydrology", "infiltrated depth after 1 h ponded, silt loam",
     "cm", 0.005, TK::absolute,
     "Chow, Maidment & Mays (1988) Applied Hydrology, Example 4.3.1 (from memory)",
     green_ampt_ponded_depth},
    {"green-ampt-ponding-time", "hydrology", "ponding time under 5 cm/h, silt loam", "h", 0.005,
     TK::absolute,
     "Chow, Maidment & Mays (1988) Applied Hydrology, Example 4.4.1 (from memory)",
     green_ampt_ponding_time},
    {"nrcs-type-ii-12h", "hydrology", "Type II fraction of 24-h depth fallen by 12 h", "-",
     0.0005, TK::absolute, "USDA SCS (1986) TR-55, Appendix B, Type II distribution",
     nrcs_type_ii_noon_fraction},
    {"plane-equilibrium-discharge", "hydrology", "kinematic plane equilibrium q = i L", "L/s/m",
     0.01, TK::relative,
     "Wooding (1965) J. Hydrol. 3; Singh (1996) Kinematic Wave Modeling, ch. 5",
     plane_equilibrium_discharge},
    {"plane-equilibrium-time", "hydrology", "kinematic plane time to equilibrium t_e", "min",
     0.01, TK::relative,
     "Wooding (1965) J. Hydrol. 3; Singh (1996) ch. 5: t_e = (L i^(1-m)/alpha)^(1/m)",
     plane_equilibrium_time},
    {"weir-pool-equilibrium-head", "network", "pool head over weir at steady inflow 4 m3/s", "m",
     1e-6, TK::absolute,
     "steady storage equation with weir Q = C L H^1.5: H = (Q/(C L))^(2/3); Henderson (1966) "
     "ch. 6",
     weir_pool_equilibrium_head},
    {"linear-reservoir-outflow", "network", "linear reservoir outflow at t = 3 K", "m3/s", 1e-4,
     TK::relative,
     "O = I (1 - exp(-t/K)): Chow, Maidment & Mays (1988) ch. 8 (section from memory); Dooge "
     "(1973)",
     linear_reservoir_outflow},
    {"hds5-inlet-control", "network", "submerged inlet-control headwater, 1.2 m concrete pipe",
     "m", 1e-6, TK::absolute,
     "FHWA HDS-5 (Schall et al. 2012) Appendix A, submerged form; Table A.1 constants "
     "recalled, matched against a third-party copy",
     hds5_inlet_control_headwater},
    {"chow-8.2-detention-peak", "network", "peak outflow of the 1-acre detention example",
     "cfs", 0.5, TK::absolute,
     "Chow, Maidment & Mays (1988) Applied Hydrology, Examples 8.2.1-8.2.2 (from memory)",
     chow_detention_peak_outflow},
    {"ponce-kinematic-boundary", "routing",
     "t_r S0 u0/d0 at T S0 u0/d0 = 171, T = 2 t_r (invented reach)", "-", 1e-9, TK::absolute,
     "Ponce, Li & Simons (1978) J. Hydraul. Div. ASCE 104(HY3), kinematic criterion; closed "
     "form on invented data",
     ponce_kinematic_boundary},
};

}  // namespace

std::span<const VerificationCase> verification_cases() { return kCases; }

bool within_tolerance(const VerificationCase& c, double published, double freshet) {
  if (!std::isfinite(published) || !std::isfinite(freshet)) return false;
  const double allowed =
      c.tolerance_kind == ToleranceKind::absolute ? c.tolerance : c.tolerance * std::abs(published);
  return std::abs(freshet - published) <= allowed;
}

CaseResult run_case(const VerificationCase& c, double published_factor) {
  CaseResult result;
  result.verification_case = &c;
  const auto start = std::chrono::steady_clock::now();
  try {
    const CaseValues values = c.compute();
    result.published = values.published * published_factor;
    result.freshet = values.freshet;
    result.passed = within_tolerance(c, result.published, result.freshet);
  } catch (const std::exception& e) {
    result.published = kNaN;
    result.freshet = kNaN;
    result.error = e.what();
  }
  result.elapsed_s =
      std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  return result;
}

}  // namespace freshet::cli
