// CF NetCDF-4 writer: read back through netcdf-cxx4 and check values and the CF structural
// rules for a timeSeries discrete sampling geometry.
// Sources: CF Conventions 1.11 (2023), sec. 2.6.1 (Conventions), 3.1 (units), 4.4 (time units
// "<unit> since <date>"), 5 (coordinates attribute names existing variables), 2.5.1
// (_FillValue has the variable's type), ch. 9 sec. 9.1-9.6 and Appendix H.2 (featureType,
// exactly one cf_role timeseries_id, orthogonal layout, unlimited dimension leading).
// Standard names allow-list: CF standard-name table v83 (2023-10-17, cfconventions.org).
// UDUNITS strings: each checked with the udunits2 2.2.28 tool (UDUNITS-2).
#include "freshet/io/netcdf_writer.hpp"

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include <cmath>
#include <netcdf>
#include <set>

#include "freshet/core/caution.hpp"
#include "freshet/core/error.hpp"
#include "temp_dir.hpp"

namespace freshet::io {
namespace {

using ::testing::HasSubstr;
using ::testing::ElementsAre;
using ::testing::IsEmpty;
using testing::TempDir;
namespace nc = netCDF;

const std::set<std::string> kAllowedStandardNames{
    "time", "platform_name", "water_volume_transport_in_river_channel",
    "water_surface_height_above_reference_datum", "lwe_precipitation_rate",
    "projection_x_coordinate", "projection_y_coordinate"};
const std::set<std::string> kAllowedUnits{"m3 s-1", "m", "m s-1", "mm h-1", "mm"};

NetcdfRunMetadata metadata() {
  NetcdfRunMetadata m;
  m.title = "freshet test run, Alder Brook (invented basin)";
  m.source = "freshet 0.1.0";
  m.history = "2024-05-01T10:00:00Z freshet run alder.toml";
  m.references = "kinematic wave: Lighthill and Whitham (1955)";
  m.comment = "test output";
  m.time_origin = "2000-01-01T00:00:00Z";
  return m;
}

InstanceSet three_stations() {
  InstanceSet s;
  s.instances = {{"alder-1", "Alder Brook at Mill Lane", "alder", 0.0, 100.0, 200.0},
                 {"alder-2", "Alder Brook, lower", "alder", 850.5, 400.0, 250.0},
                 {"fen-out", "Fen outlet", "fen", 1200.0, 900.0, 90.0}};
  return s;
}

double value(std::size_t v, std::size_t k, std::size_t i) {
  return 0.5 + static_cast<double>(v) + 0.01 * static_cast<double>(k) +
         0.001 * static_cast<double>(i);
}

std::string text_att(const nc::NcVar& var, const std::string& name) {
  std::string s;
  var.getAtt(name).getValues(s);
  return s;
}

std::string text_att(const nc::NcFile& f, const std::string& name) {
  std::string s;
  f.getAtt(name).getValues(s);
  return s;
}

std::vector<std::string> split_words(const std::string& s) {
  std::vector<std::string> out;
  std::istringstream in(s);
  for (std::string w; in >> w;) out.push_back(w);
  return out;
}

// The structural CF checks, usable on any file this writer produces.
void expect_cf_timeseries(const nc::NcFile& f) {
  EXPECT_EQ(text_att(f, "Conventions"), "CF-1.11, ACDD-1.3");
  EXPECT_EQ(text_att(f, "featureType"), "timeSeries");
  EXPECT_EQ(text_att(f, "caution"), std::string(kCautionText));
  EXPECT_THAT(text_att(f, "comment"), HasSubstr(std::string(kCautionText)));
  const auto vars = f.getVars();
  int cf_roles = 0;
  for (const auto& [name, var] : vars) {
    const auto atts = var.getAtts();
    if (atts.count("cf_role")) {
      ++cf_roles;
      EXPECT_EQ(text_att(var, "cf_role"), "timeseries_id");
    }
    if (atts.count("standard_name")) {
      EXPECT_TRUE(kAllowedStandardNames.count(text_att(var, "standard_name"))) << name;
    }
    if (atts.count("_FillValue")) {
      EXPECT_EQ(var.getAtt("_FillValue").getType().getId(), var.getType().getId()) << name;
    }
    if (name == "time_bnds") {  // CF 1.11 sec. 7.1: (time, nv = 2), named by time's bounds
      EXPECT_EQ(var.getDim(1).getSize(), 2u);
      EXPECT_EQ(text_att(f.getVar("time"), "bounds"), "time_bnds");
      continue;
    }
    if (var.getDimCount() >= 2) {  // a data variable (time, instance[, percentile])
      // CF 1.11 sec. 7.3: every data variable says whether it is a value at the stamp or a
      // mean over the interval ending there; a mean needs the time bounds.
      const std::string method = text_att(var, "cell_methods");
      EXPECT_TRUE(method == "time: point" || method == "time: mean") << name;
      if (method == "time: mean") {
        EXPECT_FALSE(f.getVar("time_bnds").isNull()) << name;
      }
      EXPECT_EQ(var.getDim(0).getName(), "time") << name;
      EXPECT_TRUE(var.getDim(0).isUnlimited()) << name;
      ASSERT_TRUE(atts.count("coordinates")) << name;
      for (const auto& c : split_words(text_att(var, "coordinates"))) {
        EXPECT_FALSE(f.getVar(c).isNull()) << name << " names missing variable " << c;
      }
      EXPECT_TRUE(atts.count("long_name")) << name;
      EXPECT_TRUE(atts.count("_FillValue")) << name;
      EXPECT_TRUE(kAllowedUnits.count(text_att(var, "units"))) << name;
    }
  }
  EXPECT_EQ(cf_roles, 1);
  const auto time = f.getVar("time");
  ASSERT_FALSE(time.isNull());
  EXPECT_THAT(text_att(time, "units"), HasSubstr(" since "));
  EXPECT_EQ(text_att(time, "calendar"), "proleptic_gregorian");
  std::vector<double> t(time.getDim(0).getSize());
  if (!t.empty()) time.getVar(t.data());
  for (std::size_t k = 1; k < t.size(); ++k) EXPECT_LT(t[k - 1], t[k]);
}

TEST(NetcdfWriter, WritesRecordsThatReadBackWithCfStructure) {
  TempDir dir;
  const auto path = dir / "run.nc";
  const std::vector<OutputVariable> vars{OutputVariable::discharge, OutputVariable::stage,
                                         OutputVariable::depth, OutputVariable::velocity};
  const std::size_t n = 3, records = 50;
  {
    NetcdfTimeSeriesWriter w(path);
    w.begin(metadata(), three_stations(), vars);
    std::vector<double> row(vars.size() * n);
    for (std::size_t k = 0; k < records; ++k) {
      for (std::size_t v = 0; v < vars.size(); ++v) {
        for (std::size_t i = 0; i < n; ++i) row[v * n + i] = value(v, k, i);
      }
      if (k == 7) row[1] = std::nan("");  // discharge at alder-2 missing -> _FillValue
      w.record(60.0 * static_cast<double>(k), row);
    }
    EXPECT_FALSE(std::filesystem::exists(path));  // only the partial file exists before commit
    EXPECT_TRUE(std::filesystem::exists(w.partial_path()));
    w.commit();
    EXPECT_EQ(w.records_written(), records);
  }
  ASSERT_TRUE(std::filesystem::exists(path));
  EXPECT_THAT(testing::entries(dir.path()), ElementsAre("run.nc"));  // no temporary file left
  std::lock_guard lock(netcdf_global_mutex());
  nc::NcFile f(path.string(), nc::NcFile::read);
  expect_cf_timeseries(f);
  EXPECT_EQ(f.getDim("time").getSize(), records);
  EXPECT_EQ(f.getDim("station").getSize(), n);
  EXPECT_EQ(text_att(f.getVar("time"), "units"), "seconds since 2000-01-01 00:00:00");
  EXPECT_EQ(text_att(f.getVar("discharge"), "standard_name"),
            "water_volume_transport_in_river_channel");
  EXPECT_EQ(text_att(f.getVar("discharge"), "units"), "m3 s-1");
  EXPECT_EQ(text_att(f.getVar("discharge"), "coordinates"),
            "station_id station_name reach_id chainage x y");
  EXPECT_TRUE(f.getVar("stage").getAtts().count("standard_name") == 0);  // no datum given
  for (std::size_t v = 0; v < vars.size(); ++v) {
    std::vector<float> data(records * n);
    f.getVar(std::string(to_string(vars[v]))).getVar(data.data());
    for (std::size_t k = 0; k < records; ++k) {
      for (std::size_t i = 0; i < n; ++i) {
        const float expected = (v == 0 && k == 7 && i == 1) ? NC_FILL_FLOAT
                                                            : static_cast<float>(value(v, k, i));
        EXPECT_EQ(data[k * n + i], expected) << to_string(vars[v]) << " " << k << " " << i;
      }
    }
  }
  char* id = nullptr;
  f.getVar("station_id").getVar(std::vector<size_t>{1}, &id);
  EXPECT_STREQ(id, "alder-2");
  nc_free_string(1, &id);
  double chainage = 0.0;
  f.getVar("chainage").getVar(std::vector<size_t>{1}, &chainage);
  EXPECT_EQ(chainage, 850.5);
}

// The writer keeps records in memory and writes them a block of chunk rows at a time (issue 16):
// with 1000 stations a chunk holds 65 records, so 150 records with a sync() after record 30
// cross full blocks, a block cut short by the sync and a partial last block. Every value,
// time and id must read back exactly as given (the float of the value; CF 1.11 sec. 2.5.1 for
// the fill value of a missing one), as when each record was written alone.
TEST(NetcdfWriter, RecordsWrittenInBlocksReadBackExactly) {
  TempDir dir;
  const auto path = dir / "wide.nc";
  const std::size_t n = 1000, records = 150;
  InstanceSet set;
  for (std::size_t i = 0; i < n; ++i) {
    set.instances.push_back({"st-" + std::to_string(i), "station " + std::to_string(i), "r" +
                             std::to_string(i / 10), 10.0 * static_cast<double>(i), NAN, NAN});
  }
  const std::vector<OutputVariable> vars{OutputVariable::discharge, OutputVariable::depth};
  {
    NetcdfTimeSeriesWriter w(path);
    w.begin(metadata(), set, vars);
    std::vector<double> row(vars.size() * n);
    for (std::size_t k = 0; k < records; ++k) {
      for (std::size_t v = 0; v < vars.size(); ++v) {
        for (std::size_t i = 0; i < n; ++i) row[v * n + i] = value(v, k, i);
      }
      if (k == 64) row[999] = std::nan("");  // last of the first block -> _FillValue
      w.record(30.0 * static_cast<double>(k), row);
      if (k == 30) w.sync();
    }
    w.commit();
    EXPECT_EQ(w.records_written(), records);
  }
  std::lock_guard lock(netcdf_global_mutex());
  nc::NcFile f(path.string(), nc::NcFile::read);
  ASSERT_EQ(f.getDim("time").getSize(), records);
  std::vector<double> t(records);
  f.getVar("time").getVar(t.data());
  for (std::size_t k = 0; k < records; ++k) EXPECT_EQ(t[k], 30.0 * static_cast<double>(k)) << k;
  for (std::size_t v = 0; v < vars.size(); ++v) {
    std::vector<float> data(records * n);
    f.getVar(std::string(to_string(vars[v]))).getVar(data.data());
    std::size_t wrong = 0;
    for (std::size_t k = 0; k < records; ++k) {
      for (std::size_t i = 0; i < n; ++i) {
        const float expected = (v == 0 && k == 64 && i == 999) ? NC_FILL_FLOAT
                                                               : static_cast<float>(value(v, k, i));
        wrong += data[k * n + i] != expected;
      }
    }
    EXPECT_EQ(wrong, 0u) << to_string(vars[v]);
  }
  std::vector<char*> ids(n), reaches(n);
  f.getVar("station_id").getVar(ids.data());
  f.getVar("reach_id").getVar(reaches.data());
  std::vector<double> chainage(n);
  f.getVar("chainage").getVar(chainage.data());
  for (std::size_t i = 0; i < n; ++i) {
    EXPECT_STREQ(ids[i], ("st-" + std::to_string(i)).c_str());
    EXPECT_STREQ(reaches[i], ("r" + std::to_string(i / 10)).c_str());
    EXPECT_EQ(chainage[i], 10.0 * static_cast<double>(i));
  }
  nc_free_string(n, ids.data());
  nc_free_string(n, reaches.data());
  EXPECT_TRUE(f.getVars().count("x") == 0);  // no coordinates given, none written
}

// An ensemble's bands: every data variable gains a third dimension, `percentile` (time,
// station, percentile), whose coordinate variable holds the percentiles in percent (a unit of
// UDUNITS-2); the values read back exactly in that layout, and percentiles that do not
// increase within [0, 100] are refused with the other metadata problems.
TEST(NetcdfWriter, PercentileBandsGainAPercentileDimension) {
  TempDir dir;
  const auto path = dir / "bands.nc";
  const std::vector<double> percentiles{5.0, 50.0, 95.0};
  const std::vector<OutputVariable> vars{OutputVariable::discharge, OutputVariable::stage};
  const std::size_t n = 3, np = 3, records = 4;
  const auto band = [](std::size_t v, std::size_t k, std::size_t i, std::size_t p) {
    return value(v, k, i) + 0.25 * static_cast<double>(p);
  };
  {
    NetcdfTimeSeriesWriter w(path);
    w.begin(metadata(), three_stations(), vars, percentiles);
    std::vector<double> row(vars.size() * n * np);
    for (std::size_t k = 0; k < records; ++k) {
      for (std::size_t v = 0; v < vars.size(); ++v) {
        for (std::size_t i = 0; i < n; ++i) {
          for (std::size_t p = 0; p < np; ++p) row[(v * n + i) * np + p] = band(v, k, i, p);
        }
      }
      w.record(60.0 * static_cast<double>(k), row);
    }
    w.commit();
  }
  std::lock_guard lock(netcdf_global_mutex());
  nc::NcFile f(path.string(), nc::NcFile::read);
  expect_cf_timeseries(f);
  const nc::NcVar pct = f.getVar("percentile");
  ASSERT_FALSE(pct.isNull());
  EXPECT_EQ(text_att(pct, "units"), "percent");
  std::vector<double> stored(np);
  pct.getVar(stored.data());
  EXPECT_EQ(stored, percentiles);
  for (std::size_t v = 0; v < vars.size(); ++v) {
    const nc::NcVar var = f.getVar(std::string(to_string(vars[v])));
    ASSERT_EQ(var.getDimCount(), 3);
    EXPECT_EQ(var.getDim(1).getName(), "station");
    EXPECT_EQ(var.getDim(2).getName(), "percentile");
    EXPECT_THAT(text_att(var, "long_name"), HasSubstr("percentile over the ensemble members"));
    std::vector<float> data(records * n * np);
    var.getVar(data.data());
    for (std::size_t k = 0; k < records; ++k) {
      for (std::size_t i = 0; i < n; ++i) {
        for (std::size_t p = 0; p < np; ++p) {
          EXPECT_EQ(data[(k * n + i) * np + p], static_cast<float>(band(v, k, i, p)));
        }
      }
    }
  }
  NetcdfTimeSeriesWriter bad(dir / "bad.nc");
  try {
    bad.begin(metadata(), three_stations(), vars, {50.0, 5.0});
    FAIL() << "decreasing percentiles accepted";
  } catch (const InputError& e) {
    EXPECT_THAT(e.what(), HasSubstr("field 'percentiles' must increase within [0, 100]"));
  }
}

TEST(NetcdfWriter, DataAreChunkedAlongTimeAndDeflated) {
  TempDir dir;
  {
    NetcdfTimeSeriesWriter w(dir / "c.nc");
    w.begin(metadata(), three_stations(), {OutputVariable::discharge});
    w.record(0.0, std::vector<double>{1.0, 2.0, 3.0});
    w.commit();
  }
  std::lock_guard lock(netcdf_global_mutex());
  nc::NcFile f((dir / "c.nc").string(), nc::NcFile::read);
  nc::NcVar::ChunkMode mode;
  std::vector<size_t> chunks;
  f.getVar("discharge").getChunkingParameters(mode, chunks);
  EXPECT_EQ(mode, nc::NcVar::nc_CHUNKED);
  ASSERT_EQ(chunks.size(), 2u);
  EXPECT_GT(chunks[0], 1u);
  EXPECT_EQ(chunks[1], 3u);
  bool shuffle = false, deflate = false;
  int level = 0;
  f.getVar("discharge").getCompressionParameters(shuffle, deflate, level);
  EXPECT_TRUE(deflate);
  EXPECT_EQ(level, 4);
}

TEST(NetcdfWriter, SubcatchmentFileConvertsRainToMillimetresPerHour) {
  TempDir dir;
  InstanceSet sub;
  sub.kind = InstanceKind::subcatchment;
  sub.instances = {{"s1", "North slope", "", NAN, NAN, NAN}};
  {
    NetcdfTimeSeriesWriter w(dir / "sub.nc");
    w.begin(metadata(), sub, {OutputVariable::rainfall_intensity, OutputVariable::rainfall_excess});
    // 36 mm/h = 1e-5 m/s; 18 mm/h = 5e-6 m/s
    w.record(0.0, std::vector<double>{1e-5, 5e-6});
    w.commit();
  }
  std::lock_guard lock(netcdf_global_mutex());
  nc::NcFile f((dir / "sub.nc").string(), nc::NcFile::read);
  expect_cf_timeseries(f);
  EXPECT_FALSE(f.getVar("subcatchment_id").isNull());
  EXPECT_TRUE(f.getVar("reach_id").isNull());
  EXPECT_TRUE(f.getVar("x").isNull());
  EXPECT_EQ(text_att(f.getVar("rainfall_intensity"), "standard_name"), "lwe_precipitation_rate");
  EXPECT_EQ(text_att(f.getVar("rainfall_intensity"), "units"), "mm h-1");
  float rain = 0.0f, excess = 0.0f;
  f.getVar("rainfall_intensity").getVar(std::vector<size_t>{0, 0}, &rain);
  f.getVar("rainfall_excess").getVar(std::vector<size_t>{0, 0}, &excess);
  EXPECT_FLOAT_EQ(rain, 36.0f);
  EXPECT_FLOAT_EQ(excess, 18.0f);
  double bounds[2] = {-1.0, -1.0};  // the first record's interval is empty: [t0, t0]
  f.getVar("time_bnds").getVar(std::vector<size_t>{0, 0}, std::vector<size_t>{1, 2}, bounds);
  EXPECT_EQ(bounds[0], 0.0);
  EXPECT_EQ(bounds[1], 0.0);
}

TEST(NetcdfWriter, StageWithAKnownDatumGetsTheStandardNameAndCrsGetsAGridMapping) {
  TempDir dir;
  InstanceSet s = three_stations();
  s.stage_datum = "local survey datum LSD-1 (invented)";
  s.crs_wkt = "LOCAL_CS[\"invented site grid\"]";
  {
    NetcdfTimeSeriesWriter w(dir / "d.nc");
    w.begin(metadata(), s, {OutputVariable::stage});
    w.record(0.0, std::vector<double>{1.0, 2.0, 3.0});
    w.commit();
  }
  std::lock_guard lock(netcdf_global_mutex());
  nc::NcFile f((dir / "d.nc").string(), nc::NcFile::read);
  expect_cf_timeseries(f);
  EXPECT_EQ(text_att(f.getVar("stage"), "standard_name"),
            "water_surface_height_above_reference_datum");
  EXPECT_EQ(text_att(f.getVar("stage"), "grid_mapping"), "crs");
  EXPECT_EQ(text_att(f.getVar("x"), "standard_name"), "projection_x_coordinate");
  EXPECT_FALSE(f.getVar("crs").isNull());
}

TEST(NetcdfWriter, ProfileFileHasOneInstancePerCell) {
  TempDir dir;
  InstanceSet cells;
  cells.kind = InstanceKind::cell;
  for (int i = 0; i < 40; ++i) {
    cells.instances.push_back({"alder:" + std::to_string(i), "", "alder", 25.0 * i + 12.5, NAN,
                               NAN});
  }
  {
    NetcdfTimeSeriesWriter w(dir / "profiles.nc");
    w.begin(metadata(), cells, {OutputVariable::depth});
    std::vector<double> row(40);
    for (int k = 0; k < 3; ++k) {
      for (int i = 0; i < 40; ++i) row[static_cast<std::size_t>(i)] = 0.01 * (k + i);
      w.record(300.0 * k, row);
    }
    w.commit();
  }
  std::lock_guard lock(netcdf_global_mutex());
  nc::NcFile f((dir / "profiles.nc").string(), nc::NcFile::read);
  expect_cf_timeseries(f);
  EXPECT_EQ(f.getDim("cell").getSize(), 40u);
  EXPECT_EQ(text_att(f.getVar("depth"), "coordinates"), "cell_id cell_name reach_id chainage");
  std::vector<double> chainage(40);
  f.getVar("chainage").getVar(chainage.data());
  EXPECT_EQ(chainage[39], 987.5);
  float depth = 0.0f;
  f.getVar("depth").getVar(std::vector<size_t>{2, 5}, &depth);
  EXPECT_FLOAT_EQ(depth, 0.07f);
}

TEST(NetcdfWriter, UncommittedWriterLeavesNoFile) {
  TempDir dir;
  {
    NetcdfTimeSeriesWriter w(dir / "lost.nc");
    w.begin(metadata(), three_stations(), {OutputVariable::discharge});
    w.record(0.0, std::vector<double>{1.0, 2.0, 3.0});
    EXPECT_TRUE(std::filesystem::exists(w.partial_path()));
  }
  EXPECT_THAT(testing::entries(dir.path()), IsEmpty());
}

TEST(NetcdfWriter, ExistingFileIsNotOverwrittenWithoutTheFlag) {
  TempDir dir;
  testing::write_text(dir / "old.nc", "precious");
  EXPECT_THROW(NetcdfTimeSeriesWriter(dir / "old.nc"), IoError);
  EXPECT_EQ(testing::read_text(dir / "old.nc"), "precious");
  NetcdfWriterOptions o;
  o.overwrite = Overwrite::yes;
  NetcdfTimeSeriesWriter w(dir / "old.nc", o);
  w.begin(metadata(), three_stations(), {OutputVariable::discharge});
  w.commit();
  EXPECT_NE(testing::read_text(dir / "old.nc"), "precious");
}

TEST(NetcdfWriter, BadMetadataListsEveryProblem) {
  TempDir dir;
  NetcdfRunMetadata m = metadata();
  m.time_origin = "1st of May";
  m.source.clear();
  InstanceSet s = three_stations();
  s.instances[2].id = "alder-1";
  NetcdfTimeSeriesWriter w(dir / "bad.nc");
  try {
    w.begin(m, s, {OutputVariable::discharge});
    FAIL() << "expected InputError";
  } catch (const InputError& e) {
    ASSERT_EQ(e.problems().size(), 3u);
    EXPECT_THAT(e.what(), HasSubstr("field 'source'"));
    EXPECT_THAT(e.what(), HasSubstr("field 'time_origin' = '1st of May'"));
    EXPECT_THAT(e.what(), HasSubstr("field 'station[3].id' = 'alder-1': duplicate id"));
  }
  EXPECT_THAT(testing::entries(dir.path()), IsEmpty());
}

TEST(NetcdfWriterDeathTest, NonIncreasingTimeIsAProgrammerError) {
  GTEST_FLAG_SET(death_test_style, "threadsafe");
  TempDir dir;
  EXPECT_DEATH(
      {
        NetcdfTimeSeriesWriter w(dir / "t.nc");
        w.begin(metadata(), three_stations(), {OutputVariable::discharge});
        w.record(60.0, std::vector<double>{1.0, 2.0, 3.0});
        w.record(60.0, std::vector<double>{1.0, 2.0, 3.0});
      },
      "strictly increasing");
}

}  // namespace
}  // namespace freshet::io
