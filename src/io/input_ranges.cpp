#include "freshet/io/input_ranges.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <limits>
#include <string>

namespace freshet::io::detail {

namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kMmPerH = 1e-3 / 3600.0;  // 1 mm/h in m/s
constexpr double kMm = 1e-3;
constexpr double kHa = 1e4;

// Shared wording of the sources.
constexpr std::string_view kChow =
    "Chow (1959), Open-Channel Hydraulics, Table 5-6: its extremes, 0.008 (lucite) to 0.200 "
    "(dense willows on a flood plain), from memory";
constexpr std::string_view kChowConduits =
    "Chow (1959), Open-Channel Hydraulics, Table 5-6, closed conduits: 0.008 (lucite) to about "
    "0.035 (corrugated metal and rubble masonry), from memory";
constexpr std::string_view kTr55SheetFlow =
    "NRCS (1986), TR-55, Table 3-1: 0.011 (smooth surfaces) to 0.80 (woods, dense underbrush), "
    "from memory";
constexpr std::string_view kRawls =
    "Rawls, Brakensiek & Miller (1983), Green-Ampt parameters by soil texture, as tabulated in "
    "Chow, Maidment & Mays (1988), Applied Hydrology, Table 4.3.1 (sand to clay, including their "
    "ranges), from memory";
constexpr std::string_view kEarth =
    "the land surface of the Earth, Dead Sea shore (-430 m) to Everest (8849 m), from memory";
constexpr std::string_view kCommon = "common practice, no source";
constexpr std::string_view kCsvOnlyHard =
    "none: a CSV value has hard limits only (a storm's depth is then judged against the record "
    "envelope)";
constexpr double kThousandYearsS = 1000.0 * 365.25 * 86400.0;

// clang-format off
constexpr std::array<InputRange, kQuantityCount> kRanges{{
  {Quantity::duration_h, "run length", Measure::hours,
   0.0, true, 8784.0, false, "a run is one flood, at most a (leap) year; our criterion",
   0.25, 240.0, "common practice, no source: design floods run from minutes to a few days"},
  {Quantity::output_interval_min, "output interval", Measure::minutes,
   1.0 / 60.0, false, 1440.0, false, "at least 1 s and at most a day; our criterion",
   1.0, 60.0, kCommon},
  {Quantity::coupling_step_s, "coupling step", Measure::seconds,
   0.01, false, kInf, false,
   "at least 0.01 s (shorter steps only pile up round-off) and at most the output interval; "
   "our criterion",
   0.5, 600.0, kCommon},
  {Quantity::cell_length, "cell length of a reach", Measure::length,
   0.0, true, 1e5, false, "a cell is shorter than 100 km; our criterion",
   0.5, 500.0, kCommon},
  {Quantity::implicit_courant, "Courant number of the implicit upwind scheme", Measure::ratio,
   0.0, true, 1000.0, false, "above 1000 the scheme smears a wave over its whole reach",
   0.5, 10.0,
   "LeVeque (2002), Finite Volume Methods for Hyperbolic Problems, sec. 8.6: smearing grows "
   "as c dx (1 + C) / 2, from memory"},
  {Quantity::storm_step_min, "storm block length", Measure::minutes,
   1.0 / 60.0, false, 1440.0, false, "at least 1 s and at most a day; our criterion",
   1.0, 60.0, kCommon},
  {Quantity::storm_duration_min, "storm duration", Measure::minutes,
   0.0, true, 525600.0, false, "at most a year; our criterion",
   5.0, 4320.0, "common practice, no source: design storms last 5 min to 3 days"},
  {Quantity::peak_ratio, "time of the storm's peak, as a fraction of its duration",
   Measure::ratio, 0.0, false, 1.0, false, "a fraction of the duration",
   0.0, 1.0, kCommon},
  {Quantity::idf_a, "IDF coefficient a", Measure::rate,
   0.0, true, 1e6 * kMmPerH, false, "above 1e6 (mm/h) min^c no IDF relation is of this world; "
   "our criterion", 0.0, 1e6 * kMmPerH, kCommon},
  {Quantity::idf_b, "IDF coefficient b", Measure::minutes,
   0.0, false, 1440.0, false, "a time offset within a day; our criterion",
   0.0, 60.0, kCommon},
  {Quantity::idf_c, "IDF exponent c", Measure::ratio,
   0.0, true, 1.0, false, "depth i t must not fall as the duration t grows",
   0.4, 1.0, kCommon},
  {Quantity::idf_duration_min, "IDF duration", Measure::minutes,
   0.0, true, 525600.0, false, "at most a year; our criterion",
   1.0, 10080.0, kCommon},
  {Quantity::idf_intensity, "IDF intensity", Measure::rate,
   0.0, true, 4000.0 * kMmPerH, false,
   "over twice the world's 1-minute record (31.2 mm, Unionville, Maryland, 1956: 1872 mm/h), "
   "from memory", 0.0, 1872.0 * kMmPerH,
   "the world's 1-minute record point rainfall (31.2 mm, Unionville, Maryland, 1956), from "
   "memory"},
  {Quantity::subcatchment_area, "plan area of a subcatchment", Measure::plan_area,
   0.0, true, 7.1e12, false,
   "larger than the Amazon basin (7.1 million km2, the Earth's largest), from memory",
   0.01 * kHa, 1e4 * kHa,
   "common practice, no source: overland planes describe subcatchments of 100 m2 to 100 km2"},
  {Quantity::plane_length, "length of an overland plane", Measure::length,
   0.0, true, 1e4, false, "overland flow does not run 10 km without a channel; our criterion",
   1.0, 500.0,
   "NRCS (1986), TR-55 limits sheet flow to 300 ft (91 m), from memory; planes that include "
   "shallow concentrated flow run a few hundred metres (common practice, no source)"},
  {Quantity::plane_slope, "slope of an overland plane", Measure::ratio,
   0.0, true, 1.0, false,
   "steeper than 45 degrees (1 m/m) is a cliff: Manning's law with the bed slope as friction "
   "slope does not apply", 0.0005, 0.5, kCommon},
  {Quantity::plane_manning_n, "Manning's n of an overland plane", Measure::ratio,
   0.0, true, 1.0, false, "above 1, beyond every published table", 0.011, 0.80, kTr55SheetFlow},
  {Quantity::plane_cells, "cells of an overland plane", Measure::count,
   1.0, false, static_cast<double>(kMaxCells), false,
   "at most 100000 cells (the memory of one run); our criterion", 4.0, 10000.0, kCommon},
  {Quantity::curve_number, "curve number", Measure::ratio,
   30.0, true, 100.0, false,
   "NRCS (2004), NEH 630 ch. 9-10: curve numbers run from 30 to 100", 30.0, 98.0,
   "NRCS (1986), TR-55, Tables 2-2a to 2-2d: 98 for paved surfaces is the highest tabulated "
   "land-cover value, from memory"},
  {Quantity::initial_abstraction_ratio, "initial abstraction ratio", Measure::ratio,
   0.0, false, 1.0, true, "a fraction of the retention, below 1",
   0.05, 0.2, "Hawkins et al. (2002): 0.05 (fitted) and 0.2 (NRCS), from memory"},
  {Quantity::event_gap_h, "dry time ending a curve-number event", Measure::hours,
   0.0, true, 8784.0, false, "at most a (leap) year, the longest run; our criterion",
   1.0, 24.0, kCommon},
  {Quantity::conductivity, "Green-Ampt hydraulic conductivity", Measure::rate,
   0.0, true, 1.0, false, "above 1 m/s, faster than open gravel; our criterion",
   0.1 * kMmPerH, 250.0 * kMmPerH, kRawls},
  {Quantity::suction_head, "Green-Ampt wetting-front suction head", Measure::depth,
   0.0, true, 10.0, false, "above 10 m, beyond any soil's capillary rise; our criterion",
   9.0 * kMm, 1570.0 * kMm, kRawls},
  {Quantity::porosity, "porosity", Measure::ratio,
   0.0, true, 1.0, true, "a fraction of the soil volume, below 1", 0.25, 0.60, kRawls},
  {Quantity::initial_saturation, "initial effective saturation", Measure::ratio,
   0.0, false, 1.0, true, "initial moisture below saturation", 0.0, 1.0, kCommon},
  {Quantity::green_ampt_recovery, "Green-Ampt recovery constant", Measure::per_hour,
   0.0, false, 1000.0, false, "the wetted depth drains by e in more than 3.6 s; our criterion",
   0.01, 0.2,
   "a wetted soil back within 2 % of its initial deficit after 1 to 14 days of drying, k_r = "
   "ln(50) / drying time; common practice, no source"},
  {Quantity::horton_initial_rate, "Horton initial infiltration rate", Measure::rate,
   0.0, false, 1.0, false, "above 1 m/s, faster than open gravel; our criterion",
   0.0, 250.0 * kMmPerH,
   "ASCE (1992), Design and Construction of Urban Stormwater Management Systems: initial "
   "rates up to 5 in/h (127 mm/h) for dry sandy soils, doubled; from memory"},
  {Quantity::horton_final_rate, "Horton final infiltration rate", Measure::rate,
   0.0, false, 1.0, false, "above 1 m/s, faster than open gravel; our criterion",
   0.0, 50.0 * kMmPerH,
   "ASCE (1992): final rates 0 to 0.45 in/h (11 mm/h) for hydrologic soil groups D to A, "
   "with room for sands; from memory"},
  {Quantity::horton_decay, "Horton decay constant", Measure::per_hour,
   0.0, true, 1000.0, false, "the rate falls by e in more than 3.6 s; our criterion",
   0.5, 20.0, "ASCE (1992): 2 to 5 per hour typical (4.14 per hour), from memory"},
  {Quantity::horton_recovery, "Horton recovery constant", Measure::per_hour,
   0.0, false, 1000.0, false, "the capacity recovers by e in more than 3.6 s; our criterion",
   0.01, 0.2,
   "a dry soil's capacity back within 2 % of f0 after 1 to 14 days of drying, k_d = "
   "ln(50) / drying time; common practice, no source"},
  {Quantity::initial_loss, "initial loss", Measure::depth,
   0.0, false, 1.0, false, "at most 1 m of water; our criterion",
   0.0, 100.0 * kMm, kCommon},
  {Quantity::continuing_rate, "continuing loss rate", Measure::rate,
   0.0, false, 1.0, false, "above 1 m/s, faster than open gravel; our criterion",
   0.0, 20.0 * kMmPerH, kCommon},
  {Quantity::impervious_fraction, "impervious fraction", Measure::ratio,
   0.0, false, 1.0, false, "a fraction of the area", 0.0, 1.0, kCommon},
  {Quantity::impervious_storage, "depression storage of impervious surfaces", Measure::depth,
   0.0, false, 1.0, false, "at most 1 m of water; our criterion",
   0.0, 5.0 * kMm,
   "ASCE (1992): 0.05 to 0.1 in (1.3 to 2.5 mm) for impervious surfaces, doubled; from memory"},
  {Quantity::impervious_evaporation, "evaporation from impervious depression storage",
   Measure::rate, 0.0, false, 1.0, false,
   "above 1 m/s, faster than any evaporation; our criterion", 0.0, 1.0 * kMmPerH,
   "open-water evaporation rarely above 10 mm a day (0.4 mm/h), doubled; from memory"},
  {Quantity::reach_length, "length of a reach", Measure::length,
   0.0, true, 1e6, false, "longer than 1000 km; our criterion", 1.0, 50000.0, kCommon},
  {Quantity::reach_slope, "bed slope of a reach", Measure::ratio,
   0.0, true, 1.0, false,
   "steeper than 45 degrees (1 m/m) is a fall: Manning's law with the bed slope as friction "
   "slope does not apply",
   1e-5, 0.1,
   "lowland rivers fall about 1e-5, step-pool and cascade channels up to 0.1 and more "
   "(Rosgen 1994, A and Aa+ types), from memory"},
  {Quantity::reach_manning_n, "Manning's n of a reach", Measure::ratio,
   0.0, true, 1.0, false, "above 1, beyond every published table", 0.008, 0.200, kChow},
  {Quantity::reach_cells, "cells of a reach", Measure::count,
   1.0, false, static_cast<double>(kMaxCells), false,
   "at most 100000 cells (the memory of one run); our criterion", 4.0, 10000.0, kCommon},
  {Quantity::elevation, "elevation", Measure::elevation,
   -11000.0, false, 9000.0, false,
   "beyond the deepest ocean trench (-10.9 km) or the highest summit (8.85 km), from memory",
   -430.0, 8849.0, kEarth},
  {Quantity::channel_width, "width of a channel", Measure::length,
   0.0, false, 1e5, false, "wider than 100 km; our criterion", 0.1, 1000.0, kCommon},
  {Quantity::side_slope, "side slope (horizontal per vertical)", Measure::ratio,
   0.0, false, 1000.0, false, "flatter than 1000:1 is no bank; our criterion",
   0.0, 10.0, "common practice, no source: flatter banks are flood plains (use a surveyed "
   "section)"},
  {Quantity::conduit_size, "size of a pipe or barrel", Measure::length,
   0.0, true, 50.0, false, "larger than 50 m; our criterion",
   0.1, 10.0, "common practice, no source: drainage pipes and barrels of 100 mm to 10 m"},
  {Quantity::section_offset, "offset across a section", Measure::length,
   -1e5, false, 1e5, false, "more than 100 km from the section's origin; our criterion",
   -1e4, 1e4, kCommon},
  {Quantity::barrel_manning_n, "Manning's n of a culvert barrel", Measure::ratio,
   0.0, true, 1.0, false, "above 1, beyond every published table", 0.008, 0.035, kChowConduits},
  {Quantity::barrel_count, "number of barrels", Measure::count,
   1.0, false, 1000.0, false, "at most 1000; our criterion", 1.0, 20.0, kCommon},
  {Quantity::barrel_length, "length of a culvert barrel", Measure::length,
   0.0, true, 1e4, false, "longer than 10 km; our criterion", 1.0, 500.0, kCommon},
  {Quantity::entrance_loss, "entrance loss coefficient", Measure::ratio,
   0.0, false, 10.0, false, "above 10 velocity heads; our criterion",
   0.0, 1.0,
   "FHWA (2012), HDS-5, Table C.2: 0.2 to 0.9, from memory"},
  {Quantity::storage_volume, "stored volume", Measure::volume,
   0.0, false, 1e12, false,
   "more than 1000 km3, above the largest reservoirs (about 180 km3), from memory",
   0.0, 1e8, "common practice, no source: ponds behind roads and detention basins hold less "
   "than 100 million m3"},
  {Quantity::pond_area, "surface area of a pond", Measure::surface_area,
   0.0, true, 1e10, false, "more than 10000 km2; our criterion",
   1.0, 1e7, kCommon},
  {Quantity::pond_area_growth, "growth of a pond's surface area with stage",
   Measure::surface_growth, 0.0, false, 1e10, false, "more than 10000 km2 per m; our criterion",
   0.0, 1e7, kCommon},
  {Quantity::orifice_size, "size of an orifice", Measure::length,
   0.0, true, 50.0, false, "larger than 50 m; our criterion",
   0.01, 5.0, kCommon},
  {Quantity::orifice_coefficient, "orifice discharge coefficient", Measure::ratio,
   0.0, true, 1.0, false, "an orifice passes at most its ideal flow (coefficient 1)",
   0.5, 1.0,
   "sharp-edged 0.6 to well-rounded 0.98 (Brater & King 1976, Handbook of Hydraulics), from "
   "memory"},
  {Quantity::weir_length, "weir length", Measure::length,
   0.0, true, 1e4, false, "longer than 10 km; our criterion", 0.1, 500.0, kCommon},
  {Quantity::weir_coefficient, "weir coefficient C in Q = C L H^1.5",
   Measure::weir_coefficient, 0.0, true, 5.0, false,
   "above 5 m^0.5/s, well over the ideal (2/3) (2g)^0.5 = 2.95 m^0.5/s",
   1.2, 2.0,
   "broad- to sharp-crested weirs and road embankments, 2.6 to 3.3 ft^0.5/s (1.4 to 1.8 "
   "m^0.5/s; Brater & King 1976 and FHWA HDS-5), from memory"},
  {Quantity::notch_angle, "V-notch angle", Measure::degrees,
   0.0, true, 180.0, true, "an angle between the sides, below 180 degrees",
   20.0, 100.0,
   "ISO 1438 and USBR (2001), Water Measurement Manual: calibrations for 20 to 100 degrees, "
   "from memory"},
  {Quantity::notch_coefficient, "V-notch discharge coefficient", Measure::ratio,
   0.0, true, 1.0, false, "a notch passes at most its ideal flow (coefficient 1)",
   0.55, 0.65,
   "USBR (2001), Water Measurement Manual: fully contracted V-notches 0.58 to 0.61, from memory"},
  {Quantity::road_offset, "position along a road", Measure::length,
   -1e5, false, 1e5, false, "more than 100 km from the survey's origin; our criterion",
   -1e4, 1e4, kCommon},
  // CSV series: the limits keep every value a finite number when written back in any column
  // unit. Generous on purpose; no plausible range (it equals the hard one).
  {Quantity::series_time, "time of a series row", Measure::seconds,
   -kThousandYearsS, false, kThousandYearsS, false, "more than 1000 years from the time origin",
   -kThousandYearsS, kThousandYearsS, kCsvOnlyHard},
  {Quantity::series_discharge, "discharge of a series row", Measure::discharge,
   0.0, false, 1e6, false,
   "above any flood discharge ever measured, about 3e5 m3/s on the largest rivers; from memory",
   0.0, 1e6, kCsvOnlyHard},
  {Quantity::series_rain_intensity, "rain intensity of a series row", Measure::rate,
   0.0, false, 1e4 * kMmPerH, false,
   "10,000 mm/h, several times the world-record 1-minute rainfall rate (about 38 mm in 1 min; "
   "from memory)",
   0.0, 1e4 * kMmPerH, kCsvOnlyHard},
  {Quantity::series_rain_depth, "rain depth of a series row", Measure::depth,
   0.0, false, 10.0, false,
   "10 m in one row, over five times the world-record 24-hour point rainfall (about 1.8 m; "
   "from memory)",
   0.0, 10.0, kCsvOnlyHard},
}};
// clang-format on

constexpr bool table_in_order() {
  for (std::size_t k = 0; k < kRanges.size(); ++k) {
    if (static_cast<std::size_t>(kRanges[k].quantity) != k) return false;
    const InputRange& r = kRanges[k];
    // The plausible range lies inside the hard range.
    if (r.plausible_min < r.hard_min || r.plausible_max > r.hard_max) return false;
    if (r.source.empty() || r.hard_rule.empty() || r.what.empty()) return false;
  }
  return true;
}
static_assert(table_in_order(), "input ranges: one row per Quantity, in order, complete");

// A bound converted to the file's units, to 7 significant digits (3280840 ft, not
// 3280839.895013123 ft).
std::string bound_text(double table_value, Measure m, const InputUnits& u) {
  const std::string_view unit = unit_label(m, u);
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.7g", table_value / to_table_units(m, u));
  return buf +
         (unit.empty() ? std::string() : " " + std::string(unit));
}

std::string value_text(double file_value, Measure m, const InputUnits& u) {
  const std::string_view unit = unit_label(m, u);
  return "= " + readable_number(file_value) + (unit.empty() ? std::string() : " " + std::string(unit));
}

void report(FieldReader& r, std::string_view key, std::optional<std::size_t> item,
            std::string message) {
  if (item) {
    r.report_item(key, *item, std::move(message));
  } else {
    r.report(key, std::move(message));
  }
}

}  // namespace

