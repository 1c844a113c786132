// Atomic output files. The behaviour relied on:
//  - rename() replaces the target atomically (IEEE Std 1003.1-2017, POSIX, rename());
//  - renameat2(..., RENAME_NOREPLACE) fails with EEXIST when the target exists
//    (Linux man-pages, rename(2));
//  - every write to /dev/full fails with ENOSPC (Linux man-pages, full(4)).
#include "freshet/io/atomic_file.hpp"

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "freshet/core/error.hpp"
#include "temp_dir.hpp"

namespace freshet::io {
namespace {

using ::testing::HasSubstr;
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
  EXPECT_FALSE(std::filesystem::exists(dir / "peaks.csv.partial"));
}

TEST(AtomicFile, DestroyedWithoutCommitLeavesNothingBehind) {
  TempDir dir;
  {
    AtomicFile f(dir / "out.csv");
    f.write("incomplete");
  }
  EXPECT_FALSE(std::filesystem::exists(dir / "out.csv"));
  EXPECT_FALSE(std::filesystem::exists(dir / "out.csv.partial"));
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
  EXPECT_FALSE(std::filesystem::exists(dir / "out.csv.partial"));
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

// Disk-full path: the partial name is made a symlink to /dev/full, so every write fails with
// ENOSPC exactly as on a full disk (full(4)).
TEST(AtomicFile, DiskFullFailsOnCommitNamesThePathAndLeavesNoFinalFile) {
  if (!std::filesystem::exists("/dev/full")) GTEST_SKIP() << "/dev/full not available";
  TempDir dir;
  const auto final_path = dir / "out.csv";
  std::filesystem::create_symlink("/dev/full", dir / "out.csv.partial");
  {
    AtomicFile f(final_path);
    f.write("some data that will not fit\n");
    try {
      f.commit();
      FAIL() << "expected IoError";
    } catch (const IoError& e) {
      EXPECT_THAT(e.what(), HasSubstr(final_path.string()));
      EXPECT_THAT(e.what(), HasSubstr("No space left on device"));
    }
  }
  EXPECT_FALSE(std::filesystem::exists(final_path));
  EXPECT_FALSE(std::filesystem::is_symlink(dir / "out.csv.partial"));
  EXPECT_TRUE(std::filesystem::exists("/dev/full"));  // only the link was removed
}

TEST(AtomicFile, DiskFullDuringALargeWriteThrowsFromWrite) {
  if (!std::filesystem::exists("/dev/full")) GTEST_SKIP() << "/dev/full not available";
  TempDir dir;
  std::filesystem::create_symlink("/dev/full", dir / "big.nc.partial");
  AtomicFile f(dir / "big.nc");
  EXPECT_THROW(f.write(std::string(1 << 20, 'x')), IoError);  // exceeds the buffer: real write
}

}  // namespace
}  // namespace freshet::io
