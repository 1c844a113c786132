// Atomic output files: a result appears under its final name complete, or not at all; the
// files of one run appear together, or not at all.
//
// Temporary names. Every output is first written under a hidden temporary name in the
// directory of its final name (so the rename never crosses a file system):
// `.<final file name>.freshet-<pid>-<8 hex digits>.partial`, made unique by the process id and
// a random part and created exclusively (O_EXCL), so two writers never share a temporary file.
// commit() flushes, fsyncs and closes the file, checks every step for errors (a full disk shows
// up in write, fsync or close), then renames it into place. An object destroyed before
// commit() removes its temporary file. An existing final file is replaced only when
// Overwrite::yes is given; otherwise the constructor throws IoError naming the path, and
// commit() re-checks atomically (Linux renameat2 with RENAME_NOREPLACE) so a file created
// meanwhile is not clobbered either. A process killed outright (SIGKILL) cannot remove its
// temporary file: the next writer of the same final name removes it once its process is gone.
//
//   freshet::io::AtomicFile out("results/peaks.csv", freshet::io::Overwrite::no);
//   out.write("station_id,peak_discharge_m3s\n");
//   out.write("mill-outlet,12.5\n");
//   out.commit();   // results/peaks.csv now exists; before this line it did not
//
// Result sets. An OutputSet groups the files of one run: each file is written into the set's
// staging folder (`<folder>/.<label>.freshet-<pid>-<hex>.partial/`), a file's own commit() only
// completes it there, and OutputSet::commit() renames every file into place, the set's marker
// file last. Until then no file of the set is under a final name; a set destroyed uncommitted
// removes its staging folder. docs/outputs.md states the guarantee and its limits.
//
//   OutputFolderLock::Handle lock = OutputFolderLock::acquire("out/base");  // one run per folder
//   OutputSet set("out/base", "aep1-60min", Overwrite::no);
//   write_file_atomically("out/base/a.csv", "...", Overwrite::no, &set);
//   write_file_atomically("out/base/b.json", "...", Overwrite::no, &set);
//   set.commit("out/base/b.json");   // both appear now; b.json (the marker) last
//
// AtomicOutputPath is the same life cycle for writers that open the file themselves
// (the NetCDF writer): it owns the temporary name and the rename, not the bytes.
#pragma once

#include <filesystem>
#include <memory>
#include <string>
#include <string_view>
#include <vector>

namespace freshet::io {

enum class Overwrite { no, yes };

class OutputSet;

// Throws IoError when `final_path` exists and overwriting is not allowed: the check every
// writer makes on construction, for callers that want it before any work starts.
void require_absent(const std::filesystem::path& final_path, Overwrite overwrite);

// `.<stem>.freshet-<pid>-<8 random hex digits>.partial`: the hidden temporary name freshet
// gives a file or staging folder while it is being written.
std::string temporary_name(std::string_view stem);
// The process id recorded in a name made by temporary_name(), or 0 when `name` is not one.
long temporary_name_pid(std::string_view name);

// Owns the temporary name of one output: removes it on destruction unless commit() succeeded.
class AtomicOutputPath {
 public:
  // Throws IoError naming `final_path` when it exists and `overwrite` is no, or when its
  // directory does not exist. With a `set`, the temporary name is in the set's staging folder
  // and commit() hands the completed file to the set instead of renaming it.
  explicit AtomicOutputPath(std::filesystem::path final_path,
                            Overwrite overwrite = Overwrite::no,
                            OutputSet* set = nullptr);
  ~AtomicOutputPath();  // noexcept: removes the temporary file when not committed
  AtomicOutputPath(const AtomicOutputPath&) = delete;
  AtomicOutputPath& operator=(const AtomicOutputPath&) = delete;

  [[nodiscard]] const std::filesystem::path& final_path() const noexcept { return final_; }
  [[nodiscard]] const std::filesystem::path& partial_path() const noexcept { return partial_; }
  [[nodiscard]] bool committed() const noexcept { return committed_; }

  // Renames the (already closed) temporary file to the final name, or, in a set, marks it
  // complete. Throws IoError naming both paths on failure, including "exists" when overwrite
  // is no and the final name was taken.
  void commit();
  // Removes the temporary file now (ignores errors); the object is then inert.
  void discard() noexcept;

 private:
  std::filesystem::path final_;
  std::filesystem::path partial_;
  Overwrite overwrite_;
  OutputSet* set_ = nullptr;
  bool committed_ = false;
};

// A text/binary file written through a POSIX descriptor with every call checked.
class AtomicFile {
 public:
  // Creates the temporary file exclusively. Throws IoError naming the path.
  explicit AtomicFile(std::filesystem::path final_path,
                      Overwrite overwrite = Overwrite::no,
                      OutputSet* set = nullptr);
  ~AtomicFile();  // noexcept: closes and removes the temporary file when not committed
  AtomicFile(const AtomicFile&) = delete;
  AtomicFile& operator=(const AtomicFile&) = delete;