const std::array<InputRange, kQuantityCount>& input_ranges() { return kRanges; }

std::string readable_number(double v) {
  char buf[40];
  std::snprintf(buf, sizeof buf, "%.10g", v);
  return std::strtod(buf, nullptr) == v ? std::string(buf) : format_value(v);
}

const InputRange& range_of(Quantity q) { return kRanges[static_cast<std::size_t>(q)]; }

std::string_view unit_label(Measure m, const InputUnits& u) {
  const bool us = u.us();
  switch (m) {
    case Measure::ratio:
    case Measure::count: return "";
    case Measure::length:
    case Measure::elevation: return us ? "ft" : "m";
    case Measure::plan_area: return us ? "acre" : "ha";
    case Measure::surface_area: return us ? "ft2" : "m2";
    case Measure::surface_growth: return us ? "ft2 per ft" : "m2 per m";
    case Measure::depth: return us ? "in" : "mm";
    case Measure::rate: return us ? "in/h" : "mm/h";
    case Measure::volume: return us ? "acre-ft" : "m3";
    case Measure::weir_coefficient: return us ? "ft^0.5/s" : "m^0.5/s";
    case Measure::hours: return "h";
    case Measure::minutes: return "min";
    case Measure::seconds: return "s";
    case Measure::per_hour: return "per h";
    case Measure::degrees: return "degrees";
    case Measure::discharge: return us ? "cfs" : "m3/s";
  }
  return "";
}

