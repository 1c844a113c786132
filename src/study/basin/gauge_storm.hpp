// Storms from rain-gauge records (method = "gauges" in a basin file, docs/inputs.md): each
// gauge's record read as it comes (io/gauge_record.hpp), and each subcatchment's rain the
// weighted mix of the gauges the storm's `weights` table gives it. Also the areal reduction
// of design storms (areal_reduction = "tp29").
#pragma once

#include <filesystem>
#include <map>
#include <optional>
#include <string>

#include <toml++/toml.h>

#include "freshet/hydrology/hyetograph.hpp"
#include "freshet/io/csv_series.hpp"
#include "freshet/io/toml_fields.hpp"
#include "freshet/study/study.hpp"

namespace freshet::study::detail {

// The rain of a CSV series (freshet's own or a gauge record): depth rows are the blocks
// ending at each row; intensity rows are instants, linear between them, and each block gets
// the exact integral.
hydrology::Hyetograph hyetograph_of(const io::SeriesTable& t, const std::string& label);

struct GaugeStorm {
  hydrology::Hyetograph mean;  // the plain mean of the gauges: what check and the report show
  std::map<std::string, hydrology::Hyetograph, std::less<>> by_subcatchment;
  std::string description;     // "gauges heron-hill, mill-cross"
};

// Reads the gauge keys of a storm table (`r`, already past id/method/description): missing,
// the [[storm.gauge]] array and the weights table, checked against the subcatchments of
// `root`. Problems go to r's list; nullopt when there was any.
std::optional<GaugeStorm> read_gauge_storm(io::FieldReader& r, const toml::table& root,
                                           const std::filesystem::path& dir,
                                           const StudySettings& settings,
                                           const std::string& label);

// For a design storm: areal_reduction = "tp29" with reduction_area (ha / acre) scales the
// storm's depths by the TP-29 areal reduction factor of that area and the storm's duration
// (hydrology/areal_rain.hpp). Returns the storm unchanged when the key is absent.
hydrology::Hyetograph apply_areal_reduction(io::FieldReader& r, hydrology::Hyetograph rain,
                                            const StudySettings& settings,
                                            std::string& description);

}  // namespace freshet::study::detail
