// Summary writers: the console table, the CSV files and the JSON document of a run summary.
#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include <cmath>
#include <nlohmann/json.hpp>

#include "freshet/core/caution.hpp"
#include "freshet/core/error.hpp"
#include "freshet/reporting/summary.hpp"
#include "freshet/io/csv_table.hpp"
#include "freshet/io/summary_writer.hpp"
#include "temp_dir.hpp"

namespace freshet::io {
namespace {

using ::testing::HasSubstr;
using testing::read_text;
using testing::TempDir;
using reporting::kNotApplicable;
using reporting::RunSummary;

RunSummary example() {
  RunSummary s;
  s.title = "Alder Brook, 100-year 6-hour storm (invented)";
  s.source = "freshet 0.1.0";
  s.stations = {{"alder-1", "Mill Lane, upper", 12.5, 5400.0, 101.25, 48000.0, 9000.0, 3600.0},
                {"alder-2", "Lower weir", 1.0 / 3.0, 7200.0, kNotApplicable, 47500.0, 9900.0,
                 4500.0}};
  reporting::AttenuationRecord a;
  a.element = "alder-reach";
  a.kind = "reach";
  a.peak_inflow_m3s = 12.5;
  a.peak_inflow_time_s = 5400.0;
  a.peak_lateral_inflow_m3s = 2.5;
  a.peak_outflow_m3s = 10.0;
  a.peak_outflow_time_s = 7200.0;
  a.attenuation_m3s = 2.5;
  a.attenuation_percent = 20.0;
  a.peak_delay_s = 1800.0;
  s.attenuation = {a};
  reporting::StretchRecord st;
  st.upstream_id = "alder-1";
  st.downstream_id = "alder-2";
  st.path = {"alder-1", "alder-reach", "alder-2"};
  st.side_inflow_volume_m3 = 500.0;
  s.stretches = {st};
  reporting::ShockRecord shock;
  shock.element = "alder-reach";
  shock.time_s = 4000.0;
  shock.chainage_m = 350.0;
  shock.speed_m_s = 1.5;
  shock.rankine_hugoniot_m_s = 1.25;
  shock.discharge_jump_m3s = 8.0;
  shock.depth_jump_m = 0.5;
  shock.fate = "outlet";
  shock.end_time_s = 5000.0;
  shock.found_by = "fronts";
  shock.path = {{4200.0, 600.0, 1.25, 7.5}};
  shock.message = "shock formed; captured by the scheme";
  s.shocks = {shock};
  s.breaking = {{"alder-reach", "", true, 3900.0, 300.0, 1500.0, "the wave breaks"},
                {"alder-hill", "upper lawn", false, kNotApplicable, kNotApplicable, 80.0,
                 "the wave does not break"}};
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

// Files that load as they are: header row first, no comment lines, RFC 4180 quoting (RFC 4180,
// 2005, Common Format and MIME Type for CSV Files, sec. 2), with '#' quoted too; the caution,
// time origin and units in the CSVW sidecar (W3C 2015, Metadata Vocabulary for Tabular Data).
TEST(SummaryWriter, CsvFilesStartWithTheHeaderQuoteTextAndRoundTripNumbers) {
  TempDir dir;
  RunSummary s = example();
  s.time_origin_iso = "2026-03-01T00:00:00Z";
  s.stations[1].name = "Mill Lane culvert #2";
  const auto paths = write_summary_csv(dir / "run1", s);
  ASSERT_EQ(paths.size(), 4u);
  const std::string stations = read_text(dir / "run1_stations.csv");
  EXPECT_EQ(stations.rfind("station_id,name,peak_discharge_m3s,peak_time_s,", 0), 0u);
  EXPECT_THAT(stations, ::testing::Not(HasSubstr(std::string(kCautionText))));
  EXPECT_THAT(stations, HasSubstr("alder-2,\"Mill Lane culvert #2\",0.3333333333333333,7200,,"));
  for (const auto& path : paths) {
    EXPECT_NE(read_text(path).front(), '#') << path;
    const auto meta = nlohmann::json::parse(read_text(csv_metadata_path(path)));
    EXPECT_EQ(meta.at("url").get<std::string>(), path.filename().string());
    EXPECT_EQ(meta.at("rdfs:comment").get<std::string>(), std::string(kCautionText));
    EXPECT_EQ(meta.at("dc:temporal").get<std::string>(), "2026-03-01T00:00:00Z");
    EXPECT_EQ(meta.at("schema:version").get<int>(), kOutputFormatVersion);
  }
  const auto meta = nlohmann::json::parse(read_text(dir / "run1_stations.csv-metadata.json"));
  const auto& columns = meta.at("tableSchema").at("columns");
  ASSERT_EQ(columns.size(), 8u);  // one per header field
  EXPECT_EQ(columns[2].at("name").get<std::string>(), "peak_discharge_m3s");
  EXPECT_EQ(columns[2].at("schema:unitText").get<std::string>(), "m3 s-1");
  EXPECT_EQ(columns[3].at("schema:unitText").get<std::string>(), "s since 2026-03-01T00:00:00Z");
  s.stations[1].name = "Lower weir";
  write_summary_csv(dir / "run2", s);
  EXPECT_THAT(read_text(dir / "run2_stations.csv"),
              HasSubstr("alder-2,Lower weir,0.3333333333333333,7200,,47500,"));
  const std::string checks = read_text(dir / "run1_checks.csv");
  EXPECT_THAT(checks, HasSubstr("applicability,alder-reach,,,,,,,,\"Froude number 1.4 at peak: "
                                "\"\"kinematic\"\" assumption marginal\""));
  EXPECT_THAT(checks, HasSubstr("mass_balance,alder-reach,,,48000,47500,499.99,0.01,2.1e-07,"));
  // Breaking and shocks fill the columns after the message (docs/outputs.md).
  EXPECT_THAT(checks, HasSubstr("relative_error,message,plane,breaks,length_m,speed_m_s,"
                                "rankine_hugoniot_m_s,discharge_jump_m3s,depth_jump_m,fate,"
                                "end_time_s,found_by\n"));
  EXPECT_THAT(checks, HasSubstr("breaking,alder-reach,3900,300,,,,,,the wave breaks,,true,1500,"
                                ",,,,,,\n"));
  EXPECT_THAT(checks, HasSubstr("breaking,alder-hill,,,,,,,,the wave does not break,upper lawn,"
                                "false,80,"));
  EXPECT_THAT(checks, HasSubstr("shock,alder-reach,4000,350,,,,,,shock formed; captured by the "
                                "scheme,,,,1.5,1.25,8,0.5,outlet,5000,fronts\n"));
  EXPECT_THAT(checks, HasSubstr("shock_path,alder-reach,4200,600,,,,,,,,,,,1.25,7.5,,,,fronts\n"));
  EXPECT_THAT(read_text(dir / "run1_attenuation.csv"),
              HasSubstr("alder-reach,reach,12.5,5400,2.5,10,7200,2.5,20,1800,"));
  EXPECT_THAT(read_text(dir / "run1_stretches.csv"),
              HasSubstr("alder-1,alder-2,alder-1 > alder-reach > alder-2,,,,,,500,"));
}

TEST(SummaryWriter, CsvSetIsNotWrittenWhenAnyFileExists) {
  TempDir dir;
  testing::write_text(dir / "run1_attenuation.csv", "keep");
  EXPECT_THROW(write_summary_csv(dir / "run1", example()), IoError);
  EXPECT_FALSE(std::filesystem::exists(dir / "run1_stations.csv"));
  EXPECT_EQ(read_text(dir / "run1_attenuation.csv"), "keep");
}

TEST(SummaryWriter, JsonHoldsEveryRecordWithNullForNotApplicable) {
  TempDir dir;
  write_summary_json(dir / "s.json", example());
  const auto j = nlohmann::json::parse(read_text(dir / "s.json"));
  EXPECT_EQ(j.at("caution").get<std::string>(), std::string(kCautionText));
  EXPECT_EQ(j.at("stations").size(), 2u);
  EXPECT_EQ(j.at("stations")[1].at("peak_discharge_m3s").get<double>(), 1.0 / 3.0);
  EXPECT_TRUE(j.at("stations")[1].at("peak_stage_m").is_null());
  EXPECT_EQ(j.at("attenuation")[0].at("peak_delay_s").get<double>(), 1800.0);
  EXPECT_EQ(j.at("stretches")[0].at("path")[1].get<std::string>(), "alder-reach");
  EXPECT_EQ(j.at("shocks")[0].at("chainage_m").get<double>(), 350.0);
  EXPECT_EQ(j.at("shocks")[0].at("rankine_hugoniot_m_s").get<double>(), 1.25);
  EXPECT_EQ(j.at("shocks")[0].at("fate").get<std::string>(), "outlet");
  EXPECT_EQ(j.at("shocks")[0].at("path")[0].at("discharge_jump_m3s").get<double>(), 7.5);
  EXPECT_TRUE(j.at("breaking")[0].at("breaks").get<bool>());
  EXPECT_EQ(j.at("breaking")[1].at("plane").get<std::string>(), "upper lawn");
  EXPECT_TRUE(j.at("breaking")[1].at("time_s").is_null());
  EXPECT_EQ(j.at("mass_balance")[0].at("relative_error").get<double>(), 2.1e-7);
  EXPECT_THAT(j.at("applicability_warnings")[0].at("message").get<std::string>(),
              HasSubstr("\"kinematic\""));
  EXPECT_EQ(j.at("units").at("discharge").get<std::string>(), "m3 s-1");
  EXPECT_EQ(j.at("format_version").get<int>(), kOutputFormatVersion);
  EXPECT_TRUE(j.at("time_origin").is_null());  // the example states none
}

TEST(SummaryWriter, CsvFieldQuotesPerRfc4180AndHash) {
  EXPECT_EQ(csv_field("mill-lane"), "mill-lane");
  EXPECT_EQ(csv_field("a,b"), "\"a,b\"");
  EXPECT_EQ(csv_field("say \"hi\""), "\"say \"\"hi\"\"\"");
  EXPECT_EQ(csv_field("culvert #2"), "\"culvert #2\"");
  EXPECT_EQ(csv_field(" padded"), "\" padded\"");
  EXPECT_EQ(csv_field("two\nlines"), "\"two\nlines\"");
}

}  // namespace
}  // namespace freshet::io
