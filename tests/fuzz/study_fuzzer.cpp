// libFuzzer target: a basin file (TOML) read and checked as `freshet check` does it
// (study::Study::load, then the summary check prints: stations, storm depths, late-storm warnings,
// scenarios). The input is written to a scratch folder laid out like the repository, so the
// CSV files the seeds name (../hydrographs/quarry-spring.csv, triangle.csv) resolve.
#include <unistd.h>

#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <limits>
#include <string>
#include <system_error>

#include "freshet/study/study.hpp"
#include "fuzz_support.hpp"

namespace {

namespace fs = std::filesystem;

fs::path scratch_root;  // removed at exit
fs::path basin_path;    // <scratch>/basins/fuzz.toml, rewritten for every input

void remove_scratch() {
  std::error_code ignored;
  if (!scratch_root.empty()) fs::remove_all(scratch_root, ignored);
}

void copy_data_file(const fs::path& from, const fs::path& to) {
  fs::create_directories(to.parent_path());
  fs::copy_file(from, to, fs::copy_options::overwrite_existing);
}

void write_input(const uint8_t* data, size_t size) {
  std::ofstream out(basin_path, std::ios::binary | std::ios::trunc);
  out.write(reinterpret_cast<const char*>(data), static_cast<std::streamsize>(size));
  if (!out) freshet::fuzz::report_finding("cannot write the scratch basin file (disk full?)");
}

// What `freshet check` does with a study after loading it (src/cli/check_command.cpp). A storm
// the file accepted must have a finite, non-negative depth (check prints it).
void summarise(const freshet::study::Study& study) {
  std::size_t text_size = study.stations().size();
  for (const auto& storm : study.storms()) {
    const double depth_m = storm.rain.total_depth_m();
    if (!(depth_m >= 0.0 && depth_m < std::numeric_limits<double>::infinity())) {
      freshet::fuzz::report_finding("storm '" + storm.id + "' accepted with total depth " +
                                    freshet::format_value(depth_m) + " m");
    }
    if (storm.ends_after_run) text_size += storm.ends_after_run->to_string().size();
  }
  for (const auto& scenario : study.scenarios()) text_size += study.stations(scenario.id).size();
  static volatile std::size_t sink = 0;
  sink = sink + text_size;
}

}  // namespace

extern "C" int LLVMFuzzerInitialize(int* /*argc*/, char*** /*argv*/) {
  const char* tmp = std::getenv("TMPDIR");
  std::string pattern = std::string(tmp && *tmp ? tmp : "/tmp") + "/freshet-fuzz-study-XXXXXX";
  if (!mkdtemp(pattern.data())) freshet::fuzz::report_finding("mkdtemp failed");
  scratch_root = pattern;
  std::atexit(remove_scratch);
  const fs::path source = FRESHET_SOURCE_DIR;
  copy_data_file(source / "hydrographs/quarry-spring.csv",
                 scratch_root / "hydrographs/quarry-spring.csv");
  copy_data_file(source / "tests/outputs/data/triangle.csv", scratch_root / "basins/triangle.csv");
  copy_data_file(source / "tests/fuzz/csv_series/seeds/rain-depth.csv",
                 scratch_root / "basins/rain.csv");
  basin_path = scratch_root / "basins/fuzz.toml";
  return 0;
}

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  write_input(data, size);
  freshet::fuzz::expect_documented_outcome(
      [] { summarise(freshet::study::Study::load(basin_path)); },
      /*problems_name_a_file=*/true);
  return 0;
}
