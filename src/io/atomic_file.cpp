#include "freshet/io/atomic_file.hpp"

#include <fcntl.h>
#include <signal.h>
#include <stdio.h>  // renameat2, RENAME_NOREPLACE (glibc >= 2.28, _GNU_SOURCE)
#include <sys/file.h>
#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <chrono>
#include <charconv>
#include <cstring>
#include <map>
#include <mutex>
#include <random>
#include <system_error>
#include <thread>

#include "freshet/core/error.hpp"

namespace freshet::io {

namespace {

constexpr std::size_t kBufferBytes = 1 << 16;
constexpr std::string_view kTemporaryTag = ".freshet-";
constexpr std::string_view kTemporarySuffix = ".partial";
constexpr const char* kLockFileName = ".freshet.lock";

[[noreturn]] void throw_errno(const std::string& what, const std::filesystem::path& path,
                              int err) {
  throw IoError(what + " '" + path.string() + "': " + std::strerror(err));
}

std::filesystem::path directory_of(const std::filesystem::path& p) {
  return p.has_parent_path() ? p.parent_path() : std::filesystem::path(".");
}

std::uint32_t random_part() {
  static std::mutex m;
  static std::mt19937 engine{std::random_device{}()};
  std::lock_guard lock(m);
  return static_cast<std::uint32_t>(engine());
}

// Whether the process that made a temporary name can still be running (kill(2) with signal
// 0 probes without sending; EPERM means it exists under another user).
bool process_running(long pid) {
  return pid > 0 && (::kill(static_cast<pid_t>(pid), 0) == 0 || errno == EPERM);
}

// Renames without replacing an existing target; falls back to link()+unlink() where the file
// system does not support RENAME_NOREPLACE. Returns 0 or an errno value.
int rename_no_replace(const std::filesystem::path& from, const std::filesystem::path& to) {
  if (::renameat2(AT_FDCWD, from.c_str(), AT_FDCWD, to.c_str(), RENAME_NOREPLACE) == 0) return 0;
  if (errno != EINVAL && errno != ENOSYS) return errno;
  if (::link(from.c_str(), to.c_str()) != 0) return errno;
  ::unlink(from.c_str());
  return 0;
}

// Removes `.<file name>.freshet-<pid>-<hex>.partial` files left beside `final_path` by
// processes that no longer run (a SIGKILL cannot be handled, so they could not clean up).
void remove_stale_temporaries(const std::filesystem::path& final_path) {
  const std::string prefix = "." + final_path.filename().string() + std::string(kTemporaryTag);
  std::error_code ec;
  for (const auto& entry : std::filesystem::directory_iterator(directory_of(final_path), ec)) {
    const std::string name = entry.path().filename().string();
    const long pid = temporary_name_pid(name);
    if (name.starts_with(prefix) && pid > 0 && !process_running(pid)) {
      std::error_code ignored;
      std::filesystem::remove(entry.path(), ignored);
    }
  }
}

void sync_directory(const std::filesystem::path& dir) {
  const int fd = ::open(dir.c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC);
  if (fd < 0) throw_errno("cannot open output folder", dir, errno);
  const int rc = ::fsync(fd);
  const int err = errno;
  ::close(fd);
  if (rc != 0 && err != EINVAL) throw_errno("cannot flush output folder to disk", dir, err);
}

}  // namespace

std::string temporary_name(std::string_view stem) {
  char hex[9];
  std::snprintf(hex, sizeof hex, "%08x", static_cast<unsigned>(random_part()));
  return "." + std::string(stem) + std::string(kTemporaryTag) + std::to_string(::getpid()) +
         "-" + hex + std::string(kTemporarySuffix);
}

long temporary_name_pid(std::string_view name) {
  if (!name.starts_with('.') || !name.ends_with(kTemporarySuffix)) return 0;
  name.remove_suffix(kTemporarySuffix.size());
  // <pid>-<8 hex>
  if (name.size() < 9 || name[name.size() - 9] != '-') return 0;
  const std::string_view hex = name.substr(name.size() - 8);
  if (!std::all_of(hex.begin(), hex.end(), [](char c) { return std::isxdigit(c) != 0; })) return 0;
  name.remove_suffix(9);
  const std::size_t tag = name.rfind(kTemporaryTag);
  if (tag == std::string_view::npos || tag == 0) return 0;
  const std::string_view digits = name.substr(tag + kTemporaryTag.size());
  long pid = 0;
  const auto [end, err] = std::from_chars(digits.data(), digits.data() + digits.size(), pid);
  if (err != std::errc{} || end != digits.data() + digits.size() || pid <= 0) return 0;
  return pid;
}

void require_absent(const std::filesystem::path& final_path, Overwrite overwrite) {
  std::error_code ec;
  if (overwrite == Overwrite::no && std::filesystem::exists(final_path, ec)) {
    throw IoError("output file '" + final_path.string() +
                  "' already exists; refusing to overwrite it (on the command line: --overwrite)");
  }
}

// ---- AtomicOutputPath ---------------------------------------------------------------------

AtomicOutputPath::AtomicOutputPath(std::filesystem::path final_path, Overwrite overwrite,
                                   OutputSet* set)
    : final_(std::move(final_path)), overwrite_(overwrite), set_(set) {
  require_absent(final_, overwrite_);
  std::error_code ec;
  const std::filesystem::path dir = directory_of(final_);
  if (!std::filesystem::is_directory(dir, ec)) {
    throw IoError("cannot write output file '" + final_.string() + "': directory '" +
                  dir.string() + "' does not exist");
  }
  if (set_) {
    partial_ = set_->staged_path(final_);
  } else {
    remove_stale_temporaries(final_);
    partial_ = dir / temporary_name(final_.filename().string());
  }
}

AtomicOutputPath::~AtomicOutputPath() { discard(); }

void AtomicOutputPath::discard() noexcept {
  if (committed_) return;
  ::unlink(partial_.c_str());  // errors ignored: nothing useful to do in cleanup
  committed_ = true;           // inert from now on
}

void AtomicOutputPath::commit() {
  FRESHET_ASSERT(!committed_, "AtomicOutputPath committed or discarded twice");
  if (set_) {
    set_->add_complete(final_);
  } else if (overwrite_ == Overwrite::yes) {
    if (::rename(partial_.c_str(), final_.c_str()) != 0) {
      throw_errno("cannot rename '" + partial_.string() + "' to", final_, errno);
    }
  } else if (const int err = rename_no_replace(partial_, final_); err != 0) {
    if (err == EEXIST) {
      throw IoError("output file '" + final_.string() +
                    "' appeared while it was being written; refusing to overwrite it");
    }
    throw_errno("cannot rename '" + partial_.string() + "' to", final_, err);
  }
  committed_ = true;
}

// ---- AtomicFile ---------------------------------------------------------------------------

AtomicFile::AtomicFile(std::filesystem::path final_path, Overwrite overwrite, OutputSet* set)
    : path_(std::move(final_path), overwrite, set) {
  fd_ = ::open(path_.partial_path().c_str(), O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, 0666);
  if (fd_ < 0) {
    const int err = errno;
    path_.discard();  // never remove a file this object did not create
    throw_errno("cannot create output file", path_.final_path(), err);
  }
  buffer_.reserve(kBufferBytes);
}

AtomicFile::~AtomicFile() { close_descriptor(); }

void AtomicFile::close_descriptor() noexcept {
  if (fd_ >= 0) ::close(fd_);
  fd_ = -1;
}

void AtomicFile::write(std::string_view bytes) {
  FRESHET_ASSERT(fd_ >= 0, "AtomicFile::write after commit or failure");
  if (bytes.size() >= kBufferBytes) {  // a large block goes straight out, not copied first
    flush_buffer();
    write_through(bytes);
    return;
  }
  buffer_.append(bytes);
  if (buffer_.size() >= kBufferBytes) flush_buffer();
}

void AtomicFile::flush_buffer() {
  write_through(buffer_);
  buffer_.clear();
}

void AtomicFile::write_through(std::string_view bytes) {
  std::size_t done = 0;
  while (done < bytes.size()) {
    const ssize_t n = ::write(fd_, bytes.data() + done, bytes.size() - done);
    if (n < 0 && errno == EINTR) continue;
    if (n <= 0) {
      const int err = n < 0 ? errno : EIO;
      close_descriptor();
      throw_errno("cannot write output file", path_.final_path(), err);
    }
    done += static_cast<std::size_t>(n);
  }
}

void AtomicFile::commit() {
  FRESHET_ASSERT(fd_ >= 0, "AtomicFile::commit after commit or failure");
  flush_buffer();
  // EINVAL: the descriptor does not support synchronisation (a character device); nothing to do.
  if (::fsync(fd_) != 0 && errno != EINVAL) {
    const int err = errno;
    close_descriptor();
    throw_errno("cannot flush output file to disk", path_.final_path(), err);
  }
  const int rc = ::close(fd_);
  fd_ = -1;
  if (rc != 0) throw_errno("cannot close output file", path_.final_path(), errno);
  path_.commit();
}

void write_file_atomically(const std::filesystem::path& final_path, std::string_view content,
                           Overwrite overwrite, OutputSet* set) {
  AtomicFile file(final_path, overwrite, set);
  file.write(content);
  file.commit();
}

// ---- OutputSet ----------------------------------------------------------------------------

OutputSet::OutputSet(std::filesystem::path folder, std::string_view label, Overwrite overwrite)
    : folder_(std::move(folder)), overwrite_(overwrite) {
  for (int attempt = 0;; ++attempt) {
    staging_ = folder_ / temporary_name(label);
    if (::mkdir(staging_.c_str(), 0777) == 0) return;
    if (errno != EEXIST || attempt == 3) {
      throw_errno("cannot write in output folder", folder_, errno);
    }
  }
}

OutputSet::~OutputSet() {
  std::error_code ignored;
  std::filesystem::remove_all(staging_, ignored);
}

std::filesystem::path OutputSet::staged_path(const std::filesystem::path& final_path) const {
  FRESHET_ASSERT(final_path.parent_path() == folder_,
                 "OutputSet: a file of the set must have its final name in the set's folder");
  return staging_ / final_path.filename();
}

void OutputSet::add_complete(const std::filesystem::path& final_path) {
  FRESHET_ASSERT(!committed_, "OutputSet: a file completed after the set was committed");
  complete_.push_back(final_path);
}

std::vector<std::filesystem::path> OutputSet::commit(const std::filesystem::path& marker) {
  FRESHET_ASSERT(!committed_, "OutputSet committed twice");
  std::vector<std::filesystem::path> order;
  for (const auto& f : complete_) {
    if (f != marker) order.push_back(f);
  }
  FRESHET_ASSERT(order.size() + 1 == complete_.size(), "OutputSet: the marker file is missing");
  order.push_back(marker);
  if (overwrite_ == Overwrite::no) {
    for (const auto& f : order) require_absent(f, overwrite_);
  } else if (::unlink(marker.c_str()) != 0 && errno != ENOENT) {
    throw_errno("cannot replace output file", marker, errno);
  }
  std::vector<std::filesystem::path> placed;
  try {
    for (const auto& f : order) {
      const std::filesystem::path from = staged_path(f);
      const int err = overwrite_ == Overwrite::yes
                          ? (::rename(from.c_str(), f.c_str()) == 0 ? 0 : errno)
                          : rename_no_replace(from, f);
      if (err == EEXIST) {
        throw IoError("output file '" + f.string() +
                      "' appeared while the run was being written; refusing to overwrite it");
      }
      if (err != 0) throw_errno("cannot rename '" + from.string() + "' to", f, err);
      placed.push_back(f);
    }
    sync_directory(folder_);
  } catch (...) {
    for (const auto& f : placed) ::unlink(f.c_str());
    throw;
  }
  committed_ = true;
  std::error_code ignored;
  std::filesystem::remove_all(staging_, ignored);
  return order;
}

// ---- OutputFolderLock -----------------------------------------------------------------------

namespace {

// The locks this process holds, by folder. An entry whose lock has expired is being
// destroyed (the deleter erases it under the same mutex); acquire() waits for that.
std::mutex& registry_mutex() {
  static std::mutex m;
  return m;
}
std::map<std::string, std::weak_ptr<OutputFolderLock>>& registry() {
  static std::map<std::string, std::weak_ptr<OutputFolderLock>> r;
  return r;
}

std::string registry_key(const std::filesystem::path& folder) {
  std::error_code ec;
  std::filesystem::path p = std::filesystem::weakly_canonical(std::filesystem::absolute(folder), ec);
  return (ec ? std::filesystem::absolute(folder).lexically_normal() : p).string();
}

// The folders create_directories() would create for `folder`, deepest first.
std::vector<std::filesystem::path> missing_folders(const std::filesystem::path& folder) {
  std::vector<std::filesystem::path> out;
  std::error_code ec;
  for (std::filesystem::path p = folder; !p.empty() && !std::filesystem::exists(p, ec);
       p = p.parent_path()) {
    out.push_back(p);
    if (p == p.parent_path()) break;
  }
  return out;
}

std::string read_holder(int fd) {
  char buf[32] = {};
  const ssize_t n = ::pread(fd, buf, sizeof buf - 1, 0);
  std::string s = n > 0 ? std::string(buf, static_cast<std::size_t>(n)) : std::string();
  while (!s.empty() && (s.back() == '\n' || s.back() == ' ')) s.pop_back();
  return s;
}

}  // namespace

OutputFolderLock::Handle OutputFolderLock::acquire(const std::filesystem::path& folder) {
  const std::string key = registry_key(folder);
  for (;;) {
    std::unique_lock guard(registry_mutex());
    auto it = registry().find(key);
    if (it != registry().end()) {
      if (Handle held = it->second.lock()) return held;
      guard.unlock();  // being released by another thread of this process: wait for it
      std::this_thread::sleep_for(std::chrono::milliseconds(1));
      continue;
    }
    std::unique_ptr<OutputFolderLock> lock(new OutputFolderLock());
    lock->folder_ = folder;
    lock->lock_file_ = folder / kLockFileName;
    for (int attempt = 0;; ++attempt) {
      std::vector<std::filesystem::path> created = missing_folders(folder);
      std::error_code ec;
      std::filesystem::create_directories(folder, ec);
      if (ec) {
        throw IoError("cannot create output folder '" + folder.string() + "': " + ec.message());
      }
      lock->created_.insert(lock->created_.end(), created.begin(), created.end());
      const int fd = ::open(lock->lock_file_.c_str(), O_RDWR | O_CREAT | O_CLOEXEC, 0644);
      if (fd < 0) {
        if (errno == ENOENT && attempt < 100) continue;  // removed by a finishing run: again
        throw_errno("cannot write in output folder", folder, errno);
      }
      if (::flock(fd, LOCK_EX | LOCK_NB) != 0) {
        const int err = errno;
        const std::string holder = read_holder(fd);
        ::close(fd);
        if (err != EWOULDBLOCK) throw_errno("cannot lock output folder", folder, err);
        throw IoError("output folder '" + folder.string() +
                      "' is in use by another freshet run (" +
                      (holder.empty() ? std::string("a process") : "process " + holder) +
                      " holds its lock file '" + lock->lock_file_.string() +
                      "'); nothing was written. Wait for that run to finish, or write to "
                      "another folder (--out)");
      }
      // The holder before us may have removed the lock file after we opened it: then our lock
      // is on a file no one else sees, and we must lock the file now at that name.
      struct stat held {}, named {};
      if (::fstat(fd, &held) != 0 || ::stat(lock->lock_file_.c_str(), &named) != 0 ||
          held.st_ino != named.st_ino || held.st_dev != named.st_dev) {
        ::close(fd);
        if (attempt < 100) continue;
        throw IoError("cannot lock output folder '" + folder.string() +
                      "': its lock file keeps being replaced");
      }
      lock->fd_ = fd;
      break;
    }
    const std::string pid = std::to_string(::getpid()) + "\n";
    if (::ftruncate(lock->fd_, 0) != 0 ||
        ::pwrite(lock->fd_, pid.data(), pid.size(), 0) != static_cast<ssize_t>(pid.size())) {
      const int err = errno;
      throw_errno("cannot write the lock file", lock->lock_file_, err);  // destructor unlocks
    }
    std::error_code ec;
    for (const auto& entry : std::filesystem::directory_iterator(folder, ec)) {
      const long owner = temporary_name_pid(entry.path().filename().string());
      if (owner > 0 && (owner == ::getpid() || !process_running(owner))) {
        std::error_code ignored;
        std::filesystem::remove_all(entry.path(), ignored);
        if (!ignored) lock->removed_.push_back(entry.path());
      }
    }
    Handle handle(lock.release(), [key](OutputFolderLock* p) {
      std::lock_guard erase_guard(registry_mutex());
      registry().erase(key);
      delete p;
    });
    registry()[key] = handle;
    return handle;
  }
}

OutputFolderLock::~OutputFolderLock() {
  if (fd_ >= 0) {
    ::unlink(lock_file_.c_str());  // still locked: an opener re-checks the name (acquire)
    ::close(fd_);
  }
  for (const auto& dir : created_) ::rmdir(dir.c_str());  // only when empty
}

}  // namespace freshet::io
