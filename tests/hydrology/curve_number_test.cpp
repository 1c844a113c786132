#include "freshet/hydrology/curve_number.hpp"

#include <cmath>
#include <gtest/gtest.h>

#include "freshet/verification/problems.hpp"

namespace freshet::hydrology {
namespace {

constexpr double kInch = 0.0254;

// USDA SCS (1986) TR-55, Table 2-1 "Runoff depth for selected CNs and rainfall amounts"
// (lambda = 0.2). The table is eq. 2-3 rounded to 0.01 in; entries from memory, each checked
// by evaluating eq. 2-3 by hand (freshet/verification/problems.hpp, shared with
// `freshet verify`).
TEST(CurveNumber, RunoffEquationReproducesTr55Table2_1) {
  for (const auto& e : verification::kTr55Table2_1) {
    const double q_in =
        curve_number_runoff_m({.curve_number = e.curve_number}, e.rain_in * kInch) / kInch;
    EXPECT_NEAR(q_in, e.runoff_in, 0.005)
        << "CN " << e.curve_number << ", P " << e.rain_in << " in";
  }
}

// TR-55 eq. 2-4 and 2-2: S = 1000/CN - 10 in, Ia = 0.2 S.
TEST(CurveNumber, RetentionAndInitialAbstraction) {
  const CurveNumberParameters p{.curve_number = 80.0};
  EXPECT_NEAR(p.retention_m(), 2.5 * kInch, 1e-15);
  EXPECT_NEAR(p.retention_m(), (25400.0 / 80.0 - 254.0) * 1e-3, 1e-15);
  EXPECT_NEAR(p.initial_abstraction_m(), 0.5 * kInch, 1e-15);
  const CurveNumberParameters low{.curve_number = 80.0, .initial_abstraction_ratio = 0.05};
  EXPECT_NEAR(low.initial_abstraction_m(), 0.125 * kInch, 1e-15);
  // Hawkins et al. (2002), S_0.05 = 1.33 S_0.2^1.15 in inches (from memory).
  const CurveNumberParameters converted{.curve_number = 80.0, .initial_abstraction_ratio = 0.05,
                                        .convert_storage_for_ratio_0_05 = true};
  EXPECT_NEAR(converted.retention_m(), 1.33 * std::pow(2.5, 1.15) * kInch, 1e-14);
}

// Stepping the cumulative equation: the storm's excess does not depend on the steps.
TEST(CurveNumber, IncrementalExcessMatchesTheCumulativeEquation) {
  CurveNumberLoss soil({.curve_number = 80.0}, "subcatchment 'alder'");
  double excess = 0.0;
  for (int k = 0; k < 50; ++k) excess += soil.excess_depth_m(5.0 * kInch / 50, 600.0);
  EXPECT_NEAR(excess, 4.5 * 4.5 / 7.0 * kInch, 1e-15);  // (P - Ia)^2 / (P - Ia + S)
  EXPECT_NEAR(soil.ledger().closure_error_m(), 0.0, 1e-17);
  soil.reset();
  EXPECT_EQ(soil.ledger().rain_m, 0.0);
  EXPECT_NEAR(soil.excess_depth_m(5.0 * kInch, 30000.0), 4.5 * 4.5 / 7.0 * kInch, 1e-15);
}

TEST(CurveNumber, RejectsCurveNumbersOutsideTheRange) {
  for (double cn : {30.0, 100.5, std::nan("")}) {
    EXPECT_THROW(CurveNumberLoss({.curve_number = cn}, "subcatchment 'alder'"), InputError);
  }
  try {
    CurveNumberLoss soil({.curve_number = 25.0, .initial_abstraction_ratio = 0.2,
                          .convert_storage_for_ratio_0_05 = true},
                         "subcatchment 'alder'");
    FAIL();
  } catch (const InputError& e) {
    ASSERT_EQ(e.problems().size(), 2u);
    EXPECT_EQ(e.problems()[0].to_string(),
              "subcatchment 'alder', field 'curve_number' = 25: must be in (30, 100]");
    EXPECT_EQ(e.problems()[1].to_string(),
              "subcatchment 'alder', field 'initial_abstraction_ratio' = 0.2: must be 0.05 when "
              "convert_storage_for_ratio_0_05 is set");
  }
}

// Antecedent moisture (Chow, Maidment & Mays 1988, Applied Hydrology, sec. 5.5, eqs. 5.5.4-5.5.5,
// after SCS 1972, NEH-4; from memory): CN_I = 4.2 CN / (10 - 0.058 CN) and
// CN_III = 23 CN / (10 + 0.13 CN). For CN 80 these give 62.7 and 90.2 (evaluated by hand).
TEST(CurveNumberAntecedent, ClassAdjustmentEquations) {
  EXPECT_NEAR(curve_number_for_class(80.0, 1), 62.69, 0.005);
  EXPECT_NEAR(curve_number_for_class(80.0, 3), 90.20, 0.005);
  EXPECT_EQ(curve_number_for_class(80.0, 2), 80.0);
  EXPECT_NEAR(curve_number_for_class(100.0, 1), 100.0, 1e-12);
  EXPECT_NEAR(curve_number_for_class(100.0, 3), 100.0, 1e-12);
  // Table 5.5.1 of the same (from memory): 5-day rain limits 0.5 / 1.1 in (dormant) and
  // 1.4 / 2.1 in (growing season).
  EXPECT_EQ(antecedent_moisture_class(0.49 * kInch, GrowingSeason::dormant), 1);
  EXPECT_EQ(antecedent_moisture_class(0.51 * kInch, GrowingSeason::dormant), 2);
  EXPECT_EQ(antecedent_moisture_class(1.11 * kInch, GrowingSeason::dormant), 3);
  EXPECT_EQ(antecedent_moisture_class(1.39 * kInch, GrowingSeason::growing), 1);
  EXPECT_EQ(antecedent_moisture_class(2.09 * kInch, GrowingSeason::growing), 2);
  EXPECT_EQ(antecedent_moisture_class(2.11 * kInch, GrowingSeason::growing), 3);
}

// A record of 40 mm bursts (10 mm/h for 4 h). Each event after the first starts again from
// P = 0 with the curve number of the class of its 5-day antecedent rain, so its excess is
// TR-55 eq. 2-3 at that curve number: 48 h after the first burst the 5-day rain is 40 mm =
// 1.57 in (AMC II in the growing season, III in the dormant one); 6 dry days later it is 0
// (AMC I); a burst 2 h short of 5 days after a 4-hour burst counts half of it (rain uniform in
// its step: 20 mm = 0.79 in, AMC II dormant, I growing).
double burst_excess(CurveNumberLoss& soil) {
  double excess = 0.0;
  for (int h = 0; h < 4; ++h) excess += soil.excess_depth_m(0.010, 3600.0);
  return excess;
}

TEST(CurveNumberAntecedent, EventsTakeTheCurveNumberOfTheirAntecedentClass) {
  const double p = 0.040;
  auto q = [&](double cn) { return curve_number_runoff_m({.curve_number = cn}, p); };
  for (GrowingSeason season : {GrowingSeason::growing, GrowingSeason::dormant}) {
    const bool growing = season == GrowingSeason::growing;
    CurveNumberLoss soil({.curve_number = 75.0, .antecedent = {.season = season}},
                         "subcatchment 'alder'");
    EXPECT_NEAR(burst_excess(soil), q(75.0), 1e-15);  // the first event: CN as given
    soil.step(0.0, 48.0 * 3600.0);
    const double wet = curve_number_for_class(75.0, growing ? 2 : 3);
    EXPECT_NEAR(burst_excess(soil), q(wet), 1e-15);
    EXPECT_EQ(soil.event_curve_number(), wet);
    soil.step(0.0, 6.0 * 86400.0);
    EXPECT_NEAR(burst_excess(soil), q(curve_number_for_class(75.0, 1)), 1e-15);
    soil.step(0.0, 5.0 * 86400.0 - 2.0 * 3600.0);
    EXPECT_NEAR(burst_excess(soil), q(curve_number_for_class(75.0, growing ? 1 : 2)), 1e-15);
    EXPECT_NEAR(soil.ledger().closure_error_m(), 0.0, 1e-15);
  }
}

// A dry spell shorter than the event gap does not end the event: the rain adds up as before.
TEST(CurveNumberAntecedent, ShortDrySpellContinuesTheEvent) {
  CurveNumberLoss soil({.curve_number = 75.0,
                        .antecedent = {.season = GrowingSeason::dormant, .event_gap_s = 6 * 3600.0}},
                       "subcatchment 'alder'");
  double excess = burst_excess(soil);
  soil.step(0.0, 5.9 * 3600.0);
  excess += burst_excess(soil);
  EXPECT_NEAR(excess, curve_number_runoff_m({.curve_number = 75.0}, 0.080), 1e-15);
  EXPECT_NEAR(soil.cumulative_rain_m(), 0.080, 1e-15);
  EXPECT_THROW(CurveNumberLoss({.curve_number = 75.0,
                                .antecedent = {.season = GrowingSeason::growing,
                                               .event_gap_s = 0.0}},
                               "subcatchment 'alder'"),
               InputError);
}

}  // namespace
}  // namespace freshet::hydrology
