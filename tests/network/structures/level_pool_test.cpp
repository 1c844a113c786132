#include "freshet/network/structures/level_pool.hpp"

#include <algorithm>
#include <cmath>
#include <string>
#include <vector>
#include <cstdio>
#include <gtest/gtest.h>

#include "freshet/core/error.hpp"
#include "freshet/core/units.hpp"
#include "freshet/network/structures/outlets.hpp"
#include "freshet/verification/problems.hpp"

namespace freshet::network::structures {
namespace {

// Linear reservoir O = S / K: a prismatic pool of 1 m2 whose outflow is stage / K
// (freshet/verification/problems.hpp, shared with `freshet verify`).
using verification::linear_reservoir;

// Reference: linear reservoir dS/dt = I - S/K with constant inflow from empty has
// O(t) = I (1 - exp(-t/K)) (Chow, Maidment and Mays 1988, Applied Hydrology, ch. 8,
// linear reservoir -- section from memory; Dooge 1973, Linear Theory of Hydrologic
// Systems). The trapezoidal storage-indication step is second order: the error falls
// about four-fold when dt halves.
TEST(LevelPool, LinearReservoirConvergesAtSecondOrder) {
  const double k = 3600.0, inflow = 2.0, t_end = 3.0 * k;
  double previous_error = 0.0;
  for (int n : {10, 20, 40, 80}) {
    LevelPool pool = linear_reservoir(k);
    const double dt = t_end / n;
    double worst = 0.0;
    for (int j = 0; j < n; ++j) {
      pool.advance(j * dt, (j + 1) * dt, inflow);
      const double exact = inflow * (1.0 - std::exp(-(j + 1) * dt / k));
      worst = std::max(worst, std::abs(pool.state().outflow_m3s - exact));
    }
    if (previous_error > 0.0) {
      std::printf("linear reservoir n=%d max error %.3e ratio %.3f\n", n, worst,
                  previous_error / worst);
      EXPECT_GT(previous_error / worst, 3.8);
      EXPECT_LT(previous_error / worst, 4.2);
    }
    previous_error = worst;
  }
  EXPECT_LT(previous_error, 1e-4 * inflow);
}

// Sub-steps reproduce the same answer as the equivalent number of whole steps.
TEST(LevelPool, SubstepsEqualSmallerSteps) {
  LevelPoolOptions sub;
  sub.max_substep_s = 300.0;
  LevelPool coarse = linear_reservoir(1800.0, sub);
  LevelPool fine = linear_reservoir(1800.0);
  for (int j = 0; j < 6; ++j) {
    const LevelPoolStep s = coarse.advance(j * 1200.0, (j + 1) * 1200.0, 1.0 + j);
    EXPECT_EQ(s.substeps, 4);
    for (int i = 0; i < 4; ++i)
      fine.advance(j * 1200.0 + i * 300.0, j * 1200.0 + (i + 1) * 300.0, 1.0 + j);
  }
  EXPECT_NEAR(coarse.state().storage_m3, fine.state().storage_m3,
              1e-12 * fine.state().storage_m3);
}

// Cross-implementation: the textbook table method (Chow, Maidment and Mays 1988, sec. 8.2)
// and the general step are the same trapezoidal scheme; on a linear storage-outflow table
// (exact under linear interpolation) and a hydrograph sampled at the step ends they agree to
// round-off when the general step is fed the mean of the end inflows.
TEST(LevelPool, TableMethodMatchesGeneralStepOnLinearReservoir) {
  const double k = 2400.0, dt = 600.0;
  std::vector<double> storage, outflow;
  for (int i = 0; i <= 100; ++i) {
    storage.push_back(i * 1000.0);
    outflow.push_back(i * 1000.0 / k);
  }
  std::vector<double> inflow;  // triangular: 0 -> 60 m3/s at 60 min -> 0 at 180 min
  for (int j = 0; j <= 30; ++j) {
    const double t = j * dt / 60.0;
    inflow.push_back(t <= 60.0 ? t : std::max(0.0, 60.0 * (180.0 - t) / 120.0));
  }
  const std::vector<double> table = route_storage_indication(storage, outflow, dt, inflow, 0.0);
  LevelPool pool = linear_reservoir(k);
  for (std::size_t j = 0; j + 1 < inflow.size(); ++j) {
    const double t0 = static_cast<double>(j) * dt;
    pool.advance(t0, t0 + dt, 0.5 * (inflow[j] + inflow[j + 1]));
    EXPECT_NEAR(pool.state().outflow_m3s, table[j + 1], 1e-10 * (1.0 + table[j + 1])) << j;
  }
}

// Textbook worked example: Chow, Maidment and Mays (1988), Applied Hydrology, McGraw-Hill,
// Examples 8.2.1 and 8.2.2 (storage-outflow function and level-pool routing) -- FROM MEMORY:
// the data and the result were recalled without the book at hand. The example (1-acre
// vertical-walled basin, tabulated pipe outflow, 0-360-0 cfs inflow, peak about 270 cfs at
// 80 min, the first 2S/dt + O values) is written once in freshet/verification/problems.hpp,
// shared with `freshet verify`. Outflow peaks where it crosses the falling inflow, as
// level-pool routing must.
using verification::ChowDetentionExample;

TEST(LevelPool, ChowDetentionExampleTableMethod) {
  const ChowDetentionExample ex;
  const double ft3 = units::kCubicMetresPerCubicFoot;
  const std::vector<double> storage_m3 = ex.storage_m3(), outflow_m3s = ex.outflow_m3s();
  for (std::size_t k = 1; k <= ex.storage_indication_cfs.size(); ++k) {
    const double si = 2.0 * storage_m3[k] / ex.dt_s + outflow_m3s[k];
    EXPECT_NEAR(si / ft3, ex.storage_indication_cfs[k - 1], 0.05) << "2S/dt + O at row " << k;
  }
  const std::vector<double> out = route_storage_indication(storage_m3, outflow_m3s, ex.dt_s,
                                                           ex.inflow_m3s(), 0.0);
  const auto peak = std::max_element(out.begin(), out.end());
  EXPECT_NEAR(*peak / ft3, ex.peak_outflow_cfs, 0.5);
  EXPECT_EQ(static_cast<double>(peak - out.begin()) * ex.dt_s, ex.peak_time_s) << "peak at 80 min";
}

// The general step (what the network driver uses) on the same example: the stage-storage
// relation is a prismatic 1-acre basin and the outflow a linear interpolation in stage, so
// 2S/dt + O is piecewise linear in stage with the table's breaks and both methods coincide.
TEST(LevelPool, ChowDetentionExampleGeneralStep) {
  const ChowDetentionExample ex;
  const double ft = units::kMetresPerFoot, ft3 = units::kCubicMetresPerCubicFoot;
  std::vector<double> stage_m, outflow_m3s;
  for (std::size_t k = 0; k < ex.stage_ft.size(); ++k) {
    stage_m.push_back(ex.stage_ft[k] * ft);
    outflow_m3s.push_back(ex.outflow_cfs[k] * ft3);
  }
  const auto rating = [stage_m, outflow_m3s](double h) {
    if (h <= 0.0) return 0.0;
    const auto it = std::upper_bound(stage_m.begin(), stage_m.end(), h);
    if (it == stage_m.end()) return outflow_m3s.back();
    const std::size_t k = static_cast<std::size_t>(it - stage_m.begin());
    const double w = (h - stage_m[k - 1]) / (stage_m[k] - stage_m[k - 1]);
    return outflow_m3s[k - 1] + w * (outflow_m3s[k] - outflow_m3s[k - 1]);
  };
  LevelPool pool("chow basin", StageStorage::prismatic(0.0, units::kSquareMetresPerAcre, 0.0,
                                                       "chow basin"),
                 rating);
  pool.reset(0.0, 0.0);
  for (std::size_t j = 0; j + 1 < ex.inflow_cfs.size(); ++j) {
    const double t0 = static_cast<double>(j) * ex.dt_s;
    pool.advance(t0, t0 + ex.dt_s, 0.5 * (ex.inflow_cfs[j] + ex.inflow_cfs[j + 1]) * ft3);
  }
  EXPECT_NEAR(pool.peaks().peak_outflow_m3s / ft3, ex.peak_outflow_cfs, 0.5);
  EXPECT_DOUBLE_EQ(pool.peaks().time_of_peak_outflow_s, ex.peak_time_s);
  EXPECT_LT(std::abs(pool.ledger().balance_error_m3()), 1e-12 * pool.ledger().supplied_m3());
}

// Reference: a prismatic pool of area A behind a weir draining with no inflow,
// A dH/dt = -C L H^1.5, has H(t) = H0 / (1 + C L sqrt(H0) t / (2A))^2 (separation of
// variables); under constant inflow Q the pool settles at the weir head H = (Q / (C L))^(2/3)
// exactly (the pool and both closed forms: freshet/verification/problems.hpp, WeirPool).
TEST(LevelPool, WeirPoolDrainsAsClosedFormAndSettlesAtEquilibriumHead) {
  const verification::WeirPool w;
  const double crest = w.crest_stage_m, h0 = 1.2;
  LevelPool pool = w.make(10.0);
  pool.reset(0.0, crest + h0);
  for (int j = 0; j < 60; ++j) {
    pool.advance(j * 60.0, (j + 1) * 60.0, 0.0);
    const double t = (j + 1) * 60.0;
    const double exact = w.draining_head_m(h0, t);
    // Trapezoidal truncation at 10 s sub-steps against a ~600 s time constant: < 1e-5 m.
    EXPECT_NEAR(pool.state().stage_m - crest, exact, 1.5e-5) << t;
  }
  const double q = 4.0;
  for (int j = 60; j < 60 + 400; ++j) pool.advance(j * 60.0, (j + 1) * 60.0, q);
  EXPECT_NEAR(pool.state().stage_m - crest, w.equilibrium_head_m(q), 1e-9);
  EXPECT_NEAR(pool.state().outflow_m3s, q, 1e-8);
}

// Volume ledger closes to round-off and storage never goes negative, including a step far
// longer than the pool's time constant, where the trapezoid would overshoot below empty.
TEST(LevelPool, LedgerClosesAndStorageNeverNegative) {
  const auto basin = StageStorage::from_table({50.0, 50.5, 51.0, 52.0, 53.5},
                                              {0.0, 300.0, 1500.0, 5000.0, 12000.0},
                                              StorageInterpolation::monotone_cubic, "basin");
  const Riser riser({Orifice{.invert_stage_m = 50.0, .shape = OrificeShape::circular,
                             .diameter_m = 0.6},
                     RectangularWeir{.crest_stage_m = 52.5, .length_m = 5.0}},
                    "riser");
  LevelPool pool("basin 'north-lea'", basin, [riser](double h) { return riser.discharge_m3s(h); });
  double t = 0.0, inflow_volume = 0.0;
  for (int j = 0; j < 200; ++j) {
    const double inflow = j < 12 ? 0.8 * j : (j < 36 ? std::max(0.0, 9.6 - 0.4 * (j - 12)) : 0.0);
    const double dt = (j % 7 == 0) ? 3600.0 : 600.0;  // irregular, some very long steps
    const LevelPoolStep s = pool.advance(t, t + dt, inflow);
    t += dt;
    inflow_volume += inflow * dt;
    EXPECT_GE(pool.state().storage_m3, 0.0);
    EXPECT_GE(s.mean_outflow_m3s, -1e-12);
  }
  EXPECT_LT(std::abs(pool.ledger().balance_error_m3()), 1e-9 * inflow_volume);
  LevelPoolOptions fine;
  fine.max_substep_s = 60.0;  // long steps let the trapezoid overshoot the inflow peak
  LevelPool ledger_pool("basin", basin, [riser](double h) { return riser.discharge_m3s(h); },
                        fine);
  double vin = 0.0;
  for (int j = 0; j < 100; ++j) {
    const double inflow = j < 10 ? 1.5 * j : std::max(0.0, 15.0 - 0.5 * (j - 10));
    ledger_pool.advance(j * 900.0, (j + 1) * 900.0, inflow);
    vin += inflow * 900.0;
  }
  const VolumeLedger& l = ledger_pool.ledger();
  EXPECT_NEAR(l.inflow_m3, vin, 1e-9 * vin);
  EXPECT_LT(std::abs(l.balance_error_m3()), 1e-9 * vin);
  const DetentionReport r = detention_report(ledger_pool);
  EXPECT_GT(r.peak_stage_m, 52.5);
  // Level-pool outflow peaks where it crosses the falling inflow, so below the inflow peak.
  EXPECT_LE(r.peak_outflow_m3s, 15.0);
  EXPECT_NEAR(r.peak_storage_m3, basin.storage_m3(r.peak_stage_m), 1e-6 * r.peak_storage_m3);
}

// A tiny pool with a large outlet and a step 100 times its time constant: the trapezoid
// would end below empty, the step clips at S = 0 and reports it; the ledger still closes.
TEST(LevelPool, ClipsAtEmptyInsteadOfGoingNegative) {
  LevelPool pool = linear_reservoir(10.0);
  pool.reset(0.0, 5.0);
  const LevelPoolStep s = pool.advance(0.0, 1000.0, 0.0);
  EXPECT_TRUE(s.storage_floor_reached);
  EXPECT_EQ(pool.state().storage_m3, 0.0);
  EXPECT_NEAR(s.outflow_volume_m3, 5.0, 1e-12);
  EXPECT_NEAR(pool.ledger().balance_error_m3(), 0.0, 1e-12);
}

// An outlet below the storage relation's lowest stage would discharge from an empty pool.
TEST(LevelPool, RejectsAnOutletBelowTheEmptyPool) {
  const auto leaky = [](double h) { return 0.5 + std::max(0.0, h - 10.0); };  // 0.5 at the floor
  try {
    LevelPool pool("basin 'north-lea'", StageStorage::prismatic(10.0, 500.0, 0.0, "nl"), leaky);
    FAIL() << "accepted an outlet below the pool floor";
  } catch (const InputError& e) {
    EXPECT_NE(std::string(e.what()).find("basin 'north-lea'"), std::string::npos) << e.what();
    EXPECT_NE(std::string(e.what()).find("below the empty pool"), std::string::npos) << e.what();
  }
}

TEST(LevelPool, RejectsNegativeInflowAndBadOptions) {
  LevelPool pool = linear_reservoir(100.0);
  EXPECT_THROW(pool.advance(0.0, 1.0, -1.0), InputError);
  LevelPoolOptions bad;
  bad.max_substep_s = -1.0;
  EXPECT_THROW(linear_reservoir(100.0, bad), InputError);
  EXPECT_THROW(route_storage_indication(std::vector<double>{0.0, 0.0},
                                        std::vector<double>{0.0, 1.0}, 60.0,
                                        std::vector<double>{0.0}, 0.0),
               InputError);
}

// A culvert crossing under a storm hydrograph: the road overtops, the report gives the
// overtopping duration (cross-checked against the recorded stage trace), the control at
// the peak, and the ledger closes.
TEST(CrossingReport, RoadOvertopsAndReportIsConsistent) {
  CulvertSpec spec;
  spec.rise_m = 0.9;
  spec.length_m = 25.0;
  spec.inlet_invert_stage_m = 100.0;
  spec.outlet_invert_stage_m = 99.75;
  const Culvert pipe(spec, "crossing 'miller-lane'");
  const RoadOvertopping road({0.0, 60.0, 120.0}, {102.2, 102.0, 102.3}, kRoadOvertoppingCoefficientSi,
                             "road");
  const CulvertCrossing xing(pipe, road, std::nullopt, 104.0, "crossing 'miller-lane'");
  LevelPoolOptions opt;
  opt.max_substep_s = 60.0;
  LevelPool pool = make_crossing_pool(
      xing, StageStorage::prismatic(100.0, 800.0, 1500.0, "ponding"), opt);
  double above_s = 0.0, previous_stage = pool.state().stage_m;
  for (int j = 0; j < 240; ++j) {
    const double t = j * 60.0;
    const double inflow = t < 1800.0 ? 8.0 * t / 1800.0 : std::max(0.0, 8.0 * (5400.0 - t) / 3600.0);
    pool.advance(t, t + 60.0, inflow);
    const double h = pool.state().stage_m;
    if (h > 102.0 && previous_stage > 102.0) above_s += 60.0;
    previous_stage = h;
  }
  const CrossingReport r = crossing_report(xing, pool);
  EXPECT_TRUE(r.road_overtopped);
  EXPECT_GT(r.overtopping_discharge_at_peak_m3s, 0.0);
  EXPECT_NEAR(r.overtopping_duration_s, above_s, 120.0);  // interpolated vs whole steps
  EXPECT_NEAR(r.peak_outflow_m3s, pool.peaks().peak_outflow_m3s, 1e-9);
  EXPECT_LT(r.peak_outflow_m3s, 8.0);
  EXPECT_EQ(r.control_at_peak, xing.barrel_headwater(r.peak_headwater_stage_m).control);
  EXPECT_FALSE(r.stage_beyond_rating);
  EXPECT_LT(std::abs(r.mass_balance_residual_m3), 1e-9 * 8.0 * 5400.0);
  std::printf("crossing: peak HW %.3f m, Q %.3f (barrels %.3f, road %.3f), overtopped %.0f s, %s control\n",
              r.peak_headwater_depth_m, r.peak_outflow_m3s, r.barrel_discharge_at_peak_m3s,
              r.overtopping_discharge_at_peak_m3s, r.overtopping_duration_s,
              std::string(to_string(r.control_at_peak)).c_str());
}

}  // namespace
}  // namespace freshet::network::structures
