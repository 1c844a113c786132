// The difference table of `freshet compare` as files: `comparison.csv` (header row first, with
// its CSVW `-metadata.json` sidecar: csv_table.hpp) and `comparison.json`, in the command's
// output folder. SI values, NaN as an empty field or null; times in s from the study start.
//
//   io::ComparisonFiles files = io::comparison_files("out/tansy-brook");
//   io::write_comparison(files, rows, {title, "freshet 0.1.0", "2026-07-14T00:00:00Z"});
#pragma once

#include <filesystem>
#include <string>
#include <vector>

#include "freshet/io/atomic_file.hpp"
#include "freshet/reporting/comparison.hpp"

namespace freshet::io {

struct ComparisonFiles {
  std::filesystem::path csv, csv_metadata, json;
};
ComparisonFiles comparison_files(const std::filesystem::path& folder);

struct ComparisonHeader {
  std::string title;            // the study's title
  std::string source;           // e.g. "freshet 0.1.0"
  std::string time_origin_iso;  // the study start, ISO 8601
};

std::string format_comparison_csv(const std::vector<reporting::ComparisonRow>& rows);
std::string format_comparison_json(const std::vector<reporting::ComparisonRow>& rows,
                                   const ComparisonHeader& header);
// Writes the three files atomically; an existing one (without Overwrite::yes) stops all three
// before anything is written.
void write_comparison(const ComparisonFiles& files,
                      const std::vector<reporting::ComparisonRow>& rows,
                      const ComparisonHeader& header, Overwrite overwrite = Overwrite::no);

}  // namespace freshet::io