double to_table_units(Measure m, const InputUnits& u) {
  switch (m) {
    case Measure::length:
    case Measure::elevation: return u.length_m(1.0);
    case Measure::plan_area: return u.plan_area_m2(1.0);
    case Measure::surface_area: return u.length_m(u.length_m(1.0));
    case Measure::surface_growth: return u.length_m(1.0);
    case Measure::depth: return u.rain_depth_m(1.0);
    case Measure::rate: return u.rate_m_s(1.0);
    case Measure::volume: return u.volume_m3(1.0);
    case Measure::weir_coefficient: return u.weir_coefficient_si(1.0);
    case Measure::discharge: return u.discharge_m3s(1.0);
    default: return 1.0;
  }
}

bool check_range(FieldReader& r, const InputUnits& u, std::string_view key, double value,
                 Quantity q, std::optional<std::size_t> item) {
  if (!std::isfinite(value)) return false;  // reported by the reader
  const InputRange& range = range_of(q);
  const double v = value * to_table_units(range.measure, u);
  const bool low = range.hard_min_open ? !(v > range.hard_min) : v < range.hard_min;
  const bool high = range.hard_max_open ? !(v < range.hard_max) : v > range.hard_max;
  if (low || high) {
    const std::string op = low ? (range.hard_min_open ? "> " : ">= ")
                               : (range.hard_max_open ? "< " : "<= ");
    const double bound = low ? range.hard_min : range.hard_max;
    // A bare positivity rule keeps its short form ("must be > 0").
    const bool plain = low && bound == 0.0;
    report(r, key, item,
           value_text(value, range.measure, u) + ": must be " + op +
               (plain ? std::string("0") : bound_text(bound, range.measure, u)) +
               (plain ? std::string() : " (" + std::string(range.what) + ": " +
                                            std::string(range.hard_rule) + ")"));
    return false;
  }
  if (v < range.plausible_min || v > range.plausible_max) {
    std::string where = std::string(key);
    if (item) where += "[" + std::to_string(*item + 1) + "]";
    r.warn(where, value_text(value, range.measure, u) + ": outside the plausible range " +
                      bound_text(range.plausible_min, range.measure, u) + " to " +
                      bound_text(range.plausible_max, range.measure, u) + " for the " +
                      std::string(range.what) + " (" + std::string(range.source) + ")");
  }
  return true;
}

