// Rain-gauge records (and observed hydrographs, dated the same way) as they come from a logger or an agency's download: a header row naming
// the columns, one dated row per reading, ISO 8601 timestamps (with or without a zone),
// RFC 4180 quoting, ',' or ';' between fields, rain depth or intensity, intervals of any
// length, and gaps. The user says which columns to read, the value's unit and what to do with
// a missing value; the record becomes a SeriesTable (times in s since the study start, values
// in SI) that the study turns into rain exactly as it does freshet's own series
// (csv_series.hpp). docs/inputs.md describes the format and every rule.
//
//   io::GaugeFormat f{.value_unit = ColumnUnit::depth_mm, .origin_epoch_s = start,
//                     .missing = MissingRule::linear};
//   io::SeriesTable t = io::read_gauge_csv("gauges/heron-hill.csv", f);
//
// Rules (each break is a problem naming file, line and column; all are reported at once):
// - '#' lines and blank lines are skipped; the first other line is the header.
// - Separator: stated, or detected from the header: ';' when it holds a ';' outside quotes,
//   otherwise ','. With ';' a value may use a decimal comma (2,5), as such files often do.
// - Timestamps strictly increase: a repeated or earlier one is an error naming both lines.
// - Missing values (an empty field, NA, NaN, null or -) follow `missing`: refuse (an error at
//   the line), zero (no rain), or linear (intensity linear in time between the nearest
//   readings on either side; a depth's rate depth/interval likewise, times the row's own
//   interval). A gap at the start or end of the record cannot be filled linearly: an error.
// - Depth rows hold the rain fallen since the row before; the first row marks the start of
//   the record and must hold 0 (or be missing, read as 0 unless the rule is refuse).
#pragma once

#include <filesystem>
#include <string>
#include <string_view>

#include "freshet/io/csv_series.hpp"

namespace freshet::io {

enum class MissingRule { refuse, zero, linear };
std::string_view to_string(MissingRule rule);
std::optional<MissingRule> parse_missing_rule(std::string_view text);  // "refuse", "zero", "linear"

struct GaugeFormat {
  char separator = 0;         // ',' or ';'; 0: detected from the header row
  std::string time_column;    // the header's name of the timestamp column; "": the first column
  std::string value_column;   // the header's name of the rain column; "": the second column
  // The value column's unit: depth_mm, depth_in, intensity_mm_per_h or intensity_in_per_h
  // for rain; discharge_m3s or discharge_cfs for an observed hydrograph (read like an
  // intensity: instants, linear between them).
  ColumnUnit value_unit = ColumnUnit::depth_mm;
  int default_offset_min = 0;  // zone of timestamps written without one (minutes ahead of UTC)
  double origin_epoch_s = 0.0;  // the study start, s since the epoch: time 0 of the result
  MissingRule missing = MissingRule::refuse;
};

// Parses a gauge record; `file_name` is used in messages only. Throws InputError with every
// problem found. The table's metadata lists the gaps filled ("line 7: missing, filled ...").
SeriesTable parse_gauge_csv(std::string_view text, const std::string& file_name,
                            const GaugeFormat& format);
// Reads a file (IoError when it cannot be read; InputError for bad content).
SeriesTable read_gauge_csv(const std::filesystem::path& path, const GaugeFormat& format);

}  // namespace freshet::io
