// Tests of the basin-file reader (study::Study) through whole files: bad input reported with
// file:line, element and field, all problems at once; SI and US customary input giving the
// same routed study; and end-to-end physics with known answers through the basin-file path.
//
// Fixtures are small strings written to a fresh temporary folder per test (temp_dir.hpp), so
// each test shows the file it reads next to what it expects.
#include "freshet/study/study.hpp"

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <functional>
#include <map>
#include <span>
#include <sstream>
#include <string>
#include <vector>

#include "freshet/study/study_run.hpp"
#include "freshet/network/driver.hpp"
#include "../io/temp_dir.hpp"
#include "manning_closed_form.hpp"

namespace freshet::study {
namespace {

using io::testing::TempDir;
using io::testing::write_text;

// ---- helpers --------------------------------------------------------------------------------

// 1-based line of the first occurrence of `needle` in `text` (0 if absent: a test error).
int line_of(const std::string& text, const std::string& needle) {
  const std::size_t at = text.find(needle);
  if (at == std::string::npos) return 0;
  return 1 + static_cast<int>(std::count(text.begin(), text.begin() + static_cast<long>(at), '\n'));
}

// True when some line of `what` starts with `prefix` and contains every part of `parts`.
::testing::AssertionResult has_line(const std::string& what, const std::string& prefix,
                                    const std::vector<std::string>& parts) {
  std::istringstream in(what);
  std::string line;
  while (std::getline(in, line)) {
    if (line.rfind(prefix, 0) != 0) continue;
    bool all = true;
    for (const auto& p : parts) all = all && line.find(p) != std::string::npos;
    if (all) return ::testing::AssertionSuccess();
  }
  std::string wanted = "'" + prefix + "'";
  for (const auto& p : parts) wanted += " + '" + p + "'";
  return ::testing::AssertionFailure() << "no line of the message has " << wanted
                                       << "; the message was:\n" << what;
}

// A valid study head: settings and one storm. Element tables follow it in each fixture.
const std::string kHead = R"([study]
title = "fixture"
units = "si"
duration_h = 1.0
output_interval_min = 5.0

[[storm]]
id = "s1"
method = "alternating-block"
duration_min = 30
step_min = 5
idf = { a = 1300.0, b = 10.0, c = 0.75 }
)";

// A constant 1 m3/s hydrograph for one hour.
const std::string kSteadyCsv = "time_min,discharge_m3s\n0,1.0\n60,1.0\n";

struct Fixture {
  TempDir dir;
  std::filesystem::path basin;
  std::string text;

  explicit Fixture(std::string basin_text, const std::map<std::string, std::string>& files = {
                                               {"flow.csv", kSteadyCsv}})
      : basin(dir / "basin.toml"), text(std::move(basin_text)) {
    write_text(basin, text);
    for (const auto& [name, content] : files) write_text(dir / name, content);
  }
  // "<path>:<line of needle>:"
  [[nodiscard]] std::string at(const std::string& needle) const {
    return basin.string() + ":" + std::to_string(line_of(text, needle)) + ":";
  }
  // Loads the basin, expecting an InputError; returns its problems (empty: no error).
  [[nodiscard]] std::vector<Problem> problems() const {
    try {
      (void)Study::load(basin);
    } catch (const InputError& e) {
      what = e.what();
      return e.problems();
    }
    return {};
  }
  mutable std::string what;
};

// ---- 1. bad input ---------------------------------------------------------------------------
// Rule under test (docs/basin-file.md; DEVELOPERS.md, "Errors, three tiers"): every problem names
// file:line, the element and the field, and a file with several problems reports all of them.

const std::string kGoodNetwork = R"(
[[inflow]]
id = "spring"
to = "r1"
file = "flow.csv"

[[reach]]
id = "r1"
to = "out"
length = 500.0
slope = 0.004
manning_n = 0.03
section = { shape = "rectangular", bottom_width = 3.0 }

[[outlet]]
id = "out"
)";

TEST(StudyLoad, TheFixtureItselfIsValid) {
  // Guards the other tests: their problems come from the one change each makes.
  Fixture f(kHead + kGoodNetwork);
  EXPECT_TRUE(f.problems().empty()) << f.what;
}

TEST(StudyLoad, MisspeltKeyIsNamedAsUnknownAtItsLine) {
  Fixture f(kHead + R"(
[[inflow]]
id = "spring"
to = "r1"
file = "flow.csv"

[[reach]]
id = "r1"
to = "out"
length = 500.0
slope = 0.004
maning_n = 0.03
section = { shape = "rectangular", bottom_width = 3.0 }

[[outlet]]
id = "out"
)");
  ASSERT_FALSE(f.problems().empty());
  EXPECT_TRUE(has_line(f.what, f.at("maning_n"),
                       {"reach 'r1', field 'maning_n' is not a known field here"}));
  // The correctly spelt key is then missing: reported too, at the same element.
  EXPECT_TRUE(has_line(f.what, f.basin.string() + ":", {"reach 'r1'", "'manning_n'"}));
}

TEST(StudyLoad, UnitsMustBeSiOrUs) {
  std::string head = kHead;
  head.replace(head.find("units = \"si\""), 12, "units = \"metric\"");
  Fixture f(head + kGoodNetwork);
  ASSERT_FALSE(f.problems().empty());
  EXPECT_TRUE(has_line(f.what, f.at("units = \"metric\""),
                       {"study, field 'units' = 'metric': must be one of 'si', 'us'"}));
}

// One reach with a negative slope, a zero Manning n and a NaN length.
const std::string kBadReach = R"(
[[inflow]]
id = "spring"
to = "r1"
file = "flow.csv"

[[reach]]
id = "r1"
to = "out"
length = nan
slope = -0.004
manning_n = 0.0
section = { shape = "rectangular", bottom_width = 3.0 }

[[outlet]]
id = "out"
)";

TEST(StudyLoad, NegativeSlopeZeroManningNAndNanAreEachReported) {
  Fixture f(kHead + kBadReach);
  const auto problems = f.problems();
  EXPECT_TRUE(has_line(f.what, f.at("slope = -0.004"),
                       {"reach 'r1', field 'slope' = -0.004: must be > 0"}));
  EXPECT_TRUE(has_line(f.what, f.at("manning_n = 0.0"),
                       {"reach 'r1'", "field 'manning_n' = 0: must be > 0"}));
  // TOML 1.0 allows nan as a float literal; a basin value must be finite.
  EXPECT_TRUE(has_line(f.what, f.at("length = nan"),
                       {"reach 'r1', field 'length' = nan: must be a finite number"}));
  EXPECT_EQ(problems.size(), 3u) << f.what;
}

