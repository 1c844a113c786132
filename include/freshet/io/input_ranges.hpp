// The ranges of every number a basin file gives, in one table (docs/basin-file.md, "Ranges").
//
// Each quantity has a hard range and a plausible range:
//   - a value outside the hard range cannot describe a real drainage system (or would break
//     the numerics): it is an error, reported with file, line, element, field, value and rule;
//   - a value outside the plausible range is possible but lies beyond the published tables the
//     range comes from: it is a warning that names the source, printed by `freshet check` and
//     at the start of `route` and `compare`.
// Bounds are in SI (m, m2, m3, m/s, m^0.5/s), or in the key's own unit where the key names it
// (duration_h, output_interval_min, coupling_step_s, ...); messages quote them in the file's
// units.
//
//   const double n = ranged(reader, units, "manning_n", Quantity::reach_manning_n);
//   // reports "= 1e+06: must be <= 1 (...)" as an error, "= 0.5: outside 0.008 to 0.2 ..." as
//   // a warning; returns the value as the file gives it (NaN after an error)
#pragma once

#include <array>
#include <cstddef>
#include <optional>
#include <string_view>
#include <vector>

#include "freshet/io/toml_fields.hpp"
#include "freshet/hydrology/hyetograph.hpp"
#include "freshet/io/input_units.hpp"

namespace freshet::io::detail {

// How a number converts from the file's units to SI (input_units.hpp).
enum class Measure {
  ratio,           // dimensionless, the same in both systems
  length,          // m / ft
  elevation,       // m / ft, a level above a datum
  plan_area,       // ha / acre
  surface_area,    // m2 / ft2
  surface_growth,  // m2 per m / ft2 per ft
  depth,           // mm / in
  rate,            // mm/h / in/h
  volume,          // m3 / acre-ft
  weir_coefficient,  // m^0.5/s / ft^0.5/s
  hours,           // h (key ends in _h)
  minutes,         // min
  seconds,         // s
  per_hour,        // 1/h
  degrees,         // deg
  count,           // a whole number
  discharge,       // m3/s / cfs
};

enum class Quantity {
  duration_h,
  output_interval_min,
  coupling_step_s,
  cell_length,
  implicit_courant,
  storm_step_min,
  storm_duration_min,
  peak_ratio,
  idf_a,
  idf_b,
  idf_c,
  idf_duration_min,
  idf_intensity,
  subcatchment_area,
  plane_length,
  plane_slope,
  plane_manning_n,
  plane_cells,
  curve_number,
  initial_abstraction_ratio,
  event_gap_h,
  conductivity,
  suction_head,
  porosity,
  initial_saturation,
  green_ampt_recovery,
  horton_initial_rate,
  horton_final_rate,
  horton_decay,
  horton_recovery,
  initial_loss,
  continuing_rate,
  impervious_fraction,
  impervious_storage,
  impervious_evaporation,
  reach_length,
  reach_slope,
  reach_manning_n,
  reach_cells,
  elevation,
  channel_width,
  side_slope,
  conduit_size,
  section_offset,
  barrel_manning_n,
  barrel_count,
  barrel_length,
  entrance_loss,
  storage_volume,
  pond_area,
  pond_area_growth,
  orifice_size,
  orifice_coefficient,
  weir_length,
  weir_coefficient,
  notch_angle,
  notch_coefficient,
  road_offset,
  // The values of CSV series (src/io/csv_series.cpp, the column's own unit): hard limits
  // only, no plausibility warning (a storm's depth is judged against the record envelope).
  series_time,
  series_discharge,
  series_rain_intensity,
  series_rain_depth,
};

struct InputRange {
  Quantity quantity;
  std::string_view what;  // "Manning's n of a reach"
  Measure measure;
  double hard_min;
  bool hard_min_open;  // true: the minimum itself is outside (> rather than >=)
  double hard_max;
  bool hard_max_open;
  std::string_view hard_rule;  // why the hard limits
  double plausible_min;
  double plausible_max;
  std::string_view source;  // where the plausible range comes from
};

inline constexpr std::size_t kQuantityCount =
    static_cast<std::size_t>(Quantity::series_rain_depth) + 1;

// The table, in Quantity order.
const std::array<InputRange, kQuantityCount>& input_ranges();
const InputRange& range_of(Quantity q);

// Cells of one reach or plane, however given: beyond this a run could not allocate its state
// (cells = 2e9 once aborted with bad_alloc).
inline constexpr long long kMaxCells = 100000;

// Reads `key` as a number and checks it against the range of `q`. Returns the value as the
// file gives it; NaN when missing (required), not a finite number, or outside the hard range.
double ranged(FieldReader& r, const InputUnits& u, std::string_view key, Quantity q);
std::optional<double> optional_ranged(FieldReader& r, const InputUnits& u, std::string_view key,
                                      Quantity q);
// A whole number (cells, count), checked the same way; nullopt when absent or invalid.
std::optional<long long> optional_ranged_integer(FieldReader& r, std::string_view key,
                                                 Quantity q);
// An array of numbers, each item checked (problems name key[k]); items outside the hard range
// become NaN.
std::vector<double> ranged_numbers(FieldReader& r, const InputUnits& u, std::string_view key,
                                   Quantity q);
// Checks a value already read (file units); false after an error. `item` names key[item + 1].
bool check_range(FieldReader& r, const InputUnits& u, std::string_view key, double value,
                 Quantity q, std::optional<std::size_t> item = std::nullopt);

// The world-record envelope of point rainfall, P = 422 D^0.475 mm with D in hours (Jennings
// 1950, as revised with later records; WMO Manual for Estimation of Probable Maximum
// Precipitation; from memory), for D from 1 min to 2 years.
double record_rainfall_envelope_m(double duration_s);

// A storm's depths against the envelope, over every window of 1 min to its whole duration
// (and the storm itself): more than twice the envelope is an error at `key`, more than the
// envelope a warning; a design storm (`design`) below 1 % of the envelope at its duration is
// a warning too (a depth in mm typed as inches, or the reverse).
void check_storm_depth(FieldReader& r, const InputUnits& u, std::string_view key,
                       const hydrology::Hyetograph& rain, bool design);

// A value as typed, without needless exponents: 200000 rather than 2e+05, 1e+308 as is (the
// shortest form when 10 significant digits do not give the value back exactly).
std::string readable_number(double v);

// The unit label of a measure in the file's system ("m", "ft", "mm/h", ...; "" for ratios).
std::string_view unit_label(Measure m, const InputUnits& u);
// File units to the table's units (SI, or the key's own unit for times): multiply.
double to_table_units(Measure m, const InputUnits& u);

}  // namespace freshet::io::detail
