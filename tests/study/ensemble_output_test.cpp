// The ensemble's outputs: thresholds declared in the basin file (read and checked), the summary
// of the members (percentiles, exceedance, convergence) against counts and published closed
// forms, and the files written as one result set.
#include "freshet/study/ensemble_output.hpp"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <fstream>
#include <iostream>
#include <sstream>
#include <string>
#include <vector>

#include "ensemble_fixture.hpp"
#include "freshet/study/ensemble_run.hpp"
#include "freshet/study/study.hpp"
#include "freshet/uncertainty/distribution.hpp"
#include "freshet/uncertainty/ensemble_statistics.hpp"
#include "freshet/uncertainty/sampling.hpp"
#include "freshet/verification/problems.hpp"

namespace freshet::study {
namespace {

using testing::Fixture;
using testing::kBasin;

std::string uncertainty_section(int members, const std::string& thresholds) {
  return "\n[uncertainty]\nmembers = " + std::to_string(members) + R"(
seed = 3

[[uncertainty.vary]]
elements = ["hill"]
field = "loss.curve_number"
distribution = "antecedent-moisture"
)" + thresholds;
}

// Line numbers in kBasin + uncertainty_section(...): the section opens at line_after_basin(2).
int line_after_basin(int offset) {
  return static_cast<int>(std::count(kBasin.begin(), kBasin.end(), '\n')) + offset;
}

TEST(EnsembleThresholds, ReadInTheFileUnitsAndChecked) {
  Fixture f(kBasin + uncertainty_section(8, R"(
[[uncertainty.threshold]]
name = "footpath"
station = "r1"
stage = 0.4

[[uncertainty.threshold]]
name = "pipe"
station = "r1"
discharge = 1.5
)"));
  const Study study = Study::load(f.basin);
  ASSERT_EQ(study.ensemble()->thresholds.size(), 2u);
  EXPECT_EQ(study.ensemble()->thresholds[0].quantity, uncertainty::PeakQuantity::stage);
  EXPECT_DOUBLE_EQ(study.ensemble()->thresholds[0].value_si, 0.4);
  EXPECT_EQ(study.ensemble()->thresholds[1].quantity, uncertainty::PeakQuantity::discharge);
  EXPECT_EQ(study.ensemble()->thresholds[1].line, line_after_basin(16));
}

TEST(EnsembleThresholds, BadDeclarationsNameFileLineEntryAndField) {
  Fixture f(kBasin + uncertainty_section(8, R"(
[[uncertainty.threshold]]
name = "nowhere"
station = "r9"
stage = 0.4

[[uncertainty.threshold]]
name = "both"
station = "r1"
stage = 0.4
discharge = 1.0

[[uncertainty.threshold]]
name = "negative"
station = "r1"
discharge = -1.0
colour = "red"
)"));
  const std::string what = f.load_error();
  const std::string file = f.basin.string();
  EXPECT_NE(what.find(file + ":" + std::to_string(line_after_basin(13)) +
                      ":11: uncertainty threshold[1], field 'station' = 'r9': names "
                      "no element"),
            std::string::npos)
      << what;
  EXPECT_NE(what.find(file + ":" + std::to_string(line_after_basin(16)) +
                      ":1: uncertainty threshold[2], give one of 'stage'"),
            std::string::npos)
      << what;
  EXPECT_NE(what.find("uncertainty threshold[3], field 'discharge'"), std::string::npos) << what;
  EXPECT_NE(what.find("uncertainty threshold[3], field 'colour'"), std::string::npos) << what;
}

TEST(EnsembleOutputs, OneMemberOrNoSectionIsRefusedBeforeRouting) {
  Fixture one(kBasin + uncertainty_section(1, ""));
  const Study study = Study::load(one.basin);
  try {
    check_ensemble_study(study);
    FAIL() << "one member accepted";
  } catch (const InputError& e) {
    EXPECT_NE(
        std::string(e.what()).find(one.basin.string() + ":" + std::to_string(line_after_basin(2)) +
                                   ": uncertainty, field 'members' "
                                   "= 1: an ensemble needs at least 2 members"),
        std::string::npos)
        << e.what();
  }
  Fixture none(kBasin);
  EXPECT_THROW(check_ensemble_study(Study::load(none.basin)), InputError);
}

TEST(EnsembleOutputs, ExceedanceIsTheCountOfMembersAboveAndFilesAppearTogether) {
  // The threshold sits at the members' median peak discharge, so about half exceed it; the
  // reported count must equal a count made here on the same members (no source needed: the
  // definition of the estimate, the fraction of members above).
  Fixture f(kBasin + uncertainty_section(8, ""));
  Study probe = Study::load(f.basin);
  const EnsembleOutcome first = run_ensemble(probe, {"", "s1", 2});
  const auto& r2 = *std::find_if(first.stations.begin(),
                                 first.stations.end(),
                                 [](const StationEnsemble& s) { return s.id == "r2"; });
  const double median = uncertainty::percentile(r2.peak_discharge_m3s, 50.0);
  std::ostringstream threshold;
  threshold.precision(17);
  threshold << "\n[[uncertainty.threshold]]\nname = \"median\"\nstation = \"r2\"\ndischarge = "
            << median << "\n";
  Fixture g(kBasin + uncertainty_section(8, threshold.str()));
  const Study study = Study::load(g.basin);
  const EnsembleOutcome e = run_ensemble(study, {"", "s1", 2});
  const EnsembleWritten w =
      write_ensemble_outputs(study, e, {g.dir / "out", io::Overwrite::no, "test", "freshet test"});
  ASSERT_EQ(w.summary.exceedances.size(), 1u);
  const auto count = static_cast<std::size_t>(
      std::count_if(r2.peak_discharge_m3s.begin(), r2.peak_discharge_m3s.end(), [median](double q) {
        return q > median;
      }));
  EXPECT_EQ(w.summary.exceedances[0].exceeded, count);
  EXPECT_DOUBLE_EQ(w.summary.exceedances[0].probability, static_cast<double>(count) / 8.0);
  EXPECT_EQ(count, 4u);  // 8 distinct peaks: 4 strictly above their median
  // Convergence sizes for 12 members: 12/8 = 1 (dropped), 3, 6, 12.
  EXPECT_EQ(uncertainty::convergence_sizes(12), (std::vector<std::size_t>{3, 6, 12}));
  // The files, the JSON last; nothing left under a temporary name.
  ASSERT_FALSE(w.files.empty());
  EXPECT_EQ(w.files.back().filename(), "s1_ensemble.json");
  for (const auto& p : planned_ensemble_files(g.dir / "out", "", "s1")) {
    EXPECT_TRUE(std::filesystem::exists(p)) << p;
  }
  for (const auto& entry : std::filesystem::directory_iterator(g.dir / "out" / "base")) {
    EXPECT_EQ(entry.path().filename().string().find(".partial"), std::string::npos) << entry.path();
  }
  // A second write without overwrite is refused and leaves the first files alone.
  EXPECT_THROW((void)write_ensemble_outputs(
                   study, e, {g.dir / "out", io::Overwrite::no, "test", "freshet test"}),
               IoError);
}

// A linear reservoir O = S / K with a sampled storage constant K, under a rectangular inflow
// pulse I for 0 <= t <= T from empty: O(t) = I (1 - exp(-t / K)) while the inflow lasts, so the
// outflow peaks at t = T with Q_p = I (1 - exp(-T / K)) (Chow, Maidment & Mays 1988, Applied
// Hydrology, ch. 8, the linear reservoir's response to a constant inflow; section from memory).
// Q_p falls as K grows, so with K ~ F_K, P(Q_p <= q) = 1 - F_K(K(q)), K(q) = -T / ln(1 - q / I).
// Each member is routed by freshet's level pool, its record collated as any member's; the
// members' peaks must pass the one-sample Kolmogorov-Smirnov test at the 1 % level against
// that distribution (Press et al. 2007, Numerical Recipes, sec. 14.3.3), and a distribution
// with K 10 % larger must be rejected at the same level.
MemberRecord route_linear_reservoir(double k_s, double inflow_m3s, double pulse_s) {
  network::structures::LevelPool pool = verification::linear_reservoir(k_s);
  pool.reset(0.0, 0.0);
  MemberRecord r;
  r.station_ids = {"reservoir"};
  r.discharge_m3s.resize(1);
  r.stage_m.resize(1);
  const double dt = 60.0, end = 3.0 * pulse_s;
  double volume = 0.0, peak = 0.0, peak_time = 0.0;
  for (double t = 0.0; t < end - 1e-9; t += dt) {
    if (std::fmod(t, 300.0) < 1e-9) {
      r.times_s.push_back(t);
      r.discharge_m3s[0].push_back(pool.state().outflow_m3s);
      r.stage_m[0].push_back(pool.state().stage_m);
    }
    volume += pool.advance(t, t + dt, t < pulse_s - 1e-9 ? inflow_m3s : 0.0).outflow_volume_m3;
    if (pool.state().outflow_m3s > peak) {
      peak = pool.state().outflow_m3s;
      peak_time = t + dt;
    }
  }
  r.peak_discharge_m3s = {peak};
  r.peak_stage_m = {pool.state().stage_m};
  r.peak_time_s = {peak_time};
  r.outflow_volume_m3 = {volume};
  return r;
}

TEST(EnsembleOutputs, LinearReservoirPeaksFollowTheClosedForm) {
  const double inflow = 2.0, pulse = 3600.0;
  const uncertainty::Distribution k_dist = uncertainty::Uniform{1800.0, 7200.0};
  const std::size_t members = 200;
  const uncertainty::SampleTable sample =
      uncertainty::draw_sample({k_dist}, members, uncertainty::SamplingMethod::monte_carlo, 11);
  std::vector<MemberRecord> records;
  for (const auto& row : sample) records.push_back(route_linear_reservoir(row[0], inflow, pulse));
  const EnsembleOutcome e = collate_members(records, {"", "pulse", 1}, {5.0, 50.0, 95.0});
  ASSERT_EQ(e.stations.size(), 1u);
  const std::vector<double>& peaks = e.stations[0].peak_discharge_m3s;
  const auto closed_form = [&](double scale) {
    return [&, scale](double q) {
      if (q <= 0.0) return 0.0;
      if (q >= inflow) return 1.0;
      return 1.0 - uncertainty::cdf(k_dist, -pulse / std::log(1.0 - q / inflow) / scale);
    };
  };
  const uncertainty::KsResult right = uncertainty::kolmogorov_smirnov(peaks, closed_form(1.0));
  const uncertainty::KsResult wrong = uncertainty::kolmogorov_smirnov(peaks, closed_form(1.1));
  EXPECT_GT(right.p_value, 0.01) << "D = " << right.statistic;
  EXPECT_LT(wrong.p_value, 0.01) << "D = " << wrong.statistic;
  // Each member's peak against its own closed form: the level pool's trapezoidal steps of 60 s
  // against K >= 1800 s agree to 1e-3 relative (second-order error (dt / K)^2 / 12 ~ 1e-4).
  for (std::size_t m = 0; m < members; ++m) {
    const double exact = inflow * (1.0 - std::exp(-pulse / sample[m][0]));
    EXPECT_NEAR(peaks[m], exact, 1e-3 * exact) << "member " << m;
    EXPECT_NEAR(e.stations[0].peak_time_s[m], pulse, 60.0);
  }
  std::cout << "linear reservoir: KS D = " << right.statistic << ", p = " << right.p_value
            << "; K 10 % larger: D = " << wrong.statistic << ", p = " << wrong.p_value << "\n";
}

}  // namespace
}  // namespace freshet::study