TEST(StudyLoad, NonIncreasingHydrographTimesNameTheCsvFileAndLine) {
  // Rows: line 1 header, 2: t = 0, 3: t = 30, 4: t = 20 (goes back), 5: t = 60.
  Fixture f(kHead + kGoodNetwork,
            {{"flow.csv", "time_min,discharge_m3s\n0,1.0\n30,1.0\n20,1.0\n60,1.0\n"}});
  ASSERT_FALSE(f.problems().empty());
  const std::string csv = (f.dir / "flow.csv").string();
  EXPECT_TRUE(has_line(f.what, csv + ":4:", {"time 20 does not increase (previous row: 30)"}));
  EXPECT_TRUE(has_line(f.what, csv + ":4:", {"inflow 'spring'"}));
}

TEST(StudyLoad, UnknownDownstreamIdIsNamed) {
  std::string net = kGoodNetwork;
  net.replace(net.find("to = \"out\""), 10, "to = \"outt\"");
  Fixture f(kHead + net);
  ASSERT_FALSE(f.problems().empty());
  // The link is located at its element's table.
  EXPECT_TRUE(has_line(f.what, f.basin.string() + ":",
                       {"reach 'r1', field 'to' = 'outt': no element has this id"}));
}

// [[stretch]] names two elements on one flow path (docs/basin-file.md): the path is found by
// following each element's 'to'; an unknown id, the same element twice, or a pair not on one
// path upstream first is an error at the file, line, stretch and field.
TEST(StudyLoad, StretchesAreCheckedAndTheirPathIsFound) {
  {
    Fixture f(kHead + kGoodNetwork + "[[stretch]]\nupstream = \"spring\"\ndownstream = \"out\"\n");
    ASSERT_TRUE(f.problems().empty()) << f.what;
    const Study study = Study::load(f.basin);
    ASSERT_EQ(study.stretches().size(), 1u);
    std::vector<std::string> ids;
    for (std::size_t i : study.stretches()[0].path) ids.push_back(study.stations()[i].id);
    EXPECT_EQ(ids, (std::vector<std::string>{"spring", "r1", "out"}));
  }
  Fixture f(kHead + kGoodNetwork +
            "[[stretch]]\nupstream = \"sprung\"\ndownstream = \"out\"\n"
            "[[stretch]]\nupstream = \"out\"\ndownstream = \"spring\"\n"
            "[[stretch]]\nupstream = \"r1\"\ndownstream = \"r1\"\n"
            "[[stretch]]\nupstream = \"r1\"\ndownstrem = \"out\"\n");
  ASSERT_EQ(f.problems().size(), 5u) << f.what;
  EXPECT_TRUE(has_line(f.what, f.at("\"sprung\""),
                       {"stretch 1, field 'upstream' = 'sprung': no element has this id"}));
  EXPECT_TRUE(has_line(f.what, f.at("downstream = \"spring\""),
                       {"stretch 2, field 'downstream' = 'spring': not downstream of 'out'",
                        "one flow path"}));
  EXPECT_TRUE(has_line(f.what, f.at("downstream = \"r1\""),
                       {"stretch 3, field 'downstream'", "the same element as upstream"}));
  EXPECT_TRUE(has_line(f.what, f.at("downstrem"), {"stretch 4, field 'downstrem'"}));
}

TEST(StudyLoad, DuplicateIdsNameBothDefinitions) {
  Fixture f(kHead + kGoodNetwork + R"(
[[junction]]
id = "r1"
to = "out"
)");
  ASSERT_FALSE(f.problems().empty());
  EXPECT_TRUE(has_line(f.what, f.basin.string() + ":",
                       {"junction 'r1', field 'id' duplicates the id of reach 'r1' defined at line"}));
}

TEST(StudyLoad, CycleNamesItsElements) {
  Fixture f(kHead + R"(
[[inflow]]
id = "spring"
to = "a"
file = "flow.csv"

[[junction]]
id = "a"
to = "b"

[[junction]]
id = "b"
to = "a"
)");
  ASSERT_FALSE(f.problems().empty());
  EXPECT_THAT(f.what, ::testing::HasSubstr("forms a cycle"));
  EXPECT_THAT(f.what, ::testing::HasSubstr("junction 'a'"));
  EXPECT_THAT(f.what, ::testing::HasSubstr("junction 'b'"));
  // Not asserted (reported as a defect): the cycle problem carries no file or line.
}

TEST(StudyLoad, ElementWithoutInflowIsReported) {
  Fixture f(kHead + kGoodNetwork + R"(
[[junction]]      # dry-junction
id = "dry"
to = "out"
)");
  ASSERT_FALSE(f.problems().empty());
  EXPECT_TRUE(has_line(f.what, f.basin.string() + ":",
                       {"junction 'dry', receives no water"}));
}

TEST(StudyLoad, UnknownSectionShapeIsNamed) {
  std::string net = kGoodNetwork;
  net.replace(net.find("\"rectangular\""), 13, "\"hexagonal\"");
  Fixture f(kHead + net);
  ASSERT_FALSE(f.problems().empty());
  EXPECT_TRUE(has_line(f.what, f.at("hexagonal"),
                       {"reach 'r1' section, field 'shape' = 'hexagonal': must be one of"}));
}

// A culvert crossing and a detention basin for the structure checks below.
const std::string kStructures = R"(
[[inflow]]
id = "spring"
to = "c1"
file = "flow.csv"

[[culvert]]
id = "c1"
to = "d1"
barrel = { shape = "circular", diameter = 1.2, length = 18.0, inlet_invert = 52.0, outlet_invert = 51.85, manning_n = 0.012, inlet = "concrete-square-edge-headwall" }
ponding = { stages = [52.0, 53.0, 54.0], storages = [0.0, 500.0, 2000.0] }

[[detention]]
id = "d1"
to = "out"
storage = { bottom = 40.0, area = 400.0 }
  [[detention.outlet]]
  type = "weir"
  crest = 40.0
  length = 2.0

[[outlet]]
id = "out"
)";

TEST(StudyLoad, StructureFixtureIsValid) {
  Fixture f(kHead + kStructures);
  EXPECT_TRUE(f.problems().empty()) << f.what;
}

TEST(StudyLoad, UnknownCulvertInletTypeIsNamed) {
  std::string net = kStructures;
  net.replace(net.find("concrete-square-edge-headwall"), 29, "bevelled-teak");
  Fixture f(kHead + net);
  ASSERT_FALSE(f.problems().empty());
  EXPECT_TRUE(has_line(f.what, f.at("bevelled-teak"),
                       {"culvert 'c1' barrel, field 'inlet' = 'bevelled-teak': unknown inlet type"}));
}

