// Hot-start state files: a run's StateArchive (core/state_archive.hpp) in HDF5, with the
// facts that say which run it belongs to. The layout is documented in docs/state-files.md and
// versioned (kStateLayoutVersion); every entry "a/b/c" of the archive is the dataset /a/b/c
// (64-bit IEEE floats, 64-bit signed integers, or a fixed-length string), and the root group's
// attributes carry the header below.
//
//   io::StateFileHeader h{.study_sha256 = ..., .scenario = "", .storm = "aep1-30min", ...};
//   io::write_state_file("runs/hot-3600.h5", h, archive);   // temporary name, then renamed
//   io::StateFile f = io::read_state_file("runs/hot-3600.h5");
//   io::check_state_file(f, "runs/hot-3600.h5", expected);  // refuses another study or storm
//
// Reading refuses, with an InputError naming the file: a file that is not HDF5 or is damaged
// or truncated, a file that is not a freshet state file, another layout version, and contents
// whose SHA-256 differs from the one recorded when the file was written (a changed byte).
// HDF5 calls hold netcdf_global_mutex() (netCDF-4 is built on the same library, which is not
// thread-safe).
#pragma once

#include <cstdint>
#include <filesystem>
#include <string>

#include "freshet/core/state_archive.hpp"

namespace freshet::io {

// Raised whenever the layout changes in a way an older reader could misread.
inline constexpr std::int64_t kStateLayoutVersion = 1;
inline constexpr const char* kStateFormatName = "freshet hot-start state";

struct StateFileHeader {
  std::int64_t layout_version = kStateLayoutVersion;
  std::string study_file;      // the basin file's name as given (for messages)
  std::string study_sha256;    // SHA-256 (hex) of the basin file's bytes
  std::string scenario;        // "" for the base network
  std::string storm;
  std::int64_t step = 0;       // coupling steps done
  double time_s = 0.0;         // the run's time at the end of that step
  std::string content_sha256;  // StateArchive::digest(), filled in by write_state_file
  std::string program_version;
};

struct StateFile {
  StateFileHeader header;
  StateArchive archive;
};

// Writes the header and the archive to a temporary name beside `path` and renames it into
// place when complete (an existing file is replaced). Throws IoError naming the path.
void write_state_file(const std::filesystem::path& path, StateFileHeader header,
                      const StateArchive& archive);

// SHA-256 (hex) of a file's bytes (the basin file's fingerprint in state files and study
// reports); IoError naming the path when it cannot be read.
[[nodiscard]] std::string file_sha256(const std::filesystem::path& path);

// Reads a state file; throws InputError naming `path` and what is wrong (see above).
[[nodiscard]] StateFile read_state_file(const std::filesystem::path& path);

// Throws InputError naming `path` and the mismatch unless the file was saved from the same
// basin file (by SHA-256), the same scenario and the same storm as `expected`.
void check_state_file(const StateFile& file, const std::filesystem::path& path,
                      const StateFileHeader& expected);

}  // namespace freshet::io
