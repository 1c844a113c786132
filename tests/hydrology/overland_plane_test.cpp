#include "freshet/hydrology/overland_plane.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <gtest/gtest.h>

#include "freshet/verification/problems.hpp"

namespace freshet::hydrology {
namespace {

// Invented plane: L = 100 m, S = 0.01, n = 0.1 -> alpha = 1 m^(1/3)/s; excess 50 mm/h
// (freshet/verification/problems.hpp, shared with `freshet verify`).
OverlandPlaneSpec test_plane(int cells = 200) { return verification::kinematic_test_plane(cells); }
constexpr double kExcess = verification::kTestPlaneExcess_m_s;

// The stated grids: second-order MUSCL-Heun on 200 cells, first-order explicit upwind on
// 1000 cells (Courant targets are the routing defaults: 0.45 and 0.9), and the grid-free
// characteristics scheme sampled on 50 cells (its outlet discharge is the outlet face flux,
// OverlandPlane::outflow_m2s; the last cell's average once read 1-2 % low on the rise).
struct Grid {
  routing::SchemeKind scheme;
  int cells;
};
routing::RoutingOptions options_for(const Grid& g) {
  routing::RoutingOptions o;
  o.scheme = g.scheme;
  return o;
}
class KinematicPlaneGrid : public ::testing::TestWithParam<Grid> {};

struct Comparison {
  double max_error_m2s = 0.0;   // largest |numerical - analytical| at the sampled times
  double peak_m2s = 0.0;        // analytical peak
  double time_to_99_s = -1.0;   // when q first reaches 0.99 q_peak (numerical, interpolated)
};

// Runs a dry plane under kExcess for [0, rain_end_s), samples the outlet every `sample_s`
// until end_s and compares with the analytical solution.
// `Model` is an OverlandPlane or a PlaneCascade (advance(t0, t1, excess), outflow_m2s()).
template <class Model>
Comparison run_against_analytical(Model& plane, const geometry::PowerLawFlux& flux,
                                  double rain_end_s, double end_s, double sample_s) {
  Comparison c;
  c.peak_m2s = kinematic_plane_outflow_m2s(flux, 100.0, kExcess, rain_end_s,
                                           std::min(rain_end_s, end_s));
  double q_previous = 0.0;
  for (double t = 0.0; t < end_s - 1e-9; t += sample_s) {
    double t1 = t + sample_s;
    // Land on the end of the rain exactly.
    if (t < rain_end_s && t1 > rain_end_s) t1 = rain_end_s;
    plane.advance(t, t1, t < rain_end_s ? kExcess : 0.0);
    const double exact = kinematic_plane_outflow_m2s(flux, 100.0, kExcess, rain_end_s, t1);
    const double q = plane.outflow_m2s();
    c.max_error_m2s = std::max(c.max_error_m2s, std::abs(q - exact));
    const double target = 0.99 * c.peak_m2s;
    if (c.time_to_99_s < 0.0 && q >= target) {
      c.time_to_99_s = t + (t1 - t) * (target - q_previous) / (q - q_previous);
    }
    q_previous = q;
    t = t1 - sample_s;
  }
  return c;
}

// Wooding (1965); Singh (1996) ch. 5: t_e = (L i^(1-m)/alpha)^(1/m), q_e = i L, and the
// rising limb alpha (i t)^m meets q_e exactly at t_e.
TEST(KinematicPlane, AnalyticalSolutionIsSelfConsistent) {
  const auto flux = test_plane().flux();
  EXPECT_DOUBLE_EQ(flux.alpha(), 1.0);
  const double t_e = kinematic_plane_equilibrium_time_s(flux, 100.0, kExcess);
  EXPECT_NEAR(flux.alpha() * std::pow(kExcess * t_e, 5.0 / 3.0), kExcess * 100.0, 1e-15);
  EXPECT_NEAR(kinematic_plane_outflow_m2s(flux, 100.0, kExcess, 1e9, 2.0 * t_e),
              kExcess * 100.0, 1e-15);
  // Recession: q falls, and the characteristic relation holds at the returned q.
  const double t = 1.5 * t_e + 600.0;
  const double q = kinematic_plane_outflow_m2s(flux, 100.0, kExcess, 1.5 * t_e, t);
  EXPECT_LT(q, kExcess * 100.0);
  EXPECT_NEAR(q / kExcess + (5.0 / 3.0) * std::pow(q, 0.4) * 600.0, 100.0, 1e-9);
}

// Long after the rain the analytical recession gives a drained plane: q from
// q/i + m alpha^(1/m) q^(1-1/m) t = L is (L / (m alpha^(1/m) t))^(m/(m-1)), about 1e-321 m2/s
// at t = 1e130 s, below every bracket. It once returned the plateau q_max instead (its root
// search found no bracket and fell back to q_max without a word).
TEST(KinematicPlane, AnalyticalRecessionLongAfterTheRainIsADrainedPlane) {
  const auto flux = test_plane().flux();
  const double t_e = kinematic_plane_equilibrium_time_s(flux, 100.0, kExcess);
  EXPECT_EQ(kinematic_plane_outflow_m2s(flux, 100.0, kExcess, t_e, t_e + 1e130), 0.0);
  const double q = kinematic_plane_outflow_m2s(flux, 100.0, kExcess, t_e, t_e + 1e6);
  EXPECT_NEAR(q, std::pow(100.0 / ((5.0 / 3.0) * 1e6), 2.5), 1e-3 * q);  // i = 50 mm/h: q/i << L
}

void report(const char* label, const Comparison& c) {
  std::printf("%s: max error %.3g of peak, time to 99%% %.1f s\n", label,
              c.max_error_m2s / c.peak_m2s, c.time_to_99_s);
}

// Full equilibrium then recession, against Wooding (1965) / Singh (1996): rain for 1.6 t_e,
// outlet sampled every 30 s to 4 t_e, within 1 % of the peak at every sample.
TEST_P(KinematicPlaneGrid, EquilibriumAndRecessionMatchTheAnalyticalSolution) {
  OverlandPlane plane(test_plane(GetParam().cells), options_for(GetParam()));
  const double t_e = kinematic_plane_equilibrium_time_s(plane.spec().flux(), 100.0, kExcess);
  const Comparison c = run_against_analytical(plane, plane.spec().flux(), 1.6 * t_e, 4.0 * t_e, 30.0);
  report("equilibrium", c);
  EXPECT_NEAR(c.peak_m2s, kExcess * 100.0, 1e-15);
  EXPECT_LE(c.max_error_m2s, 0.01 * c.peak_m2s);
  // t_e from the time the outlet reaches 0.99 q_e (analytically 0.99^(3/5) t_e): within 1 %.
  EXPECT_NEAR(c.time_to_99_s / std::pow(0.99, 0.6), t_e, 0.01 * t_e);
  const auto& l = plane.ledger();
  EXPECT_NEAR(l.lateral_m3, kExcess * 1.6 * t_e * 100.0, 1e-12);
  EXPECT_NEAR(l.balance_error_m3(), 0.0, 1e-12 * l.lateral_m3);  // ~1e4 steps of round-off
}

// Rain stops at t_e / 2: the outlet holds alpha (i t_r)^m (partial equilibrium) until the
// characteristic from x_r arrives, then recedes (Singh 1996 ch. 5).
TEST_P(KinematicPlaneGrid, PartialEquilibriumPlateauMatchesTheAnalyticalSolution) {
  OverlandPlane plane(test_plane(GetParam().cells), options_for(GetParam()));
  const auto flux = plane.spec().flux();
  const double t_e = kinematic_plane_equilibrium_time_s(flux, 100.0, kExcess);
  const Comparison c = run_against_analytical(plane, plane.spec().flux(), 0.5 * t_e, 4.0 * t_e, 30.0);
  report("partial", c);
  EXPECT_NEAR(c.peak_m2s, std::pow(kExcess * 0.5 * t_e, 5.0 / 3.0), 1e-15);
  EXPECT_LE(c.max_error_m2s, 0.01 * c.peak_m2s);
}

// Two planes of equal alpha in series form one plane of the summed length (the kinematic
// equation does not see the joint), so the cascade must follow the analytical solution for
// L = 40 + 60 m (Wooding 1965), within 1 % of the peak every 30 s (MUSCL-Heun, 80 + 120 cells,
// 5-s handover steps).
INSTANTIATE_TEST_SUITE_P(StatedGrids, KinematicPlaneGrid,
                         ::testing::Values(Grid{routing::SchemeKind::kMusclHeun, 200},
                                           Grid{routing::SchemeKind::kExplicitUpwind, 1000},
                                           Grid{routing::SchemeKind::kCharacteristics, 50}));

TEST(PlaneCascade, EqualPlanesInSeriesBehaveAsOnePlane) {
  OverlandPlaneSpec upper = test_plane(80), lower = test_plane(120);
  upper.length_m = 40.0;
  lower.length_m = 60.0;
  upper.name = "upper";
  lower.name = "lower";
  PlaneCascade cascade({upper, lower}, options_for({routing::SchemeKind::kMusclHeun, 0}));
  const auto flux = upper.flux();
  const double t_e = kinematic_plane_equilibrium_time_s(flux, 100.0, kExcess);
  const Comparison c = run_against_analytical(cascade, flux, 1.5 * t_e, 3.0 * t_e, 30.0);
  report("cascade", c);
  EXPECT_NEAR(c.peak_m2s, kExcess * 100.0, 1e-15);
  EXPECT_LE(c.max_error_m2s, 0.01 * c.peak_m2s);
  EXPECT_NEAR(cascade.excess_received_m2() - cascade.outflow_volume_m2() - cascade.storage_m2(),
              0.0, 1e-12 * cascade.excess_received_m2());
}

TEST(OverlandPlane, RejectsBadPlanes) {
  try {
    OverlandPlane plane({.name = "bad", .length_m = 0.0, .slope = -0.01, .manning_n = 0.0,
                         .cell_count = 0});
    FAIL();
  } catch (const InputError& e) {
    ASSERT_EQ(e.problems().size(), 4u);
    EXPECT_EQ(e.problems()[1].to_string(), "plane 'bad', field 'slope' = -0.01: must be > 0");
    EXPECT_EQ(e.problems()[3].to_string(), "plane 'bad', field 'cell_count' = 0: must be >= 1");
  }
  EXPECT_THROW(PlaneCascade({}), InputError);
}

}  // namespace
}  // namespace freshet::hydrology
