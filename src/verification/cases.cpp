// The verification cases of `freshet verify`: one small function per case, each computing
// freshet's value live through the library and comparing it with the published value of its
// problem. The problems (parameters, published values, sources) are written once, in
// freshet/verification/problems.hpp, which the module tests (tests/<module>/) use too; "from
// memory" marks a value recalled without the source at hand. Registration is the single table
// at the end of this file.
#include "freshet/verification/verification_case.hpp"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <exception>
#include <limits>
#include <vector>

#include "freshet/core/time_series.hpp"
#include "freshet/core/units.hpp"
#include "freshet/geometry/section_flux.hpp"
#include "freshet/hydrology/curve_number.hpp"
#include "freshet/hydrology/nrcs_distribution.hpp"
#include "freshet/routing/applicability.hpp"
#include "freshet/routing/kinematic_reach.hpp"
#include "freshet/routing/lateral_inflow.hpp"
#include "freshet/verification/problems.hpp"

namespace freshet::verification {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kHour_s = 3600.0;
constexpr double kCm_m = 0.01;

// ---- geometry ----------------------------------------------------------------------------

CaseValues chow_normal_depth() {
  const ChowTrapezoidExample ex;
  const auto depth = geometry::normal_depth_m(*ex.section(), ex.bed_slope, ex.discharge_m3s());
  return {ex.normal_depth_ft, depth.value_or(kNaN) / units::kMetresPerFoot};
}

CaseValues pipe_capacity_depth_ratio() {
  const PartFullPipeExample ex;
  const geometry::CircularSection pipe(ex.spec, "pipe");
  return {ex.capacity_depth_ratio, pipe.capacity_depth_m() / pipe.diameter_m()};
}

// freshet's value is the cap of the routing flux law (the tabulated Q(A) used in reaches),
// divided by Manning's full flow.
CaseValues pipe_capacity_discharge_ratio() {
  const PartFullPipeExample ex;
  const geometry::FlowSection flow =
      geometry::make_flow_section(ex.spec, ex.bed_slope, {}, "pipe");
  const double q_full = flow.section->normal_discharge_m3s(ex.spec.diameter_m, ex.bed_slope);
  return {ex.capacity_discharge_ratio, geometry::max_discharge_m3s(flow.flux) / q_full};
}

// ---- routing -----------------------------------------------------------------------------

routing::RoutingOptions scheme_options(routing::SchemeKind scheme) {
  routing::RoutingOptions options;
  options.scheme = scheme;
  return options;
}

// The shock of kShockProblem on the wide channel; freshet's value: the speed fitted to the
// detected shock path (explicit upwind, dx = 5 m, 800 s).
CaseValues riemann_shock_speed() {
  const geometry::PowerLawFlux law = wide_channel();
  const RiemannProblem& p = kShockProblem;
  const int cells = 800;
  routing::KinematicReach<geometry::PowerLawFlux> reach(
      {"riemann", p.length_m, cells}, law, scheme_options(routing::SchemeKind::kExplicitUpwind));
  reach.set_initial_areas(p.initial_areas_m2(cells));
  const auto inflow = PiecewiseLinearSeries::constant(law.discharge_m3s(p.a_left_m2));
  for (double t = 0.0; t < 800.0; t += 20.0) {
    (void)reach.advance(t, t + 20.0, inflow, routing::LateralInflow::none());
  }
  const routing::ShockReport& shock = reach.shock_report();
  return {p.shock_speed_m_s(law), shock.formed ? shock.speed_m_s : kNaN};
}

// The Burgers bump; freshet's value: the formation time of the shock detected in the computed
// solution (explicit upwind, dx = 2.5 mm).
CaseValues burgers_breaking_time() {
  const BurgersBump bump;
  const double length = 10.0, dx = 0.0025;
  const int cells = static_cast<int>(length / dx);
  routing::KinematicReach<geometry::PowerLawFlux> reach(
      {"burgers", length, cells}, BurgersBump::flux(),
      scheme_options(routing::SchemeKind::kExplicitUpwind));
  std::vector<double> a0(static_cast<std::size_t>(cells));
  for (std::size_t i = 0; i < a0.size(); ++i) {
    a0[i] = bump.initial_area_m2((static_cast<double>(i) + 0.5) * dx);
  }
  reach.set_initial_areas(a0);
  const double exact = bump.breaking_time_s();
  const auto inflow = PiecewiseLinearSeries::constant(0.5);  // Q(1) upstream
  const double dt_obs = exact / 400.0;
  for (int k = 0; k < 600; ++k) {
    (void)reach.advance(k * dt_obs, (k + 1) * dt_obs, inflow, routing::LateralInflow::none());
  }
  const routing::ShockReport& shock = reach.shock_report();
  return {exact, shock.formed ? shock.formation_time_s : kNaN};
}

// The fan of kFanProblem: the area in the cell nearest the middle of the fan after 600 s
// (MUSCL-Heun, dx = 2.5 m).
CaseValues rarefaction_fan_area() {
  const geometry::PowerLawFlux law = wide_channel();
  const RiemannProblem& p = kFanProblem;
  const double t_end = 600.0;
  const int cells = 1600;
  const double dx = p.length_m / cells;
  routing::KinematicReach<geometry::PowerLawFlux> reach(
      {"fan", p.length_m, cells}, law, scheme_options(routing::SchemeKind::kMusclHeun));
  reach.set_initial_areas(p.initial_areas_m2(cells));
  (void)reach.advance(0.0, t_end, PiecewiseLinearSeries::constant(law.discharge_m3s(p.a_left_m2)),
                      routing::LateralInflow::none());
  const double xi_mid = 0.5 * (law.celerity_m_s(p.a_left_m2) + law.celerity_m_s(p.a_right_m2));
  const auto cell = static_cast<std::size_t>((p.x_jump_m + xi_mid * t_end) / dx);
  const double xi = ((static_cast<double>(cell) + 0.5) * dx - p.x_jump_m) / t_end;
  return {p.rarefaction_area_m2(law, xi), reach.cell_area_m2()[cell]};
}

CaseValues ponce_kinematic_boundary() {
  const PonceReach r;
  return {r.kinematic_period_number / 2.0,
          routing::wave_applicability(r.kinematic_boundary_rise_s(), r.bed_slope,
                                      r.velocity_m_s, r.depth_m)
              .kinematic_number};
}

// ---- hydrology ---------------------------------------------------------------------------

// TR-55 Table 2-1, its first entry: CN 75 and 4.0 in of rain give 1.67 in of runoff.
CaseValues tr55_runoff() {
  const Tr55Entry& e = kTr55Table2_1[0];
  const double runoff_m = hydrology::curve_number_runoff_m({.curve_number = e.curve_number},
                                                           e.rain_in * units::kMetresPerInch);
  return {e.runoff_in, runoff_m / units::kMetresPerInch};
}

// Silt loam, Example 4.3.1: F after 1 h of ponding.
CaseValues green_ampt_ponded_depth() {
  return {kSiltLoamPondedDepthAfter1h_cm,
          hydrology::green_ampt_ponded_infiltration_m(silt_loam(), kHour_s) / kCm_m};
}

// Silt loam, Example 4.4.1: ponding time under 5 cm/h.
CaseValues green_ampt_ponding_time() {
  return {kSiltLoamPondingTimeUnder5cmh_h,
          hydrology::green_ampt_ponding_time_s(silt_loam(), 5.0 * kCm_m / kHour_s) / kHour_s};
}

// The TR-55 Type II ordinate at noon; freshet's value: from a 15-minute design storm of 5 in.
CaseValues nrcs_type_ii_noon_fraction() {
  const double depth_m = 5.0 * units::kMetresPerInch;
  const hydrology::Hyetograph storm =
      hydrology::nrcs_24h_storm(hydrology::NrcsRainType::type_ii, depth_m, 900.0, "Type II storm");
  return {kTypeIIFractionAtNoon, storm.cumulative_depth_m(12.0 * kHour_s) / storm.total_depth_m()};
}

// The kinematic test plane: equilibrium discharge q_e = i L, reached at
// t_e = (L i^(1-m) / alpha)^(1/m); the rising limb is alpha (i t)^m, so the outlet reaches
// 0.99 q_e at 0.99^(3/5) t_e. MUSCL-Heun on 200 cells, outlet sampled every 10 s for 1.6 t_e.
struct PlaneRun {
  double equilibrium_time_s = 0.0;      // closed form
  double time_to_99_percent_s = kNaN;   // computed, linear between samples
  double final_outflow_m2s = 0.0;       // computed, at 1.6 t_e
};

PlaneRun run_test_plane() {
  const hydrology::OverlandPlaneSpec spec = kinematic_test_plane(200);
  const double excess = kTestPlaneExcess_m_s, length = spec.length_m;
  hydrology::OverlandPlane plane(spec, scheme_options(routing::SchemeKind::kMusclHeun));
  PlaneRun run;
  run.equilibrium_time_s =
      hydrology::kinematic_plane_equilibrium_time_s(spec.flux(), length, excess);
  const double target = 0.99 * excess * length, end_s = 1.6 * run.equilibrium_time_s;
  double t = 0.0, q_previous = 0.0;
  while (t < end_s) {
    const double t1 = std::min(t + 10.0, end_s);
    plane.advance(t, t1, excess);
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

// Equilibrium discharge per metre of width, in litres per second per metre.
CaseValues plane_equilibrium_discharge() {
  const PlaneRun run = run_test_plane();
  return {kTestPlaneExcess_m_s * kinematic_test_plane().length_m * 1e3,
          run.final_outflow_m2s * 1e3};
}

// Time to equilibrium, from the computed time to 99 % of q_e, in minutes.
CaseValues plane_equilibrium_time() {
  const PlaneRun run = run_test_plane();
  return {run.equilibrium_time_s / 60.0, run.time_to_99_percent_s / std::pow(0.99, 0.6) / 60.0};
}

// ---- network (structures) ----------------------------------------------------------------

// The weir pool, full to 1.2 m over the crest, under 4 m3/s for 460 min (10 s sub-steps).
CaseValues weir_pool_equilibrium_head() {
  const WeirPool w;
  const double inflow = 4.0;
  network::structures::LevelPool pool = w.make(10.0);
  pool.reset(0.0, w.crest_stage_m + 1.2);
  for (int j = 0; j < 460; ++j) pool.advance(j * 60.0, (j + 1) * 60.0, inflow);
  return {w.equilibrium_head_m(inflow), pool.state().stage_m - w.crest_stage_m};
}

// The linear reservoir, K = 1 h, I = 2 m3/s, 80 steps to t = 3 K.
CaseValues linear_reservoir_outflow() {
  const double k = 3600.0, inflow = 2.0, t_end = 3.0 * k;
  network::structures::LevelPool pool = linear_reservoir(k);
  const int steps = 80;
  const double dt = t_end / steps;
  for (int j = 0; j < steps; ++j) pool.advance(j * dt, (j + 1) * dt, inflow);
  return {inflow * (1.0 - std::exp(-t_end / k)), pool.state().outflow_m3s};
}

// The detention example by storage indication; freshet's value: the peak outflow.
CaseValues chow_detention_peak_outflow() {
  const ChowDetentionExample ex;
  const std::vector<double> out = network::structures::route_storage_indication(
      ex.storage_m3(), ex.outflow_m3s(), ex.dt_s, ex.inflow_m3s(), 0.0);
  return {ex.peak_outflow_cfs,
          *std::max_element(out.begin(), out.end()) / units::kCubicMetresPerCubicFoot};
}

// HDS-5 submerged inlet control for a 1.2 m concrete pipe 40 m long falling 0.4 m (S = 0.01)
// at Q = 3 m3/s: the form evaluated with the Table A.1 constants.
CaseValues hds5_inlet_control_headwater() {
  const network::structures::Culvert pipe(concrete_pipe(1.2, 40.0, 0.4),
                                          "culvert 'verification'");
  return {hds5_submerged_headwater_m(3.0, 1.2, 0.01), pipe.inlet_control_depth_m(3.0)};
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

const VerificationCase* find_case(std::string_view id) {
  for (const VerificationCase& c : kCases) {
    if (c.id == id) return &c;
  }
  return nullptr;
}

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

}  // namespace freshet::verification
