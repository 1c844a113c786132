// The [uncertainty] section of a basin file: members drawn as declared, their values laid over
// the base network or a scenario, each member's model routing with its own values, and bad
// declarations reported with file, line, entry and field.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <set>
#include <span>
#include <string>
#include <vector>

#include "../io/temp_dir.hpp"
#include "ensemble_fixture.hpp"
#include "manning_closed_form.hpp"
#include "freshet/network/driver.hpp"
#include "freshet/study/ensemble_run.hpp"
#include "freshet/study/study.hpp"
#include "freshet/uncertainty/ensemble_statistics.hpp"

namespace freshet::study {
namespace {

using testing::Fixture;
using testing::kBasin;

const std::string kUncertainty = R"(
[uncertainty]
members = 40
sampling = "latin-hypercube"
seed = 7
percentiles = [5, 50, 95]

[[uncertainty.vary]]          # Chow (1959) Table 5-6 style minimum / normal / maximum
elements = ["r1", "r2"]
field = "manning_n"
distribution = "triangular"
low = 0.025
normal = 0.030
high = 0.033

[[uncertainty.vary]]
kind = "subcatchment"
field = "plane.manning_n"
as = "factor"
distribution = "uniform"
low = 0.8
high = 1.25

[[uncertainty.vary]]
elements = ["hill"]
field = "loss.curve_number"
distribution = "antecedent-moisture"
)";

double value_of(const std::vector<MemberValue>& values, const std::string& element,
                const std::string& field, std::size_t nth = 0) {
  for (const MemberValue& v : values) {
    if (v.element_id == element && v.field == field && nth-- == 0) return v.value;
  }
  ADD_FAILURE() << "no value of " << field << " for " << element;
  return NAN;
}

TEST(Ensemble, CurveNumbersForDryAndWetConditions) {
  // CN_I = 4.2 CN_II / (10 - 0.058 CN_II), CN_III = 23 CN_II / (10 + 0.13 CN_II) (Chow, Maidment
  // & Mays 1988, Applied Hydrology, eq. 5.5.4-5.5.5; from memory), evaluated by hand:
  // CN_II = 70: 294 / 5.94 = 49.49 and 1610 / 19.1 = 84.29.
  EXPECT_NEAR(curve_number_dry(70.0), 49.495, 1e-3);
  EXPECT_NEAR(curve_number_wet(70.0), 84.293, 1e-3);
  EXPECT_NEAR(curve_number_dry(100.0), 100.0, 1e-12);  // impervious stays impervious
  EXPECT_NEAR(curve_number_wet(100.0), 100.0, 1e-12);
}

TEST(Ensemble, MembersTakeTheDeclaredValues) {
  Fixture f(kBasin + kUncertainty);
  const Study study = Study::load(f.basin);
  ASSERT_TRUE(study.ensemble().has_value());
  const EnsembleDefinition& e = *study.ensemble();
  ASSERT_EQ(e.members, 40u);
  ASSERT_EQ(e.parameters.size(), 3u);
  std::vector<double> channel_n;
  for (std::size_t m = 0; m < e.members; ++m) {
    const auto values = study.member_values("", m);
    const auto& p = e.probabilities[m];
    // One draw per entry: both reaches take the same n, the triangular quantile of p[0].
    const double n1 = value_of(values, "r1", "manning_n");
    EXPECT_DOUBLE_EQ(n1, value_of(values, "r2", "manning_n"));
    EXPECT_DOUBLE_EQ(n1, uncertainty::quantile(uncertainty::Triangular{0.025, 0.030, 0.033},
                                               p[0]));
    channel_n.push_back(n1);
    // Factor: each plane's own n times the same uniform factor.
    const double factor = 0.8 + p[1] * 0.45;
    EXPECT_NEAR(value_of(values, "hill", "plane.manning_n", 0), 0.24 * factor, 1e-15);
    EXPECT_NEAR(value_of(values, "hill", "plane.manning_n", 1), 0.15 * factor, 1e-15);
    // Antecedent moisture: between the dry and wet curve numbers of CN 70.
    const double cn = value_of(values, "hill", "loss.curve_number");
    EXPECT_GE(cn, curve_number_dry(70.0));
    EXPECT_LE(cn, curve_number_wet(70.0));
  }
  // Latin hypercube: the 40 channel n values fall one in each of 40 equal-probability strata.
  std::set<int> strata;
  for (double n : channel_n) {
    strata.insert(static_cast<int>(
        std::floor(40.0 * uncertainty::cdf(uncertainty::Triangular{0.025, 0.030, 0.033}, n))));
  }
  EXPECT_EQ(strata.size(), 40u);
  // In a scenario, the entry varies the scenario's curve number (80), not the base's.
  const auto scenario_values = study.member_values("steeper-hill", 0);
  const double cn = value_of(scenario_values, "hill", "loss.curve_number");
  EXPECT_GE(cn, curve_number_dry(80.0));
  EXPECT_LE(cn, curve_number_wet(80.0));
}

// Keeps the last row the driver records.
class LastRow final : public network::RecordSink {
 public:
  void record(double, std::span<const network::StationSample> samples) override {
    row.assign(samples.begin(), samples.end());
  }
  std::vector<network::StationSample> row;
};

using testing::manning_normal_depth_rectangular;

TEST(Ensemble, EachMemberRoutesWithItsOwnValues) {
  // The steady 5 m3/s through reach r1 settles to Manning's normal depth for the member's n:
  // members with different n give different depths, each the closed form's.
  Fixture f(kBasin + kUncertainty);
  const Study study = Study::load(f.basin);
  const StudySettings& s = study.settings();
  const network::ClockOptions clock{0.0, s.duration_s, s.output_interval_s, s.coupling_step_s};
  std::vector<double> depths;
  for (std::size_t m : {0U, 17U, 39U}) {
    network::Model model = study.build_member_model("", study.storm("s1"), m);
    LastRow sink;
    (void)network::simulate(model, clock, sink);
    std::size_t r1 = 0;
    while (model.links[r1].id != "r1") ++r1;
    const double n = value_of(study.member_values("", m), "r1", "manning_n");
    const double y = manning_normal_depth_rectangular(5.0, 4.0, n, 0.002);
    EXPECT_NEAR(sink.row[r1].depth_m, y, 1e-9 * y) << "member " << m << " n " << n;
    depths.push_back(sink.row[r1].depth_m);
  }
  EXPECT_GT(*std::max_element(depths.begin(), depths.end()) -
                *std::min_element(depths.begin(), depths.end()),
            0.01);
}

TEST(EnsembleRun, PeakDepthsFollowTheClosedFormDistribution) {
  // Reach r1 carries a steady 5 m3/s at Manning's normal depth y(n) (Chow 1959, eq. 5-6), and n
  // is triangular(0.025, 0.030, 0.033). y rises with n, so the peak depth's distribution is
  // F_y(y) = F_n(n(y)), n(y) = A R^(2/3) S^(1/2) / Q: the members' peak depths must pass the
  // Kolmogorov-Smirnov test against it (Press et al. 2007, sec. 14.3.3), at the 1 % level.
  Fixture f(kBasin + kUncertainty);
  const Study study = Study::load(f.basin);
  const EnsembleOutcome e = run_ensemble(study, {"", "s1", 2});
  ASSERT_EQ(e.members, 40u);
  const auto r1 = std::find_if(e.stations.begin(), e.stations.end(),
                               [](const StationEnsemble& s) { return s.id == "r1"; });
  ASSERT_NE(r1, e.stations.end());
  const uncertainty::Triangular n_dist{0.025, 0.030, 0.033};
  const auto cdf_of_depth = [&](double y) {
    const double a = 4.0 * y;
    const double n = a * std::pow(a / (4.0 + 2.0 * y), 2.0 / 3.0) * std::sqrt(0.002) / 5.0;
    return uncertainty::cdf(n_dist, n);
  };
  const uncertainty::KsResult ks = uncertainty::kolmogorov_smirnov(r1->peak_stage_m, cdf_of_depth);
  EXPECT_GT(ks.p_value, 0.01) << "D " << ks.statistic;
  // And it would see a wrong distribution: the depths of a 10 % rougher channel.
  const uncertainty::KsResult wrong = uncertainty::kolmogorov_smirnov(
      r1->peak_stage_m, [&](double y) { return cdf_of_depth(y / 1.1); });
  EXPECT_LT(wrong.p_value, 1e-3) << "D " << wrong.statistic;
  RecordProperty("ks_p_value", format_value(ks.p_value));
  RecordProperty("ks_p_value_wrong", format_value(wrong.p_value));
  // Every member's steady outflow volume is 5 m3/s over the run.
  for (double v : r1->outflow_volume_m3) EXPECT_NEAR(v, 5.0 * 3.0 * 3600.0, 1e-6 * v);
  // The bands are ordered: 5th <= 50th <= 95th at every time, at every station.
  for (const StationEnsemble& s : e.stations) {
    for (std::size_t t = 0; t < e.times_s.size(); ++t) {
      EXPECT_LE(s.discharge_band_m3s[0][t], s.discharge_band_m3s[1][t]) << s.id;
      EXPECT_LE(s.discharge_band_m3s[1][t], s.discharge_band_m3s[2][t]) << s.id;
    }
  }
}

TEST(EnsembleRun, ResultsDoNotDependOnTheNumberOfThreads) {
  Fixture f(kBasin + kUncertainty);
  const Study study = Study::load(f.basin);
  const EnsembleOutcome one = run_ensemble(study, {"steeper-hill", "s1", 1});
  const EnsembleOutcome three = run_ensemble(study, {"steeper-hill", "s1", 3});
  ASSERT_EQ(one.stations.size(), three.stations.size());
  for (std::size_t k = 0; k < one.stations.size(); ++k) {
    EXPECT_EQ(one.stations[k].peak_discharge_m3s, three.stations[k].peak_discharge_m3s);
    EXPECT_EQ(one.stations[k].discharge_band_m3s, three.stations[k].discharge_band_m3s);
  }
  // The curve number varies by member, so the hill's peaks spread.
  const auto hill = std::find_if(one.stations.begin(), one.stations.end(),
                                 [](const StationEnsemble& s) { return s.id == "hill"; });
  ASSERT_NE(hill, one.stations.end());
  const auto [lo, hi] = std::minmax_element(hill->peak_discharge_m3s.begin(),
                                            hill->peak_discharge_m3s.end());
  EXPECT_GT(*hi, 1.2 * *lo);
}

TEST(Ensemble, BadDeclarationsNameTheEntryAndField) {
  const std::string bad = R"(
[uncertainty]
members = 10
percentiles = [50, 5]

[[uncertainty.vary]]
elements = ["r1", "nowhere"]
field = "manning_n"
distribution = "triangular"
low = 0.035
normal = 0.030
high = 0.033

[[uncertainty.vary]]
kind = "reach"
field = "roughness"
distribution = "uniform"
low = 0.8
high = 1.2

[[uncertainty.vary]]
elements = ["r1"]
field = "slope"
distribution = "antecedent-moisture"
)";
  Fixture f(kBasin + bad);
  const std::string what = f.load_error();
  const std::string file = f.basin.string();
  EXPECT_NE(what.find("uncertainty, field 'percentiles[2]'"), std::string::npos) << what;
  EXPECT_NE(what.find("uncertainty vary[1], field 'elements[2]' names no element"),
            std::string::npos) << what;
  EXPECT_NE(what.find("uncertainty vary[1], field 'distribution'"), std::string::npos) << what;
  EXPECT_NE(what.find("uncertainty vary[2], field 'field' element 'r1' has no number "
                      "'roughness'"),
            std::string::npos) << what;
  EXPECT_NE(what.find("uncertainty vary[3], field 'distribution'"), std::string::npos) << what;
}

TEST(Ensemble, AMemberOutsideTheHardRangesIsRefusedAtLoad) {
  // A factor that makes the reach's n negative: the members at the lowest and highest drawn
  // factors are built at load and their problems reported against the entry.
  const std::string too_steep = R"(
[uncertainty]
members = 20

[[uncertainty.vary]]
elements = ["r1"]
field = "manning_n"
as = "factor"
distribution = "uniform"
low = -2.0
high = -1.0
)";
  Fixture f(kBasin + too_steep);
  const std::string what = f.load_error();
  EXPECT_NE(what.find("uncertainty vary[1], field 'distribution'"), std::string::npos) << what;
  EXPECT_NE(what.find("manning_n"), std::string::npos) << what;
  RecordProperty("message", what);
}

}  // namespace
}  // namespace freshet::study
