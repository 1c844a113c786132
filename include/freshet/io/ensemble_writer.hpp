// The files of one ensemble (docs/outputs.md, "Ensemble files"): what its members say at each
// station, as CSV tables with their CSVW sidecars and one JSON document, all under one stem
// (`out/base/aep1-60min_ensemble`):
//   <stem>_percentiles.csv   a row per station: each percentile of peak discharge, peak stage,
//                            time of peak and outflow volume (columns peak_discharge_m3s_p5 ...)
//   <stem>_exceedance.csv    a row per threshold: members above it and the probability
//   <stem>_convergence.csv   the percentiles of the first N/8, N/4, N/2 and N members
//   <stem>_members.csv       each member's values at each station (the samples of the above)
//   <stem>.json              all of the above but the members, with the caution
//
//   io::EnsembleDescription d{.title = "...", .scenario = "", .storm = "aep1-60min", ...};
//   io::write_ensemble_tables("out/base/aep1-60min_ensemble", summary, members, d,
//                             Overwrite::no, &set);
#pragma once

#include <filesystem>
#include <string>
#include <vector>

#include "freshet/io/atomic_file.hpp"
#include "freshet/uncertainty/ensemble_summary.hpp"

namespace freshet::io {

struct EnsembleDescription {
  std::string title;            // the study's title
  std::string source;           // "freshet <version>"
  std::string time_origin_iso;  // of the *_time_s columns
  std::string scenario;         // "" = the base network
  std::string storm;
  std::string sampling;                    // e.g. "latin-hypercube, seed 1"
  std::vector<std::string> station_names;  // aligned with the summary's stations
};

// "p5", "p50", "p97.5": the suffix of a percentile's columns.
std::string percentile_label(double q);

// The paths write_ensemble_tables writes, the JSON (the set's marker) last; sidecars not listed.
std::vector<std::filesystem::path> ensemble_table_paths(const std::filesystem::path& stem);

// The JSON document of <stem>.json (also the "ensembles" member of a command's JSON result).
std::string format_ensemble_json(const uncertainty::EnsembleSummary& summary,
                                 const EnsembleDescription& d);

// Writes every file (atomically, in `set` when given); an existing file stops all before any
// is written. `members` gives the samples, one entry per station as in the summary.
std::vector<std::filesystem::path> write_ensemble_tables(
    const std::filesystem::path& stem,
    const uncertainty::EnsembleSummary& summary,
    const std::vector<uncertainty::MemberPeaks>& members,
    const EnsembleDescription& d,
    Overwrite overwrite = Overwrite::no,
    OutputSet* set = nullptr);

}  // namespace freshet::io