// An orifice with no size at all is told both ways to give one (it was told only to give a
// width and a height).
TEST(StudyLoad, OrificeWithoutSizeNamesBothWays) {
  std::string net = kStructures;
  net.replace(net.find("  type = \"weir\"\n  crest = 40.0\n  length = 2.0"), 45,
              "  type = \"orifice\"\n  invert = 40.0");
  Fixture f(kHead + net);
  ASSERT_EQ(f.problems().size(), 1u) << f.what;
  EXPECT_TRUE(has_line(f.what, f.at("[[detention.outlet]]"),
                       {"detention 'd1' outlet 1, is missing the size of the opening: give "
                        "'diameter' (a circular orifice) or 'width' and 'height'"}));
}

TEST(StudyLoad, DetentionBasinWithoutOutletsIsReported) {
  std::string net = kStructures;
  const std::size_t from = net.find("  [[detention.outlet]]");
  net.erase(from, net.find("[[outlet]]") - from);
  Fixture f(kHead + net);
  ASSERT_FALSE(f.problems().empty());
  EXPECT_TRUE(has_line(f.what, f.basin.string() + ":",
                       {"detention 'd1', needs at least one [[detention.outlet]]"}));
}

TEST(StudyLoad, UnknownStormMethodIsNamed) {
  std::string head = kHead;
  head.replace(head.find("\"alternating-block\""), 19, "\"gaussian\"");
  Fixture f(head + kGoodNetwork);
  ASSERT_FALSE(f.problems().empty());
  // Not asserted (reported as a defect): the line. Storm tables are read from a copy of the
  // [[storm]] array, which loses toml++'s source positions, so the message has no line.
  EXPECT_TRUE(has_line(f.what, f.basin.string() + ":",
                       {"storm 's1', field 'method' = 'gaussian': must be one of"}));
}

TEST(StudyLoad, SettingsAndNetworkProblemsAreReportedInOnePass) {
  // A bad [study] value does not hide the network's problems (study.hpp: "checks
  // everything at once").
  std::string head = kHead;
  head.replace(head.find("units = \"si\""), 12, "units = \"metric\"");
  Fixture f(head + kBadReach);
  const auto problems = f.problems();
  EXPECT_TRUE(has_line(f.what, f.at("units = \"metric\""), {"study, field 'units'"}));
  EXPECT_TRUE(has_line(f.what, f.at("slope = -0.004"), {"reach 'r1', field 'slope'"}));
  EXPECT_EQ(problems.size(), 4u) << f.what;
}

TEST(StudyLoad, PlaneAndOutletFieldsAreCheckedAndNamed) {
  Fixture f(kHead + R"(
[[subcatchment]]
id = "hill"
to = "d1"
area = 10.0
loss = { method = "none" }
  [[subcatchment.plane]]
  length = -90.0
  slope = 0.08
  manning_n = 0.40

[[detention]]
id = "d1"
to = "out"
storage = { bottom = 40.0, area = 400.0 }
  [[detention.outlet]]
  type = "weir"
  crest = 40.0
  length = -2.0

[[outlet]]
id = "out"
)");
  ASSERT_FALSE(f.problems().empty());
  EXPECT_TRUE(has_line(f.what, f.basin.string() + ":",
                       {"subcatchment 'hill' plane 1, field 'length' = -90 m: must be > 0"}));
  EXPECT_TRUE(has_line(f.what, f.basin.string() + ":",
                       {"detention 'd1' outlet 1, field 'length' = -2 m: must be > 0"}));
  // Not asserted (reported as defects): these lines carry no line number, and each value is
  // reported a second time by the library as "field 'length_m' = nan".
}

TEST(StudyLoad, ScenarioNamingAnUnknownElementIsReported) {
  Fixture f(kHead + kGoodNetwork + R"(
[[scenario]]
id = "wider"
[scenario.change.r2]
manning_n = 0.02
)");
  ASSERT_FALSE(f.problems().empty());
  EXPECT_TRUE(has_line(f.what, f.basin.string() + ":",
                       {"scenario 'wider', field 'change.r2' names no element of the basin"}));
}

TEST(StudyLoad, ScenarioCannotChangeTheToLink) {
  Fixture f(kHead + kGoodNetwork + R"(
[[scenario]]
id = "rerouted"
[scenario.change.r1]
to = "spring"
)");
  ASSERT_FALSE(f.problems().empty());
  EXPECT_TRUE(has_line(f.what, f.basin.string() + ":",
                       {"scenario 'rerouted', field 'change.r1' cannot change an element's id or "
                        "its 'to' link"}));
}

TEST(StudyLoad, ScenarioValuesAreCheckedLikeTheBase) {
  // Loading applies every scenario to the base and checks the result (study.hpp).
  Fixture f(kHead + kGoodNetwork + R"(
[[scenario]]
id = "steep"
[scenario.change.r1]
slope = -0.5
)");
  ASSERT_FALSE(f.problems().empty());
  EXPECT_TRUE(has_line(f.what, f.basin.string() + ":",
                       {"reach 'r1', field 'slope' = -0.5: must be > 0"}));
}

// A scenario may rename an element or give it a datum; its runs must describe their stations
// (names, whether stage is an elevation) as the scenario has them, not as the base does.
TEST(StudyLoad, ScenarioStationsCarryTheScenariosNamesAndDatum) {
  Fixture f(kHead + kGoodNetwork + R"(
[[scenario]]
id = "surveyed"
[scenario.change.r1]
name = "Reach 1, surveyed"
outlet_invert = 52.0
)");
  const Study study = Study::load(f.basin);
  const auto find = [](const std::vector<StationDescription>& list, const std::string& id) {
    for (const auto& s : list) {
      if (s.id == id) return s;
    }
    throw std::runtime_error("no station " + id);
  };
  const StationDescription base = find(study.stations(), "r1");
  const StationDescription surveyed = find(study.stations("surveyed"), "r1");
  EXPECT_FALSE(base.stage_is_elevation);
  EXPECT_TRUE(surveyed.stage_is_elevation);
  EXPECT_EQ(surveyed.name, "Reach 1, surveyed");
  EXPECT_NE(base.name, surveyed.name);
  EXPECT_THROW((void)study.stations("nosuch"), InputError);
}

