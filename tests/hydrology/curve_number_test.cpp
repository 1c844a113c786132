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

}  // namespace
}  // namespace freshet::hydrology
