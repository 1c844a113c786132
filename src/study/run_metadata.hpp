// The study module's NetCDF metadata of one run (title, history, references, ACDD discovery
// attributes) and the instances of a station file, shared by a run's files (study_run.cpp)
// and an ensemble's bands (ensemble_output.cpp).
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include "freshet/io/netcdf_writer.hpp"
#include "freshet/study/study.hpp"
#include "freshet/study/study_run.hpp"

namespace freshet::study::detail {

// `what` names the file's content, e.g. "stations" (the title says the storm and scenario).
io::NetcdfRunMetadata run_metadata(const Study& study, const RunRequest& req,
                                   const std::string& what);

// The stations at `index` (model order indices into `stations`) as a NetCDF instance set.
io::InstanceSet run_instances(const std::vector<StationDescription>& stations,
                              const std::vector<std::size_t>& index, io::InstanceKind kind);

}  // namespace freshet::study::detail