// A storm that ends after the run, or a series that starts before it, would lose rain
// without a trace. A series starting before time 0 is an error in the file. A storm that
// outlasts the run is kept with a problem that stops its own runs only (the run length is
// shared by every storm of a file). NRCS Type II, 60 mm: by 1 h the table has 0.011 of the
// depth (2 h: 0.022, linear), so 60 (1 - 0.011) = 59.3 mm would be lost in a 1-hour run.
TEST(StudyLoad, StormsMustFallInsideTheRun) {
  Fixture late(kHead + kGoodNetwork + R"(
[[storm]]
id = "day"
method = "nrcs-24h"
distribution = "II"
depth = 60.0
step_min = 15
)");
  const Study study = Study::load(late.basin);
  EXPECT_FALSE(study.storm("s1").ends_after_run.has_value());
  ASSERT_TRUE(study.storm("day").ends_after_run.has_value());
  const std::string text = study.storm("day").ends_after_run->to_string();
  EXPECT_TRUE(has_line(text, late.basin.string() + ":",
                       {"storm 'day'", "ends at 24.00 h, after the run", "59.3 mm of its 60.0 mm",
                        "would not be routed"}))
      << text;
  RunRequest req;
  req.storm_id = "day";
  req.out_dir = late.dir / "out";
  EXPECT_THROW(check_run_request(study, req), InputError);
  req.storm_id = "s1";
  EXPECT_NO_THROW(check_run_request(study, req));

  Fixture early(kHead + kGoodNetwork + R"(
[[storm]]
id = "gauge"
method = "series"
file = "gauge.csv"
)",
                {{"flow.csv", kSteadyCsv},
                 {"gauge.csv", "time_min,intensity_mm_per_h\n-30,30\n10,30\n20,0\n"}});
  ASSERT_FALSE(early.problems().empty());
  EXPECT_TRUE(has_line(early.what, early.basin.string() + ":",
                       {"storm 'gauge'", "starts at t = -30 min, before the study start"}))
      << early.what;
  // Rows before time 0 that carry no rain lose nothing: accepted.
  Fixture dry_lead(kHead + kGoodNetwork + R"(
[[storm]]
id = "gauge"
method = "series"
file = "gauge.csv"
)",
                   {{"flow.csv", kSteadyCsv},
                    {"gauge.csv", "time_min,intensity_mm_per_h\n-10,0\n0,0\n10,30\n20,0\n"}});
  EXPECT_TRUE(dry_lead.problems().empty()) << dry_lead.what;
}

// IDF-table problems quote the values and units as typed, at the offending item.
TEST(StudyLoad, IdfTableProblemsQuoteTheFilesUnits) {
  Fixture f(R"([study]
title = "fixture"
units = "us"
duration_h = 1.0
output_interval_min = 5.0

[[storm]]
id = "s1"
method = "alternating-block"
duration_min = 30
step_min = 5
idf_table = { durations_min = [5, 15, 30], intensities = [4.0, 1.2, 0.5] }
)" + kGoodNetwork);
  ASSERT_FALSE(f.problems().empty());
  EXPECT_TRUE(has_line(f.what, f.at("idf_table"),
                       {"storm 's1' idf_table", "field 'intensities[2]' = 1.2 in/h",
                        "depth must not decrease"}))
      << f.what;
  EXPECT_EQ(f.what.find("e-0"), std::string::npos) << "no SI values: " << f.what;
}

TEST(StudyLoad, ImplicitCourantMustBePositive) {
  std::string head = kHead;
  head.replace(head.find("output_interval_min"), 0, "implicit_courant = -1.0\n");
  Fixture f(head + kGoodNetwork);
  ASSERT_FALSE(f.problems().empty());
  EXPECT_TRUE(has_line(f.what, f.at("implicit_courant"), {"'implicit_courant' = -1", "> 0"}))
      << f.what;
}

// Rules of the run clock and the design-storm library are said with the file's keys, at their
// lines (they were named 'output_interval' in s, 'duration_s' and 'step_s' at the table's first
// line), and the storm's library is not asked again about a key already reported.
TEST(StudyLoad, ClockAndBlockRulesNameTheKeysAtTheirLines) {
  std::string head = kHead;
  head.replace(head.find("output_interval_min = 5.0"), 25, "output_interval_min = 7.0");
  head.replace(head.find("step_min = 5"), 12, "step_min = 7");
  Fixture f(head + kGoodNetwork);
  const auto problems = f.problems();
  EXPECT_TRUE(has_line(f.what, f.at("output_interval_min"),
                       {"study, field 'output_interval_min' = 7 min: must divide the run "
                        "(duration_h = 1, i.e. 60 min) into whole output intervals"}));
  EXPECT_TRUE(has_line(f.what, f.at("step_min"),
                       {"storm 's1', field 'step_min' = 7 min: must divide duration_min = 30 "
                        "into whole blocks"}));
  EXPECT_EQ(problems.size(), 2u) << f.what;

  std::string longer = kHead;
  longer.replace(longer.find("step_min = 5"), 12, "step_min = 45");
  Fixture g(longer + kGoodNetwork);
  EXPECT_EQ(g.problems().size(), 1u) << g.what;
  EXPECT_TRUE(has_line(g.what, g.at("step_min"),
                       {"field 'step_min' = 45 min: must not exceed duration_min = 30"}));
}

// An output interval longer than the run was refused by the clock in its own words, at the
// [study] line: "study, field 'output_interval' = 7200 s: longer than the run". It is now said
// with the file's key, at its line, in minutes. (The rule: a run has at least one output
// interval; network::ClockOptions::count_fault.)
TEST(StudyLoad, OutputIntervalLongerThanTheRunIsNamedByItsKeyAtItsLine) {
  std::string head = kHead;
  head.replace(head.find("output_interval_min = 5.0"), 25, "output_interval_min = 120.0");
  Fixture f(head + kGoodNetwork);
  ASSERT_EQ(f.problems().size(), 1u) << f.what;
  EXPECT_TRUE(has_line(f.what, f.at("output_interval_min"),
                       {"study, field 'output_interval_min' = 120 min: must divide the run "
                        "(duration_h = 1, i.e. 60 min) into whole output intervals; it is "
                        "longer than the run"}))
      << f.what;
  EXPECT_EQ(f.what.find("'output_interval'"), std::string::npos) << f.what;
  EXPECT_EQ(f.what.find(" s:"), std::string::npos) << "no internal seconds: " << f.what;
}

// A CSV file that cannot be opened is reported at the key that names it.
TEST(StudyLoad, UnreadableCsvIsReportedAtItsFileKey) {
  Fixture f(kHead + kGoodNetwork, {});
  ASSERT_EQ(f.problems().size(), 1u) << f.what;
  EXPECT_TRUE(has_line(f.what, f.at("file = \"flow.csv\""),
                       {"inflow 'spring', field 'file' = 'flow.csv': cannot open input file"}));
}

