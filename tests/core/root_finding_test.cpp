#include "freshet/core/root_finding.hpp"

#include <cmath>
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

}  // namespace
}  // namespace freshet
