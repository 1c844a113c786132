// Routed against observed: each observed hydrograph of the run's storm paired with the
// routed discharge at its station, its fit statistics (reporting/fit_statistics.hpp), and the
// CSV file of the pairs (docs/inputs.md, "Observed hydrographs").
#pragma once

#include <filesystem>
#include <string>
#include <vector>

#include "freshet/core/time_series.hpp"
#include "freshet/io/atomic_file.hpp"
#include "freshet/reporting/run_report.hpp"
#include "freshet/study/study.hpp"

namespace freshet::study::detail {

// The observed readings that fall within the run (0 to duration_s), each paired with the
// routed discharge at the same time (the routed series is linear between coupling steps).
// Empty pairs (fewer than 2 readings in the run) leave the statistics undefined (NaN).
reporting::ObservedFit pair_observed(const ObservedSeries& observed,
                                     const PiecewiseLinearSeries& routed, double duration_s);

// One line for the run's notes: "observed (file): NSE 0.62, KGE 0.74, ...".
std::string fit_note(const reporting::ObservedFit& fit);

// Writes <storm>_<station>_observed.csv (time_s, observed_discharge_m3s,
// routed_discharge_m3s) and its sidecar with the fit statistics, in the run's result set.
void write_observed_csv(const std::filesystem::path& path, const reporting::ObservedFit& fit,
                        const std::string& time_origin_iso, const std::string& source,
                        io::Overwrite overwrite, io::OutputSet* set);

}  // namespace freshet::study::detail
