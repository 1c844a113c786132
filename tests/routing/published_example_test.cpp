// A published kinematic-wave channel-routing worked example: J. A. Ramirez, "Kinematic Wave
// Routing - Example", CE322 Basic Hydrology course notes, Colorado State University.
// Rectangular channel 100 ft wide, bed slope 0.001, Manning's n = 0.035, length 25 000 ft,
// treated as wide (R ~ depth); inflow (min, cfs): 0 2000, 12 2000, 24 3000, 36 4000,
// 48 5000, 60 6000, 72 5000, 84 4000, 96 3000, 108 2000, 120 2000. The worked solution
// translates every inflow discharge Q to the outlet unchanged, arriving L / c(Q) later with
// the kinematic celerity c = (5/3) V (no lateral inflow, so no attenuation; the arrival times
// increase along the rising limb, so no characteristics cross within the reach).
// freshet must reproduce that: the outflow takes each tabulated discharge at its
// characteristic arrival time, and the peak leaves the reach undiminished.
#include <gtest/gtest.h>

#include <cmath>
#include <vector>

#include "freshet/routing/kinematic_reach.hpp"
#include "routing_test_support.hpp"

namespace freshet::routing {
namespace {

constexpr double kFt = 0.3048;                   // m per ft (exact)
constexpr double kCfs = kFt * kFt * kFt;         // m3/s per cfs
const double kLength_m = 25000.0 * kFt;
const geometry::PowerLawFlux kChannel = testing::wide_manning(100.0 * kFt, 0.035, 0.001);

struct Ordinate {
  double time_min;
  double discharge_cfs;
};
constexpr Ordinate kInflow[] = {{0, 2000},  {12, 2000}, {24, 3000}, {36, 4000},
                                {48, 5000}, {60, 6000}, {72, 5000}, {84, 4000},
                                {96, 3000}, {108, 2000}, {120, 2000}};

// Arrival time at the outlet of the characteristic carrying discharge q launched at t_s.
double arrival_s(double t_s, double q_m3s) {
  return t_s + kLength_m / kChannel.celerity_m_s(kChannel.area_for_discharge_m2(q_m3s));
}

TEST(PublishedExample, RamirezWideChannelTranslatesEveryDischarge) {
  std::vector<double> t_s, q_m3s;
  for (const auto& o : kInflow) {
    t_s.push_back(o.time_min * 60.0);
    q_m3s.push_back(o.discharge_cfs * kCfs);
  }
  const PiecewiseLinearSeries inflow(t_s, q_m3s, "Ramirez inflow");
  KinematicReach<geometry::PowerLawFlux> reach({"ramirez", kLength_m, 1000}, kChannel,
                                               testing::options_for(SchemeKind::kMusclHeun));
  reach.set_uniform_discharge(q_m3s.front());

  // Outflow sampled every 10 s up to 4 h.
  std::vector<double> out_t, out_q;
  const double dt_s = 10.0;
  for (double t = 0.0; t < 4.0 * 3600.0; t += dt_s) {
    reach.advance(t, t + dt_s, inflow, LateralInflow::none());
    out_t.push_back(t + dt_s);
    out_q.push_back(reach.cell_discharge_m3s(999));
  }
  // Rising limb: the time the outflow first reaches each tabulated discharge equals the
  // characteristic arrival time, within 1 minute (the tabulated rise is 12 min per step).
  for (std::size_t k = 2; k <= 4; ++k) {
    const double target = q_m3s[k];
    std::size_t j = 0;
    while (j < out_q.size() && out_q[j] < target) ++j;
    ASSERT_LT(j, out_q.size());
    const double crossing = out_t[j - 1] + (target - out_q[j - 1]) / (out_q[j] - out_q[j - 1]) * dt_s;
    const double exact = arrival_s(t_s[k], target);
    EXPECT_NEAR(crossing, exact, 60.0) << kInflow[k].discharge_cfs << " cfs";
    RecordProperty("arrival_error_s_" + std::to_string(static_cast<int>(kInflow[k].discharge_cfs)),
                   std::to_string(crossing - exact));
  }
  // The 6000 cfs peak leaves undiminished (within 1%, the smoothing of the hydrograph's
  // corner by the grid) and on time (within 2 minutes).
  std::size_t peak = 0;
  for (std::size_t j = 1; j < out_q.size(); ++j) {
    if (out_q[j] > out_q[peak]) peak = j;
  }
  EXPECT_NEAR(out_q[peak], 6000.0 * kCfs, 0.01 * 6000.0 * kCfs);
  EXPECT_NEAR(out_t[peak], arrival_s(3600.0, 6000.0 * kCfs), 120.0);
  // Volume through the reach: nothing made or lost (ledger to round-off).
  EXPECT_LE(reach.ledger().relative_balance_error(), 1e-12);
}

}  // namespace
}  // namespace freshet::routing
