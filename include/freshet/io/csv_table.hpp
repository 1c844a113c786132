// CSV files that load as they are: the header row first, no comment lines, RFC 4180 quoting,
// and the metadata (title, time origin, notes, caution, column units, format version) in a
// sidecar JSON file named `<file>.csv-metadata.json`, the name and vocabulary of the W3C
// recommendation "Metadata Vocabulary for Tabular Data" (CSVW, 2015, sec. 5.1 and 5.6).
// So `pandas.read_csv(path)` or a spreadsheet reads every CSV freshet writes with no options,
// and the caution and units travel beside it.
//
//   io::CsvDescription d{.title = "freshet station summary", .notes = {...},
//                        .columns = {{"station_id", "", "station id", "string"},
//                                    {"peak_discharge_m3s", "m3 s-1", "peak discharge"}}};
//   io::write_csv_with_metadata("out/a_stations.csv", text, d, Overwrite::no, &set);
//   // out/a_stations.csv and out/a_stations.csv-metadata.json
#pragma once

#include <filesystem>
#include <string>
#include <string_view>
#include <vector>

#include "freshet/io/atomic_file.hpp"

namespace freshet::io {

// The version of the layout of freshet's CSV, JSON and sidecar files; raised when a column or
// member changes meaning or disappears (added members do not raise it).
inline constexpr int kOutputFormatVersion = 3;  // 3: pairs gave way to attenuation, stretches

// A text field quoted per RFC 4180 when it holds a comma, a double quote, a line break or a
// '#' (a reader told to skip '#' comments would otherwise cut the row), or starts or ends
// with a space; other text is returned as it is.
std::string csv_field(std::string_view text);
// A number in its shortest round-trip form; NaN (not applicable) as an empty field.
std::string csv_number(double v);

struct CsvColumn {
  std::string name;         // the header's name, e.g. "peak_discharge_m3s"
  std::string unit;         // UDUNITS text, e.g. "m3 s-1", "s since 2000-01-01T00:00:00Z"; "" for text
  std::string description;  // what the column holds
  std::string datatype = "double";  // CSVW datatype: "double", "string", "integer"
};

struct CsvDescription {
  std::string title;                // e.g. "freshet station summary: <study title>"
  std::string source;               // e.g. "freshet 0.1.0"; "" if not known
  std::string time_origin_iso;      // ISO 8601 time origin of the time columns; "" if none
  std::vector<std::string> notes;   // further lines (what was resampled, peak notes...)
  std::vector<CsvColumn> columns;   // in the file's order
};

// `<csv path>-metadata.json` (CSVW sec. 5.1: `{+url}-metadata.json`).
std::filesystem::path csv_metadata_path(const std::filesystem::path& csv_path);

// The sidecar's JSON text for the CSV file named `csv_file_name` (its name only: the sidecar
// sits beside it). Holds the title, time origin, notes, caution, source, format version and
// a CSVW table schema with each column's unit.
std::string format_csv_metadata(const std::string& csv_file_name, const CsvDescription& d);

// Writes the CSV text and its sidecar, both through atomic files; an existing file stops both
// before anything is written. Returns the CSV path.
std::filesystem::path write_csv_with_metadata(const std::filesystem::path& csv_path,
                                              std::string_view csv_text, const CsvDescription& d,
                                              Overwrite overwrite = Overwrite::no,
                                              OutputSet* set = nullptr);

}  // namespace freshet::io
