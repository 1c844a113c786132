// CSV hydrograph/hyetograph reader and writer.
// Unit factors checked against NIST Special Publication 811 (2008 ed.), Appendix B.8/B.9:
// foot = 0.3048 m and inch = 0.0254 m exactly, so 1 ft3/s = 0.028316846592 m3/s exactly;
// minute = 60 s, hour = 3600 s.
#include "freshet/io/csv_series.hpp"

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include <bit>
#include <cmath>
#include <cstdint>
#include <nlohmann/json.hpp>

#include "freshet/core/caution.hpp"
#include "freshet/core/error.hpp"
#include "freshet/reporting/series_resample.hpp"
#include "temp_dir.hpp"

namespace freshet::io {
namespace {

using ::testing::HasSubstr;
using testing::TempDir;
using testing::read_text;
using testing::write_text;

std::vector<std::string> messages_of(std::string_view text) {
  try {
    parse_series_csv(text, "in.csv");
  } catch (const InputError& e) {
    std::vector<std::string> out;
    for (const auto& p : e.problems()) out.push_back(p.to_string());
    return out;
  }
  return {};
}

TEST(CsvSeries, ReadsHeaderUnitsAndConvertsToSiOnce) {
  const auto t = parse_series_csv("# freshet hydrograph\ntime_min,discharge_cfs\n0,0\n15,100\n",
                                  "in.csv");
  EXPECT_EQ(t.quantity, SeriesQuantity::discharge);
  ASSERT_EQ(t.times_s.size(), 2u);
  EXPECT_DOUBLE_EQ(t.times_s[1], 900.0);  // 15 min = 900 s
  EXPECT_NEAR(t.values_si[1], 2.8316846592, 1e-12);  // 100 ft3/s, NIST SP 811 B.9
  ASSERT_EQ(t.metadata.size(), 1u);
  EXPECT_EQ(t.metadata[0], "freshet hydrograph");
}

TEST(CsvSeries, RainUnitsConvertToMetresAndMetresPerSecond) {
  const auto in = parse_series_csv("time_h,intensity_in_per_h\n0,1\n1,2\n", "r.csv");
  EXPECT_EQ(in.quantity, SeriesQuantity::rain_intensity);
  EXPECT_DOUBLE_EQ(in.times_s[1], 3600.0);
  EXPECT_NEAR(in.values_si[0], 0.0254 / 3600.0, 1e-20);  // 1 in/h
  const auto mm = parse_series_csv("time_min,depth_mm\n0,0\n5,2.5\n", "r.csv");
  EXPECT_EQ(mm.quantity, SeriesQuantity::rain_depth);
  EXPECT_NEAR(mm.values_si[1], 0.0025, 1e-18);
}

TEST(CsvSeries, AcceptsByteOrderMarkCrlfBlankLinesAndSpaces) {
  const auto t = parse_series_csv("\xEF\xBB\xBF# c\r\ntime_s, discharge_m3s\r\n\r\n0 ,1.5\r\n"
                                  "60,  2.5e0\r\n", "in.csv");
  ASSERT_EQ(t.values_si.size(), 2u);
  EXPECT_EQ(t.values_si[1], 2.5);
}

TEST(CsvSeries, ReportsEveryProblemWithFileLineAndColumn) {
  const auto m = messages_of(
      "# comment\n"
      "time_s,discharge_m3s\n"
      "0,1\n"
      "60,abc\n"        // line 4: non-numeric at column 4
      "120,nan\n"       // line 5: NaN at column 5
      "180,-2\n"        // line 6: negative at column 5
      "170,1\n"         // line 7: time does not increase, column 1
      "240,1,7\n"       // line 8: three columns
      "\"300\",1\n");   // line 9: quoted field
  ASSERT_EQ(m.size(), 6u);
  EXPECT_EQ(m[0], "in.csv:4:4: 'abc' is not a number");
  EXPECT_THAT(m[1], HasSubstr("in.csv:5:5: 'nan' is not allowed"));
  EXPECT_EQ(m[2], "in.csv:6:5: discharge_m3s = -2: must be >= 0");
  EXPECT_EQ(m[3], "in.csv:7:1: time 170 does not increase (previous row: 180)");
  EXPECT_EQ(m[4], "in.csv:8:1: expected 2 columns, found 3");
  EXPECT_THAT(m[5], HasSubstr("in.csv:9:1: quoted fields are not supported"));
}

TEST(CsvSeries, UnknownUnitNamesTheColumnAndTheChoices) {
  const auto m = messages_of("time_s,discharge_gpm\n0,1\n");
  ASSERT_EQ(m.size(), 1u);
  EXPECT_THAT(m[0], HasSubstr("in.csv:1:8: unknown value column 'discharge_gpm'"));
  EXPECT_THAT(m[0], HasSubstr("discharge_cfs"));
  EXPECT_THAT(messages_of("time_days,discharge_m3s\n0,1\n").at(0),
              HasSubstr("in.csv:1:1: unknown time column 'time_days'"));
}

TEST(CsvSeries, EmptyOrHeaderlessFilesAreRejected) {
  EXPECT_THAT(messages_of("# only comments\n").at(0), HasSubstr("no header row"));
  // An empty file has no line of its own: it is reported at line 1, not at line 0 (which
  // printed no line at all).
  EXPECT_THAT(messages_of("").at(0), HasSubstr("in.csv:1: no header row"));
  EXPECT_THAT(messages_of("time_s,discharge_m3s\n").at(0), HasSubstr("no data rows"));
}

TEST(CsvSeries, DepthColumnMustStartWithZero) {
  EXPECT_THAT(messages_of("time_min,depth_in\n5,0.2\n").at(0),
              HasSubstr("in.csv:2:3: depth_in = 0.2: the first row marks the start"));
}

// Values chosen to need all 17 significant digits, plus extremes.
// Values the decimal text must carry exactly (the largest is just under the reader's hard
// limit on discharge, 1e6 m3/s).
std::vector<double> awkward_values() {
  return {0.0, 1.0 / 3.0, 2.0 / 3.0 * 1e5, std::nextafter(1.0, 2.0), 1e-300, 5e-324,
          123456.78901234567, 0.1, 0.7, std::nextafter(1e6, 0.0)};
}

TEST(CsvSeries, WrittenThenReadBackIsBitwiseEqualInSiUnits) {
  TempDir dir;
  SeriesTable t;
  const auto v = awkward_values();
  for (std::size_t k = 0; k < v.size(); ++k) {
    t.times_s.push_back(static_cast<double>(k) * 60.1 + 1.0 / 7.0);
    t.values_si.push_back(v[k]);
  }
  CsvWriteOptions options;
  options.time_base = "2000-01-01T00:00:00Z";
  write_series_csv(dir / "q.csv", t, options);
  const auto back = read_series_csv(dir / "q.csv");
  ASSERT_EQ(back.values_si.size(), v.size());
  for (std::size_t k = 0; k < v.size(); ++k) {
    EXPECT_EQ(std::bit_cast<std::uint64_t>(back.times_s[k]),
              std::bit_cast<std::uint64_t>(t.times_s[k]));
    EXPECT_EQ(std::bit_cast<std::uint64_t>(back.values_si[k]), std::bit_cast<std::uint64_t>(v[k]));
  }
}

// A value converted to minutes or ft3/s and back cannot always hit the same double (there may be
// no double x with fl(60 x) = t), so the promise outside SI columns is one unit in the last place.
TEST(CsvSeries, WrittenInUsUnitsReadsBackWithinOneUlp) {
  SeriesTable t;
  for (int k = 0; k < 200; ++k) {
    t.times_s.push_back(37.3 * k);
    t.values_si.push_back(0.0123 * k * k / (1.0 + k));
  }
  CsvWriteOptions options;
  options.time_unit = ColumnUnit::time_min;
  options.value_unit = ColumnUnit::discharge_cfs;
  const std::string text = format_series_csv(t, options);
  const auto back = parse_series_csv(text, "mem.csv");
  for (std::size_t k = 0; k < t.times_s.size(); ++k) {
    const double ulp = 0x1p-52;
    EXPECT_LE(std::abs(back.times_s[k] - t.times_s[k]), ulp * t.times_s[k]) << k;
    EXPECT_LE(std::abs(back.values_si[k] - t.values_si[k]), ulp * t.values_si[k]) << k;
  }
}

// The header row first and no comment lines, so a plain CSV reader loads the file; the time
// base, caution and units in the CSVW sidecar (W3C 2015, Metadata Vocabulary for Tabular Data,
// sec. 5.1 for the `-metadata.json` name).
TEST(CsvSeries, WriterPutsTheHeaderFirstAndTimeBaseCautionUnitsInTheSidecar) {
  TempDir dir;
  SeriesTable t;
  t.times_s = {0.0, 3600.0};
  t.values_si = {0.0, 1.0};
  t.metadata = {"station mill-lane"};
  CsvWriteOptions options;
  options.time_unit = ColumnUnit::time_h;
  options.time_base = "storm start";
  options.time_origin_iso = "2000-01-01T00:00:00Z";
  EXPECT_EQ(format_series_csv(t, options), "time_h,discharge_m3s\n0,0\n1,1\n");
  write_series_csv(dir / "q.csv", t, options);
  EXPECT_EQ(read_text(dir / "q.csv"), "time_h,discharge_m3s\n0,0\n1,1\n");
  const auto meta = nlohmann::json::parse(read_text(dir / "q.csv-metadata.json"));
  EXPECT_EQ(meta.at("dc:title").get<std::string>(), "freshet hydrograph");
  EXPECT_EQ(meta.at("rdfs:comment").get<std::string>(), std::string(kCautionText));
  const auto notes = meta.at("dc:description").dump();
  EXPECT_THAT(notes, HasSubstr("time base: storm start"));
  EXPECT_THAT(notes, HasSubstr("station mill-lane"));
  const auto& columns = meta.at("tableSchema").at("columns");
  EXPECT_EQ(columns[0].at("schema:unitText").get<std::string>(), "h since 2000-01-01T00:00:00Z");
  EXPECT_EQ(columns[1].at("schema:unitText").get<std::string>(), "m3 s-1");
}

TEST(CsvSeries, AnExistingSidecarStopsTheWriteBeforeAnythingIsWritten) {
  TempDir dir;
  SeriesTable t;
  t.times_s = {0.0, 60.0};
  t.values_si = {0.0, 1.0};
  write_text(dir / "q.csv-metadata.json", "keep");
  EXPECT_THROW(write_series_csv(dir / "q.csv", t, {}), IoError);
  EXPECT_FALSE(std::filesystem::exists(dir / "q.csv"));
  EXPECT_EQ(read_text(dir / "q.csv-metadata.json"), "keep");
}

TEST(CsvSeries, HydrographReaderReturnsASeriesAndRejectsRainFiles) {
  TempDir dir;
  write_text(dir / "q.csv", "time_s,discharge_m3s\n0,0\n100,2\n");
  const auto q = read_hydrograph_csv(dir / "q.csv");
  EXPECT_DOUBLE_EQ(q.integral(0.0, 100.0), 100.0);  // triangle: 0.5 * 100 s * 2 m3/s
  write_text(dir / "r.csv", "time_s,intensity_mm_per_h\n0,0\n100,2\n");
  EXPECT_THROW(read_hydrograph_csv(dir / "r.csv"), InputError);
  EXPECT_EQ(read_hyetograph_csv(dir / "r.csv").quantity, SeriesQuantity::rain_intensity);
  EXPECT_THROW(read_hyetograph_csv(dir / "q.csv"), InputError);
}

// The wrong quantity is reported at the header's value column, before any row is judged (a
// depth column under an inflow used to be rejected for its first row's depth, and a discharge
// column under a storm without a line).
TEST(CsvSeries, WrongQuantityIsReportedAtTheHeader) {
  TempDir dir;
  write_text(dir / "d.csv", "# gauge\ntime_min,depth_mm\n0,0.2\n5,1\n");
  try {
    read_hydrograph_csv(dir / "d.csv");
    FAIL();
  } catch (const InputError& e) {
    ASSERT_EQ(e.problems().size(), 1u);
    EXPECT_THAT(e.problems()[0].to_string(),
                HasSubstr("d.csv:2:10: value column 'depth_mm' is rain, not discharge"));
  }
  write_text(dir / "q.csv", "time_s,discharge_m3s\n0,0\n100,2\n");
  try {
    read_hyetograph_csv(dir / "q.csv");
    FAIL();
  } catch (const InputError& e) {
    ASSERT_EQ(e.problems().size(), 1u);
    EXPECT_THAT(e.problems()[0].to_string(),
                HasSubstr("q.csv:1:8: value column 'discharge_m3s' is a discharge, not rain"));
  }
}

// A folder opens as an empty stream; it used to be reported as a file without a header.
TEST(CsvSeries, FolderIsAnIoErrorNamingIt) {
  TempDir dir;
  try {
    read_series_csv(dir.path());
    FAIL();
  } catch (const IoError& e) {
    EXPECT_THAT(e.what(), HasSubstr("': it is a folder"));
  }
}

TEST(CsvSeries, MissingInputFileIsAnIoErrorNamingIt) {
  try {
    read_series_csv("/nonexistent/q.csv");
    FAIL();
  } catch (const IoError& e) {
    EXPECT_THAT(e.what(), HasSubstr("/nonexistent/q.csv"));
  }
}

TEST(CsvSeries, UnitNamesRoundTrip) {
  for (auto u : {ColumnUnit::time_s, ColumnUnit::time_min, ColumnUnit::time_h,
                 ColumnUnit::discharge_m3s, ColumnUnit::discharge_cfs,
                 ColumnUnit::intensity_mm_per_h, ColumnUnit::intensity_in_per_h,
                 ColumnUnit::depth_mm, ColumnUnit::depth_in}) {
    EXPECT_EQ(parse_column_unit(to_string(u)), u);
  }
  EXPECT_FALSE(parse_column_unit("cfs").has_value());
}

// Values beyond any real flow or rain are refused where they are read (a fuzzing finding:
// 1e308 in/h was accepted, then written back as 'inf' in mm/h). The limits are generous hard
// bounds, not design values; their reasons (record floods and rainfalls) are from memory.
TEST(CsvSeries, ValuesAndTimesBeyondHardLimitsAreRefusedWithTheirLine) {
  const auto rain = messages_of("time_h,intensity_in_per_h\n0,0\n1,1e308\n");
  ASSERT_EQ(rain.size(), 1u);
  EXPECT_THAT(rain[0], HasSubstr("in.csv:3"));
  EXPECT_THAT(rain[0], HasSubstr("above the hard limit"));
  EXPECT_EQ(messages_of("time_h,intensity_mm_per_h\n0,0\n1,9999\n").size(), 0u);
  EXPECT_EQ(messages_of("time_s,discharge_cfs\n0,0\n1,4e7\n").size(), 1u);
  EXPECT_EQ(messages_of("time_s,discharge_m3s\n0,0\n1,9e5\n").size(), 0u);
  // The limits are rows of the input-ranges table (src/io/input_ranges.cpp): 1e6 m3/s,
  // some three times the largest flood discharge measured (about 3e5 m3/s; from memory), is
  // the last value accepted, and the refusal quotes the table's reason.
  EXPECT_EQ(messages_of("time_s,discharge_m3s\n0,0\n1,1e6\n").size(), 0u);
  const auto flood = messages_of("time_s,discharge_m3s\n0,0\n1,1.000001e6\n");
  ASSERT_EQ(flood.size(), 1u);
  EXPECT_THAT(flood[0], HasSubstr("above the hard limit of 1e+06 (above any flood discharge "
                                  "ever measured, about 3e5 m3/s"));
  EXPECT_EQ(messages_of("time_h,discharge_m3s\n-8766000,0\n0,1\n").size(), 0u);  // -1000 years
  EXPECT_EQ(messages_of("time_h,discharge_m3s\n-8766001,0\n0,1\n").size(), 1u);
  EXPECT_EQ(messages_of("time_min,depth_mm\n0,0\n5,10001\n").size(), 1u);
  const auto time = messages_of("time_h,discharge_m3s\n0,0\n1e306,1\n");
  ASSERT_EQ(time.size(), 1u);
  EXPECT_THAT(time[0], HasSubstr("more than 1000 years"));
}

// A series resampled to keep its volume (reporting/series_resample.hpp) keeps it through a CSV
// file: the written digits round-trip. Reference volume: the trapezoid rule over the
// breakpoints of a piecewise-linear series (exact for it).
TEST(CsvSeries, ResampledVolumeSurvivesWritingAndReading) {
  const PiecewiseLinearSeries q({0.0, 2820.0, 11580.0}, {1.5, 13.5, 1.5});
  const auto r = reporting::resample_preserving_volume(q, 0.0, 300.0, 40,
                                                       reporting::ResampleMethod::interval_volumes);
  SeriesTable t;
  t.times_s.assign(r.times_s().begin(), r.times_s().end());
  t.values_si.assign(r.values().begin(), r.values().end());
  const auto back = parse_series_csv(format_series_csv(t, {}), "mem.csv");
  const PiecewiseLinearSeries b(back.times_s, back.values_si);
  const double exact = q.integral(0.0, 12000.0);
  EXPECT_LT(std::abs(b.integral(0.0, 12000.0) - exact) / exact, 1e-12);
}

}  // namespace
}  // namespace freshet::io
