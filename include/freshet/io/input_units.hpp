// Units of a basin file, converted to SI once as values are read (docs/basin-file.md):
//
//   quantity            units = "si"        units = "us"
//   length, elevation   m                   ft
//   plan area           ha                  acre
//   discharge           m3/s                ft3/s
//   rain depth          mm                  in
//   intensity, rates    mm/h                in/h
//   storage volume      m3                  acre-ft
//   weir coefficient    m^0.5/s             ft^0.5/s
#pragma once

#include <cmath>

#include "freshet/core/units.hpp"

namespace freshet::io::detail {

struct InputUnits {
  units::System system = units::System::si;

  [[nodiscard]] bool us() const { return system == units::System::us_customary; }
  [[nodiscard]] double length_m(double v) const { return units::length_to_m(v, system); }
  [[nodiscard]] double plan_area_m2(double v) const {
    return us() ? v * units::kSquareMetresPerAcre : v * 1e4;
  }
  [[nodiscard]] double discharge_m3s(double v) const { return units::discharge_to_m3s(v, system); }
  [[nodiscard]] double rain_depth_m(double v) const { return units::rain_depth_to_m(v, system); }
  [[nodiscard]] double rate_m_s(double v) const {
    return units::rain_depth_to_m(v, system) / units::kSecondsPerHour;
  }
  [[nodiscard]] double volume_m3(double v) const {
    constexpr double kCubicMetresPerAcreFoot = units::kSquareMetresPerAcre * units::kMetresPerFoot;
    return us() ? v * kCubicMetresPerAcreFoot : v;
  }
  // Q = C L H^1.5: C_si = C_us * sqrt(0.3048) (ft^0.5/s to m^0.5/s).
  [[nodiscard]] double weir_coefficient_si(double v) const {
    return us() ? v * std::sqrt(units::kMetresPerFoot) : v;
  }
  // Back to the file's units, for messages about derived quantities.
  [[nodiscard]] double length_in_file(double m) const { return m / length_m(1.0); }
  [[nodiscard]] double discharge_in_file(double m3s) const { return m3s / discharge_m3s(1.0); }
  // Unit labels, for messages quoting a value as the file gives it.
  [[nodiscard]] const char* length_unit() const { return us() ? "ft" : "m"; }
  [[nodiscard]] const char* depth_unit() const { return us() ? "in" : "mm"; }
  [[nodiscard]] const char* rate_unit() const { return us() ? "in/h" : "mm/h"; }
  [[nodiscard]] const char* volume_unit() const { return us() ? "acre-ft" : "m3"; }
  [[nodiscard]] const char* discharge_unit() const { return us() ? "ft3/s" : "m3/s"; }
};

}  // namespace freshet::io::detail
