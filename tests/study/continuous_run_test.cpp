// The continuous example of the documentation (docs/examples/continuous/: 90 days of invented
// hourly rain on a Horton catchment whose capacity recovers between bursts) run end to end:
//   - memory does not grow with the length of the record: the resident set (VmRSS,
//     /proc/self/status, proc(5)) sampled at every output from day 10 to day 90 stays within
//     10 % of its value at day 10 (the allowance is common practice, no source);
//   - the catchment's rain is the gauge record's total (270 mm on 35 ha = 94 500 m3) and its
//     balance closes (rain = loss + runoff + storage);
//   - recovery between bursts takes runoff away: without it the later bursts fall on the
//     capacity the earlier ones left (Horton 1940; the recovery curve of Bedient, Huber & Vieux,
//     Hydrology and Floodplain Analysis, ch. 2, from memory), so the same record runs off more.
// Its own executable, so that other tests do not disturb the resident set.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include "freshet/study/study_run.hpp"
#include "../io/temp_dir.hpp"

// Under AddressSanitizer the memory check is skipped (under_asan.hpp).
#include "../io/under_asan.hpp"

namespace freshet::study {
namespace {

using io::testing::TempDir;

const std::filesystem::path kExample =
    std::filesystem::path(FRESHET_SOURCE_DIR) / "docs" / "examples" / "continuous";

long resident_kib() {
  std::ifstream status("/proc/self/status");
  for (std::string line; std::getline(status, line);) {
    if (line.rfind("VmRSS:", 0) == 0) return std::stol(line.substr(6));
  }
  return -1;
}

std::string read_text(const std::filesystem::path& p) {
  std::ifstream in(p);
  std::stringstream s;
  s << in.rdbuf();
  return s.str();
}

// The example copied into `dir`, with `edit` applied to the basin text.
std::filesystem::path copy_example(const TempDir& dir, const std::string& from,
                                   const std::string& to) {
  std::string basin = read_text(kExample / "basin.toml");
  if (!from.empty()) {
    const auto at = basin.find(from);
    if (at == std::string::npos) throw std::runtime_error("no '" + from + "' in the example");
    basin.replace(at, from.size(), to);
  }
  std::ofstream(dir / "basin.toml") << basin;
  std::filesystem::copy_file(kExample / "gauge.csv", dir / "gauge.csv");
  return dir / "basin.toml";
}

RunRequest request_in(const TempDir& dir) {
  RunRequest req;
  req.storm_id = "gauge-90d";
  req.out_dir = dir / "out";
  req.source = "freshet test";
  return req;
}

const reporting::StationSummary& station(const RunOutcome& r, const std::string& id) {
  for (const auto& s : r.summary.stations) {
    if (s.station_id == id) return s;
  }
  throw std::runtime_error("no station " + id);
}

TEST(ContinuousRun, NinetyDaysInFlatMemoryWithLossesRecoveringBetweenBursts) {
  TempDir dir;
  const Study study = Study::load(copy_example(dir, "", ""));
  long day10_kib = -1, largest_after_kib = -1;
  const auto progress = [&](double fraction) {
    if (fraction < 10.0 / 90.0) return;
    const long now = resident_kib();
    if (day10_kib < 0) day10_kib = now;
    largest_after_kib = std::max(largest_after_kib, now);
  };
  const RunOutcome r = run_study(study, request_in(dir), progress);
  std::printf("VmRSS at day 10: %ld KiB, largest from day 10 to day 90: %ld KiB\n", day10_kib,
              largest_after_kib);
  RecordProperty("vmrss_day10_kib", std::to_string(day10_kib));
  RecordProperty("vmrss_max_day10_to_90_kib", std::to_string(largest_after_kib));
  if (!FRESHET_UNDER_ASAN) {
    ASSERT_GT(day10_kib, 0);
    EXPECT_LT(static_cast<double>(largest_after_kib - day10_kib),
              0.10 * static_cast<double>(day10_kib));
  }

  // 270 mm of the gauge record on 35 ha.
  const double rain_m3 = 0.270 * 35.0e4;
  bool found = false;
  for (const auto& b : r.numerics.balances) {
    if (b.id != "wrenfield") continue;
    found = true;
    EXPECT_NEAR(b.ledger.rain_m3, rain_m3, 1e-9 * rain_m3);
    EXPECT_LT(std::abs(b.ledger.balance_error_m3()), 1e-9 * rain_m3);
  }
  EXPECT_TRUE(found);

  TempDir kept_dir;
  const Study kept = Study::load(copy_example(kept_dir, ", recovery_per_h = 0.05", ""));
  const RunOutcome no_recovery = run_study(kept, request_in(kept_dir));
  const double with_m3 = station(r, "wren-outlet").runoff_volume_m3;
  const double without_m3 = station(no_recovery, "wren-outlet").runoff_volume_m3;
  std::printf("runoff at the outlet: %.1f m3 with recovery, %.1f m3 without\n", with_m3,
              without_m3);
  EXPECT_LT(with_m3, 0.8 * without_m3);
  EXPECT_GT(with_m3, 0.0);
}

}  // namespace
}  // namespace freshet::study