std::optional<double> optional_ranged(FieldReader& r, const InputUnits& u, std::string_view key,
                                      Quantity q) {
  auto v = r.optional_number(key);
  if (v && !check_range(r, u, key, *v, q)) return kNaN;
  return v;
}

double ranged(FieldReader& r, const InputUnits& u, std::string_view key, Quantity q) {
  if (!r.has(key)) return r.number(key);  // reports the missing key
  return *optional_ranged(r, u, key, q);
}

std::optional<long long> optional_ranged_integer(FieldReader& r, std::string_view key,
                                                 Quantity q) {
  const InputRange& range = range_of(q);
  auto v = r.optional_integer(key, static_cast<long long>(range.hard_min));
  if (v && !check_range(r, InputUnits{}, key, static_cast<double>(*v), q)) return std::nullopt;
  return v;
}

std::vector<double> ranged_numbers(FieldReader& r, const InputUnits& u, std::string_view key,
                                   Quantity q) {
  std::vector<double> values = r.numbers(key);
  for (std::size_t k = 0; k < values.size(); ++k) {
    if (!check_range(r, u, key, values[k], q, k)) values[k] = kNaN;
  }
  return values;
}

double record_rainfall_envelope_m(double duration_s) {
  return 0.422 * std::pow(duration_s / 3600.0, 0.475);
}

