#include <cmath>
#include <gtest/gtest.h>
#include <memory>
#include <vector>

#include "freshet/hydrology/composite_loss.hpp"
#include "freshet/hydrology/curve_number.hpp"
#include "freshet/hydrology/design_storm.hpp"
#include "freshet/hydrology/green_ampt.hpp"
#include "freshet/hydrology/horton.hpp"
#include "freshet/hydrology/initial_continuing_loss.hpp"
#include "freshet/hydrology/nrcs_distribution.hpp"

namespace freshet::hydrology {
namespace {

constexpr double kMmPerHour = 1e-3 / 3600.0;
constexpr double kHour = 3600.0;
const std::string kName = "subcatchment 'alder'";

// Initial and continuing loss by the method's own arithmetic (common practice, no source):
// 10 mm/h for 3 h against IL = 15 mm, CL = 2.5 mm/h. IL is met after 1.5 h, CL then takes
// 2.5 x 1.5 = 3.75 mm, leaving 30 - 15 - 3.75 = 11.25 mm of excess, however the rain is cut.
TEST(InitialContinuingLoss, FillsInitialLossThenLosesAtTheContinuingRate) {
  for (int steps : {1, 4, 18}) {
    InitialContinuingLoss loss({.initial_loss_m = 0.015, .continuing_loss_m_s = 2.5 * kMmPerHour},
                               kName);
    const double dt = 3.0 * kHour / steps;
    double excess = 0.0;
    for (int s = 0; s < steps; ++s) excess += loss.excess_depth_m(10.0 * kMmPerHour * dt, dt);
    EXPECT_NEAR(excess, 0.01125, 1e-15) << steps << " steps";
    EXPECT_EQ(loss.remaining_initial_loss_m(), 0.0);
  }
  InitialContinuingLoss loss({.initial_loss_m = 0.015, .continuing_loss_m_s = 0.0}, kName);
  loss.step(0.010, 600.0);
  loss.reset();
  EXPECT_EQ(loss.remaining_initial_loss_m(), 0.015);
  EXPECT_THROW(InitialContinuingLoss({.initial_loss_m = -1.0, .continuing_loss_m_s = 0.0}, kName),
               InputError);
}

// Area weighting: the impervious share loses only its depression storage.
TEST(CompositeLoss, ImperviousShareRunsOffAfterDepressionStorage) {
  auto pervious = std::make_unique<CurveNumberLoss>(CurveNumberParameters{.curve_number = 70.0},
                                                    kName);
  CompositeLoss cover({.fraction = 0.4, .depression_storage_m = 0.002}, std::move(pervious),
                      kName);
  double excess = 0.0;
  for (int s = 0; s < 10; ++s) excess += cover.excess_depth_m(0.005, 600.0);
  const double cn_excess = curve_number_runoff_m({.curve_number = 70.0}, 0.050);
  EXPECT_NEAR(excess, 0.4 * (0.050 - 0.002) + 0.6 * cn_excess, 1e-15);
  EXPECT_EQ(cover.impervious_storage_filled_m(), 0.002);
  EXPECT_NEAR(cover.ledger().closure_error_m(), 0.0, 1e-15);
  std::unique_ptr<LossModel> copy = cover.clone();
  copy->reset();
  EXPECT_EQ(copy->ledger().rain_m, 0.0);
  EXPECT_NEAR(cover.ledger().rain_m, 0.050, 1e-15);  // the original is untouched
  try {
    CompositeLoss bad({.fraction = 1.5, .depression_storage_m = -0.001},
                      std::make_unique<CurveNumberLoss>(CurveNumberParameters{.curve_number = 70},
                                                        kName),
                      kName);
    FAIL();
  } catch (const InputError& e) {
    ASSERT_EQ(e.problems().size(), 2u);
    EXPECT_EQ(e.problems()[0].to_string(),
              "subcatchment 'alder', field 'impervious_fraction' = 1.5: must be in [0, 1]");
  }
}

// Depression storage that empties by evaporation at a stated constant rate in dry steps
// (common practice, no source): 2 mm of storage at 0.1 mm/h holds 1 mm after 10 dry hours,
// is empty after 20 however the dry spell is cut, and then holds its full 2 mm of the next
// burst again. No evaporation while it rains. The ledger still closes (held water stays a
// loss when it evaporates).
TEST(CompositeLoss, DepressionStorageEmptiesByEvaporationInDrySteps) {
  for (int dry_steps : {1, 5, 120}) {
    CompositeLoss cover({.fraction = 1.0, .depression_storage_m = 0.002,
                         .evaporation_m_s = 0.1 * kMmPerHour},
                        std::make_unique<InitialContinuingLoss>(InitialContinuingParameters{},
                                                                kName),
                        kName);
    EXPECT_NEAR(cover.excess_depth_m(0.005, kHour), 0.003, 1e-15);
    EXPECT_EQ(cover.impervious_storage_filled_m(), 0.002);
    for (int s = 0; s < dry_steps; ++s) cover.step(0.0, 10.0 * kHour / dry_steps);
    EXPECT_NEAR(cover.impervious_storage_filled_m(), 0.001, 1e-15) << dry_steps;
    cover.step(0.0, 10.0 * kHour + 1.0);  // past empty: stays at zero
    EXPECT_EQ(cover.impervious_storage_filled_m(), 0.0);
    EXPECT_NEAR(cover.excess_depth_m(0.003, kHour), 0.001, 1e-15);
    for (int s = 0; s < 3; ++s) cover.step(0.001, kHour);  // raining: nothing evaporates
    EXPECT_EQ(cover.impervious_storage_filled_m(), 0.002);
    EXPECT_NEAR(cover.ledger().closure_error_m(), 0.0, 1e-15);
  }
  EXPECT_THROW(CompositeLoss({.fraction = 0.5, .depression_storage_m = 0.001,
                              .evaporation_m_s = -1e-9},
                             std::make_unique<InitialContinuingLoss>(
                                 InitialContinuingParameters{}, kName),
                             kName),
               InputError);
}

std::vector<std::unique_ptr<LossModel>> every_model() {
  std::vector<std::unique_ptr<LossModel>> models;
  models.push_back(std::make_unique<CurveNumberLoss>(CurveNumberParameters{.curve_number = 78},
                                                     kName));
  models.push_back(std::make_unique<GreenAmptLoss>(
      GreenAmptParameters{.hydraulic_conductivity_m_s = 3.4 * kMmPerHour,
                          .suction_head_m = 0.1101, .porosity = 0.463,
                          .effective_porosity = 0.434, .initial_effective_saturation = 0.2},
      kName));
  models.push_back(std::make_unique<HortonLoss>(
      HortonParameters{.initial_capacity_m_s = 75 * kMmPerHour,
                       .final_capacity_m_s = 5 * kMmPerHour, .decay_rate_per_s = 2.0 / kHour},
      kName));
  models.push_back(std::make_unique<InitialContinuingLoss>(
      InitialContinuingParameters{.initial_loss_m = 0.012, .continuing_loss_m_s = 4 * kMmPerHour},
      kName));
  models.push_back(std::make_unique<CompositeLoss>(
      ImperviousCover{.fraction = 0.3, .depression_storage_m = 0.0015}, models[1]->clone(),
      kName));
  return models;
}

// Volume ledger: rain = losses + excess, to round-off, for every model over a design storm
// (an NRCS Type II 24-h storm of 120 mm in 6-min blocks), and excess hyetograph totals agree.
TEST(LossLedger, EveryModelClosesTheVolumeBalance) {
  const Hyetograph storm = nrcs_24h_storm(NrcsRainType::type_ii, 0.120, 360.0);
  for (auto& model : every_model()) {
    const Hyetograph excess = rainfall_excess(storm, *model);
    const LossLedger& l = model->ledger();
    EXPECT_NEAR(l.rain_m, 0.120, 1e-15) << model->method();
    EXPECT_NEAR(l.closure_error_m(), 0.0, 1e-14 * l.rain_m) << model->method();
    EXPECT_NEAR(excess.total_depth_m(), l.excess_m, 1e-16) << model->method();
    EXPECT_GT(l.excess_m, 0.0) << model->method();
    EXPECT_GT(l.loss_m, 0.0) << model->method();
    for (double e : excess.block_depths_m()) EXPECT_GE(e, 0.0) << model->method();
  }
}

}  // namespace
}  // namespace freshet::hydrology
