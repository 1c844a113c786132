#include "freshet/core/converged_root.hpp"

#include <cmath>
#include <string>
#include <gtest/gtest.h>

namespace freshet {
namespace {

// Reference: the C++ standard library's cbrt (a general-purpose reference implementation).
TEST(SolveBracketedNewton, FindsCubeRootToRoundOff) {
  for (double target : {1e-9, 0.5, 2.0, 1e6}) {
    auto fdf = [&](double x, double& f, double& df) {
      f = x * x * x - target;
      df = 3.0 * x * x;
    };
    const RootResult r = solve_bracketed_newton(fdf, 0.0, std::max(1.0, target));
    ASSERT_TRUE(r.converged) << target;
    EXPECT_NEAR(r.x, std::cbrt(target), 4e-15 * std::cbrt(target)) << target;
    EXPECT_LT(r.iterations, 80);
  }
}

TEST(SolveBracketedNewton, ReportsMissingBracket) {
  auto fdf = [](double x, double& f, double& df) {
    f = x * x + 1.0;
    df = 2.0 * x;
  };
  EXPECT_FALSE(solve_bracketed_newton(fdf, -1.0, 1.0).converged);
}

// A function with a zero derivative at the root's neighbourhood still converges by bisection.
TEST(SolveBracketedNewton, SurvivesFlatDerivative) {
  auto fdf = [](double x, double& f, double& df) {
    f = std::pow(x - 1.0, 3);
    df = 3.0 * (x - 1.0) * (x - 1.0);
  };
  const RootResult r = solve_bracketed_newton(fdf, 0.0, 3.0);
  ASSERT_TRUE(r.converged);
  EXPECT_NEAR(r.x, 1.0, 1e-5);
}

// A converged root is returned as found; a failed one becomes a NumericalError that names the
// element, the quantity and the value it was sought for (the error tiers of DEVELOPERS.md).
// What it was sought for is described only on failure (solvers in hot loops call this for
// every root). Reference: x^2 - 2 has no root on [2, 3] (f > 0 at both ends), so rtsafe
// reports no bracket.
TEST(ConvergedRoot, ReturnsTheRootOrNamesElementQuantityAndValue) {
  int described = 0;
  auto area = [&described] {
    ++described;
    return std::string("area 2 m2");
  };
  EXPECT_EQ(converged_root({1.5, 3, true}, "reach 'r1'", "depth (m)", area), 1.5);
  EXPECT_EQ(described, 0);
  auto fdf = [](double x, double& f, double& df) {
    f = x * x - 2.0;
    df = 2.0 * x;
  };
  const RootResult none = solve_bracketed_newton(fdf, 2.0, 3.0);
  ASSERT_FALSE(none.converged);
  try {
    (void)converged_root(none, "reach 'r1'", "depth (m)", area);
    FAIL() << "no NumericalError";
  } catch (const NumericalError& e) {
    EXPECT_STREQ(e.what(),
                 "reach 'r1': depth (m) did not converge for area 2 m2 (0 iterations, last "
                 "estimate nan)");
  }
  EXPECT_EQ(described, 1);
}

}  // namespace
}  // namespace freshet
