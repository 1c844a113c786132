// Writers for a reporting::RunSummary (freshet/reporting/summary.hpp): an aligned text table for the console, CSV files and
// one JSON document, written next to the NetCDF output through atomic files. Every output
// carries freshet::kCautionText. Field lists are in docs/outputs.md.
//
//   std::cout << freshet::io::format_summary_table(summary);
//   auto files = freshet::io::write_summary_csv("out/run1", summary);   // out/run1_stations.csv …
//   freshet::io::write_summary_json("out/run1_summary.json", summary);
#pragma once

#include <filesystem>
#include <string>
#include <vector>

#include "freshet/io/atomic_file.hpp"
#include "freshet/reporting/summary.hpp"

namespace freshet::io {

// Console table: stations, attenuation, stretches, shocks, mass balance and warnings, columns aligned, units
// in the headings (m3/s, h, m, m3), ending with the caution unless the caller prints it
// itself at the end of a longer report (with_caution = false).
std::string format_summary_table(const reporting::RunSummary& summary, bool with_caution = true);

// The run's warnings (applicability, backwater, pipes at capacity, coupling step, end of run),
// one "  element: message" line each, in the summary's order (each element's together, in
// network order); empty when there are none. The console table prints them under its
// "Applicability warnings" heading.
std::string format_warning_lines(const reporting::RunSummary& summary);

// Writes `<prefix>_stations.csv`, `<prefix>_attenuation.csv` (every reach, pond and culvert),
// `<prefix>_stretches.csv` (the stretches the study names; the header row alone when it names
// none) and `<prefix>_checks.csv` (shocks,
// mass-balance records and applicability warnings, one row each), each with its
// `-metadata.json` sidecar (csv_table.hpp: title, time origin, caution, units); returns the
// CSV paths. The header row comes first; SI values with full round-trip precision; NaN as an
// empty field; text fields quoted per RFC 4180 (csv_field: comma, quote, line break, '#').
// The four paths write_summary_csv() writes for `prefix`, in order.
std::vector<std::filesystem::path> summary_csv_paths(const std::filesystem::path& prefix);
std::vector<std::filesystem::path> write_summary_csv(const std::filesystem::path& prefix,
                                                     const reporting::RunSummary& summary,
                                                     Overwrite overwrite = Overwrite::no,
                                                     OutputSet* set = nullptr);

// The whole summary as one JSON document (NaN as null), with "caution" and "units" members.
std::string format_summary_json(const reporting::RunSummary& summary);
void write_summary_json(const std::filesystem::path& path, const reporting::RunSummary& summary,
                        Overwrite overwrite = Overwrite::no, OutputSet* set = nullptr);

}  // namespace freshet::io
