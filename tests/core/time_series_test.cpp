#include "freshet/core/time_series.hpp"

#include <cmath>
#include <gtest/gtest.h>

#include "freshet/core/error.hpp"

namespace freshet {
namespace {

// Triangular hydrograph: its volume is base * peak / 2 exactly (plane geometry).
TEST(PiecewiseLinearSeries, TriangleIntegralIsExact) {
  PiecewiseLinearSeries q({0.0, 600.0, 1800.0}, {0.0, 10.0, 0.0});
  EXPECT_DOUBLE_EQ(q.integral(0.0, 1800.0), 0.5 * 1800.0 * 10.0);
  EXPECT_DOUBLE_EQ(q.value_at(300.0), 5.0);
  EXPECT_DOUBLE_EQ(q.value_at(1200.0), 5.0);
  // Partial interval [300, 1200]: trapezoids 0.5*(5+10)*300 + 0.5*(10+5)*600.
  EXPECT_NEAR(q.integral(300.0, 1200.0), 2250.0 + 4500.0, 1e-9);
}

TEST(PiecewiseLinearSeries, HoldsEndValuesOutsideTheSampledRange) {
  PiecewiseLinearSeries q({100.0, 200.0}, {2.0, 4.0});
  EXPECT_DOUBLE_EQ(q.value_at(0.0), 2.0);
  EXPECT_DOUBLE_EQ(q.value_at(1e6), 4.0);
  EXPECT_DOUBLE_EQ(q.integral(0.0, 100.0), 200.0);
  EXPECT_DOUBLE_EQ(q.integral(200.0, 300.0), 400.0);
  EXPECT_DOUBLE_EQ(q.integral(0.0, 300.0), 200.0 + 300.0 + 400.0);
}

TEST(PiecewiseLinearSeries, RejectsNonIncreasingTimesAndNaN) {
  try {
    PiecewiseLinearSeries q({0.0, 60.0, 60.0}, {1.0, std::nan(""), 2.0}, "hydrograph 'west-inflow'");
    FAIL() << "expected InputError";
  } catch (const InputError& e) {
    ASSERT_EQ(e.problems().size(), 2u);
    EXPECT_EQ(e.problems()[0].to_string(),
              "hydrograph 'west-inflow', field 'value[2]' = nan: must be a finite number");
    EXPECT_EQ(e.problems()[1].to_string(),
              "hydrograph 'west-inflow', field 'time[3]' = 60: times must strictly increase "
              "(previous 60)");
  }
}

}  // namespace
}  // namespace freshet
