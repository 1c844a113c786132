// Atomic output files and result sets. The behaviour relied on:
//  - rename() replaces the target atomically (IEEE Std 1003.1-2017, POSIX, rename());
//  - renameat2(..., RENAME_NOREPLACE) fails with EEXIST when the target exists
//    (Linux man-pages, rename(2));
//  - open(..., O_CREAT | O_EXCL) fails with EEXIST when the name exists, mkdir() likewise
//    (POSIX open(), mkdir());
//  - a write that would pass the RLIMIT_FSIZE soft limit fails with EFBIG when SIGXFSZ is
//    ignored (Linux man-pages, setrlimit(2), write(2)): the same error path as a full disk;
//  - flock() locks held through two open file descriptions conflict, even in one process, and
//    a process's locks go when it ends (Linux man-pages, flock(2)).
#include "freshet/io/atomic_file.hpp"

#include <fcntl.h>
#include <signal.h>
#include <sys/file.h>
#include <sys/resource.h>
#include <sys/wait.h>
#include <unistd.h>

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "freshet/core/error.hpp"
#include "temp_dir.hpp"

namespace freshet::io {
namespace {

using ::testing::ElementsAre;
using ::testing::HasSubstr;
using ::testing::IsEmpty;
using ::testing::SizeIs;
using ::testing::StartsWith;
using testing::entries;
using testing::read_text;
using testing::TempDir;
using testing::write_text;

TEST(AtomicFile, CommitPutsTheContentUnderTheFinalNameAndLeavesNoPartialFile) {
  TempDir dir;
  const auto final_path = dir / "peaks.csv";
  {
    AtomicFile f(final_path);
    f.write("a,b\n");
    EXPECT_TRUE(std::filesystem::exists(f.partial_path()));
    EXPECT_FALSE(std::filesystem::exists(final_path));  // nothing visible before commit
    f.write(std::string(200000, 'x'));                   // larger than the internal buffer
    f.commit();
  }
  EXPECT_EQ(read_text(final_path), "a,b\n" + std::string(200000, 'x'));
  EXPECT_THAT(entries(dir.path()), ElementsAre("peaks.csv"));
}

TEST(AtomicFile, DestroyedWithoutCommitLeavesNothingBehind) {
  TempDir dir;
  {
    AtomicFile f(dir / "out.csv");
    f.write("incomplete");
  }
  EXPECT_THAT(entries(dir.path()), IsEmpty());
}

TEST(AtomicFile, RefusesToOverwriteAnExistingFileAndNamesIt) {
  TempDir dir;
  const auto final_path = dir / "out.csv";
  write_text(final_path, "precious");
  try {
    AtomicFile f(final_path);
    FAIL() << "expected IoError";
  } catch (const IoError& e) {
    EXPECT_THAT(e.what(), HasSubstr("'" + final_path.string() + "' already exists"));
  }
  EXPECT_EQ(read_text(final_path), "precious");
  EXPECT_THAT(entries(dir.path()), ElementsAre("out.csv"));
}

TEST(AtomicFile, OverwritesWhenAsked) {
  TempDir dir;
  const auto final_path = dir / "out.csv";
  write_text(final_path, "old");
  write_file_atomically(final_path, "new", Overwrite::yes);
  EXPECT_EQ(read_text(final_path), "new");
}

TEST(AtomicFile, FileThatAppearsDuringWritingIsNotClobbered) {
  TempDir dir;
  const auto final_path = dir / "out.csv";
  AtomicFile f(final_path);
  f.write("mine");
  write_text(final_path, "someone else's");
  EXPECT_THROW(f.commit(), IoError);
  EXPECT_EQ(read_text(final_path), "someone else's");
}

TEST(AtomicFile, MissingDirectoryIsAnIoErrorNamingThePath) {
  TempDir dir;
  const auto final_path = dir / "no-such-dir" / "out.csv";
  try {
    write_file_atomically(final_path, "x");
    FAIL() << "expected IoError";
  } catch (const IoError& e) {
    EXPECT_THAT(e.what(), HasSubstr(final_path.string()));
    EXPECT_THAT(e.what(), HasSubstr("does not exist"));
  }
  EXPECT_FALSE(std::filesystem::exists(final_path));
}

// Lowers the file-size limit of this process for one test, with SIGXFSZ ignored, so writes
// past it fail with EFBIG (setrlimit(2)); restores both afterwards.
class FileSizeLimit {
 public:
  explicit FileSizeLimit(rlim_t bytes) {
    ::getrlimit(RLIMIT_FSIZE, &saved_);
    old_handler_ = ::signal(SIGXFSZ, SIG_IGN);
    rlimit lowered = saved_;
    lowered.rlim_cur = bytes;
    ::setrlimit(RLIMIT_FSIZE, &lowered);
  }
  ~FileSizeLimit() {
    ::setrlimit(RLIMIT_FSIZE, &saved_);
    ::signal(SIGXFSZ, old_handler_);
  }
  FileSizeLimit(const FileSizeLimit&) = delete;
  FileSizeLimit& operator=(const FileSizeLimit&) = delete;