TEST(StudyLoad, UnknownStormOrScenarioIdAsked) {
  Fixture f(kHead + kGoodNetwork);
  const Study study = Study::load(f.basin);
  EXPECT_THROW(
      {
        try {
          (void)study.storm("nosuch");
        } catch (const InputError& e) {
          EXPECT_THAT(e.what(), ::testing::HasSubstr("storm 'nosuch'"));
          throw;
        }
      },
      InputError);
  EXPECT_THROW(
      {
        try {
          (void)study.build_model("nosuch", study.storm("s1"));
        } catch (const InputError& e) {
          EXPECT_THAT(e.what(), ::testing::HasSubstr("scenario 'nosuch'"));
          throw;
        }
      },
      InputError);
}

TEST(StudyLoad, TomlSyntaxErrorGivesFileLineAndColumn) {
  // Line 15 of the file (12 lines of kHead, a blank, the header): two values for one key.
  const std::string text = kHead + "\n[[reach]]\nslope = 0.004 0.005\n";
  Fixture f(text);
  ASSERT_EQ(f.problems().size(), 1u) << f.what;
  const int line = line_of(text, "slope = 0.004 0.005");
  ASSERT_EQ(line, 15);
  EXPECT_THAT(f.what, ::testing::StartsWith(f.basin.string() + ":15:"));
  EXPECT_GT(f.problems().front().column, 0) << f.what;
}

TEST(StudyLoad, SeveralProblemsInOneFileAreReportedTogether) {
  // One file, eight independent mistakes in five elements: one InputError lists them all.
  Fixture f(kHead + R"(
[[inflow]]
id = "spring"
to = "r1"
file = "flow.csv"

[[reach]]
id = "r1"
to = "c1"
length = 500.0
slope = -0.004
manning_n = 0.0
section = { shape = "rectangular", bottom_width = 3.0, botom_width = 2.0 }

[[culvert]]
id = "c1"
to = "d1"
barrel = { shape = "circular", diameter = nan, length = 18.0, inlet_invert = 52.0, outlet_invert = 51.85, manning_n = 0.012, inlet = "bevelled-teak" }
ponding = { stages = [52.0, 53.0, 54.0], storages = [0.0, 500.0, 2000.0] }

[[detention]]
id = "d1"
to = "nowhere"
storage = { bottom = 40.0, area = 400.0 }

[[reach]]
id = "r1"
to = "out"
length = 100.0
slope = 0.01
manning_n = 0.03
section = { shape = "rectangular", bottom_width = 3.0 }

[[outlet]]
id = "out"
)");
  const auto problems = f.problems();
  EXPECT_TRUE(has_line(f.what, f.at("slope = -0.004"), {"reach 'r1', field 'slope' = -0.004"}));
  EXPECT_TRUE(has_line(f.what, f.at("manning_n = 0.0"), {"reach 'r1'", "'manning_n' = 0"}));
  EXPECT_TRUE(has_line(f.what, f.at("botom_width"),
                       {"reach 'r1' section, field 'botom_width' is not a known field"}));
  EXPECT_TRUE(has_line(f.what, f.at("diameter = nan"),
                       {"culvert 'c1' barrel, field 'diameter' = nan"}));
  EXPECT_TRUE(has_line(f.what, f.at("diameter = nan"),
                       {"culvert 'c1' barrel, field 'inlet' = 'bevelled-teak'"}));
  EXPECT_TRUE(has_line(f.what, f.basin.string() + ":",
                       {"detention 'd1', needs at least one [[detention.outlet]]"}));
  EXPECT_TRUE(has_line(f.what, f.basin.string() + ":",
                       {"detention 'd1', field 'to' = 'nowhere': no element has this id"}));
  EXPECT_TRUE(has_line(f.what, f.basin.string() + ":",
                       {"reach 'r1', field 'id' duplicates the id of reach 'r1'"}));
  EXPECT_GE(problems.size(), 8u) << f.what;
}

// ---- running a study in memory --------------------------------------------------------------

// Keeps every sample the driver hands over: at output times (record) and, because it asks,
// at the end of every other coupling step (observe).
class RecordingSink final : public network::RecordSink {
 public:
  void record(double time_s, std::span<const network::StationSample> samples) override {
    times_s.push_back(time_s);
    rows.emplace_back(samples.begin(), samples.end());
    observe_peaks(samples);
  }
  [[nodiscard]] bool observes_every_step() const override { return true; }
  void observe(double /*time_s*/, std::span<const network::StationSample> samples) override {
    observe_peaks(samples);
  }
  std::vector<double> times_s;
  std::vector<std::vector<network::StationSample>> rows;
  std::vector<double> peak_discharge_m3s;
  std::vector<double> peak_stage_m;

 private:
  void observe_peaks(std::span<const network::StationSample> samples) {
    peak_discharge_m3s.resize(samples.size(), -1.0);
    peak_stage_m.resize(samples.size(), -1e300);
    for (std::size_t i = 0; i < samples.size(); ++i) {
      peak_discharge_m3s[i] = std::max(peak_discharge_m3s[i], samples[i].discharge_m3s);
      if (std::isfinite(samples[i].stage_m)) {
        peak_stage_m[i] = std::max(peak_stage_m[i], samples[i].stage_m);
      }
    }
  }
};

struct RunResult {
  network::RunSummary numerics;
  RecordingSink sink;
  std::vector<std::string> ids;
};

// Builds the base network for `storm_id` and runs it over the study's clock.
RunResult run_in_memory(const Study& study, const std::string& storm_id,
                        const std::string& scenario_id = "") {
  network::Model model = study.build_model(scenario_id, study.storm(storm_id));
  const StudySettings& s = study.settings();
  network::ClockOptions clock{0.0, s.duration_s, s.output_interval_s, s.coupling_step_s};
  RunResult run;
  run.numerics = network::simulate(model, clock, run.sink);
  for (const auto& link : model.links) run.ids.push_back(link.id);
  return run;
}

std::size_t index_of(const RunResult& run, const std::string& id) {
  const auto it = std::find(run.ids.begin(), run.ids.end(), id);
  EXPECT_NE(it, run.ids.end()) << id;
  return static_cast<std::size_t>(it - run.ids.begin());
}

// ---- 2. SI and US customary input give the same study ---------------------------------------
// Exact factors, NIST SP 811 (2008), Appendix B: ft = 0.3048 m, in = 0.0254 m,
// acre = 4046.8564224 m2 (international acre); hence ft3 = 0.3048^3 m3, acre-ft = 4046.8564224
// x 0.3048 m3, and a weir coefficient in ft^0.5/s times sqrt(0.3048) is in m^0.5/s
// (Q = C L H^1.5 is dimensionally C [L^0.5 T^-1]).

