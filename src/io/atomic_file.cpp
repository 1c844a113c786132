#include "freshet/io/atomic_file.hpp"

#include <fcntl.h>
#include <stdio.h>  // renameat2, RENAME_NOREPLACE (glibc >= 2.28, _GNU_SOURCE)
#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <system_error>

#include "freshet/core/error.hpp"

namespace freshet::io {

namespace {

constexpr std::size_t kBufferBytes = 1 << 16;

[[noreturn]] void throw_errno(const std::string& what, const std::filesystem::path& path,
                              int err) {
  throw IoError(what + " '" + path.string() + "': " + std::strerror(err));
}

std::filesystem::path partial_name(const std::filesystem::path& final_path) {
  std::filesystem::path p = final_path;
  p += ".partial";
  return p;
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

}  // namespace

void require_absent(const std::filesystem::path& final_path, Overwrite overwrite) {
  std::error_code ec;
  if (overwrite == Overwrite::no && std::filesystem::exists(final_path, ec)) {
    throw IoError("output file '" + final_path.string() +
                  "' already exists; refusing to overwrite it (on the command line: --overwrite)");
  }
}

AtomicOutputPath::AtomicOutputPath(std::filesystem::path final_path, Overwrite overwrite)
    : final_(std::move(final_path)), partial_(partial_name(final_)), overwrite_(overwrite) {
  require_absent(final_, overwrite_);
  std::error_code ec;
  const std::filesystem::path dir =
      final_.has_parent_path() ? final_.parent_path() : std::filesystem::path(".");
  if (!std::filesystem::is_directory(dir, ec)) {
    throw IoError("cannot write output file '" + final_.string() + "': directory '" +
                  dir.string() + "' does not exist");
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
  if (overwrite_ == Overwrite::yes) {
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

AtomicFile::AtomicFile(std::filesystem::path final_path, Overwrite overwrite)
    : path_(std::move(final_path), overwrite) {
  fd_ = ::open(path_.partial_path().c_str(), O_WRONLY | O_CREAT | O_TRUNC | O_CLOEXEC, 0666);
  if (fd_ < 0) throw_errno("cannot create output file", path_.partial_path(), errno);
  buffer_.reserve(kBufferBytes);
}

AtomicFile::~AtomicFile() { close_descriptor(); }

void AtomicFile::close_descriptor() noexcept {
  if (fd_ >= 0) ::close(fd_);
  fd_ = -1;
}

void AtomicFile::write(std::string_view bytes) {
  FRESHET_ASSERT(fd_ >= 0, "AtomicFile::write after commit or failure");
  buffer_.append(bytes);
  if (buffer_.size() >= kBufferBytes) flush_buffer();
}

void AtomicFile::flush_buffer() {
  std::size_t done = 0;
  while (done < buffer_.size()) {
    const ssize_t n = ::write(fd_, buffer_.data() + done, buffer_.size() - done);
    if (n < 0 && errno == EINTR) continue;
    if (n <= 0) {
      const int err = n < 0 ? errno : EIO;
      close_descriptor();
      throw_errno("cannot write output file", path_.final_path(), err);
    }
    done += static_cast<std::size_t>(n);
  }
  buffer_.clear();
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
                           Overwrite overwrite) {
  AtomicFile file(final_path, overwrite);
  file.write(content);
  file.commit();
}

}  // namespace freshet::io