 private:
  rlimit saved_{};
  sighandler_t old_handler_ = SIG_DFL;
};

TEST(AtomicFile, FailedWriteAtCommitNamesThePathAndLeavesNoFile) {
  TempDir dir;
  const auto final_path = dir / "out.csv";
  {
    AtomicFile f(final_path);
    f.write("some data that will not fit\n");  // buffered: reaches the file at commit
    FileSizeLimit limit(4);
    try {
      f.commit();
      FAIL() << "expected IoError";
    } catch (const IoError& e) {
      EXPECT_THAT(e.what(), HasSubstr("cannot write output file '" + final_path.string() + "'"));
      EXPECT_THAT(e.what(), HasSubstr("File too large"));
    }
  }
  EXPECT_THAT(entries(dir.path()), IsEmpty());
}

TEST(AtomicFile, FailedLargeWriteThrowsFromWrite) {
  TempDir dir;
  AtomicFile f(dir / "big.nc");
  FileSizeLimit limit(4096);
  EXPECT_THROW(f.write(std::string(1 << 20, 'x')), IoError);  // exceeds the buffer: real write
}

// Two writers of one final name (two runs with --overwrite) never share a temporary file: each
// has its own, and the later commit wins whole.
TEST(AtomicFile, TwoWritersOfOneNameHaveTheirOwnTemporaryFiles) {
  TempDir dir;
  const auto final_path = dir / "peaks.csv";
  AtomicFile a(final_path, Overwrite::yes);
  AtomicFile b(final_path, Overwrite::yes);
  EXPECT_NE(a.partial_path(), b.partial_path());
  EXPECT_EQ(temporary_name_pid(a.partial_path().filename().string()), ::getpid());
  a.write(std::string(100000, 'a'));
  b.write(std::string(100000, 'b'));
  a.commit();
  b.commit();
  EXPECT_EQ(read_text(final_path), std::string(100000, 'b'));
  EXPECT_THAT(entries(dir.path()), ElementsAre("peaks.csv"));
}

TEST(AtomicFile, TemporaryNamesAreHiddenAndCarryTheProcessId) {
  const std::string name = temporary_name("aep1.nc");
  EXPECT_THAT(name, StartsWith(".aep1.nc.freshet-" + std::to_string(::getpid()) + "-"));
  EXPECT_EQ(temporary_name_pid(name), ::getpid());
  EXPECT_NE(temporary_name("aep1.nc"), name);  // the random part
  EXPECT_EQ(temporary_name_pid("aep1.nc"), 0);
  EXPECT_EQ(temporary_name_pid("aep1.nc.partial"), 0);  // the old fixed name: not ours
  EXPECT_EQ(temporary_name_pid(".a.freshet-12-xyz12345.partial"), 0);
  EXPECT_EQ(temporary_name_pid(".a.freshet-12-0000abcd.partial"), 12);
}

// The id of a process that has ended (its entry reaped), for leftovers of a killed run.
long dead_process_id() {
  const pid_t child = ::fork();
  if (child == 0) ::_exit(0);
  ::waitpid(child, nullptr, 0);
  return child;
}

std::string leftover_name(const std::string& stem, long pid) {
  return "." + stem + ".freshet-" + std::to_string(pid) + "-0badc0de.partial";
}

TEST(AtomicFile, TheNextWriterRemovesTheTemporaryFileOfAKilledOne) {
  TempDir dir;
  const long dead = dead_process_id();
  write_text(dir / leftover_name("out.csv", dead), "half");
  write_text(dir / leftover_name("other.csv", dead), "not this writer's");
  write_file_atomically(dir / "out.csv", "whole");
  EXPECT_THAT(entries(dir.path()), ElementsAre(leftover_name("other.csv", dead), "out.csv"));
}

// ---- result sets ----------------------------------------------------------------------------

TEST(OutputSet, NothingIsUnderAFinalNameUntilTheSetIsCommitted) {
  TempDir dir;
  const auto nc = dir / "s1.nc", csv = dir / "s1_stations.csv", json = dir / "s1_summary.json";
  {
    OutputSet set(dir.path(), "s1", Overwrite::no);
    write_file_atomically(json, "{}", Overwrite::no, &set);  // completion order is free
    write_file_atomically(nc, "netcdf", Overwrite::no, &set);
    write_file_atomically(csv, "a,b", Overwrite::no, &set);
    ASSERT_THAT(entries(dir.path()), SizeIs(1));  // only the staging folder
    EXPECT_EQ(temporary_name_pid(entries(dir.path())[0]), ::getpid());
    const auto placed = set.commit(json);
    EXPECT_THAT(placed, ElementsAre(nc, csv, json));  // the marker last
  }
  EXPECT_THAT(entries(dir.path()), ElementsAre("s1.nc", "s1_stations.csv", "s1_summary.json"));
  EXPECT_EQ(read_text(nc), "netcdf");
}

TEST(OutputSet, AnUncommittedSetLeavesNothing) {
  TempDir dir;
  {
    OutputSet set(dir.path(), "s1", Overwrite::no);
    write_file_atomically(dir / "s1.nc", "netcdf", Overwrite::no, &set);
    AtomicFile unfinished(dir / "s1_summary.json", Overwrite::no, &set);
    unfinished.write("{");
  }
  EXPECT_THAT(entries(dir.path()), IsEmpty());
}

// A file that appears under one of the set's names during the run stops the commit, and the
// set's files already renamed are taken back: nothing of the set is left.
TEST(OutputSet, AClashAtCommitLeavesNoFileOfTheSet) {
  TempDir dir;
  {
    OutputSet set(dir.path(), "s1", Overwrite::no);
    write_file_atomically(dir / "a.csv", "a", Overwrite::no, &set);
    write_file_atomically(dir / "b.csv", "b", Overwrite::no, &set);
    write_file_atomically(dir / "s1_summary.json", "{}", Overwrite::no, &set);
    write_text(dir / "b.csv", "someone else's");
    try {
      (void)set.commit(dir / "s1_summary.json");
      FAIL() << "expected IoError";
    } catch (const IoError& e) {
      EXPECT_THAT(e.what(), HasSubstr("'" + (dir / "b.csv").string() + "' already exists"));
    }
  }
  EXPECT_THAT(entries(dir.path()), ElementsAre("b.csv"));
  EXPECT_EQ(read_text(dir / "b.csv"), "someone else's");
}

TEST(OutputSet, OverwriteReplacesTheWholeSet) {
  TempDir dir;
  write_text(dir / "a.csv", "old a");
  write_text(dir / "s1_summary.json", "old json");
  OutputSet set(dir.path(), "s1", Overwrite::yes);
  write_file_atomically(dir / "a.csv", "new a", Overwrite::yes, &set);
  write_file_atomically(dir / "s1_summary.json", "new json", Overwrite::yes, &set);
  (void)set.commit(dir / "s1_summary.json");
  EXPECT_EQ(read_text(dir / "a.csv"), "new a");
  EXPECT_EQ(read_text(dir / "s1_summary.json"), "new json");
  EXPECT_THAT(entries(dir.path()), ElementsAre("a.csv", "s1_summary.json"));
}

// ---- folder lock ----------------------------------------------------------------------------

TEST(OutputFolderLock, AnotherHolderStopsTheRunAndIsNamed) {
  TempDir dir;
  // Another process's lock, simulated by a second open file description of the lock file.
  const int other = ::open((dir / ".freshet.lock").c_str(), O_RDWR | O_CREAT | O_CLOEXEC, 0644);
  ASSERT_GE(other, 0);
  ASSERT_EQ(::flock(other, LOCK_EX | LOCK_NB), 0);
  ASSERT_EQ(::write(other, "4242\n", 5), 5);
  try {
    (void)OutputFolderLock::acquire(dir.path());
    FAIL() << "expected IoError";
  } catch (const IoError& e) {
    EXPECT_THAT(e.what(), HasSubstr("output folder '" + dir.path().string() +
                                    "' is in use by another freshet run (process 4242"));
    EXPECT_THAT(e.what(), HasSubstr("nothing was written"));
  }
  ::close(other);  // the holder ends: the folder is free again
  EXPECT_NO_THROW((void)OutputFolderLock::acquire(dir.path()));
}

TEST(OutputFolderLock, RunsOfOneProcessShareTheLockAndReleaseRemovesWhatItCreated) {
  TempDir dir;
  const auto folder = dir / "out" / "base";
  {
    const auto first = OutputFolderLock::acquire(folder);
    const auto second = OutputFolderLock::acquire(folder);
    EXPECT_EQ(first.get(), second.get());
    EXPECT_TRUE(std::filesystem::exists(folder / ".freshet.lock"));
  }
  EXPECT_THAT(entries(dir.path()), IsEmpty());  // out/base and out were created, and empty
  std::filesystem::create_directories(folder);
  write_text(folder / "s1.nc", "kept");
  { const auto again = OutputFolderLock::acquire(folder); }
  EXPECT_THAT(entries(folder), ElementsAre("s1.nc"));  // an existing folder stays, lock file goes
}

TEST(OutputFolderLock, LeftoversOfAKilledRunAreRemovedAndReported) {
  TempDir dir;
  const long dead = dead_process_id();
  const auto staging = dir / leftover_name("s1", dead);
  std::filesystem::create_directories(staging);
  write_text(staging / "s1.nc", "half");
  write_text(dir / leftover_name("s1.csv", dead), "half");
  write_text(dir / "s1_summary.json", "kept");
  const auto lock = OutputFolderLock::acquire(dir.path());
  EXPECT_THAT(lock->removed_leftovers(), SizeIs(2));
  EXPECT_THAT(entries(dir.path()), ElementsAre(".freshet.lock", "s1_summary.json"));
}

TEST(OutputFolderLock, AnUnwritableFolderIsAnIoErrorNamingIt) {
  TempDir dir;
  write_text(dir / "file", "not a folder");
  try {
    (void)OutputFolderLock::acquire(dir / "file" / "base");
    FAIL() << "expected IoError";
  } catch (const IoError& e) {
    EXPECT_THAT(e.what(), HasSubstr("cannot create output folder '" +
                                    (dir / "file" / "base").string() + "'"));
  }
}

}  // namespace
}  // namespace freshet::io
