// Kinematic-wave translation of a hydrograph through a wide channel with no lateral inflow,
// checked against the exact solution by characteristics (Lighthill & Whitham 1955, Proc. R.
// Soc. A 229: every discharge Q travels unchanged at the celerity c = dQ/dA, which for a wide
// Manning channel is (5/3) V) on invented data: rectangular channel 40 m wide treated as wide
// (R ~ depth), bed slope 0.0008, Manning's n = 0.032, length 9000 m; inflow (min, m3/s):
// 0 60, 15 60, 30 90, 45 120, 60 150, 75 180, 90 150, 105 120, 120 90, 135 60, 150 60.
// The arrival times t + L / c(Q) increase along the rising limb (5844, 6004, 6447, 7027,
// 7686 s for 60 ... 180 m3/s), so no characteristics cross within the reach: freshet's
// outflow must take each tabulated discharge at its characteristic arrival time, and the peak
// must leave the reach undiminished.
#include <gtest/gtest.h>

#include <cmath>
#include <vector>

#include "freshet/routing/kinematic_reach.hpp"
#include "routing_test_support.hpp"

namespace freshet::routing {
namespace {

const double kLength_m = 9000.0;
const geometry::PowerLawFlux kChannel = testing::wide_manning(40.0, 0.032, 0.0008);

struct Ordinate {
  double time_min;
  double discharge_m3s;
};
constexpr Ordinate kInflow[] = {{0, 60},   {15, 60},  {30, 90},   {45, 120},  {60, 150}, {75, 180},
                                {90, 150}, {105, 120}, {120, 90}, {135, 60}, {150, 60}};

// Arrival time at the outlet of the characteristic carrying discharge q launched at t_s.
double arrival_s(double t_s, double q_m3s) {
  return t_s + kLength_m / kChannel.celerity_m_s(kChannel.area_for_discharge_m2(q_m3s));
}

TEST(CharacteristicArrival, WideChannelTranslatesEveryDischarge) {
  std::vector<double> t_s, q_m3s;
  for (const auto& o : kInflow) {
    t_s.push_back(o.time_min * 60.0);
    q_m3s.push_back(o.discharge_m3s);
  }
  const PiecewiseLinearSeries inflow(t_s, q_m3s, "invented inflow");
  KinematicReach<geometry::PowerLawFlux> reach({"wide-channel", kLength_m, 1000}, kChannel,
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
  // characteristic arrival time, within 1 minute (the tabulated rise is 15 min per step).
  for (std::size_t k = 2; k <= 4; ++k) {
    const double target = q_m3s[k];
    std::size_t j = 0;
    while (j < out_q.size() && out_q[j] < target) ++j;
    ASSERT_LT(j, out_q.size());
    const double crossing = out_t[j - 1] + (target - out_q[j - 1]) / (out_q[j] - out_q[j - 1]) * dt_s;
    const double exact = arrival_s(t_s[k], target);
    EXPECT_NEAR(crossing, exact, 60.0) << kInflow[k].discharge_m3s << " m3/s";
    RecordProperty("arrival_error_s_" + std::to_string(static_cast<int>(kInflow[k].discharge_m3s)),
                   std::to_string(crossing - exact));
  }
  // The 180 m3/s peak leaves undiminished (within 1%, the smoothing of the hydrograph's
  // corner by the grid) and on time (within 2 minutes).
  std::size_t peak = 0;
  for (std::size_t j = 1; j < out_q.size(); ++j) {
    if (out_q[j] > out_q[peak]) peak = j;
  }
  EXPECT_NEAR(out_q[peak], 180.0, 0.01 * 180.0);
  EXPECT_NEAR(out_t[peak], arrival_s(75.0 * 60.0, 180.0), 120.0);
  // Volume through the reach: nothing made or lost (ledger to round-off).
  EXPECT_LE(reach.ledger().relative_balance_error(), 1e-12);
}

}  // namespace
}  // namespace freshet::routing
