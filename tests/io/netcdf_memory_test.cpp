// Streaming check: writing a 30-day run at 1-minute output must not need more memory than a
// 1-day run (peak resident set, VmHWM from /proc/self/status, proc(5)), i.e. nothing grows with
// run length. The 10 % allowance is common practice, no source. Its own executable, so the peak
// is not raised by other tests.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <fstream>
#include <string>
#include <vector>

#include "freshet/io/netcdf_writer.hpp"
#include "temp_dir.hpp"

// Under AddressSanitizer the memory check is skipped (under_asan.hpp).
#include "under_asan.hpp"

namespace freshet::io {
namespace {

long peak_resident_kib() {
  std::ifstream status("/proc/self/status");
  for (std::string line; std::getline(status, line);) {
    if (line.rfind("VmHWM:", 0) == 0) return std::stol(line.substr(6));
  }
  return -1;
}

void write_run(const std::filesystem::path& path, std::size_t records) {
  const std::size_t n = 20;
  InstanceSet s;
  for (std::size_t i = 0; i < n; ++i) {
    s.instances.push_back({"st-" + std::to_string(i), "station " + std::to_string(i), "r1",
                           100.0 * static_cast<double>(i), NAN, NAN});
  }
  NetcdfRunMetadata m;
  m.title = "streaming memory check";
  m.source = "freshet test";
  m.history = "2024-05-01T10:00:00Z io_memory_tests";
  m.time_origin = "2000-01-01";
  const std::vector<OutputVariable> vars{OutputVariable::discharge, OutputVariable::stage,
                                         OutputVariable::depth, OutputVariable::velocity};
  NetcdfTimeSeriesWriter w(path);
  w.begin(m, s, vars);
  std::vector<double> row(vars.size() * n);
  for (std::size_t k = 0; k < records; ++k) {
    for (std::size_t j = 0; j < row.size(); ++j) {
      row[j] = 1.0 + 1e-3 * static_cast<double>((k * 7 + j * 13) % 1000);
    }
    w.record(60.0 * static_cast<double>(k), row);
  }
  w.commit();
}

TEST(NetcdfStreaming, ThirtyDayRunNeedsNoMoreMemoryThanOneDayRun) {
  if (FRESHET_UNDER_ASAN) GTEST_SKIP() << "peak memory is not meaningful under AddressSanitizer";
  testing::TempDir dir;
  write_run(dir / "day.nc", 1440);
  const long one_day_kib = peak_resident_kib();
  write_run(dir / "month.nc", 30 * 1440);
  const long thirty_day_kib = peak_resident_kib();
  ASSERT_GT(one_day_kib, 0);
  RecordProperty("vmhwm_one_day_kib", std::to_string(one_day_kib));
  RecordProperty("vmhwm_thirty_day_kib", std::to_string(thirty_day_kib));
  std::printf("VmHWM after 1-day run: %ld KiB, after 30-day run: %ld KiB\n", one_day_kib,
              thirty_day_kib);
  EXPECT_LT(static_cast<double>(thirty_day_kib - one_day_kib), 0.10 * static_cast<double>(one_day_kib));
}

}  // namespace
}  // namespace freshet::io
