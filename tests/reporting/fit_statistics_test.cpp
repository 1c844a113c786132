// Fit statistics (reporting/fit_statistics.hpp) against their published definitions on a
// small case worked by hand, the same numbers checked with numpy by
// tests/outputs/fit_statistics_numpy.py (np.corrcoef, np.std, np.trapz).
//
// Observed o = 1, 3, 5, 3, 1 and routed s = 2, 3, 4, 4.5, 1 m3/s at 0, 1, 2, 3, 4 h.
//   obar = 13/5 = 2.6; sbar = 14.5/5 = 2.9
//   sum (s - o)^2 = 1 + 0 + 1 + 2.25 + 0 = 4.25
//   sum (o - obar)^2 = 2.56 + 0.16 + 5.76 + 0.16 + 2.56 = 11.2
//   sum (s - sbar)^2 = 0.81 + 0.01 + 1.21 + 2.56 + 3.61 = 8.2
//   sum (s - sbar)(o - obar) = 1.44 + 0.04 + 2.64 + 0.64 + 3.04 = 7.8
// Nash & Sutcliffe (1970), J. Hydrol. 10(3), 282-290: NSE = 1 - 4.25 / 11.2 = 0.6205357
// Gupta et al. (2009), J. Hydrol. 377, 80-91, eq. 9:
//   r = 7.8 / sqrt(11.2 x 8.2) = 0.8139143; alpha = sqrt(8.2 / 11.2) = 0.8556535;
//   beta = 2.9 / 2.6 = 1.1153846; KGE = 1 - sqrt(0.034616 + 0.020836 + 0.013314) = 0.7377455
// Peak: routed 4.5 at 3 h, observed 5 at 2 h: error -0.5 m3/s (-10 %), timing +3600 s.
// Volume (trapezoid, 1 h steps): observed 3600 x 12 = 43200 m3, routed 3600 x 13 = 46800 m3,
//   error +1/12 = +8.333 %.
#include "freshet/reporting/fit_statistics.hpp"

#include <gtest/gtest.h>

#include <cmath>
#include <vector>

namespace freshet::reporting {
namespace {

TEST(FitStatistics, HandWorkedCaseMatchesThePublishedDefinitions) {
  const std::vector<double> t{0.0, 3600.0, 7200.0, 10800.0, 14400.0};
  const std::vector<double> o{1.0, 3.0, 5.0, 3.0, 1.0};
  const std::vector<double> s{2.0, 3.0, 4.0, 4.5, 1.0};
  const FitStatistics f = fit_statistics(t, s, o);
  EXPECT_EQ(f.pairs, 5u);
  EXPECT_NEAR(f.nse, 1.0 - 4.25 / 11.2, 1e-12);          // 0.6205357
  EXPECT_NEAR(f.kge_r, 7.8 / std::sqrt(11.2 * 8.2), 1e-12);  // 0.8139143
  EXPECT_NEAR(f.kge_alpha, std::sqrt(8.2 / 11.2), 1e-12);    // 0.8556535
  EXPECT_NEAR(f.kge_beta, 2.9 / 2.6, 1e-12);                 // 1.1153846
  EXPECT_NEAR(f.kge, 0.7377455, 1e-7);
  EXPECT_NEAR(f.peak_error_m3s, -0.5, 1e-15);
  EXPECT_NEAR(f.peak_error_relative, -0.1, 1e-15);
  EXPECT_EQ(f.peak_timing_error_s, 3600.0);
  EXPECT_NEAR(f.observed_volume_m3, 43200.0, 1e-9);
  EXPECT_NEAR(f.routed_volume_m3, 46800.0, 1e-9);
  EXPECT_NEAR(f.volume_error_relative, 1.0 / 12.0, 1e-12);
}

TEST(FitStatistics, APerfectFitAndAFlatObservedSeries) {
  const std::vector<double> t{0.0, 60.0, 120.0};
  const std::vector<double> q{1.0, 4.0, 2.0};
  const FitStatistics perfect = fit_statistics(t, q, q);
  EXPECT_EQ(perfect.nse, 1.0);
  EXPECT_NEAR(perfect.kge, 1.0, 1e-15);
  EXPECT_EQ(perfect.peak_timing_error_s, 0.0);
  EXPECT_EQ(perfect.volume_error_relative, 0.0);
  // The mean of the observations as the "model": NSE = 0 by construction (Nash & Sutcliffe
  // 1970: the efficiency compares with the no-model variance).
  const std::vector<double> mean_model(3, 7.0 / 3.0);
  EXPECT_NEAR(fit_statistics(t, mean_model, q).nse, 0.0, 1e-15);
  // A flat observed series has no variance: NSE and KGE's r and alpha are not defined.
  const std::vector<double> flat{2.0, 2.0, 2.0};
  const FitStatistics f = fit_statistics(t, q, flat);
  EXPECT_TRUE(std::isnan(f.nse));
  EXPECT_TRUE(std::isnan(f.kge));
}

}  // namespace
}  // namespace freshet::reporting