struct UnitFactors {
  std::string system;
  double length = 1.0;     // ft -> m
  double area = 1.0;       // acre -> ha
  double discharge = 1.0;  // cfs -> m3/s
  double depth = 1.0;      // in -> mm, and in/h -> mm/h
  double volume = 1.0;     // acre-ft -> m3
  double weir = 1.0;       // ft^0.5/s -> m^0.5/s
  std::string discharge_column = "discharge_cfs";
};

const UnitFactors kUs{"us"};
const UnitFactors kSi{"si",
                      0.3048,
                      4046.8564224 / 1e4,
                      0.3048 * 0.3048 * 0.3048,
                      25.4,
                      4046.8564224 * 0.3048,
                      std::sqrt(0.3048),
                      "discharge_m3s"};

std::string num(double v) {
  char buf[40];
  std::snprintf(buf, sizeof buf, "%.17g", v);
  std::string s = buf;
  if (s.find_first_of(".en") == std::string::npos) s += ".0";
  return s;
}

std::string nums(const std::vector<double>& values, double factor) {
  std::string s = "[";
  for (std::size_t i = 0; i < values.size(); ++i) s += (i ? ", " : "") + num(values[i] * factor);
  return s + "]";
}

// The same small basin in either unit system. All design values are given in US customary
// units and scaled by `u`; dimensionless values (slopes, n, CN, porosities, fractions, the
// Horton decay rate per hour) are unchanged. Every loss method with a unit is used once:
// curve number (impervious storage in), Green-Ampt (K in/h, suction head in), Horton
// (rates in/h), initial-continuing (in, in/h).
std::string equivalence_basin(const UnitFactors& u) {
  const auto L = [&](double ft) { return num(ft * u.length); };
  return R"([study]
title = "unit equivalence"
units = ")" + u.system + R"("
duration_h = 3.0
output_interval_min = 5.0
coupling_step_s = 60.0
cell_length = )" + L(80.0) + R"(

[[storm]]
id = "design"
method = "alternating-block"
duration_min = 60
step_min = 5
idf = { a = )" + num(51.0 * u.depth) + R"(, b = 10.0, c = 0.75 }

[[inflow]]
id = "spring"
to = "upper"
file = "flow.csv"

[[subcatchment]]
id = "hill"
to = "upper"
area = )" + num(150.0 * u.area) + R"(
loss = { method = "curve-number", curve_number = 75, impervious_fraction = 0.3, impervious_storage = )" +
         num(0.06 * u.depth) + R"( }
  [[subcatchment.plane]]
  length = )" + L(300.0) + R"(
  slope = 0.03
  manning_n = 0.15
  cells = 30

[[subcatchment]]
id = "furze"
to = "upper"
area = )" + num(40.0 * u.area) + R"(
loss = { method = "green-ampt", conductivity = )" + num(0.26 * u.depth) + R"(, suction_head = )" +
         num(6.57 * u.depth) + R"(, porosity = 0.501, effective_porosity = 0.486, initial_saturation = 0.3 }
  [[subcatchment.plane]]
  length = )" + L(200.0) + R"(
  slope = 0.05
  manning_n = 0.13
  cells = 20

[[subcatchment]]
id = "heath"
to = "upper"
area = )" + num(30.0 * u.area) + R"(
loss = { method = "horton", initial_rate = )" + num(3.0 * u.depth) + R"(, final_rate = )" +
         num(0.5 * u.depth) + R"(, decay_per_h = 4.0 }
  [[subcatchment.plane]]
  length = )" + L(250.0) + R"(
  slope = 0.04
  manning_n = 0.24
  cells = 20

[[reach]]
id = "upper"
to = "crossing"
length = )" + L(4000.0) + R"(
slope = 0.006
manning_n = 0.035
section = { shape = "trapezoidal", bottom_width = )" + L(8.0) + R"(, left_side_slope = 2.0, right_side_slope = 2.5 }
outlet_invert = )" + L(180.0) + R"(

[[culvert]]
id = "crossing"
to = "lower"
barrel = { shape = "circular", diameter = )" + L(3.0) + R"(, count = 1, length = )" + L(60.0) +
         R"(, inlet_invert = )" + L(172.0) + R"(, outlet_invert = )" + L(171.5) +
         R"(, manning_n = 0.012, inlet = "concrete-square-edge-headwall" }
ponding = { stages = )" + nums({172, 174, 176, 178, 180, 184}, u.length) +
         R"(, storages = )" + nums({0, 0.2, 0.8, 2.0, 4.0, 10.0}, u.volume) + R"( }
road = { offsets = )" + nums({0, 100, 200, 300}, u.length) + R"(, levels = )" +
         nums({180.5, 179.0, 179.2, 181.0}, u.length) + R"(, coefficient = )" +
         num(2.9 * u.weir) + R"( }

[[subcatchment]]
id = "yard"
to = "pond"
area = )" + num(10.0 * u.area) + R"(
loss = { method = "initial-continuing", initial_loss = )" + num(0.1 * u.depth) +
         R"(, continuing_rate = )" + num(0.05 * u.depth) +
         R"(, impervious_fraction = 0.8, impervious_storage = )" + num(0.04 * u.depth) + R"( }
  [[subcatchment.plane]]
  length = )" + L(150.0) + R"(
  slope = 0.01
  manning_n = 0.013
  cells = 20

[[detention]]
id = "pond"
to = "lower"
storage = { stages = )" + nums({100, 102, 104, 106}, u.length) + R"(, storages = )" +
         nums({0, 0.3, 0.7, 1.2}, u.volume) + R"( }
  [[detention.outlet]]
  type = "orifice"
  invert = )" + L(100.0) + R"(
  diameter = )" + L(1.0) + R"(
  coefficient = 0.61
  [[detention.outlet]]
  type = "weir"
  crest = )" + L(103.5) + R"(
  length = )" + L(10.0) + R"(
  coefficient = )" + num(3.1 * u.weir) + R"(

[[reach]]
id = "lower"
to = "out"
length = )" + L(2500.0) + R"(
slope = 0.004
manning_n = 0.03
section = { shape = "rectangular", bottom_width = )" + L(15.0) + R"( }
cells = 12
outlet_invert = )" + L(165.0) + R"(

[[outlet]]
id = "out"
)";
}

std::string equivalence_csv(const UnitFactors& u) {
  return "time_min," + u.discharge_column + "\n0," + num(10.0 * u.discharge) + "\n60," +
         num(60.0 * u.discharge) + "\n120," + num(30.0 * u.discharge) + "\n180," +
         num(10.0 * u.discharge) + "\n";
}

