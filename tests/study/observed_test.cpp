// Observed hydrographs ([[observed]], docs/inputs.md) through whole runs: the pairs written,
// the fit statistics on a case worked by hand, and bad attachments named by line and field.
//
// The observed record sits on an inflow whose hydrograph is a constant 2 m3/s, so the routed
// discharge at every reading is exactly 2. Observed 1, 3, 5, 3, 1 m3/s at 0.5, 1.5, 2.5,
// 3.5, 4.5 h (dated at +01:00, the study's time_zone, without a zone). By hand:
//   Nash & Sutcliffe (1970): NSE = 1 - sum (2 - o)^2 / sum (o - 2.6)^2 = 1 - 13 / 11.2
//                                = -0.160714 (worse than the observations' mean);
//   peak error 2 - 5 = -3 m3/s (-60 %); the routed series is flat, so its first maximum is
//   its first reading (0.5 h) and the timing error 0.5 - 2.5 h = -7200 s;
//   volume (trapezoid over the readings, 1 h apart): observed 3600 x 12 = 43200 m3, routed
//   3600 x 8 = 28800 m3: -33.3 %;
//   Kling-Gupta (Gupta et al. 2009): the routed series has no variance, so r is not defined
//   and neither is KGE.
#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include <cmath>
#include <string>

#include "../io/temp_dir.hpp"
#include "freshet/study/study_run.hpp"

namespace freshet::study {
namespace {

using io::testing::read_text;
using io::testing::TempDir;
using io::testing::write_text;
using ::testing::HasSubstr;

std::string basin(const std::string& observed) {
  return R"toml([study]
title = "observed fixture (invented)"
units = "si"
start = 2026-05-14T06:00:00
time_zone = "+01:00"
duration_h = 6.0
output_interval_min = 10.0

[[storm]]
id = "s1"
method = "alternating-block"
duration_min = 30
step_min = 5
idf = { a = 1300.0, b = 10.0, c = 0.75 }

[[inflow]]
id = "spring"
to = "out"
file = "q.csv"

[[outlet]]
id = "out"
)toml" + observed;
}

const std::string kObserved = R"toml(
[[observed]]
station = "spring"
storm = "s1"
file = "spring-observed.csv"
value_unit = "discharge_m3s"
)toml";

const std::string kRecord =
    "when;flow\n2026-05-14T06:30;1\n2026-05-14T07:30;3\n2026-05-14T08:30;5\n"
    "2026-05-14T09:30;3\n2026-05-14T10:30;1\n";

void write_inputs(const TempDir& dir, const std::string& text) {
  write_text(dir / "b.toml", text);
  write_text(dir / "q.csv", "time_h,discharge_m3s\n0,2\n6,2\n");
  write_text(dir / "spring-observed.csv", kRecord);
}

TEST(Observed, RoutedAgainstObservedIsWrittenWithItsFitStatistics) {
  TempDir dir;
  write_inputs(dir, basin(kObserved));
  const Study study = Study::load(dir / "b.toml");
  ASSERT_EQ(study.observed().size(), 1u);
  RunRequest req;
  req.storm_id = "s1";
  req.out_dir = dir / "out";
  req.source = "freshet test";
  const RunOutcome r = run_study(study, req);
  ASSERT_EQ(r.observed.size(), 1u);
  const reporting::ObservedFit& o = r.observed.front();
  ASSERT_EQ(o.times_s.size(), 5u);
  EXPECT_EQ(o.times_s.front(), 1800.0);  // 06:30 at +01:00, the start being 06:00 there
  for (double q : o.routed_m3s) EXPECT_NEAR(q, 2.0, 1e-12);
  EXPECT_NEAR(o.fit.nse, 1.0 - 13.0 / 11.2, 1e-12);
  EXPECT_TRUE(std::isnan(o.fit.kge));
  EXPECT_NEAR(o.fit.peak_error_m3s, -3.0, 1e-12);
  EXPECT_NEAR(o.fit.peak_error_relative, -0.6, 1e-12);
  EXPECT_EQ(o.fit.peak_timing_error_s, -7200.0);
  EXPECT_NEAR(o.fit.volume_error_relative, 28800.0 / 43200.0 - 1.0, 1e-12);
  const std::string csv = read_text(dir / "out" / "base" / "s1_spring_observed.csv");
  EXPECT_THAT(csv, HasSubstr("time_s,observed_discharge_m3s,routed_discharge_m3s\n1800,1,2\n"));
  const std::string sidecar =
      read_text(dir / "out" / "base" / "s1_spring_observed.csv-metadata.json");
  EXPECT_THAT(sidecar, HasSubstr("Nash-Sutcliffe efficiency -0.161"));
  EXPECT_THAT(sidecar, HasSubstr("peak timing error -120 min"));
  bool noted = false;
  for (const auto& [id, note] : r.notes) noted = noted || (id == "spring" && note.find("volume error -33.3 %") != std::string::npos);
  EXPECT_TRUE(noted);
}

TEST(Observed, BadAttachmentsAreNamedByLineAndField) {
  TempDir dir;
  const std::string text = basin(R"toml(
[[observed]]
station = "nowhere"
storm = "s9"
file = "spring-observed.csv"
value_unit = "discharge_m3s"
)toml");
  write_inputs(dir, text);
  std::vector<std::string> m;
  try {
    (void)Study::load(dir / "b.toml");
  } catch (const InputError& e) {
    for (const auto& p : e.problems()) m.push_back(p.to_string());
  }
  ASSERT_EQ(m.size(), 2u) << ::testing::PrintToString(m);
  EXPECT_THAT(m[0], HasSubstr("b.toml:25:"));
  EXPECT_THAT(m[0], HasSubstr("field 'station' = 'nowhere': names no element of the basin"));
  EXPECT_THAT(m[1], HasSubstr("b.toml:26:"));
  EXPECT_THAT(m[1], HasSubstr("field 'storm' = 's9': names no storm of this file"));
  // A spoiled record: its own file, line and column.
  write_text(dir / "b.toml", basin(kObserved));
  write_text(dir / "spring-observed.csv", "when;flow\n2026-05-14T06:30;1\n2026-05-14T06:20;3\n");
  try {
    (void)Study::load(dir / "b.toml");
    ADD_FAILURE() << "a backwards timestamp was accepted";
  } catch (const InputError& e) {
    EXPECT_THAT(e.problems().at(0).to_string(),
                HasSubstr("spring-observed.csv:3:1: observed 'spring', timestamp "
                          "'2026-05-14T06:20' is earlier than the one at line 2"));
  }
}

}  // namespace
}  // namespace freshet::study
