// CSV time series: hydrographs (time, discharge) and hyetographs (time, rain intensity or
// rain depth), read and written in freshet's own small format (docs/outputs.md):
//
//   time_min,discharge_cfs
//   0,0
//   15,120.5
//
// freshet writes the header first and no comment lines, so any CSV reader loads the file as
// it is; the title, time base, caution and units go in a `<file>-metadata.json` sidecar
// (csv_table.hpp). On reading, '#' lines before the header and between rows are metadata, so
// older files and hand-written notes still load.
// The first line that is not a '#' line is the header naming two columns with units:
// time_s | time_min | time_h, then discharge_m3s | discharge_cfs | intensity_mm_per_h |
// intensity_in_per_h | depth_mm | depth_in. Values are converted to SI once, on reading
// (seconds, m3 s-1, m s-1, m). Numbers are parsed with std::from_chars (locale independent);
// a UTF-8 byte-order mark and CRLF line ends are accepted, quoted fields are not.
// Every problem is reported as `file:line:column: message` (freshet::Problem), all at once.
//
// Meaning of the value column:
//   discharge, intensity: the value at that instant, linear between rows (PiecewiseLinearSeries);
//   depth: the rain depth that fell from the previous row's time to this row's time; the first
//          row marks the start and must have depth 0.
//
//   auto q = freshet::io::read_hydrograph_csv("inflow.csv");   // PiecewiseLinearSeries, m3 s-1
//   freshet::io::write_series_csv("out.csv", table, {.time_unit = ColumnUnit::time_min});
#pragma once

#include <filesystem>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "freshet/core/time_series.hpp"
#include "freshet/io/atomic_file.hpp"
#include "freshet/io/csv_table.hpp"

namespace freshet::io {

enum class SeriesQuantity { discharge, rain_intensity, rain_depth };

// A column name with its unit, as written in the header row.
enum class ColumnUnit {
  time_s,
  time_min,
  time_h,
  discharge_m3s,
  discharge_cfs,
  intensity_mm_per_h,
  intensity_in_per_h,
  depth_mm,
  depth_in,
};

// Header-row spelling, e.g. "discharge_cfs".
std::string_view to_string(ColumnUnit unit);
// Inverse of to_string; nullopt for an unknown name.
std::optional<ColumnUnit> parse_column_unit(std::string_view name);
// Factor that converts a value in `unit` to SI (s, m3 s-1, m s-1 or m).
double to_si_factor(ColumnUnit unit);
// Whether the column is a time column, and which quantity a value column holds.
bool is_time_unit(ColumnUnit unit);
SeriesQuantity quantity_of(ColumnUnit value_unit);  // precondition: !is_time_unit(value_unit)

// Two columns in SI, as read or to be written.
struct SeriesTable {
  SeriesQuantity quantity = SeriesQuantity::discharge;
  std::vector<double> times_s;
  std::vector<double> values_si;       // m3 s-1, m s-1 (intensity) or m (depth per interval)
  std::vector<std::string> metadata;   // comment lines, without the leading '#' and one space
};

// What a reader wants in the value column: a header naming another quantity is a problem at
// the header's line (a hydrograph needs discharge; a hyetograph, rain intensity or depth).
enum class SeriesKind { any, hydrograph, hyetograph };

// Parses CSV text; `file_name` is used in messages only. Throws InputError with every problem.
SeriesTable parse_series_csv(std::string_view text, const std::string& file_name,
                             SeriesKind kind = SeriesKind::any);
// Reads a file (IoError when it cannot be read or is a folder; InputError for bad content).
SeriesTable read_series_csv(const std::filesystem::path& path, SeriesKind kind = SeriesKind::any);
// Reads a hydrograph (a discharge column is required) as a series in m3 s-1.
PiecewiseLinearSeries read_hydrograph_csv(const std::filesystem::path& path);
// Reads a hyetograph (an intensity or depth column is required).
SeriesTable read_hyetograph_csv(const std::filesystem::path& path);

struct CsvWriteOptions {
  ColumnUnit time_unit = ColumnUnit::time_s;
  // Value column; empty: the SI column of the table's quantity (discharge_m3s, or for rain
  // intensity_mm_per_h / depth_mm, which are exact decimal scalings of SI).
  std::optional<ColumnUnit> value_unit;
  std::string title;      // the sidecar's title; empty: "freshet hydrograph" / "freshet hyetograph"
  std::string time_base;  // what time 0 is, in words, e.g. "study start" or "storm start"
  std::string time_origin_iso;  // time 0 as ISO 8601 ("2000-01-01T00:00:00Z"); "" if none
  std::string source;           // e.g. "freshet 0.1.0"
  Overwrite overwrite = Overwrite::no;
  OutputSet* set = nullptr;  // the run's result set (atomic_file.hpp); nullptr: on its own
};

// Formats the table as CSV text: the header first, then rows with the shortest decimal form
// that reads back to the same double (std::to_chars). No comment lines: the title, time base,
// metadata and caution go in the sidecar (csv_table.hpp).
std::string format_series_csv(const SeriesTable& table, const CsvWriteOptions& options);
// The sidecar's content: title, time base and origin, the table's metadata lines, units.
CsvDescription describe_series_csv(const SeriesTable& table, const CsvWriteOptions& options);
// Writes format_series_csv() and its `-metadata.json` sidecar through atomic files.
void write_series_csv(const std::filesystem::path& path, const SeriesTable& table,
                      const CsvWriteOptions& options = {});

}  // namespace freshet::io