TEST(StudyUnits, SiAndUsCustomaryInputRouteToTheSamePeaks) {
  Fixture us(equivalence_basin(kUs), {{"flow.csv", equivalence_csv(kUs)}});
  Fixture si(equivalence_basin(kSi), {{"flow.csv", equivalence_csv(kSi)}});
  ASSERT_TRUE(us.problems().empty()) << us.what;
  ASSERT_TRUE(si.problems().empty()) << si.what;
  const Study study_us = Study::load(us.basin);
  const Study study_si = Study::load(si.basin);
  EXPECT_EQ(study_us.settings().units, units::System::us_customary);
  EXPECT_EQ(study_si.settings().units, units::System::si);

  const RunResult a = run_in_memory(study_us, "design");
  const RunResult b = run_in_memory(study_si, "design");
  ASSERT_EQ(a.ids, b.ids);
  double worst = 0.0;
  for (std::size_t i = 0; i < a.ids.size(); ++i) {
    SCOPED_TRACE(a.ids[i]);
    const double qa = a.sink.peak_discharge_m3s[i];
    const double qb = b.sink.peak_discharge_m3s[i];
    worst = std::max(worst, std::abs(qa - qb) / qb);
    EXPECT_GT(qb, 0.1);  // every station carries flow, so the comparison means something
    EXPECT_LE(std::abs(qa - qb), 1e-9 * qb) << "US " << qa << " m3/s, SI " << qb << " m3/s";
    const double ha = a.sink.peak_stage_m[i];
    const double hb = b.sink.peak_stage_m[i];
    if (hb > -1e300) {
      EXPECT_LE(std::abs(ha - hb), 1e-9 * std::abs(hb)) << ha << " vs " << hb;
    }
    const double va = a.numerics.balances[i].ledger.outflow_m3;
    const double vb = b.numerics.balances[i].ledger.outflow_m3;
    EXPECT_LE(std::abs(va - vb), 1e-9 * vb) << va << " vs " << vb;
  }
  RecordProperty("worst_relative_peak_difference", format_value(worst));
  // Rain volume of the US file against a hand value: the alternating block holds the IDF
  // depth at its duration (Chow, Maidment & Mays 1988, sec. 14.4), P = 51 / (60 + 10)^0.75
  // in/h x 1 h, on 150 + 40 + 30 + 10 acres; in m3 with the NIST factors above.
  const double rain_in = 51.0 / std::pow(70.0, 0.75);
  const double rain_m3 = rain_in * 0.0254 * 230.0 * 4046.8564224;
  double ledger_m3 = 0.0;
  for (const auto& balance : a.numerics.balances) ledger_m3 += balance.ledger.rain_m3;
  EXPECT_NEAR(ledger_m3, rain_m3, 1e-9 * rain_m3);
  // The road and the weir are in play: the crossing's pool rises above the road's low point
  // (179.0 ft) and the pond above the weir crest (103.5 ft), so their coefficients'
  // conversions are exercised.
  EXPECT_GT(b.sink.peak_stage_m[index_of(b, "crossing")], 179.0 * 0.3048);
  EXPECT_GT(b.sink.peak_stage_m[index_of(b, "pond")], 103.5 * 0.3048);
}

// ---- 3. end-to-end physics through the basin-file path --------------------------------------

// (a) Uniform flow. A prismatic rectangular reach fed a constant discharge settles to uniform
// flow: outflow = inflow, and the depth is the Manning normal depth (manning_closed_form.hpp).
using testing::manning_normal_depth_rectangular;

TEST(StudyPhysics, RectangularReachReachesManningNormalDepth) {
  const double q = 5.0, b = 4.0, n = 0.03, slope = 0.002, invert = 100.0;
  Fixture f(kHead + R"(
[[inflow]]
id = "steady"
to = "r1"
file = "steady.csv"

[[reach]]
id = "r1"
to = "out"
length = 2000.0
slope = 0.002
manning_n = 0.03
section = { shape = "rectangular", bottom_width = 4.0 }
cells = 40
outlet_invert = 100.0

[[outlet]]
id = "out"

[[scenario]]
id = "wider"
[scenario.change.r1]
section = { shape = "rectangular", bottom_width = 8.0 }
)",
            {{"steady.csv", "time_min,discharge_m3s\n0,5.0\n60,5.0\n"}});
  const Study study = Study::load(f.basin);
  const RunResult run = run_in_memory(study, "s1");
  const network::StationSample& end = run.sink.rows.back()[index_of(run, "r1")];
  const double y = manning_normal_depth_rectangular(q, b, n, slope);
  // Hand check of the root: Q n / S^0.5 = 3.3541 = (4 y)^(5/3) / (4 + 2 y)^(2/3) at
  // y = 1.0676 m (evaluated with a calculator).
  EXPECT_NEAR(y, 1.0676, 5e-4);
  EXPECT_NEAR(end.discharge_m3s, q, 1e-9 * q);
  EXPECT_NEAR(end.depth_m, y, 1e-9 * y);
  RecordProperty("normal_depth_m", std::to_string(y));
  RecordProperty("depth_relative_error", format_value(std::abs(end.depth_m - y) / y));
  EXPECT_NEAR(end.stage_m, invert + y, 1e-9 * (invert + y));
  EXPECT_NEAR(end.velocity_m_s, q / (b * y), 1e-9 * q / (b * y));
  EXPECT_NEAR(run.sink.rows.back()[index_of(run, "out")].discharge_m3s, q, 1e-9 * q);

  // The scenario replaces the section: twice the width, the normal depth of that channel.
  const RunResult wide = run_in_memory(study, "s1", "wider");
  const network::StationSample& w = wide.sink.rows.back()[index_of(wide, "r1")];
  const double y8 = manning_normal_depth_rectangular(q, 8.0, n, slope);
  EXPECT_LT(y8, 0.7 * y);
  EXPECT_NEAR(w.depth_m, y8, 1e-9 * y8);
  EXPECT_NEAR(w.discharge_m3s, q, 1e-9 * q);
}

