// Gauge records as they come (io/gauge_record.hpp) and ISO 8601 timestamps (io/iso_time.hpp).
// Epoch seconds are checked against Python's datetime (the standard library's implementation
// of the proleptic Gregorian calendar and UTC offsets), computed with
//   datetime(2026, 5, 14, 6, 30, tzinfo=timezone(timedelta(hours=1))).timestamp()
// and written beside each check. Filled gaps are checked against values worked by hand in the
// comments from the rule stated in the header.
#include "freshet/io/gauge_record.hpp"

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include <string>
#include <vector>

#include "freshet/core/error.hpp"
#include "freshet/io/iso_time.hpp"

namespace freshet::io {
namespace {

using ::testing::HasSubstr;

std::vector<std::string> messages_of(const std::string& text, const GaugeFormat& f) {
  try {
    parse_gauge_csv(text, "g.csv", f);
  } catch (const InputError& e) {
    std::vector<std::string> out;
    for (const auto& p : e.problems()) out.push_back(p.to_string());
    return out;
  }
  return {};
}

TEST(IsoTime, AgreesWithPythonDatetime) {
  // datetime(2026,5,14,6,30,tzinfo=+01:00).timestamp() = 1778736600
  EXPECT_EQ(parse_iso_date_time("2026-05-14T06:30:00+01:00", 0), 1778736600.0);
  EXPECT_EQ(parse_iso_date_time("2026-05-14T05:30:00Z", 0), 1778736600.0);
  EXPECT_EQ(parse_iso_date_time("2026-05-14 05:30", 0), 1778736600.0);
  EXPECT_EQ(parse_iso_date_time("2026-05-14T0630+0100", 0), 1778736600.0);
  // No zone: the default offset (the study's time_zone) applies.
  EXPECT_EQ(parse_iso_date_time("2026-05-14T06:30:00", 60), 1778736600.0);
  EXPECT_EQ(parse_iso_date_time("2026-05-14T06:30:00.25", 60), 1778736600.25);
  // datetime(2000,1,1,tzinfo=utc).timestamp() = 946684800; 2024-02-29 (leap day) = 1709164800
  EXPECT_EQ(parse_iso_date_time("2000-01-01", 0), 946684800.0);
  EXPECT_EQ(parse_iso_date_time("2024-02-29T00:00Z", 0), 1709164800.0);
  // datetime(1969,12,31,23,0,tzinfo=utc).timestamp() = -3600
  EXPECT_EQ(parse_iso_date_time("1969-12-31T23:00:00Z", 0), -3600.0);
}

TEST(IsoTime, RefusesImpossibleDatesAndTimesWithAReason) {
  std::string why;
  EXPECT_FALSE(parse_iso_date_time("2026-04-31T00:00", 0, &why));
  EXPECT_THAT(why, HasSubstr("no such date"));
  EXPECT_FALSE(parse_iso_date_time("2025-02-29", 0, &why));  // 2025 is not a leap year
  EXPECT_FALSE(parse_iso_date_time("2026-05-14T24:00", 0, &why));
  EXPECT_THAT(why, HasSubstr("hour 24"));
  EXPECT_FALSE(parse_iso_date_time("2026-05-14T10:60", 0, &why));
  EXPECT_FALSE(parse_iso_date_time("14/05/2026 10:00", 0, &why));
  EXPECT_THAT(why, HasSubstr("ISO 8601"));
  EXPECT_FALSE(parse_iso_date_time("2026-05-14T10:00 CET", 0, &why));
  EXPECT_THAT(why, HasSubstr("zone designator"));
  EXPECT_EQ(parse_utc_offset("-05:30"), -330);
  EXPECT_EQ(parse_utc_offset("UTC"), 0);
  EXPECT_FALSE(parse_utc_offset("+15:00"));
}

GaugeFormat depth_format(MissingRule rule = MissingRule::refuse) {
  GaugeFormat f;
  f.value_unit = ColumnUnit::depth_mm;
  f.origin_epoch_s = 1778716800.0;  // 2026-05-14T00:00:00Z (Python: 1778716800)
  f.missing = rule;
  return f;
}

TEST(GaugeRecord, ReadsSemicolonsQuotesDecimalCommasAndIrregularIntervals) {
  // A logger export: quoted header names holding the separator, ';' between fields, a
  // decimal comma, a zone on each stamp, extra columns, irregular intervals.
  const std::string text =
      "\"Station; name\";\"Date/Time\";\"Rain (mm)\"\n"
      "\"Heron Hill\";2026-05-14T01:00:00+01:00;0\n"
      "\"Heron Hill\";2026-05-14T01:10:00+01:00;2,5\n"
      "\"Heron Hill\";2026-05-14T01:40:00+01:00;\"1.5\"\n";
  GaugeFormat f = depth_format();
  f.time_column = "Date/Time";
  f.value_column = "Rain (mm)";
  const SeriesTable t = parse_gauge_csv(text, "g.csv", f);
  ASSERT_EQ(t.times_s.size(), 3u);
  EXPECT_EQ(t.quantity, SeriesQuantity::rain_depth);
  EXPECT_EQ(t.times_s[0], 0.0);      // 01:00+01:00 is the study start, 00:00Z
  EXPECT_EQ(t.times_s[1], 600.0);
  EXPECT_EQ(t.times_s[2], 2400.0);
  EXPECT_DOUBLE_EQ(t.values_si[1], 2.5e-3);
  EXPECT_DOUBLE_EQ(t.values_si[2], 1.5e-3);
}

TEST(GaugeRecord, FillsGapsByTheChosenRule) {
  // Intensity readings at 0, 10, 20, 40 min: 6, (gap), (gap), 12 mm/h.
  const std::string text =
      "time,rain\n2026-05-14T00:00Z,6\n2026-05-14T00:10Z,\n2026-05-14T00:20Z,NA\n"
      "2026-05-14T00:40Z,12\n";
  GaugeFormat f = depth_format(MissingRule::linear);
  f.value_unit = ColumnUnit::intensity_mm_per_h;
  const SeriesTable lin = parse_gauge_csv(text, "g.csv", f);
  // Linear in time between 6 (0 min) and 12 (40 min): 10 min -> 7.5, 20 min -> 9 mm/h.
  const double mm_h = 1e-3 / 3600.0;
  EXPECT_DOUBLE_EQ(lin.values_si[1], 7.5 * mm_h);
  EXPECT_DOUBLE_EQ(lin.values_si[2], 9.0 * mm_h);
  EXPECT_THAT(lin.metadata.at(0), HasSubstr("line 3: missing value filled (linear) with 7.5"));
  f.missing = MissingRule::zero;
  const SeriesTable zero = parse_gauge_csv(text, "g.csv", f);
  EXPECT_EQ(zero.values_si[1], 0.0);
  EXPECT_EQ(zero.values_si[2], 0.0);

  // Depths: rows at 0, 10, 20, 30 min holding 0, 2, (gap), 4 mm. Rates: 0.2 mm/min over
  // (0,10], 0.4 mm/min over (20,30]; the gap's row at 20 min lies halfway in time between the
  // rows of those rates (10 and 30 min): 0.3 mm/min over its 10 min interval = 3 mm.
  const std::string depths =
      "t,d\n2026-05-14T00:00Z,0\n2026-05-14T00:10Z,2\n2026-05-14T00:20Z,-\n2026-05-14T00:30Z,4\n";
  const SeriesTable d = parse_gauge_csv(depths, "g.csv", depth_format(MissingRule::linear));
  EXPECT_DOUBLE_EQ(d.values_si[2], 3e-3);
}

TEST(GaugeRecord, EveryBadRowIsNamedByLineAndColumn) {
  const std::string text =
      "time,rain\n"
      "2026-05-14T00:00Z,0\n"
      "2026-05-14T00:10Z,1\n"
      "2026-05-14T00:10Z,1\n"      // line 4: repeated stamp
      "2026-05-14T00:05Z,1\n"      // line 5: earlier stamp
      "2026-05-14T00:20Z,\n"       // line 6: missing under refuse, column 19
      "2026-13-01T00:00Z,1\n"      // line 7: bad date
      "2026-05-14T00:40Z,-1\n";    // line 8: negative
  const auto m = messages_of(text, depth_format());
  ASSERT_EQ(m.size(), 5u);
  EXPECT_THAT(m[0], HasSubstr("g.csv:4:1: timestamp '2026-05-14T00:10Z' repeats the one at line 3"));
  EXPECT_THAT(m[1], HasSubstr("g.csv:5:1: timestamp '2026-05-14T00:05Z' is earlier than the one "
                              "at line 4"));
  EXPECT_THAT(m[2], HasSubstr("g.csv:6:19: missing value"));
  EXPECT_THAT(m[2], HasSubstr("missing = \"refuse\""));
  EXPECT_THAT(m[3], HasSubstr("g.csv:7:1: timestamp '2026-13-01T00:00Z'"));
  EXPECT_THAT(m[4], HasSubstr("g.csv:8:19: depth_mm = -1: must be >= 0"));
}

TEST(GaugeRecord, HeaderAndEdgeProblems) {
  GaugeFormat f = depth_format(MissingRule::linear);
  f.value_column = "rain_mm";
  EXPECT_THAT(messages_of("time,rain\n2026-05-14T00:00Z,0\n", f).at(0),
              HasSubstr("g.csv:1:1: value_column 'rain_mm' is not in the header ('time', 'rain')"));
  EXPECT_THAT(messages_of("time,rain\n2026-05-14T00:00Z,0\n2026-05-14T00:10Z,\n",
                          depth_format(MissingRule::linear)).at(0),
              HasSubstr("g.csv:3:19: missing value at the end of the record"));
  EXPECT_THAT(messages_of("time,rain\n2026-05-14T00:00Z,3\n2026-05-14T00:10Z,1\n",
                          depth_format()).at(0),
              HasSubstr("g.csv:2:19: depth_mm = 3: the first reading marks the start"));
  EXPECT_THAT(messages_of("time,rain\n\"2026-05-14T00:00Z,0\n", depth_format()).at(0),
              HasSubstr("g.csv:2:1: quoted field is not closed"));
  EXPECT_THAT(messages_of("# nothing\n", depth_format()).at(0), HasSubstr("no header row"));
}

}  // namespace
}  // namespace freshet::io
