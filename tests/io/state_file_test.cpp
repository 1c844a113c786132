// Hot-start state files (docs/state-files.md): an archive written to HDF5 reads back bit for
// bit with its header, the file appears only under its final name, and a file that is not
// HDF5, is truncated, had a byte changed, has another layout version or belongs to another
// study, scenario or storm is refused with a message naming the file and the mismatch. The
// damaged files are made here with the HDF5 C library itself (H5Dget_offset locates a
// dataset's bytes; the HDF5 reference manual, "H5Dget_offset", for contiguous datasets).
#include <hdf5.h>

#include <cstring>
#include <filesystem>
#include <fstream>
#include <limits>
#include <string>

#include <gtest/gtest.h>

#include "freshet/core/error.hpp"
#include "freshet/io/state_file.hpp"
#include "temp_dir.hpp"

namespace freshet::io {
namespace {

StateArchive sample_archive() {
  StateArchive a;
  a.entries["run/step"] = std::vector<std::int64_t>{40};
  a.entries["run/time_s"] = std::vector<double>{2400.0};
  a.entries["elements/mill-race/reach/area_m2"] =
      std::vector<double>{0.0, 1.25, std::numeric_limits<double>::quiet_NaN(), -0.0, 3.5e-300};
  a.entries["elements/mill-race/reach/shocks/reports/count"] = std::vector<std::int64_t>{0};
  a.entries["elements/mill-race/reach/shocks/reports/c0"] = std::vector<std::int64_t>{};
  a.entries["elements/pond/label"] = std::string("upper pond");
  return a;
}

StateFileHeader sample_header() {
  StateFileHeader h;
  h.study_file = "basins/tansy-brook.toml";
  h.study_sha256 = std::string(64, 'a');
  h.scenario = "";
  h.storm = "aep1-30min";
  h.step = 40;
  h.time_s = 2400.0;
  h.program_version = "freshet 0.1.0";
  return h;
}

std::string refusal(const std::filesystem::path& path) {
  try {
    (void)read_state_file(path);
  } catch (const InputError& e) {
    return e.what();
  }
  return "accepted";
}

bool same_archive_bits(const StateArchive& a, const StateArchive& b) {
  return a.digest() == b.digest();  // SHA-256 over every byte of every entry
}

TEST(StateFile, RoundTripsBitForBitWithItsHeader) {
  testing::TempDir dir;
  const auto path = dir / "hot.h5";
  write_state_file(path, sample_header(), sample_archive());
  // Written under a temporary name and renamed: nothing else is left in the folder.
  EXPECT_EQ(std::distance(std::filesystem::directory_iterator(dir.path()),
                          std::filesystem::directory_iterator{}),
            1);
  const StateFile f = read_state_file(path);
  EXPECT_EQ(f.header.layout_version, kStateLayoutVersion);
  EXPECT_EQ(f.header.study_sha256, sample_header().study_sha256);
  EXPECT_EQ(f.header.storm, "aep1-30min");
  EXPECT_EQ(f.header.scenario, "");
  EXPECT_EQ(f.header.step, 40);
  EXPECT_EQ(f.header.time_s, 2400.0);
  EXPECT_EQ(f.header.content_sha256, sample_archive().digest());
  EXPECT_TRUE(same_archive_bits(f.archive, sample_archive()));
  EXPECT_EQ(std::get<std::string>(f.archive.entries.at("elements/pond/label")), "upper pond");
  EXPECT_TRUE(std::get<std::vector<std::int64_t>>(
                  f.archive.entries.at("elements/mill-race/reach/shocks/reports/c0"))
                  .empty());
  EXPECT_NO_THROW(check_state_file(f, path, sample_header()));
}

TEST(StateFile, AnotherStudyScenarioOrStormIsRefused) {
  testing::TempDir dir;
  const auto path = dir / "hot.h5";
  write_state_file(path, sample_header(), sample_archive());
  const StateFile f = read_state_file(path);
  auto message = [&](const StateFileHeader& expected) -> std::string {
    try {
      check_state_file(f, path, expected);
    } catch (const InputError& e) {
      return e.what();
    }
    return "accepted";
  };
  StateFileHeader other = sample_header();
  other.study_file = "basins/rookery-vale.toml";
  other.study_sha256 = std::string(64, 'b');
  const std::string study = message(other);
  EXPECT_NE(study.find(path.string() + ": state file, field 'study_sha256' = aaaa"), std::string::npos)
      << study;
  EXPECT_NE(study.find("'basins/rookery-vale.toml' has SHA-256 bbbb"), std::string::npos) << study;
  EXPECT_NE(study.find("belongs to another study"), std::string::npos) << study;

  other = sample_header();
  other.scenario = "twin-1500";
  const std::string scenario = message(other);
  EXPECT_NE(scenario.find("field 'scenario' = '': the state was saved from the base network, this "
                          "run is scenario 'twin-1500'"),
            std::string::npos)
      << scenario;

  other = sample_header();
  other.storm = "aep1-120min";
  const std::string storm = message(other);
  EXPECT_NE(storm.find("field 'storm' = 'aep1-30min': the state was saved from storm "
                       "'aep1-30min', this run routes storm 'aep1-120min'"),
            std::string::npos)
      << storm;
}

TEST(StateFile, NotHdf5AndTruncatedFilesAreRefused) {
  testing::TempDir dir;
  const auto text = dir / "notes.h5";
  std::ofstream(text) << "not a state file\n";
  EXPECT_NE(refusal(text).find(text.string() + ": state file, is not an HDF5 file, or is damaged "
                                               "or truncated"),
            std::string::npos)
      << refusal(text);

  const auto path = dir / "hot.h5";
  write_state_file(path, sample_header(), sample_archive());
  const auto size = std::filesystem::file_size(path);
  for (const double keep : {0.9, 0.5, 0.1}) {
    const auto cut = dir / "cut.h5";
    std::filesystem::copy_file(path, cut, std::filesystem::copy_options::overwrite_existing);
    std::filesystem::resize_file(cut, static_cast<std::uintmax_t>(keep * static_cast<double>(size)));
    const std::string m = refusal(cut);
    EXPECT_NE(m.find(cut.string() + ": state file"), std::string::npos) << keep << ": " << m;
    EXPECT_NE(m.find("damaged or truncated"), std::string::npos) << keep << ": " << m;
  }
  EXPECT_THROW((void)read_state_file(dir / "nosuch.h5"), IoError);
}

// The byte offset of a contiguous dataset's values in the file.
haddr_t offset_of(const std::filesystem::path& path, const char* dataset) {
  const hid_t file = H5Fopen(path.c_str(), H5F_ACC_RDONLY, H5P_DEFAULT);
  const hid_t set = H5Dopen2(file, dataset, H5P_DEFAULT);
  const haddr_t offset = H5Dget_offset(set);
  H5Dclose(set);
  H5Fclose(file);
  return offset;
}

TEST(StateFile, AChangedByteIsRefused) {
  testing::TempDir dir;
  const auto path = dir / "hot.h5";
  write_state_file(path, sample_header(), sample_archive());
  const haddr_t at = offset_of(path, "elements/mill-race/reach/area_m2");
  ASSERT_NE(at, HADDR_UNDEF);
  {
    std::fstream f(path, std::ios::in | std::ios::out | std::ios::binary);
    f.seekg(static_cast<std::streamoff>(at + 8));  // the second value, 1.25
    char byte = 0;
    f.get(byte);
    f.seekp(static_cast<std::streamoff>(at + 8));
    f.put(static_cast<char>(byte ^ 0x01));
  }
  const std::string m = refusal(path);
  EXPECT_NE(m.find(path.string() + ": state file, field 'content_sha256' = " +
                   sample_archive().digest() + ", but the contents hash to "),
            std::string::npos)
      << m;
  EXPECT_NE(m.find("changed or damaged after it was written"), std::string::npos) << m;
}

TEST(StateFile, AnotherLayoutVersionIsRefused) {
  testing::TempDir dir;
  const auto path = dir / "hot.h5";
  write_state_file(path, sample_header(), sample_archive());
  {
    const hid_t file = H5Fopen(path.c_str(), H5F_ACC_RDWR, H5P_DEFAULT);
    const hid_t attr = H5Aopen(file, "layout_version", H5P_DEFAULT);
    const std::int64_t two = 2;
    ASSERT_GE(H5Awrite(attr, H5T_NATIVE_INT64, &two), 0);
    H5Aclose(attr);
    H5Fclose(file);
  }
  EXPECT_NE(refusal(path).find(path.string() + ": state file, field 'layout_version' = 2: this "
                                               "freshet reads layout version 1 only"),
            std::string::npos)
      << refusal(path);
}

}  // namespace
}  // namespace freshet::io