// (b) Volume. For the whole demo basin, what left through the outfall plus what is still
// stored equals what came in (the Quarry Spring hydrograph and the rain) less the losses.
// The inflow and rain volumes are computed here by hand, not taken from freshet:
//   * Quarry Spring: trapezoidal integral of hydrographs/quarry-spring.csv over 0-360 min
//     (the series is linear between rows): 387 m3/s min = 23 220 m3;
//   * rain: the alternating-block storm's depth telescopes to the IDF depth at its duration,
//     P = i(30 min) x 0.5 h with i = 1300 / (30 + 10)^0.75 mm/h (Chow, Maidment & Mays 1988,
//     Applied Hydrology, sec. 14.4), on 85 + 120 + 60 + 12 ha of subcatchments.
TEST(StudyPhysics, DemoBasinConservesVolume) {
  const Study study = Study::load(std::filesystem::path(FRESHET_SOURCE_DIR) / "basins" /
                                  "tansy-brook.toml");
  const RunResult run = run_in_memory(study, "aep1-30min");

  const std::vector<double> t_min{0, 30, 60, 90, 120, 180, 240, 300, 360};
  const std::vector<double> q_m3s{0.40, 0.55, 1.40, 2.50, 2.10, 1.20, 0.70, 0.45, 0.40};
  double spring_m3 = 0.0;
  for (std::size_t k = 1; k < t_min.size(); ++k) {
    spring_m3 += 0.5 * (q_m3s[k] + q_m3s[k - 1]) * (t_min[k] - t_min[k - 1]) * 60.0;
  }
  EXPECT_NEAR(spring_m3, 23220.0, 1e-9);
  const double depth_m = 1300.0 / std::pow(40.0, 0.75) * 0.5 / 1000.0;
  const double rain_m3 = depth_m * (85.0 + 120.0 + 60.0 + 12.0) * 1e4;

  double rain_ledger_m3 = 0.0, loss_m3 = 0.0, stored_m3 = 0.0, out_m3 = 0.0;
  for (const auto& [id, l] : run.numerics.balances) {
    rain_ledger_m3 += l.rain_m3;
    loss_m3 += l.loss_m3;
    stored_m3 += l.storage_m3 - l.initial_storage_m3;
    if (id == "tansy-outfall") out_m3 = l.outflow_m3;
    // Each element's own ledger closes (element.hpp).
    EXPECT_LE(std::abs(l.balance_error_m3()), 1e-9 * std::max(l.supplied_m3(), 1.0)) << id;
  }
  EXPECT_NEAR(rain_ledger_m3, rain_m3, 1e-9 * rain_m3);
  const double supplied_m3 = spring_m3 + rain_m3 - loss_m3;
  EXPECT_NEAR(out_m3 + stored_m3, supplied_m3, 1e-9 * supplied_m3)
      << "outfall " << out_m3 << " m3, stored " << stored_m3 << " m3, spring " << spring_m3
      << " m3, rain " << rain_m3 << " m3, losses " << loss_m3 << " m3";
  EXPECT_GT(out_m3, 0.5 * supplied_m3);
  RecordProperty("volume_closure_relative",
                 format_value(std::abs(out_m3 + stored_m3 - supplied_m3) / supplied_m3));
  RecordProperty("outfall_m3", std::to_string(out_m3));
  RecordProperty("rain_m3", std::to_string(rain_m3));
  RecordProperty("loss_m3", std::to_string(loss_m3));  // most of it has left after 6 h
}

// (c) A detention basin with one free-flowing rectangular weir under a constant inflow
// settles where the weir passes the inflow: Q = C L H^1.5, so H = (Q / (C L))^(2/3)
// (weir equation: Chow 1959, Open-Channel Hydraulics, section number not at hand; Brater &
// King 1976, Handbook of Hydraulics, ch. 5; equation form standard, chapter from memory).
TEST(StudyPhysics, DetentionBasinSettlesAtTheWeirHead) {
  const double q = 2.0, c = 1.6, length = 3.0, crest = 10.0;
  Fixture f(kHead + R"(
[[inflow]]
id = "steady"
to = "pond"
file = "steady.csv"

[[detention]]
id = "pond"
to = "out"
storage = { bottom = 10.0, area = 500.0 }
  [[detention.outlet]]
  type = "weir"
  crest = 10.0
  length = 3.0
  coefficient = 1.6

[[outlet]]
id = "out"
)",
            {{"steady.csv", "time_min,discharge_m3s\n0,2.0\n60,2.0\n"}});
  const Study study = Study::load(f.basin);
  const RunResult run = run_in_memory(study, "s1");
  const network::StationSample& end = run.sink.rows.back()[index_of(run, "pond")];
  const double head = std::pow(q / (c * length), 2.0 / 3.0);
  EXPECT_NEAR(head, 0.5579, 5e-4);  // (2 / 4.8)^(2/3), by hand
  EXPECT_NEAR(end.stage_m, crest + head, 1e-6 * head);
  RecordProperty("head_relative_error", format_value(std::abs(end.stage_m - crest - head) / head));
  EXPECT_NEAR(end.depth_m, head, 1e-6 * head);
  EXPECT_NEAR(end.discharge_m3s, q, 1e-6 * q);
}

// (d) A confluence junction stores nothing: its outflow is the sum of its inflows at every
// instant (continuity). Both hydrographs are linear between rows, so the expected values at
// the output times are interpolated by hand here.
TEST(StudyPhysics, ConfluenceAddsItsInflowsExactly) {
  Fixture f(kHead + R"(
[[inflow]]
id = "west"
to = "meet"
file = "west.csv"

[[inflow]]
id = "east"
to = "meet"
file = "east.csv"

[[junction]]
id = "meet"
to = "out"

[[outlet]]
id = "out"
)",
            {{"west.csv", "time_min,discharge_m3s\n0,0\n20,6.0\n50,0\n60,0\n"},
             {"east.csv", "time_min,discharge_m3s\n0,1.0\n10,3.0\n40,1.0\n60,1.0\n"}});
  const Study study = Study::load(f.basin);
  const RunResult run = run_in_memory(study, "s1");
  const auto west = [](double m) { return m <= 20 ? 0.3 * m : m <= 50 ? 6.0 - 0.2 * (m - 20) : 0.0; };
  const auto east = [](double m) {
    return m <= 10 ? 1.0 + 0.2 * m : m <= 40 ? 3.0 - (m - 10) / 15.0 : 1.0;
  };
  ASSERT_EQ(run.sink.times_s.size(), 13u);  // 0, 5, ..., 60 min
  // From the first output time on: at t = 0, before any step, the junction and the outlet
  // report 0 while the inflows report their t = 0 values (reported as a defect; not asserted).
  for (std::size_t k = 1; k < run.sink.times_s.size(); ++k) {
    const double m = run.sink.times_s[k] / 60.0;
    SCOPED_TRACE(m);
    EXPECT_NEAR(run.sink.rows[k][index_of(run, "meet")].discharge_m3s, west(m) + east(m), 1e-12);
    EXPECT_NEAR(run.sink.rows[k][index_of(run, "out")].discharge_m3s, west(m) + east(m), 1e-12);
  }
  // Volumes: west triangle 0.5 x 50 min x 6 = 150 m3/s min; east: 60 min x 1 plus the
  // triangle 0.5 x 40 min x 2 = 100 m3/s min. Sum 250 x 60 s = 15 000 m3.
  EXPECT_NEAR(run.numerics.balances[index_of(run, "meet")].ledger.outflow_m3, 15000.0, 1e-8);
}

}  // namespace
}  // namespace freshet::study