  // Appends bytes (buffered). Throws IoError naming the path on a failed write (e.g. ENOSPC).
  void write(std::string_view bytes);
  // Flushes, fsyncs, closes, checks, renames (or completes it in its set). Throws IoError
  // naming the path on any failure; the temporary file is then removed by the destructor and
  // the final name is untouched.
  void commit();

  [[nodiscard]] const std::filesystem::path& final_path() const noexcept {
    return path_.final_path();
  }
  [[nodiscard]] const std::filesystem::path& partial_path() const noexcept {
    return path_.partial_path();
  }

 private:
  void flush_buffer();
  void write_through(std::string_view bytes);  // every byte to the descriptor, or IoError
  void close_descriptor() noexcept;

  AtomicOutputPath path_;
  int fd_ = -1;
  std::string buffer_;
};

// Writes `content` to `final_path` atomically (one AtomicFile, one commit).
void write_file_atomically(const std::filesystem::path& final_path, std::string_view content,
                           Overwrite overwrite = Overwrite::no, OutputSet* set = nullptr);

// The files of one run, staged in a private folder and renamed into place together.
class OutputSet {
 public:
  // Creates the staging folder `<folder>/.<label>.freshet-<pid>-<hex>.partial` (IoError naming
  // the folder on failure). Every file of the set must have its final name in `folder`.
  OutputSet(std::filesystem::path folder, std::string_view label, Overwrite overwrite);
  ~OutputSet();  // noexcept: removes the staging folder and its files unless committed
  OutputSet(const OutputSet&) = delete;
  OutputSet& operator=(const OutputSet&) = delete;

  [[nodiscard]] const std::filesystem::path& folder() const noexcept { return folder_; }
  [[nodiscard]] const std::filesystem::path& staging_folder() const noexcept { return staging_; }
  // Where the file with this final name is written until the set is committed.
  [[nodiscard]] std::filesystem::path staged_path(const std::filesystem::path& final_path) const;
  // Called by AtomicOutputPath::commit(): the staged file for `final_path` is complete.
  void add_complete(const std::filesystem::path& final_path);

  // Renames every completed file into place, `marker` last (with Overwrite::yes an old marker
  // is removed before the first rename, so a present marker always belongs to a complete
  // set), syncs the folder and removes the staging folder. Without Overwrite::yes every final
  // name is checked first and each rename refuses to replace a file. On failure (IoError
  // naming the path) the files of the set already renamed are removed again. Returns the final
  // paths, marker last.
  std::vector<std::filesystem::path> commit(const std::filesystem::path& marker);

 private:
  std::filesystem::path folder_;
  std::filesystem::path staging_;
  Overwrite overwrite_;
  std::vector<std::filesystem::path> complete_;  // final paths, in completion order
  bool committed_ = false;
};

// An exclusive lock on an output folder, held by one process at a time (flock(2) on
// `<folder>/.freshet.lock`, which holds the holder's process id). The lock is released when
// the last handle in the process goes, or when the process ends in any way (the kernel drops
// flock locks of a dead process), so a killed run never leaves the folder locked. Every run of
// one process writing into the folder shares the one lock.
class OutputFolderLock {
 public:
  using Handle = std::shared_ptr<OutputFolderLock>;
  // Creates the folder if needed and takes the lock. IoError naming the folder when it cannot
  // be created or written, or when another process holds the lock (naming that process).
  // Taking the lock first in this process removes what killed runs left in the folder:
  // staging folders and temporary files (temporary_name()) of processes no longer running.
  static Handle acquire(const std::filesystem::path& folder);
  ~OutputFolderLock();  // removes the lock file, then the folders acquire() created if empty

  OutputFolderLock(const OutputFolderLock&) = delete;
  OutputFolderLock& operator=(const OutputFolderLock&) = delete;

  [[nodiscard]] const std::filesystem::path& folder() const noexcept { return folder_; }
  // The leftovers removed by acquire(), for the caller to report.
  [[nodiscard]] const std::vector<std::filesystem::path>& removed_leftovers() const noexcept {
    return removed_;
  }

 private:
  OutputFolderLock() = default;
  std::filesystem::path folder_;
  std::filesystem::path lock_file_;
  int fd_ = -1;
  std::vector<std::filesystem::path> created_;  // deepest first
  std::vector<std::filesystem::path> removed_;
};

}  // namespace freshet::io
