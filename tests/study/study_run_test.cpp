// Tests of a whole study run (study::run_study): the summaries a reviewer reads. Each fixture is
// a small invented basin written to a temporary folder; the expected values come from the
// definitions of the quantities (stated beside each check), not from earlier runs.
#include "freshet/study/study_run.hpp"

#include "freshet/io/csv_series.hpp"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <map>
#include <string>

#include "freshet/core/error.hpp"
#include "../io/temp_dir.hpp"

namespace freshet::study {
namespace {

using io::testing::TempDir;
using io::testing::write_text;
using reporting::ApplicabilityWarning;
using reporting::ShockRecord;
using reporting::StationSummary;

// Settings for `hours` of run at 5-minute output, and a 30-minute storm.
std::string head(double hours) {
  return "[study]\ntitle = \"run fixture\"\nunits = \"si\"\nduration_h = " +
         std::to_string(hours) +
         "\noutput_interval_min = 5.0\n"
         "[[storm]]\nid = \"s1\"\nmethod = \"alternating-block\"\nduration_min = 30\n"
         "step_min = 5\nidf = { a = 1300.0, b = 10.0, c = 0.75 }\n";
}

const std::string kChannel =
    "length = 1200.0\nslope = 0.002\nmanning_n = 0.03\n"
    "section = { shape = \"rectangular\", bottom_width = 4.0 }\n";

// The request every test starts from: storm s1, results under dir/out.
RunRequest request_in(const TempDir& dir) {
  RunRequest req;
  req.storm_id = "s1";
  req.out_dir = dir / "out";
  req.source = "freshet test";
  return req;
}

RunOutcome run(const TempDir& dir, const std::string& basin_text) {
  write_text(dir / "b.toml", basin_text);
  return run_study(Study::load(dir / "b.toml"), request_in(dir));
}

// An inflow hydrograph q.csv into reach r1 (kChannel) draining to outlet out.
std::string spring_reach_outlet() {
  return "[[inflow]]\nid = \"spring\"\nto = \"r1\"\nfile = \"q.csv\"\n"
         "[[reach]]\nid = \"r1\"\nto = \"out\"\n" + kChannel + "[[outlet]]\nid = \"out\"\n";
}

const StationSummary& station(const RunOutcome& r, const std::string& id) {
  for (const auto& s : r.summary.stations) {
    if (s.station_id == id) return s;
  }
  throw std::runtime_error("no station " + id);
}

bool has_attenuation_row(const RunOutcome& r, const std::string& element) {
  for (const auto& a : r.summary.attenuation) {
    if (a.element == element) return true;
  }
  return false;
}

bool has_warning(const RunOutcome& r, const std::string& element, const std::string& part) {
  for (const auto& w : r.summary.warnings) {
    if (w.element == element && w.message.find(part) != std::string::npos) return true;
  }
  return false;
}

// Attenuation rows are for the elements that store water (reaches, ponds, culverts), not for
// sources, junctions or outlets.
TEST(RunSummary, AttenuationRowsAreForReachesPondsAndCulverts) {
  TempDir dir;
  write_text(dir / "q.csv", "time_min,discharge_m3s\n0,1.0\n120,1.0\n");
  const RunOutcome r = run(dir, head(2.0) +
      "[[inflow]]\nid = \"spring\"\nto = \"r1\"\nfile = \"q.csv\"\n"
      "[[reach]]\nid = \"r1\"\nto = \"j\"\n" + kChannel +
      "[[subcatchment]]\nid = \"field\"\nto = \"j\"\narea = 20.0\n"
      "loss = { method = \"none\" }\n[[subcatchment.plane]]\nlength = 60.0\nslope = 0.02\n"
      "manning_n = 0.2\ncells = 20\n"
      "[[junction]]\nid = \"j\"\nto = \"out\"\n[[outlet]]\nid = \"out\"\n");
  EXPECT_TRUE(has_attenuation_row(r, "r1"));
  EXPECT_FALSE(has_attenuation_row(r, "spring"));
  EXPECT_FALSE(has_attenuation_row(r, "field"));
  EXPECT_FALSE(has_attenuation_row(r, "j"));
  EXPECT_FALSE(has_attenuation_row(r, "out"));
  // Centroid lag is measured from the rainfall excess upstream: none reaches the spring.
  EXPECT_TRUE(std::isnan(station(r, "spring").centroid_lag_s));
  EXPECT_GT(station(r, "out").centroid_lag_s, 0.0);
}

// A reach that starts in steady flow: the outlet carries the inflow from the first record
// (steady uniform flow, Q out = Q in), so no false wetting front is reported.
TEST(RunSummary, ReachesStartInSteadyFlow) {
  TempDir dir;
  write_text(dir / "q.csv", "time_min,discharge_m3s\n0,2.0\n60,2.0\n");
  const RunOutcome r = run(dir, head(1.0) +
      "[[inflow]]\nid = \"spring\"\nto = \"r1\"\nfile = \"q.csv\"\n"
      "[[reach]]\nid = \"r1\"\nto = \"out\"\n" + kChannel + "[[outlet]]\nid = \"out\"\n");
  // Volume out over the hour equals volume in (steady state, empty of transients).
  EXPECT_NEAR(station(r, "out").runoff_volume_m3, 2.0 * 3600.0, 1e-6 * 7200.0);
  EXPECT_TRUE(r.summary.shocks.empty());
}

// The Ponce number uses the time of rise, so the same flood arriving five hours later gives
// the same number (the criterion depends on the wave, not on the clock).
TEST(RunSummary, ApplicabilityNumberDoesNotDependOnWhenTheFloodArrives) {
  auto tau_for = [](double delay_min) {
    TempDir dir;
    const std::string d = std::to_string(delay_min);
    write_text(dir / "q.csv", "time_min,discharge_m3s\n0,0.5\n" + std::to_string(delay_min) +
                                  ",0.5\n" + std::to_string(delay_min + 20) + ",12.0\n" +
                                  std::to_string(delay_min + 60) + ",0.5\n600,0.5\n");
    const RunOutcome r = run(dir, head(10.0) +
        "[[inflow]]\nid = \"spring\"\nto = \"r1\"\nfile = \"q.csv\"\n"
        "[[reach]]\nid = \"r1\"\nto = \"out\"\nlength = 1200.0\nslope = 0.0005\n"
        "manning_n = 0.04\nsection = { shape = \"rectangular\", bottom_width = 4.0 }\n"
        "[[outlet]]\nid = \"out\"\n");
    for (const auto& w : r.summary.wave_numbers) {
      if (w.element != "r1") continue;
      // The warning is given exactly when the number is below Ponce's 85.
      EXPECT_EQ(w.kinematic_number < 85.0, has_warning(r, "r1", "t_r S0 u0/d0"));
      EXPECT_GT(w.time_of_rise_s, 0.0);
      return w.kinematic_number;
    }
    return -1.0;
  };
  const double early = tau_for(10.0), late = tau_for(310.0);
  ASSERT_GT(early, 0.0) << "r1 has applicability numbers";
  EXPECT_LT(early, 85.0) << "a flat, short flood should be flagged";
  EXPECT_NEAR(late, early, 0.1 * early);
}

// A reach draining into a culvert pond that a tailwater keeps at 11.2 m, 1.2 m above the
// reach's outlet invert (and a small barrel), with `study_keys` added to [study].
RunOutcome run_pond_study(const TempDir& dir, const std::string& study_keys) {
  write_text(dir / "q.csv", "time_min,discharge_m3s\n0,0.5\n30,6.0\n90,0.5\n240,0.5\n");
  std::string study = head(4.0);
  study.insert(study.find("[[storm]]"), study_keys);
  return run(dir, study +
      "[[inflow]]\nid = \"spring\"\nto = \"r1\"\nfile = \"q.csv\"\n"
      "[[reach]]\nid = \"r1\"\nto = \"c1\"\n" + kChannel + "outlet_invert = 10.0\n"
      "[[culvert]]\nid = \"c1\"\nto = \"out\"\ntailwater = 11.2\n"
      "barrel = { shape = \"circular\", diameter = 0.6, length = 15.0, inlet_invert = 10.0, "
      "outlet_invert = 9.95, manning_n = 0.012, inlet = \"concrete-square-edge-headwall\" }\n"
      "ponding = { bottom = 10.0, area = 4000.0 }\n"
      "[[outlet]]\nid = \"out\"\n");
}

// Backwater: a pond kept above the reach's outlet water level by a tailwater must be
// reported, even though its peak is below the reach's own peak level.
TEST(RunSummary, BackwaterFromAPondIsReportedWheneverThePondStandsHigher) {
  TempDir dir;
  const RunOutcome r = run_pond_study(dir, "");
  EXPECT_TRUE(has_warning(r, "r1", "backwater"));
  EXPECT_TRUE(has_warning(r, "r1", "set backwater = \"level-pool\" in [study]"));
}

// The same pond with backwater = "level-pool": the reach's lower length is drowned (with
// S0 = 0.002 up to 600 m of the 1200 m reach lies below 11.2 m), the warning says so instead,
// and the run's volume balance holds (the run would refuse to write otherwise).
TEST(RunSummary, BackwaterAsALevelPoolSaysHowMuchOfTheReachWasDrowned) {
  TempDir dir;
  const RunOutcome r = run_pond_study(dir, "backwater = \"level-pool\"\n");
  EXPECT_TRUE(has_warning(r, "r1", "represented as a level pool over the drowned length"));
  EXPECT_FALSE(has_warning(r, "r1", "not represented by the kinematic wave"));
}

// A run that ends while the flood is still rising warns at every station still at its peak;
// the same flood in a long enough run does not.
TEST(RunSummary, WarnsWhenTheRunEndsBeforeThePeak) {
  const std::string network = spring_reach_outlet();
  TempDir short_dir, long_dir;
  for (const TempDir* d : {&short_dir, &long_dir}) {
    write_text(*d / "q.csv", "time_min,discharge_m3s\n0,1.0\n90,8.0\n180,1.0\n300,1.0\n");
  }
  const RunOutcome cut = run(short_dir, head(1.0) + network);
  EXPECT_TRUE(has_warning(cut, "out", "still at its highest when the run ends"));
  const RunOutcome full = run(long_dir, head(5.0) + network);
  EXPECT_FALSE(has_warning(full, "out", "still at its highest"));
}

// Exports carry the routed volume exactly (from the element's ledger), read back by the
// inflow reader; a coarse interval that cuts the peak by more than 2 % is pointed out.
TEST(RunExports, VolumeIsTheRoutedVolumeAndACutPeakIsPointedOut) {
  const auto export_run = [](double interval_min) {
    TempDir dir;
    write_text(dir / "q.csv", "time_min,discharge_m3s\n0,0.5\n62,9.0\n150,0.5\n180,0.5\n");
    write_text(dir / "b.toml", head(3.0) + spring_reach_outlet());
    const Study study = Study::load(dir / "b.toml");
    RunRequest req = request_in(dir);
    req.export_stations = {"out"};
    req.export_interval_s = interval_min * 60.0;
    const RunOutcome r = run_study(study, req);
    const PiecewiseLinearSeries q =
        io::read_hydrograph_csv(dir / "out" / "base" / "s1_out_hydrograph.csv");
    const double routed = station(r, "out").runoff_volume_m3;
    EXPECT_NEAR(q.integral(q.times_s().front(), q.times_s().back()), routed, 1e-6 * routed);
    return has_warning(r, "out", "hydrograph export: the exported peak");
  };
  EXPECT_FALSE(export_run(5.0));   // peak within 2 %
  EXPECT_TRUE(export_run(60.0));   // hourly samples of a 2.5-hour flood: about 20 % low
}

// A 600 mm pipe (n 0.013, S 0.005) carries at most about 1.076 x its full-flow discharge
// Q_full = (1/n)(pi D^2/4)(D/4)^(2/3) S^(1/2) = 0.434 m3/s, i.e. about 0.467 m3/s (Chow 1959,
// circular-section hydraulic elements, from memory). Fed 1.2 m3/s for an hour, it cannot pass
// about (1.2 - 0.467) x 3600 = 2640 m3; a kinematic pipe keeps that water, and the summary
// must say how much it held above its full volume (pi 0.3^2 x 200 = 56.5 m3).
TEST(RunSummary, ASurchargedPipeReportsTheVolumeItHeldAboveFull) {
  TempDir dir;
  write_text(dir / "q.csv", "time_min,discharge_m3s\n0,0.1\n1,1.2\n61,1.2\n62,0.1\n240,0.1\n");
  const RunOutcome r = run(dir, head(4.0) +
      "[[inflow]]\nid = \"up\"\nto = \"pipe\"\nfile = \"q.csv\"\n"
      "[[reach]]\nid = \"pipe\"\nto = \"out\"\nlength = 200.0\nslope = 0.005\n"
      "manning_n = 0.013\nsection = { shape = \"circular\", diameter = 0.6 }\n"
      "[[outlet]]\nid = \"out\"\n");
  const ApplicabilityWarning* w = nullptr;
  for (const auto& x : r.summary.warnings) {
    if (x.element == "pipe" && x.message.find("above its full volume") != std::string::npos) w = &x;
  }
  ASSERT_NE(w, nullptr) << "no surcharge volume reported";
  const auto at = w->message.find("held up to ");
  ASSERT_NE(at, std::string::npos);
  const double held_m3 = std::stod(w->message.substr(at + 11));
  EXPECT_GT(held_m3, 0.9 * (1.2 - 0.467) * 3600.0 - 56.5);
  EXPECT_LT(held_m3, 1.02 * (1.2 - 0.467) * 3600.0);
  EXPECT_NE(w->message.find("full volume of 57 m3"), std::string::npos) << w->message;
}

// A shock is born with no jump and grows as characteristics run into it, so it must be judged
// by its largest jump, not its first. A 1 -> 40 -> 1 m3/s triangle (rise 10-20 min) into a
// 5 km wide channel (b 20 m, S 0.001, n 0.035): the exact solution (characteristics with
// c = dQ/dA of Manning's law and Rankine-Hugoniot shock fitting; Whitham 1974, Linear and
// Nonlinear Waves, ch. 2), computed for this case by an independent script, has the front
// break near 18 m at 10.7 min and reach the outlet at 83.6 min as a jump from 1 to 28.0 m3/s.
TEST(RunSummary, AShockThatGrowsIntoTheFloodFrontIsListed) {
  TempDir dir;
  write_text(dir / "q.csv", "time_min,discharge_m3s\n0,1\n10,1\n20,40\n60,1\n180,1\n");
  const RunOutcome r = run(dir, head(3.0) +
      "[[inflow]]\nid = \"up\"\nto = \"ch\"\nfile = \"q.csv\"\n"
      "[[reach]]\nid = \"ch\"\nto = \"out\"\nlength = 5000.0\nslope = 0.001\n"
      "manning_n = 0.035\nsection = { shape = \"rectangular\", bottom_width = 20.0 }\n"
      "cells = 100\n[[outlet]]\nid = \"out\"\n");
  ASSERT_EQ(r.summary.shocks.size(), 1u);
  const ShockRecord& shock = r.summary.shocks.front();
  EXPECT_EQ(shock.element, "ch");
  EXPECT_NE(shock.message.find("reached the outlet at t = 8"), std::string::npos)
      << shock.message;
  const auto at = shock.message.find("reached the outlet at t = ");
  ASSERT_NE(at, std::string::npos);
  EXPECT_NEAR(std::stod(shock.message.substr(at + 26)), 83.6, 2.0) << shock.message;
}

// A paved 3 ha car park on a 40 m plane answers rain within minutes (Wooding 1965: t_e of
// about 2 min here). With 15-minute coupling steps its rise spans fewer than two steps and
// the run must say so; with the default 60 s steps it does not.
TEST(RunSummary, ACouplingStepLongerThanARiseIsPointedOut) {
  const auto warned = [](double coupling_s) {
    TempDir dir;
    const RunOutcome r = run(dir,
        "[study]\ntitle = \"coupling\"\nunits = \"si\"\nduration_h = 3.0\n"
        "output_interval_min = 15.0\ncoupling_step_s = " + std::to_string(coupling_s) + "\n"
        "[[storm]]\nid = \"s1\"\nmethod = \"alternating-block\"\nduration_min = 30\n"
        "step_min = 5\nidf = { a = 1300.0, b = 10.0, c = 0.75 }\n"
        "[[subcatchment]]\nid = \"car-park\"\nto = \"out\"\narea = 3.0\n"
        "loss = { method = \"none\", impervious_fraction = 1.0 }\n"
        "[[subcatchment.plane]]\nlength = 40.0\nslope = 0.02\nmanning_n = 0.012\ncells = 40\n"
        "[[outlet]]\nid = \"out\"\n");
    return has_warning(r, "car-park", "less than two coupling steps");
  };
  EXPECT_TRUE(warned(900.0));
  EXPECT_FALSE(warned(60.0));
}

// The planned file list is exactly what a run writes, so an existing result can be refused
// before any routing; without --overwrite a second run stops at once and leaves the first
// run's files untouched.
TEST(RunOutputs, PlannedFilesAreWrittenAndAnExistingResultStopsTheRunFirst) {
  TempDir dir;
  write_text(dir / "q.csv", "time_min,discharge_m3s\n0,1.0\n60,3.0\n120,1.0\n");
  write_text(dir / "b.toml", head(2.0) + spring_reach_outlet());
  const Study study = Study::load(dir / "b.toml");
  RunRequest req = request_in(dir);
  req.export_stations = {"out"};
  req.profile_reaches = {"r1"};
  const RunOutcome first = run_study(study, req);
  auto planned = planned_output_files(study, req);
  auto written = first.files;
  std::sort(planned.begin(), planned.end());
  std::sort(written.begin(), written.end());
  EXPECT_EQ(planned, written);

  const auto stamp = std::filesystem::last_write_time(dir / "out" / "base" / "s1.nc");
  EXPECT_THROW((void)run_study(study, req), IoError);
  EXPECT_EQ(std::filesystem::last_write_time(dir / "out" / "base" / "s1.nc"), stamp);
  std::size_t partial = 0;
  for (const auto& e : std::filesystem::directory_iterator(dir / "out" / "base")) {
    partial += e.path().filename().string().find("partial") != std::string::npos;
  }
  EXPECT_EQ(partial, 0u) << "no temporary file is left behind";

  req.overwrite = io::Overwrite::yes;
  EXPECT_NO_THROW(check_run_request(study, req));
}

// A run stopped through its CancelFn (the command line's SIGINT/SIGTERM) leaves nothing: no
// file under a final or temporary name, and not the output folder it created.
TEST(RunStudy, AStoppedRunLeavesNothing) {
  TempDir dir;
  write_text(dir / "q.csv", "time_min,discharge_m3s\n0,1.0\n60,3.0\n120,1.0\n");
  write_text(dir / "b.toml", head(2.0) + spring_reach_outlet());
  const Study study = Study::load(dir / "b.toml");
  int polls = 0;
  EXPECT_THROW((void)run_study(study, request_in(dir), {}, [&polls] { return ++polls > 3; }),
               RunInterrupted);
  EXPECT_GT(polls, 3);
  EXPECT_FALSE(std::filesystem::exists(dir / "out"));
}

// An input problem found only while routing (rain that overflows to infinity) names the study
// file and the storm, and the failed run leaves no output folder behind.
TEST(RunStudy, AProblemFoundWhileRoutingNamesTheFileAndTheStorm) {
  TempDir dir;
  std::string text = head(2.0) +
                     "[[subcatchment]]\nid = \"field\"\nto = \"out\"\narea = 10.0\n"
                     "loss = { method = \"curve-number\", curve_number = 80 }\n"
                     "  [[subcatchment.plane]]\n  length = 80.0\n  slope = 0.03\n"
                     "  manning_n = 0.24\n[[outlet]]\nid = \"out\"\n";
  text.replace(text.find("a = 1300.0"), 10, "a = 1e308");
  write_text(dir / "b.toml", text);
  try {
    (void)run_study(Study::load(dir / "b.toml"), request_in(dir));
    FAIL() << "expected InputError";
  } catch (const InputError& e) {
    ASSERT_FALSE(e.problems().empty());
    EXPECT_EQ(e.problems()[0].file, (dir / "b.toml").string());
    EXPECT_NE(std::string(e.what()).find("storm 's1'"), std::string::npos) << e.what();
  }
  EXPECT_FALSE(std::filesystem::exists(dir / "out"));
}

// A reach may be routed by the diffusion wave (scheme = "muskingum-cunge"). On a mild reach
// a short flood is attenuated by the water surface slope (Hayami 1951: the diffusion wave
// lowers a peak), which the kinematic wave leaves out (Lighthill & Whitham 1955: without a
// shock a peak travels unchanged). The flood is inside the diffusion wave's range (Ponce's
// diffusion number >= 15) and outside the kinematic wave's (kinematic number < 85). Volume
// still balances (simulate() refuses a run that loses water).
TEST(RunSummary, AReachRoutedByTheDiffusionWaveAttenuatesTheFlood) {
  auto run_with = [](const std::string& scheme_line) {
    TempDir dir;
    write_text(dir / "q.csv", "time_min,discharge_m3s\n0,0.5\n10,0.5\n70,12.0\n190,0.5\n600,0.5\n");
    return run(dir, head(10.0) +
        "[[inflow]]\nid = \"spring\"\nto = \"r1\"\nfile = \"q.csv\"\n"
        "[[reach]]\nid = \"r1\"\nto = \"out\"\nlength = 4000.0\nslope = 0.004\n"
        "manning_n = 0.035\nsection = { shape = \"rectangular\", bottom_width = 6.0 }\n" +
        scheme_line + "[[outlet]]\nid = \"out\"\n");
  };
  const RunOutcome k = run_with("scheme = \"characteristics\"\n");
  const RunOutcome d = run_with("scheme = \"muskingum-cunge\"\n");
  const double kinematic = station(k, "out").peak_discharge_m3s;
  const double diffusion = station(d, "out").peak_discharge_m3s;
  ASSERT_FALSE(d.summary.wave_numbers.empty());
  const auto& w = d.summary.wave_numbers.front();
  std::printf("peak out: kinematic %.3f, diffusion %.3f m3/s; numbers %.1f, %.1f\n", kinematic,
              diffusion, w.kinematic_number, w.diffusion_number);
  EXPECT_GE(w.diffusion_number, 15.0);
  EXPECT_LT(w.kinematic_number, 85.0);
  // Exact kinematic: the peak arrives unchanged, within 2 % (the sharp peak of the triangle is
  // seen as means over 60-s coupling steps).
  EXPECT_NEAR(kinematic, 12.0, 0.02 * 12.0);
  // The diffusion wave attenuates it: measured 2.7 %; the quantitative check against Hayami's
  // closed form is in tests/routing/muskingum_cunge_test.cpp.
  EXPECT_LT(diffusion, 0.985 * kinematic);
  EXPECT_GT(diffusion, 0.9 * kinematic);
}

// wave_choice = "automatic": a first pass with the kinematic wave measures each reach's flood,
// and Ponce's criteria (Ponce, Li & Simons 1978; Ponce 1989: kinematic wave where
// t_r S0 u0/d0 >= 85, diffusion wave where only t_r S0 (g/d0)^0.5 >= 15) choose its method.
// Three reaches in a row, steep, mild and flat; the report says which method each used and
// why, and the flat one, which neither wave suits, is warned about.
TEST(RunSummary, AutomaticWaveChoiceFollowsPoncesCriteriaAndSaysWhy) {
  TempDir dir;
  write_text(dir / "q.csv", "time_min,discharge_m3s\n0,0.5\n10,0.5\n70,12.0\n190,0.5\n600,0.5\n");
  std::string text = head(10.0);
  text.insert(text.find("[[storm]]"), "wave_choice = \"automatic\"\n");
  const auto reach = [](const std::string& id, const std::string& to, double slope) {
    return "[[reach]]\nid = \"" + id + "\"\nto = \"" + to + "\"\nlength = 3000.0\nslope = " +
           std::to_string(slope) +
           "\nmanning_n = 0.035\nsection = { shape = \"rectangular\", bottom_width = 6.0 }\n";
  };
  const RunOutcome r = run(dir, text + "[[inflow]]\nid = \"spring\"\nto = \"steep\"\nfile = \"q.csv\"\n" +
                                    reach("steep", "mild", 0.06) + reach("mild", "flat", 0.004) +
                                    reach("flat", "out", 0.0003) + "[[outlet]]\nid = \"out\"\n");
  std::map<std::string, reporting::ReachMethodRecord> method;
  for (const auto& m : r.summary.methods) method[m.element] = m;
  ASSERT_EQ(method.size(), 3u);
  EXPECT_EQ(method["steep"].wave, "kinematic");
  EXPECT_EQ(method["steep"].scheme, "muscl-heun");
  EXPECT_NE(method["steep"].reason.find(">= 85"), std::string::npos) << method["steep"].reason;
  EXPECT_EQ(method["mild"].wave, "diffusion");
  EXPECT_EQ(method["mild"].scheme, "muskingum-cunge");
  EXPECT_NE(method["mild"].reason.find(">= 15"), std::string::npos) << method["mild"].reason;
  EXPECT_EQ(method["flat"].wave, "diffusion");
  EXPECT_NE(method["flat"].reason.find("NEITHER"), std::string::npos) << method["flat"].reason;
  EXPECT_TRUE(has_warning(r, "flat", "dynamic-wave"));
  // The reach the diffusion wave suits is no longer warned about.
  EXPECT_FALSE(has_warning(r, "mild", "t_r S0"));
}

// Without wave_choice the basin file's schemes are used and said so.
TEST(RunSummary, TheReportSaysWhichMethodEachReachUsed) {
  TempDir dir;
  write_text(dir / "q.csv", "time_min,discharge_m3s\n0,1.0\n60,1.0\n");
  const RunOutcome r = run(dir, head(1.0) + spring_reach_outlet());
  ASSERT_EQ(r.summary.methods.size(), 1u);
  EXPECT_EQ(r.summary.methods[0].element, "r1");
  EXPECT_EQ(r.summary.methods[0].scheme, "muscl-heun");
  EXPECT_EQ(r.summary.methods[0].wave, "kinematic");
  EXPECT_EQ(r.summary.methods[0].reason, "as given in the basin file");
}

}  // namespace
}  // namespace freshet::study
