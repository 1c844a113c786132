#include "freshet/core/error.hpp"

#include <cmath>
#include <gtest/gtest.h>

namespace freshet {
namespace {

TEST(ProblemList, CollectsEveryProblemBeforeThrowing) {
  ProblemList p("reach 'upper-mill'");
  p.require_positive("manning_n", 0.0);
  p.require_non_negative("side_slope", -1.5);
  p.require_finite("length_m", std::nan(""));
  try {
    p.throw_if_any();
    FAIL() << "expected InputError";
  } catch (const InputError& e) {
    ASSERT_EQ(e.problems().size(), 3u);
    EXPECT_EQ(e.problems()[0].to_string(), "reach 'upper-mill', field 'manning_n' = 0: must be > 0");
    EXPECT_EQ(e.problems()[1].to_string(),
              "reach 'upper-mill', field 'side_slope' = -1.5: must be >= 0");
    EXPECT_EQ(e.problems()[2].to_string(),
              "reach 'upper-mill', field 'length_m' = nan: must be a finite number");
  }
}

TEST(Problem, LeadsWithFileLineAndColumn) {
  Problem p{"basins/demo.toml", 12, 5, "reach 'r1'", "slope", "= -0.01: must be > 0"};
  EXPECT_EQ(p.to_string(), "basins/demo.toml:12:5: reach 'r1', field 'slope' = -0.01: must be > 0");
}

TEST(ProblemList, EmptyListDoesNotThrow) {
  ProblemList p("x");
  p.require_positive("a", 1.0);
  EXPECT_TRUE(p.empty());
  EXPECT_NO_THROW(p.throw_if_any());
}

}  // namespace
}  // namespace freshet

namespace freshet {
namespace {

// Fixed-point text never shows a negative zero ("-0.00" for a speed of -1e-17 m/s).
TEST(FormatFixed, RoundsAndNeverPrintsNegativeZero) {
  EXPECT_EQ(format_fixed(2.345, 2), "2.35");
  EXPECT_EQ(format_fixed(-1e-17, 2), "0.00");
  EXPECT_EQ(format_fixed(-0.004, 2), "0.00");
  EXPECT_EQ(format_fixed(-0.006, 2), "-0.01");
  EXPECT_EQ(format_fixed(-0.0, 0), "0");
}

}  // namespace
}  // namespace freshet