namespace {

// The wettest window of `rain` relative to the envelope.
struct WorstWindow {
  double ratio = 0.0;
  double depth_m = 0.0;
  double duration_s = 0.0;
};

WorstWindow worst_window(const hydrology::Hyetograph& rain) {
  WorstWindow worst;
  const double whole_s = rain.duration_s();
  const auto consider = [&](double t0, double t1) {
    const double d_s = t1 - t0;
    if (!(d_s > 0.0)) return;
    const double depth = rain.depth_between_m(t0, t1);
    const double ratio = depth / record_rainfall_envelope_m(std::max(d_s, 60.0));
    if (ratio > worst.ratio) worst = {ratio, depth, d_s};
  };
  consider(rain.start_s(), rain.end_s());
  // Windows of standard lengths starting at every block boundary: enough to find a burst
  // inside a long record without testing every pair of blocks.
  constexpr double kWindowsMin[] = {1, 5, 10, 15, 30, 60, 120, 360, 720, 1440, 4320, 10080};
  for (double w_min : kWindowsMin) {
    const double w_s = 60.0 * w_min;
    if (w_s >= whole_s) break;
    for (double t0 : rain.boundary_times_s()) {
      if (t0 + w_s > rain.end_s()) break;
      consider(t0, t0 + w_s);
    }
  }
  return worst;
}

std::string duration_text(double s) {
  return s < 7200.0 ? format_value(std::round(s / 6.0) / 10.0) + " min"
                    : format_value(std::round(s / 360.0) / 10.0) + " h";
}

}  // namespace

