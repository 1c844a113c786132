// Summary accumulator and writers.
// Reference values: a triangular hydrograph rising linearly from 0 at t = 0 to Qp at tp and
// falling linearly to 0 at tb has volume Qp tb / 2 and its centroid (first moment over area)
// at t = (0 + tp + tb) / 3, the centroid of a triangle (Beer and Johnston, Vector Mechanics
// for Engineers: Statics, centroids of common shapes; any statics text).
#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include <cmath>
#include <nlohmann/json.hpp>

#include "freshet/core/caution.hpp"
#include "freshet/core/error.hpp"
#include "freshet/io/summary.hpp"
#include "freshet/io/summary_writer.hpp"
#include "temp_dir.hpp"

namespace freshet::io {
namespace {

using ::testing::HasSubstr;
using testing::read_text;
using testing::TempDir;

constexpr double kPeak = 12.0, kPeakTime = 2700.0, kBase = 10800.0;

double triangle_q(double t) {
  if (t <= kPeakTime) return kPeak * t / kPeakTime;
  return std::max(0.0, kPeak * (kBase - t) / (kBase - kPeakTime));
}

TEST(SummaryAccumulator, TriangleVolumeCentroidAndPeakMatchGeometry) {
  SummaryAccumulator acc;
  for (int k = 0; k <= 240; ++k) {  // 60 s samples over 4 h; 2700 and 10800 are sample times
    const double t = 60.0 * k;
    acc.add_sample(t, triangle_q(t), 100.0 + 0.1 * triangle_q(t));
  }
  EXPECT_NEAR(acc.volume_m3(), 0.5 * kPeak * kBase, 1e-9 * kPeak * kBase);
  EXPECT_NEAR(acc.centroid_time_s(), (kPeakTime + kBase) / 3.0, 1e-9 * kBase);
  EXPECT_EQ(acc.peak_discharge_m3s(), kPeak);
  EXPECT_EQ(acc.peak_time_s(), kPeakTime);
  EXPECT_DOUBLE_EQ(acc.peak_stage_m(), 100.0 + 0.1 * kPeak);
  const auto s = acc.station_summary("mill", "Mill Lane", 1000.0);
  EXPECT_NEAR(s.centroid_lag_s, (kPeakTime + kBase) / 3.0 - 1000.0, 1e-9 * kBase);
}

// A flat-topped hydrograph peaks where the top is first reached, even when round-off makes
// later samples of the plateau larger in the last digits; a real rise still moves the peak.
TEST(SummaryAccumulator, PeakTimeOfAPlateauIsWhereItIsFirstReached) {
  SummaryAccumulator acc;
  acc.add_sample(0.0, 0.2);
  acc.add_sample(60.0, 0.7027);
  acc.add_sample(120.0, 0.7027 * (1.0 + 3e-13));
  acc.add_sample(180.0, 0.7027 * (1.0 + 8e-13));
  acc.add_sample(240.0, 0.5);
  EXPECT_EQ(acc.peak_time_s(), 60.0);
  EXPECT_EQ(acc.peak_discharge_m3s(), 0.7027 * (1.0 + 8e-13));  // the value is the largest
  acc.add_sample(300.0, 0.71);
  EXPECT_EQ(acc.peak_time_s(), 300.0);

  // A pipe at capacity creeping up by 1e-8 m3/s a step for 300 steps (3.8e-5 relative in
  // all) keeps the time its top was reached.
  SummaryAccumulator pipe;
  pipe.add_sample(0.0, 0.01);
  for (int k = 1; k <= 300; ++k) pipe.add_sample(60.0 * k, 0.08057 + 1e-8 * k);
  EXPECT_EQ(pipe.peak_time_s(), 60.0);
  EXPECT_NEAR(pipe.peak_discharge_m3s(), 0.08057 + 3e-6, 1e-15);
}

TEST(SummaryAccumulator, HandedInVolumesTakePrecedence) {
  SummaryAccumulator acc;
  acc.add_sample(0.0, 0.0);
  acc.add_sample(600.0, 1.0);
  acc.add_interval_volume(0.0, 600.0, 250.0);
  EXPECT_EQ(acc.volume_m3(), 250.0);
  EXPECT_EQ(acc.centroid_time_s(), 300.0);  // one interval: its midpoint
}

TEST(SummaryAccumulator, EmptyAccumulatorReportsNotApplicable) {
  SummaryAccumulator acc;
  EXPECT_TRUE(std::isnan(acc.peak_discharge_m3s()));
  EXPECT_TRUE(std::isnan(acc.volume_m3()));
  EXPECT_TRUE(std::isnan(acc.centroid_time_s()));
}

TEST(Summary, CompareStationsGivesAttenuationShiftAndVolumeChange) {
  StationSummary up{"a", "A", 10.0, 3600.0, 2.0, 5000.0, 4000.0, 1000.0};
  StationSummary down{"b", "B", 8.0, 4500.0, 1.5, 4900.0, 4800.0, 1800.0};
  const auto p = compare_stations(up, down);
  EXPECT_EQ(p.peak_attenuation_m3s, 2.0);
  EXPECT_EQ(p.peak_attenuation_percent, 20.0);
  EXPECT_EQ(p.peak_time_shift_s, 900.0);
  EXPECT_EQ(p.volume_change_m3, -100.0);
}

RunSummary example() {
  RunSummary s;
  s.title = "Alder Brook, 100-year 6-hour storm (invented)";
  s.source = "freshet 0.1.0";
  s.stations = {{"alder-1", "Mill Lane, upper", 12.5, 5400.0, 101.25, 48000.0, 9000.0, 3600.0},
                {"alder-2", "Lower weir", 1.0 / 3.0, 7200.0, kNotApplicable, 47500.0, 9900.0,
                 4500.0}};
  s.pairs = {compare_stations(s.stations[0], s.stations[1])};
  s.shocks = {{"alder-reach", 4000.0, 350.0, "shock formed; captured by the scheme"}};
  s.mass_balance = {{"alder-reach", 48000.0, 47500.0, 499.99, 0.01, 2.1e-7}};
  s.warnings = {{"alder-reach", "Froude number 1.4 at peak: \"kinematic\" assumption marginal"}};
  return s;
}

TEST(SummaryWriter, TableIsAlignedAndEndsWithTheCaution) {
  const std::string t = format_summary_table(example());
  EXPECT_THAT(t, HasSubstr("peak Q (m3/s)"));
  EXPECT_THAT(t, HasSubstr("12.500"));
  EXPECT_THAT(t, HasSubstr("Froude number 1.4"));
  EXPECT_THAT(t, HasSubstr("CAUTION: freshet results are engineering estimates"));
  EXPECT_THAT(t, HasSubstr("the local authority.\n"));
  // Right-aligned numeric columns: the station rows end at the same column as the header.
  std::istringstream in(t);
  std::vector<std::string> lines;
  for (std::string l; std::getline(in, l);) lines.push_back(l);
  const auto header = std::find_if(lines.begin(), lines.end(),
                                   [](const auto& l) { return l.rfind("station ", 0) == 0; });
  ASSERT_NE(header, lines.end());
  EXPECT_EQ(header->size(), (header + 1)->size());
  EXPECT_EQ(header->size(), (header + 2)->size());
  EXPECT_EQ((header + 1)->find("Mill Lane"), header->find("name"));  // names left-aligned
}

TEST(SummaryWriter, CsvFilesCarryCautionQuoteTextAndRoundTripNumbers) {
  TempDir dir;
  const auto paths = write_summary_csv(dir / "run1", example());
  ASSERT_EQ(paths.size(), 3u);
  const std::string stations = read_text(dir / "run1_stations.csv");
  EXPECT_THAT(stations, HasSubstr("# " + std::string(kCautionText)));
  EXPECT_THAT(stations, HasSubstr("\nstation_id,name,peak_discharge_m3s,peak_time_s,"));
  EXPECT_THAT(stations, HasSubstr("alder-2,Lower weir,0.3333333333333333,7200,,47500,"));
  const std::string checks = read_text(dir / "run1_checks.csv");
  EXPECT_THAT(checks, HasSubstr("applicability,alder-reach,,,,,,,,\"Froude number 1.4 at peak: "
                                "\"\"kinematic\"\" assumption marginal\""));
  EXPECT_THAT(checks, HasSubstr("mass_balance,alder-reach,,,48000,47500,499.99,0.01,2.1e-07,"));
  EXPECT_THAT(read_text(dir / "run1_pairs.csv"), HasSubstr("alder-1,alder-2,12.166666666666666,"));
}

TEST(SummaryWriter, CsvSetIsNotWrittenWhenAnyFileExists) {
  TempDir dir;
  testing::write_text(dir / "run1_pairs.csv", "keep");
  EXPECT_THROW(write_summary_csv(dir / "run1", example()), IoError);
  EXPECT_FALSE(std::filesystem::exists(dir / "run1_stations.csv"));
  EXPECT_EQ(read_text(dir / "run1_pairs.csv"), "keep");
}

TEST(SummaryWriter, JsonHoldsEveryRecordWithNullForNotApplicable) {
  TempDir dir;
  write_summary_json(dir / "s.json", example());
  const auto j = nlohmann::json::parse(read_text(dir / "s.json"));
  EXPECT_EQ(j.at("caution").get<std::string>(), std::string(kCautionText));
  EXPECT_EQ(j.at("stations").size(), 2u);
  EXPECT_EQ(j.at("stations")[1].at("peak_discharge_m3s").get<double>(), 1.0 / 3.0);
  EXPECT_TRUE(j.at("stations")[1].at("peak_stage_m").is_null());
  EXPECT_EQ(j.at("pairs")[0].at("peak_time_shift_s").get<double>(), 1800.0);
  EXPECT_EQ(j.at("shocks")[0].at("chainage_m").get<double>(), 350.0);
  EXPECT_EQ(j.at("mass_balance")[0].at("relative_error").get<double>(), 2.1e-7);
  EXPECT_THAT(j.at("applicability_warnings")[0].at("message").get<std::string>(),
              HasSubstr("\"kinematic\""));
  EXPECT_EQ(j.at("units").at("discharge").get<std::string>(), "m3 s-1");
}

}  // namespace
}  // namespace freshet::io
