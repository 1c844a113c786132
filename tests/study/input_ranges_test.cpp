// Hard and plausible ranges of the basin file's numbers (src/io/input_ranges.cpp;
// docs/basin-file.md, "Ranges"). Table-driven: each case puts one value into an otherwise
// valid basin file and asserts
//   - hard limit: the load fails with a problem at that value's line, naming the element, the
//     key as written and the value, and stating the rule;
//   - plausible range: the load succeeds and Study::warnings() holds a warning at that line
//     naming the published source of the range.
// The plausible ranges come from published tables (Chow 1959, Open-Channel Hydraulics, Table
// 5-6; NRCS 1986, TR-55, Table 3-1; Rawls, Brakensiek & Miller 1983; the world-record rainfall
// envelope, Jennings 1950), each named in the case; the values are from memory (the sources
// were not at hand), as the table itself says.

#include <gtest/gtest.h>

#include <algorithm>
#include <string>
#include <vector>

#include "freshet/study/study.hpp"
#include "../io/temp_dir.hpp"

namespace freshet::study {
namespace {

using io::testing::TempDir;
using io::testing::write_text;

// A valid basin using every numeric key once; each value a case may change ends its line with
// a tag "#@name". Inline tables are avoided so that every value has its own line.
const char* const kBasin = R"(
[study]
title = "ranges"
units = "si"
duration_h = 26.0                     #@duration_h
output_interval_min = 5.0             #@output_interval_min
coupling_step_s = 60.0                #@coupling_step_s
cell_length = 25.0                    #@cell_length
implicit_courant = 2.0                #@implicit_courant

[[storm]]
id = "block"
method = "alternating-block"
duration_min = 30                     #@duration_min
step_min = 5                          #@step_min
peak_ratio = 0.5                      #@peak_ratio
[storm.idf]
a = 1300.0                            #@idf.a
b = 10.0                              #@idf.b
c = 0.75                              #@idf.c

[[storm]]
id = "table"
method = "chicago"
duration_min = 60
step_min = 5
[storm.idf_table]
durations_min = [5.0, 60.0]           #@durations_min
intensities = [150.0, 45.0]           #@intensities

[[storm]]
id = "nrcs"
method = "nrcs-24h"
distribution = "II"
depth = 100.0                         #@depth
step_min = 30

[[subcatchment]]
id = "sub"
to = "r1"
area = 10.0                           #@area
[subcatchment.loss]
method = "green-ampt"
conductivity = 6.5                    #@conductivity
suction_head = 166.8                  #@suction_head
porosity = 0.501                      #@porosity
effective_porosity = 0.486
initial_saturation = 0.3              #@initial_saturation
  [[subcatchment.plane]]
  length = 50.0                       #@plane.length
  slope = 0.02                        #@plane.slope
  manning_n = 0.15                    #@plane.manning_n
  cells = 20                          #@plane.cells

[[subcatchment]]
id = "horton"
to = "r1"
area = 5.0
[subcatchment.loss]
method = "horton"
initial_rate = 75.0                   #@initial_rate
final_rate = 10.0                     #@final_rate
decay_per_h = 4.0                     #@decay_per_h
impervious_fraction = 0.3             #@impervious_fraction
impervious_storage = 1.5              #@impervious_storage
  [[subcatchment.plane]]
  length = 40.0
  slope = 0.02
  manning_n = 0.15

[[subcatchment]]
id = "cn"
to = "r1"
area = 5.0
[subcatchment.loss]
method = "curve-number"
curve_number = 75                     #@curve_number
initial_abstraction_ratio = 0.2       #@initial_abstraction_ratio
  [[subcatchment.plane]]
  length = 40.0
  slope = 0.02
  manning_n = 0.15

[[subcatchment]]
id = "ic"
to = "r1"
area = 5.0
[subcatchment.loss]
method = "initial-continuing"
initial_loss = 10.0                   #@initial_loss
continuing_rate = 2.0                 #@continuing_rate
  [[subcatchment.plane]]
  length = 40.0
  slope = 0.02
  manning_n = 0.15

[[reach]]
id = "r1"
to = "r2"
length = 1200.0                       #@reach.length
slope = 0.005                         #@reach.slope
manning_n = 0.035                     #@reach.manning_n
cells = 40                            #@reach.cells
outlet_invert = 50.0                  #@outlet_invert
[reach.section]
shape = "trapezoidal"
bottom_width = 3.0                    #@bottom_width
left_side_slope = 2.0                 #@left_side_slope
right_side_slope = 2.0

[[reach]]
id = "r2"
to = "r3"
length = 800.0
slope = 0.004
cell_length = 20.0                    #@reach.cell_length
[reach.section]
shape = "irregular"
offsets = [0.0, 10.0, 14.0, 18.0, 30.0]       #@offsets
levels = [52.0, 50.5, 49.0, 50.5, 52.0]    #@levels
channel_left = 10.0                      #@channel_left
channel_right = 18.0
left_floodplain_n = 0.05                #@left_floodplain_n
channel_n = 0.035
right_floodplain_n = 0.05

[[reach]]
id = "r3"
to = "cul"
length = 300.0
slope = 0.006
manning_n = 0.013
[reach.section]
shape = "circular"
diameter = 1.2                        #@diameter

[[culvert]]
id = "cul"
to = "pond"
tailwater = 40.5                      #@tailwater
[culvert.barrel]
shape = "box"
rise = 1.5                            #@rise
span = 2.0
count = 1                             #@count
length = 20.0                         #@barrel.length
inlet_invert = 41.0                   #@inlet_invert
outlet_invert = 40.8
manning_n = 0.012                     #@barrel.manning_n
entrance_loss = 0.5                   #@entrance_loss
inlet = "box-wingwall-30-to-75-deg"
[culvert.ponding]
stages = [41.0, 42.0, 43.0, 45.0]     #@ponding.stages
storages = [0.0, 500.0, 2000.0, 9000.0]  #@ponding.storages
[culvert.road]
offsets = [0.0, 50.0, 100.0]         #@road.offsets
levels = [44.5, 44.0, 44.6]       #@road.levels
coefficient = 1.6                     #@road.coefficient

[[detention]]
id = "pond"
to = "out"
initial_stage = 30.0                  #@initial_stage
[detention.storage]
bottom = 30.0                         #@bottom
area = 2000.0                         #@pond.area
area_growth = 400.0                   #@area_growth
  [[detention.outlet]]
  type = "orifice"
  invert = 30.0                       #@orifice.invert
  diameter = 0.3                      #@orifice.diameter
  coefficient = 0.61                  #@orifice.coefficient
  [[detention.outlet]]
  type = "orifice"
  invert = 31.0
  width = 0.5                         #@orifice.width
  height = 0.2
  [[detention.outlet]]
  type = "weir"
  crest = 32.0                        #@crest
  length = 3.0                        #@weir.length
  coefficient = 1.7                   #@weir.coefficient
  [[detention.outlet]]
  type = "v-notch"
  vertex = 31.5
  angle_deg = 90.0                    #@angle_deg
  coefficient = 0.58                  #@notch.coefficient

[[outlet]]
id = "out"
)";

// The basin with the value on the line tagged `tag` replaced by `value`.
std::string with(const std::string& tag, const std::string& value) {
  std::string text = kBasin;
  const std::string marker = "#@" + tag + "\n";
  const std::size_t at = text.find(marker);
  EXPECT_NE(at, std::string::npos) << "no tag " << tag;
  if (at == std::string::npos) return text;
  const std::size_t line_start = text.rfind('\n', at) + 1;
  const std::size_t eq = text.find("= ", line_start);
  return text.substr(0, eq + 2) + value + "  " + text.substr(at);
}

int line_of_tag(const std::string& tag) {
  const std::string text = kBasin;
  const std::size_t at = text.find("#@" + tag + "\n");
  return 1 + static_cast<int>(std::count(text.begin(), text.begin() + static_cast<long>(at), '\n'));
}

struct Loaded {
  std::vector<Problem> problems;
  std::vector<Problem> warnings;
  std::string what;
};

Loaded load(const std::string& text) {
  TempDir dir;
  write_text(dir / "basin.toml", text);
  Loaded out;
  try {
    const Study study = Study::load(dir / "basin.toml");
    out.warnings = study.warnings();
  } catch (const InputError& e) {
    out.problems = e.problems();
    out.what = e.what();
  }
  return out;
}

TEST(InputRanges, TheFixtureLoadsWithoutWarnings) {
  const Loaded l = load(kBasin);
  EXPECT_TRUE(l.problems.empty()) << l.what;
  for (const Problem& w : l.warnings) ADD_FAILURE() << w.to_string();
}

// ---- hard limits: errors ----------------------------------------------------------------------

struct HardCase {
  const char* tag;
  const char* value;
  const char* element;  // as named in the message
  const char* field;
  const char* rule;     // a fragment of the message after the value
};

// Bounds from the table (src/io/input_ranges.cpp), in the file's units (SI here).
const HardCase kHardCases[] = {
    {"duration_h", "1e12", "study", "duration_h", "must be <= 8784 h"},
    {"output_interval_min", "0.001", "study", "output_interval_min", "must be >= 0.0166"},
    {"coupling_step_s", "1e-300", "study", "coupling_step_s", "must be >= 0.01 s"},
    {"coupling_step_s", "600", "study", "coupling_step_s", "must be <= the output interval"},
    {"cell_length", "1e9", "study", "cell_length", "must be <= 100000 m"},
    {"implicit_courant", "1e5", "study", "implicit_courant", "must be <= 1000"},
    {"duration_min", "-30", "storm 'block'", "duration_min", "must be > 0"},
    {"step_min", "1e9", "storm 'block'", "step_min", "must be <= 1440 min"},
    {"peak_ratio", "1.5", "storm 'block'", "peak_ratio", "must be <= 1"},
    {"idf.a", "1e30", "storm 'block' idf", "a", "must be <= 1000000 mm/h"},
    {"idf.b", "-1", "storm 'block' idf", "b", "must be >= 0"},
    {"idf.c", "1.5", "storm 'block' idf", "c", "must be <= 1"},
    {"durations_min", "[5.0, 1e9]", "storm 'table' idf_table", "durations_min[2]",
     "must be <= 525600 min"},
    {"intensities", "[15000.0, 45.0]", "storm 'table' idf_table", "intensities[1]",
     "must be <= 4000 mm/h"},
    {"area", "1e20", "subcatchment 'sub'", "area", "Amazon"},
    {"plane.length", "1e308", "subcatchment 'sub' plane 1", "length", "must be <= 10000 m"},
    {"plane.slope", "1e300", "subcatchment 'sub' plane 1", "slope", "must be <= 1"},
    {"plane.manning_n", "1e6", "subcatchment 'sub' plane 1", "manning_n", "must be <= 1"},
    {"plane.cells", "2000000000", "subcatchment 'sub' plane 1", "cells", "must be <= 100000"},
    {"conductivity", "1e12", "subcatchment 'sub' loss", "conductivity", "must be <= 3600000 mm/h"},
    {"suction_head", "1e6", "subcatchment 'sub' loss", "suction_head", "must be <= 10000 mm"},
    {"porosity", "1.0", "subcatchment 'sub' loss", "porosity", "must be < 1"},
    {"initial_saturation", "1.0", "subcatchment 'sub' loss", "initial_saturation", "must be < 1"},
    {"initial_rate", "-5", "subcatchment 'horton' loss", "initial_rate", "must be >= 0"},
    {"final_rate", "1e9", "subcatchment 'horton' loss", "final_rate", "must be <= 3600000 mm/h"},
    {"decay_per_h", "1e6", "subcatchment 'horton' loss", "decay_per_h", "must be <= 1000 per h"},
    {"impervious_fraction", "1.2", "subcatchment 'horton' loss", "impervious_fraction",
     "must be <= 1"},
    {"impervious_storage", "5000", "subcatchment 'horton' loss", "impervious_storage",
     "must be <= 1000 mm"},
    {"curve_number", "25", "subcatchment 'cn' loss", "curve_number", "must be > 30"},
    {"curve_number", "101", "subcatchment 'cn' loss", "curve_number", "must be <= 100"},
    {"initial_abstraction_ratio", "1.0", "subcatchment 'cn' loss", "initial_abstraction_ratio",
     "must be < 1"},
    {"initial_loss", "2000", "subcatchment 'ic' loss", "initial_loss", "must be <= 1000 mm"},
    {"continuing_rate", "-1", "subcatchment 'ic' loss", "continuing_rate", "must be >= 0"},
    {"reach.length", "1e308", "reach 'r1'", "length", "must be <= 1000000 m"},
    {"reach.slope", "1e300", "reach 'r1'", "slope", "must be <= 1"},
    {"reach.manning_n", "1e6", "reach 'r1'", "manning_n", "must be <= 1"},
    {"reach.cells", "2000000000", "reach 'r1'", "cells", "must be <= 100000"},
    {"reach.cell_length", "0.001", "reach 'r2'", "cell_length",
     "gives 800000 cells over the reach's 800 m: at most 100000"},
    {"outlet_invert", "-1.75e308", "reach 'r1'", "outlet_invert", "must be >= -11000 m"},
    {"bottom_width", "1e7", "reach 'r1' section", "bottom_width", "must be <= 100000 m"},
    {"left_side_slope", "-2", "reach 'r1' section", "left_side_slope", "must be >= 0"},
    {"offsets", "[0.0, 10.0, 14.0, 18.0, 1e9]", "reach 'r2' section", "offsets[5]",
     "must be <= 100000 m"},
    {"levels", "[52.0, 50.5, -1.75e308, 50.5, 52.0]", "reach 'r2' section", "levels[3]",
     "must be >= -11000 m"},
    {"channel_left", "-1e6", "reach 'r2' section", "channel_left", "must be >= -100000 m"},
    {"left_floodplain_n", "1e6", "reach 'r2' section", "left_floodplain_n", "must be <= 1"},
    {"diameter", "1000", "reach 'r3' section", "diameter", "must be <= 50 m"},
    {"tailwater", "1e5", "culvert 'cul'", "tailwater", "must be <= 9000 m"},
    {"rise", "0", "culvert 'cul' barrel", "rise", "must be > 0"},
    {"count", "5000", "culvert 'cul' barrel", "count", "must be <= 1000"},
    {"barrel.length", "1e8", "culvert 'cul' barrel", "length", "must be <= 10000 m"},
    {"inlet_invert", "1e6", "culvert 'cul' barrel", "inlet_invert", "must be <= 9000 m"},
    {"barrel.manning_n", "50", "culvert 'cul' barrel", "manning_n", "must be <= 1"},
    {"entrance_loss", "100", "culvert 'cul' barrel", "entrance_loss", "must be <= 10"},
    {"ponding.stages", "[41.0, 42.0, 43.0, 1e7]", "culvert 'cul' ponding", "stages[4]",
     "must be <= 9000 m"},
    {"ponding.storages", "[0.0, 500.0, 2000.0, 1e15]", "culvert 'cul' ponding", "storages[4]",
     "must be <= 1e+12 m3"},
    {"road.offsets", "[0.0, 50.0, 1e7]", "culvert 'cul' road", "offsets[3]",
     "must be <= 100000 m"},
    {"road.levels", "[44.5, 44.0, 1e5]", "culvert 'cul' road", "levels[3]",
     "must be <= 9000 m"},
    {"road.coefficient", "30", "culvert 'cul' road", "coefficient", "must be <= 5 m^0.5/s"},
    {"initial_stage", "-20000", "detention 'pond'", "initial_stage", "must be >= -11000 m"},
    {"bottom", "20000", "detention 'pond' storage", "bottom", "must be <= 9000 m"},
    {"pond.area", "1e12", "detention 'pond' storage", "area", "must be <= 1e+10 m2"},
    {"area_growth", "-4", "detention 'pond' storage", "area_growth", "must be >= 0"},
    {"orifice.invert", "1e300", "detention 'pond' outlet 1", "invert", "must be <= 9000 m"},
    {"orifice.diameter", "100", "detention 'pond' outlet 1", "diameter", "must be <= 50 m"},
    {"orifice.coefficient", "1.5", "detention 'pond' outlet 1", "coefficient", "must be <= 1"},
    {"orifice.width", "1e4", "detention 'pond' outlet 2", "width", "must be <= 50 m"},
    {"crest", "-1e5", "detention 'pond' outlet 3", "crest", "must be >= -11000 m"},
    {"weir.length", "1e6", "detention 'pond' outlet 3", "length", "must be <= 10000 m"},
    {"weir.coefficient", "100", "detention 'pond' outlet 3", "coefficient", "must be <= 5"},
    {"angle_deg", "180", "detention 'pond' outlet 4", "angle_deg", "must be < 180 degrees"},
    {"notch.coefficient", "2", "detention 'pond' outlet 4", "coefficient", "must be <= 1"},
};

TEST(InputRanges, ValuesBeyondTheHardLimitsAreErrorsAtTheirLine) {
  for (const HardCase& c : kHardCases) {
    SCOPED_TRACE(std::string(c.tag) + " = " + c.value);
    const Loaded l = load(with(c.tag, c.value));
    const auto it = std::find_if(l.problems.begin(), l.problems.end(),
                                 [&c](const Problem& p) { return p.field == c.field; });
    ASSERT_NE(it, l.problems.end()) << "no problem for field '" << c.field << "': " << l.what;
    EXPECT_EQ(it->line, line_of_tag(c.tag));
    EXPECT_EQ(it->element, c.element);
    EXPECT_NE(it->message.find(c.rule), std::string::npos) << it->message;
    const std::string text = it->to_string();
    EXPECT_NE(text.find("basin.toml:" + std::to_string(line_of_tag(c.tag)) + ":"),
              std::string::npos)
        << text;
  }
}

// The value is quoted as written, and a bound other than 0 gives its reason.
TEST(InputRanges, AHardLimitMessageQuotesTheValueAndTheRule) {
  const Loaded l = load(with("reach.manning_n", "1e6"));
  ASSERT_FALSE(l.problems.empty());
  EXPECT_NE(l.what.find("reach 'r1', field 'manning_n' = 1000000: must be <= 1 (Manning's n of "
                        "a reach: above 1, beyond every published table)"),
            std::string::npos)
      << l.what;
}

// US customary files: bounds are quoted in the file's units (1000 km = 3280840 ft).
TEST(InputRanges, HardLimitsAreQuotedInTheFilesUnits) {
  std::string text = with("reach.length", "1e9");
  text.replace(text.find("units = \"si\""), 12, "units = \"us\"");
  const Loaded l = load(text);
  EXPECT_NE(l.what.find("field 'length' = 1000000000 ft: must be <= 3280840 ft"),
            std::string::npos)
      << l.what;
}

// ---- plausible ranges: warnings ---------------------------------------------------------------

struct PlausibleCase {
  const char* tag;
  const char* value;
  const char* field;
  const char* source;  // a fragment naming the published source
};

const PlausibleCase kPlausibleCases[] = {
    // Chow (1959) Table 5-6 spans 0.008 (lucite) to 0.200 (dense willows).
    {"reach.manning_n", "0.5", "manning_n", "Chow (1959), Open-Channel Hydraulics, Table 5-6"},
    {"reach.manning_n", "0.005", "manning_n", "Chow (1959)"},
    {"left_floodplain_n", "0.3", "left_floodplain_n", "Chow (1959)"},
    {"barrel.manning_n", "0.06", "manning_n", "Table 5-6, closed conduits"},
    // TR-55 Table 3-1 spans 0.011 (smooth surfaces) to 0.80 (woods, dense underbrush).
    {"plane.manning_n", "0.9", "manning_n", "NRCS (1986), TR-55, Table 3-1"},
    {"plane.manning_n", "0.005", "manning_n", "TR-55, Table 3-1"},
    {"curve_number", "99", "curve_number", "TR-55, Tables 2-2a"},
    {"initial_abstraction_ratio", "0.5", "initial_abstraction_ratio", "Hawkins et al. (2002)"},
    {"conductivity", "1000", "conductivity", "Rawls, Brakensiek & Miller (1983)"},
    {"suction_head", "5", "suction_head", "Rawls, Brakensiek & Miller (1983)"},
    {"porosity", "0.9", "porosity", "Rawls"},
    {"initial_rate", "400", "initial_rate", "ASCE (1992)"},
    {"decay_per_h", "50", "decay_per_h", "ASCE (1992)"},
    {"impervious_storage", "20", "impervious_storage", "ASCE (1992)"},
    {"reach.slope", "0.3", "slope", "Rosgen 1994"},
    {"reach.slope", "1e-7", "slope", "lowland rivers"},
    {"outlet_invert", "9000", "outlet_invert", "Everest"},
    {"entrance_loss", "2.0", "entrance_loss", "HDS-5"},
    {"road.coefficient", "3.0", "coefficient", "Brater & King 1976"},
    {"orifice.coefficient", "0.3", "coefficient", "Brater & King 1976"},
    {"angle_deg", "150", "angle_deg", "Water Measurement Manual"},
    {"notch.coefficient", "0.9", "coefficient", "Water Measurement Manual"},
    {"implicit_courant", "50", "implicit_courant", "LeVeque (2002)"},
    {"plane.length", "2000", "length", "TR-55 limits sheet flow"},
    {"area", "50000", "area", "common practice, no source"},
    {"intensities", "[2500.0, 300.0]", "intensities[1]", "1-minute record"},
};

TEST(InputRanges, ImplausibleValuesAreWarningsNamingTheirSource) {
  for (const PlausibleCase& c : kPlausibleCases) {
    SCOPED_TRACE(std::string(c.tag) + " = " + c.value);
    const Loaded l = load(with(c.tag, c.value));
    ASSERT_TRUE(l.problems.empty()) << l.what;
    const auto it = std::find_if(l.warnings.begin(), l.warnings.end(), [&c](const Problem& p) {
      return p.field == c.field && p.line == line_of_tag(c.tag);
    });
    ASSERT_NE(it, l.warnings.end()) << "no warning for field '" << c.field << "'";
    EXPECT_NE(it->message.find("outside the plausible range"), std::string::npos) << it->message;
    EXPECT_NE(it->message.find(c.source), std::string::npos) << it->message;
  }
}

// ---- storm depths against the world-record envelope -----------------------------------------

// The world-record envelope P = 422 D^0.475 mm (D in h; Jennings 1950 with later records,
// from memory) gives 1910 mm in 24 h and 304 mm in 30 min. A TR-55 Type II storm puts 38 %
// of its depth into its wettest 30 min (USDA SCS 1986, TR-55 Appendix B: 0.283 to 0.663 of
// the depth between 11.5 and 12 h, from memory): 1200 mm in 24 h puts 456 mm there, 1.5
// times the envelope (a warning); 5000 mm puts 1900 mm there, 6.3 times (an error).
TEST(InputRanges, StormDepthsAreCheckedAgainstTheWorldRecordEnvelope) {
  {
    const Loaded l = load(with("depth", "1200.0"));
    ASSERT_TRUE(l.problems.empty()) << l.what;
    const auto it = std::find_if(l.warnings.begin(), l.warnings.end(),
                                 [](const Problem& p) { return p.field == "depth"; });
    ASSERT_NE(it, l.warnings.end());
    EXPECT_NE(it->message.find("wetter than any storm on record"), std::string::npos);
    EXPECT_NE(it->message.find("Jennings 1950"), std::string::npos);
  }
  {
    const Loaded l = load(with("depth", "5000.0"));
    const auto it = std::find_if(l.problems.begin(), l.problems.end(),
                                 [](const Problem& p) { return p.field == "depth"; });
    ASSERT_NE(it, l.problems.end()) << l.what;
    EXPECT_EQ(it->line, line_of_tag("depth"));
    EXPECT_NE(it->message.find("more than twice the world record"), std::string::npos);
  }
}

// The demo's SI numbers read as US customary: the IDF a = 1300 becomes in/h, and the 30-min
// storm holds 1038 mm (40.9 in), 3.4 times the envelope's 303 mm in 30 min: an error, pointing
// at the units.
TEST(InputRanges, SiNumbersUnderUsUnitsAreCaughtByTheStormDepth) {
  std::string text = kBasin;
  text.replace(text.find("units = \"si\""), 12, "units = \"us\"");
  const Loaded l = load(text);
  const auto it = std::find_if(l.problems.begin(), l.problems.end(), [](const Problem& p) {
    return p.element == "storm 'block'" && p.field == "idf";
  });
  ASSERT_NE(it, l.problems.end()) << l.what;
  EXPECT_NE(it->message.find("check the units"), std::string::npos) << it->message;
}

// The reverse: a US design storm of 7.2 in typed under units = "si" is 7.2 mm in 24 h, below
// 1 % of the envelope (19.1 mm): a warning.
TEST(InputRanges, ATinyDesignStormIsPointedOut) {
  const Loaded l = load(with("depth", "7.2"));
  ASSERT_TRUE(l.problems.empty()) << l.what;
  const auto it = std::find_if(l.warnings.begin(), l.warnings.end(),
                               [](const Problem& p) { return p.field == "depth"; });
  ASSERT_NE(it, l.warnings.end());
  EXPECT_NE(it->message.find("too small for a design storm"), std::string::npos) << it->message;
}

// ---- surveyed sections: keys of our own, rules in the file's keys --------------------------

// The survey keys are offsets, levels, channel_left/right and left_floodplain_n, channel_n,
// right_floodplain_n; no other names are accepted (a misspelt or foreign key is unknown).
TEST(SurveyedSection, OnlyOurOwnKeysAreAccepted) {
  std::string text = kBasin;
  text.replace(text.find("offsets = [0.0, 10.0"), 7, "stations");
  const Loaded l = load(text);
  const auto unknown = std::find_if(l.problems.begin(), l.problems.end(), [](const Problem& p) {
    return p.field == "stations" && p.message.find("is not a known field") != std::string::npos;
  });
  EXPECT_NE(unknown, l.problems.end()) << l.what;
  EXPECT_NE(l.what.find("reach 'r2' section, is missing required field 'offsets'"),
            std::string::npos)
      << l.what;
}

TEST(SurveyedSection, SurveyRulesNameTheFileKeys) {
  {
    const Loaded l = load(with("offsets", "[0.0, 10.0, 9.0, 18.0, 30.0]"));
    EXPECT_NE(l.what.find("reach 'r2' section, field 'offsets[3]' = 9 m: offsets must not "
                          "decrease from left to right (the one before is 10 m)"),
              std::string::npos)
        << l.what;
  }
  {
    const Loaded l = load(with("channel_left", "40.0"));
    EXPECT_NE(l.what.find("field 'channel_left' = 40 m: must not exceed channel_right = 18 m"),
              std::string::npos)
        << l.what;
    EXPECT_NE(l.what.find("field 'channel_left' = 40 m: must lie within the survey's offsets "
                          "(0 to 30 m)"),
              std::string::npos)
        << l.what;
  }
}

}  // namespace
}  // namespace freshet::study
