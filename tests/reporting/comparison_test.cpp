// The difference table of `freshet compare`: each scenario's row holds its own values and its
// difference from the base (scenario minus base), stage differences only on one datum.
// The quantities are defined in docs/outputs.md (definitions; common practice, no source).
#include "freshet/reporting/comparison.hpp"

#include <gtest/gtest.h>

#include <cmath>
#include <stdexcept>

namespace freshet::reporting {
namespace {

StationPeak peak(std::string id, double q, double t, double stage, bool elevation, double v) {
  StationPeak p;
  p.id = std::move(id);
  p.name = p.id + " name";
  p.kind = network::ElementKind::culvert;
  p.peak_discharge_m3s = q;
  p.peak_time_s = t;
  p.peak_stage_m = stage;
  p.stage_is_elevation = elevation;
  p.volume_m3 = v;
  return p;
}

TEST(Comparison, RowsHoldValuesAndScenarioMinusBase) {
  const std::vector<StationPeak> base{peak("mill", 12.0, 3600.0, 54.0, true, 1000.0),
                                      peak("yard", 2.0, 1800.0, 0.5, false, 200.0)};
  const std::vector<StationPeak> upgrade{peak("mill", 10.5, 3480.0, 53.25, true, 1000.0),
                                         peak("yard", 2.0, 1800.0, 48.0, true, 200.0)};
  const auto rows = compare_scenarios("s60", {{"", &base}, {"twin", &upgrade}});
  ASSERT_EQ(rows.size(), 4u);
  EXPECT_EQ(rows[0].scenario_id, "");  // the base first within each point
  EXPECT_TRUE(std::isnan(rows[0].peak_discharge_change_m3s));
  EXPECT_EQ(rows[1].scenario_id, "twin");
  EXPECT_EQ(rows[1].storm_id, "s60");
  EXPECT_DOUBLE_EQ(rows[1].peak_discharge_m3s, 10.5);
  EXPECT_DOUBLE_EQ(rows[1].peak_discharge_change_m3s, -1.5);
  EXPECT_DOUBLE_EQ(rows[1].peak_time_shift_s, -120.0);
  EXPECT_DOUBLE_EQ(rows[1].peak_stage_change_m, -0.75);
  EXPECT_DOUBLE_EQ(rows[1].volume_change_m3, 0.0);
  // A depth against an elevation is no difference at all: left empty.
  EXPECT_EQ(rows[3].station_id, "yard");
  EXPECT_TRUE(std::isnan(rows[3].peak_stage_change_m));
  EXPECT_DOUBLE_EQ(rows[3].peak_stage_m, 48.0);
}

TEST(Comparison, RunsWithOtherStationsAreRefused) {
  const std::vector<StationPeak> base{peak("mill", 1.0, 0.0, 0.0, true, 0.0)};
  const std::vector<StationPeak> other{peak("yard", 1.0, 0.0, 0.0, true, 0.0)};
  EXPECT_THROW((void)compare_scenarios("s", {{"", &base}, {"x", &other}}), std::invalid_argument);
}

}  // namespace
}  // namespace freshet::reporting
