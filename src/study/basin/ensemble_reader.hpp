// The [uncertainty] section of a basin file, and the change table that lays one ensemble
// member's values over the base network or a scenario (read by NetworkReader like a
// scenario's changes). See freshet/study/ensemble.hpp.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include <toml++/toml.h>

#include "freshet/core/error.hpp"
#include "freshet/core/units.hpp"
#include "freshet/study/ensemble.hpp"

namespace freshet::study::detail {

// The table of the element with this id in any element array of the basin file, or null.
const toml::table* find_element(const toml::table& root, std::string_view id);

// Reads [uncertainty] (nullopt when the file has none) and draws the members' probabilities.
// Problems name the file, line, "uncertainty" or "uncertainty vary[k]", and the field.
// Threshold values are converted from the file's `units` to SI.
std::optional<EnsembleDefinition> read_ensemble(const toml::table& root, const std::string& file,
                                                units::System units,
                                                std::vector<Problem>& problems);

// The changes of `scenario_changes` (may be null) with every varied parameter set from
// `probabilities` (one per parameter). Elements the scenario changes are varied from their
// changed values. `values` (optional) receives each element's value.
toml::table member_changes(const toml::table& root, const toml::table* scenario_changes,
                           const EnsembleDefinition& ensemble,
                           const std::vector<double>& probabilities,
                           std::vector<MemberValue>* values);

}  // namespace freshet::study::detail