void check_storm_depth(FieldReader& r, const InputUnits& u, std::string_view key,
                       const hydrology::Hyetograph& rain, bool design) {
  const auto depth = [&u](double m) {
    return format_fixed(m / u.rain_depth_m(1.0), u.us() ? 2 : 1) + " " + u.depth_unit();
  };
  constexpr std::string_view kEnvelope =
      "the world-record envelope of point rainfall, P = 422 D^0.475 mm with D in hours "
      "(Jennings 1950, with later records; from memory)";
  const WorstWindow w = worst_window(rain);
  if (w.duration_s > 0.0) {
    const double envelope_m = record_rainfall_envelope_m(std::max(w.duration_s, 60.0));
    const std::string what = "gives " + depth(w.depth_m) + " within " +
                             duration_text(w.duration_s) + ", " + format_fixed(w.ratio, 1) +
                             " times " + std::string(kEnvelope) + " (" + depth(envelope_m) +
                             " within " + duration_text(w.duration_s) + ")";
    if (w.ratio > 2.0) {
      r.report(key, what + ": more than twice the world record is not a real storm; " +
                        "check the units (units = \"us\" reads depths in inches and " +
                        "intensities in in/h)");
      return;
    }
    if (w.ratio > 1.0) {
      r.warn(key, what + ": wetter than any storm on record; check the depths and their units");
    }
  }
  const double total_envelope_m = record_rainfall_envelope_m(std::max(rain.duration_s(), 60.0));
  if (design && rain.total_depth_m() < 0.01 * total_envelope_m) {
    r.warn(key, "gives " + depth(rain.total_depth_m()) + " within " +
                    duration_text(rain.duration_s()) + ", less than 1 % of " + std::string(kEnvelope) + " (" +
                    depth(total_envelope_m) + "): too small for a design storm; check the "
                    "units (units = \"si\" reads depths in mm and intensities in mm/h)");
  }
}

}  // namespace freshet::io::detail
