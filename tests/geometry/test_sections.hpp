// Sections shared by the geometry tests (invented channels; the survey is of no real place).
#pragma once

#include <cmath>
#include <memory>
#include <vector>

#include "freshet/geometry/cross_section.hpp"

namespace freshet::geometry::testing {

inline RectangularSpec rectangle_spec() { return {.bottom_width_m = 4.0, .manning_n = 0.03}; }

inline TrapezoidalSpec trapezoid_spec() {
  return {.bottom_width_m = 3.0, .left_side_slope = 1.5, .right_side_slope = 2.5,
          .manning_n = 0.035};
}

inline TriangularSpec triangle_spec() {
  return {.left_side_slope = 2.0, .right_side_slope = 3.0, .manning_n = 0.02};
}

inline CircularSpec circle_spec() { return {.diameter_m = 1.2, .manning_n = 0.013}; }

inline SheetSpec sheet_spec() { return {.manning_n = 0.15}; }

// A natural channel with two overbanks ("Alder Brook", invented).
inline IrregularSpec natural_spec() {
  IrregularSpec s;
  s.points = {{0, 104.0},  {8, 102.5},  {20, 102.1}, {24, 101.0}, {27, 99.6}, {30, 99.2},
              {33, 99.9},  {36, 101.3}, {45, 102.0}, {60, 102.4}, {70, 103.8}};
  s.left_bank_station_m = 24.0;
  s.right_bank_station_m = 36.0;
  s.left_overbank_n = 0.06;
  s.main_channel_n = 0.035;
  s.right_overbank_n = 0.08;
  return s;
}

// The trapezoid of trapezoid_spec() surveyed to a depth of 4 m, one n throughout.
inline IrregularSpec surveyed_trapezoid_spec() {
  IrregularSpec s;
  s.points = {{0.0, 4.0}, {6.0, 0.0}, {9.0, 0.0}, {19.0, 4.0}};
  s.left_bank_station_m = 0.0;
  s.right_bank_station_m = 19.0;
  s.left_overbank_n = s.main_channel_n = s.right_overbank_n = 0.035;
  return s;
}

inline std::vector<SectionSpec> all_specs() {
  return {rectangle_spec(), trapezoid_spec(), triangle_spec(),
          circle_spec(),    natural_spec(),   sheet_spec()};
}

// Log-spaced values from lo to hi inclusive.
inline std::vector<double> log_spaced(double lo, double hi, int count) {
  std::vector<double> v;
  for (int k = 0; k < count; ++k) {
    v.push_back(lo * std::pow(hi / lo, static_cast<double>(k) / (count - 1)));
  }
  return v;
}

// Depth range for sweeps: up to just below the crown for a conduit, 5 x scale otherwise.
inline double sweep_top_depth_m(const CrossSection& s) {
  if (auto crown = s.full_depth_m()) return 0.999 * *crown;
  return 5.0 * s.depth_scale_m();
}

}  // namespace freshet::geometry::testing
