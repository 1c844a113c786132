// Atomic output files: a result appears under its final name complete, or not at all.
//
// Every output freshet writes goes first to `<final>.partial` in the same directory (so the
// final rename never crosses a file system). commit() flushes, fsyncs and closes the file,
// checks every step for errors (a full disk shows up in write, fsync or close), then renames
// it into place. An object destroyed before commit() removes its temporary file. An existing
// final file is replaced only when Overwrite::yes is given; otherwise the constructor throws
// IoError naming the path, and commit() re-checks atomically (Linux renameat2 with
// RENAME_NOREPLACE) so a file created meanwhile is not clobbered either.
//
//   freshet::io::AtomicFile out("results/peaks.csv", freshet::io::Overwrite::no);
//   out.write("station_id,peak_discharge_m3s\n");
//   out.write("mill-outlet,12.5\n");
//   out.commit();   // results/peaks.csv now exists; before this line it did not
//
// AtomicOutputPath is the same life cycle for writers that open the file themselves
// (the NetCDF writer): it owns the temporary name and the rename, not the bytes.
#pragma once

#include <filesystem>
#include <string>
#include <string_view>

namespace freshet::io {

enum class Overwrite { no, yes };

// Throws IoError when `final_path` exists and overwriting is not allowed: the check every
// writer makes on construction, for callers that want it before any work starts.
void require_absent(const std::filesystem::path& final_path, Overwrite overwrite);

// Owns `<final>.partial`: removes it on destruction unless commit() succeeded.
class AtomicOutputPath {
 public:
  // Throws IoError naming `final_path` when it exists and `overwrite` is no, or when its
  // directory does not exist.
  explicit AtomicOutputPath(std::filesystem::path final_path, Overwrite overwrite = Overwrite::no);
  ~AtomicOutputPath();  // noexcept: removes the temporary file when not committed
  AtomicOutputPath(const AtomicOutputPath&) = delete;
  AtomicOutputPath& operator=(const AtomicOutputPath&) = delete;

  [[nodiscard]] const std::filesystem::path& final_path() const noexcept { return final_; }
  [[nodiscard]] const std::filesystem::path& partial_path() const noexcept { return partial_; }
  [[nodiscard]] bool committed() const noexcept { return committed_; }

  // Renames the (already closed) temporary file to the final name. Throws IoError naming both
  // paths on failure, including "exists" when overwrite is no and the final name was taken.
  void commit();
  // Removes the temporary file now (ignores errors); the object is then inert.
  void discard() noexcept;

 private:
  std::filesystem::path final_;
  std::filesystem::path partial_;
  Overwrite overwrite_;
  bool committed_ = false;
};

// A text/binary file written through a POSIX descriptor with every call checked.
class AtomicFile {
 public:
  // Creates `<final>.partial` (truncating a stale one). Throws IoError naming the path.
  explicit AtomicFile(std::filesystem::path final_path, Overwrite overwrite = Overwrite::no);
  ~AtomicFile();  // noexcept: closes and removes the temporary file when not committed
  AtomicFile(const AtomicFile&) = delete;
  AtomicFile& operator=(const AtomicFile&) = delete;

  // Appends bytes (buffered). Throws IoError naming the path on a failed write (e.g. ENOSPC).
  void write(std::string_view bytes);
  // Flushes, fsyncs, closes, checks, renames. Throws IoError naming the path on any failure;
  // the temporary file is then removed by the destructor and the final name is untouched.
  void commit();

  [[nodiscard]] const std::filesystem::path& final_path() const noexcept {
    return path_.final_path();
  }
  [[nodiscard]] const std::filesystem::path& partial_path() const noexcept {
    return path_.partial_path();
  }

 private:
  void flush_buffer();
  void close_descriptor() noexcept;

  AtomicOutputPath path_;
  int fd_ = -1;
  std::string buffer_;
};

// Writes `content` to `final_path` atomically (one AtomicFile, one commit).
void write_file_atomically(const std::filesystem::path& final_path, std::string_view content,
                           Overwrite overwrite = Overwrite::no);

}  // namespace freshet::io
