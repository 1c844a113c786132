// Observed hydrographs ([[observed]] in a basin file, docs/inputs.md): a dated discharge
// record read as it comes (io/gauge_record.hpp) and attached to a station for one storm.
#pragma once

#include <filesystem>
#include <vector>

#include <toml++/toml.h>

#include "freshet/study/study.hpp"

namespace freshet::study::detail {

// Reads every [[observed]] table of `root`; `storms` and `element_ids` are what the file
// defines (an unknown station or storm is a problem at its key). Problems go to `problems`.
std::vector<ObservedSeries> read_observed(const toml::table& root, const std::string& file,
                                          const std::filesystem::path& dir,
                                          const StudySettings& settings,
                                          const std::vector<StormDefinition>& storms,
                                          const std::vector<std::string>& element_ids,
                                          std::vector<Problem>& problems);

}  // namespace freshet::study::detail
