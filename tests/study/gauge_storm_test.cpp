// Storms from rain-gauge records (method = "gauges", docs/inputs.md) read through whole basin
// files: each subcatchment receives the weighted mix of its gauges (the rain each one books
// equals sum_g w_g P_g times its area, worked by hand below), dated records are placed on the
// study clock through the study's time_zone, and bad weights or records are named by file,
// line and field.
#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include <span>
#include <string>
#include <vector>

#include "../io/temp_dir.hpp"
#include "freshet/network/driver.hpp"
#include "freshet/study/study.hpp"

namespace freshet::study {
namespace {

using io::testing::TempDir;
using io::testing::write_text;
using ::testing::HasSubstr;

class NullSink final : public network::RecordSink {
 public:
  void record(double, std::span<const network::StationSample>) override {}
};

// Study start 06:00 local at +01:00 (05:00Z). Gauge "north" is written in local time without
// a zone, "south" in UTC with ';' and a decimal comma; both put their first reading at the
// study start. north: 4 mm then 6 mm over two 10-min intervals (10 mm); south: 2 mm over
// 20 min then a gap filled by the linear rule between its neighbours' rates, then 2 mm.
const std::string kNorth =
    "Date/Time,Rain (mm),Quality\n"
    "2026-05-14T06:00:00,0,good\n"
    "2026-05-14T06:10:00,4,good\n"
    "2026-05-14T06:20:00,6,good\n";
// Rates: 2 mm / 20 min = 0.1 mm/min at 05:20Z; 2 mm / 10 min = 0.2 mm/min at 05:40Z; the gap's
// row at 05:30Z lies halfway: 0.15 mm/min over its 10 min = 1.5 mm. Total 2 + 1.5 + 2 = 5.5 mm.
const std::string kSouth =
    "\"time\";\"depth\"\n"
    "2026-05-14T05:00Z;0\n"
    "2026-05-14T05:20Z;2,0\n"
    "2026-05-14T05:30Z;\n"
    "2026-05-14T05:40Z;2\n";

std::string basin(const std::string& weights) {
  return R"toml([study]
title = "gauge fixture (invented)"
units = "si"
start = 2026-05-14T06:00:00
time_zone = "+01:00"
duration_h = 2.0
output_interval_min = 10.0

[[storm]]
id = "may"
method = "gauges"
missing = "linear"
  [[storm.gauge]]
  id = "north"
  file = "north.csv"
  time_column = "Date/Time"
  value_column = "Rain (mm)"
  value_unit = "depth_mm"
  [[storm.gauge]]
  id = "south"
  file = "south.csv"
  value_unit = "depth_mm"
  [storm.weights]
)toml" + weights + R"toml(

[[subcatchment]]
id = "hill"
to = "out"
area = 10.0
loss = { method = "none" }
  [[subcatchment.plane]]
  length = 100.0
  slope = 0.05
  manning_n = 0.1
  cells = 20

[[subcatchment]]
id = "vale"
to = "out"
area = 5.0
loss = { method = "none" }
  [[subcatchment.plane]]
  length = 100.0
  slope = 0.05
  manning_n = 0.1
  cells = 20

[[outlet]]
id = "out"
)toml";
}

struct Files {
  TempDir dir;
  std::filesystem::path file;
  explicit Files(const std::string& text, const std::string& south = kSouth)
      : file(dir / "basin.toml") {
    write_text(file, text);
    write_text(dir / "north.csv", kNorth);
    write_text(dir / "south.csv", south);
  }
  [[nodiscard]] std::vector<std::string> problems() const {
    std::vector<std::string> out;
    try {
      (void)Study::load(file);
    } catch (const InputError& e) {
      for (const auto& p : e.problems()) out.push_back(p.to_string());
    }
    return out;
  }
};

const std::string kWeights = "  hill = { north = 0.75, south = 0.25 }\n"
                             "  vale = { south = 1.0 }";

TEST(GaugeStorm, EachSubcatchmentBooksItsWeightedMixOfGauges) {
  Files f(basin(kWeights));
  const Study study = Study::load(f.file);
  const StormDefinition& storm = study.storm("may");
  // hill: 0.75 x 10 + 0.25 x 5.5 = 8.875 mm on 10 ha = 887.5 m3; vale: 5.5 mm on 5 ha = 275 m3.
  EXPECT_NEAR(storm.subcatchment_rain.at("hill").total_depth_m(), 8.875e-3, 1e-15);
  EXPECT_NEAR(storm.subcatchment_rain.at("vale").total_depth_m(), 5.5e-3, 1e-15);
  // Both records start at the study start (06:00 at +01:00 = 05:00Z): time 0.
  EXPECT_EQ(storm.subcatchment_rain.at("hill").start_s(), 0.0);
  EXPECT_EQ(storm.subcatchment_rain.at("vale").end_s(), 2400.0);
  EXPECT_NEAR(storm.rain.total_depth_m(), 0.5 * (10.0 + 5.5) * 1e-3, 1e-15);  // the plain mean
  network::Model model = study.build_model("", storm);
  NullSink sink;
  const auto& s = study.settings();
  const network::RunSummary run = network::simulate(
      model, {0.0, s.duration_s, s.output_interval_s, s.coupling_step_s}, sink);
  double hill_m3 = 0.0, vale_m3 = 0.0;
  for (std::size_t i = 0; i < model.links.size(); ++i) {
    if (model.links[i].id == "hill") hill_m3 = run.balances[i].ledger.rain_m3;
    if (model.links[i].id == "vale") vale_m3 = run.balances[i].ledger.rain_m3;
  }
  EXPECT_NEAR(hill_m3, 887.5, 1e-9 * 887.5);
  EXPECT_NEAR(vale_m3, 275.0, 1e-9 * 275.0);
}

TEST(GaugeStorm, BadWeightsAreNamedByLineAndField) {
  const std::string text = basin("  hill = { north = 0.75, east = 0.25 }\n"
                                 "  vale = { south = 0.5, north = 0.4 }\n"
                                 "  meadow = { south = 1.0 }");
  Files f(text);
  const auto m = f.problems();
  const std::string at = f.file.string() + ":";
  ASSERT_EQ(m.size(), 3u) << ::testing::PrintToString(m);
  // In the order TOML keeps a table's keys (sorted): hill, meadow, vale.
  EXPECT_THAT(m[0], HasSubstr(at + "24:"));
  EXPECT_THAT(m[0], HasSubstr("field 'east'"));
  EXPECT_THAT(m[0], HasSubstr("names no gauge of this storm (gauges: north, south)"));
  EXPECT_THAT(m[1], HasSubstr(at + "26:"));
  EXPECT_THAT(m[1], HasSubstr("field 'meadow'"));
  EXPECT_THAT(m[1], HasSubstr("names no subcatchment"));
  EXPECT_THAT(m[2], HasSubstr(at + "25:"));
  EXPECT_THAT(m[2], HasSubstr("field 'vale'"));
  EXPECT_THAT(m[2], HasSubstr("weights sum to 0.9"));
}

TEST(GaugeStorm, AMissingSubcatchmentAndABadRecordAreRefused) {
  Files f(basin("  hill = { north = 1.0 }"),
          "time;depth\n2026-05-14T05:00Z;0\n2026-05-14T05:00Z;1\n");
  const auto m = f.problems();
  ASSERT_EQ(m.size(), 1u) << ::testing::PrintToString(m);  // the weights wait for the records
  EXPECT_THAT(m[0], HasSubstr("gauge 'south'"));
  EXPECT_THAT(m[0], HasSubstr("south.csv:3:1: storm 'may' gauge 'south', timestamp '2026-05-14T05:00Z' repeats the one at "
                              "line 2"));
  Files g(basin("  hill = { north = 1.0 }"));
  const auto n = g.problems();
  ASSERT_EQ(n.size(), 1u) << ::testing::PrintToString(n);
  EXPECT_THAT(n[0], HasSubstr("gives no weights for subcatchment 'vale'"));
}

}  // namespace
}  // namespace freshet::study
