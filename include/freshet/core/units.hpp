// Unit systems at the input edge.
//
// freshet computes in SI (metres, seconds, cubic metres per second). US customary input
// (feet, cubic feet per second, inches, acres) is converted once, where it is read, with the
// exact factors below. Names of quantities carry their unit (`depth_m`, `discharge_m3s`).
//
// Manning's equation in US customary units carries k = 1.486, the rounded value of
// (1 m / 0.3048 m)^(1/3) = 1.4859. Because freshet converts lengths to metres before it
// applies Manning's law (with k = 1), an input given in feet and the same input given in
// metres produce the same discharge to round-off; k = 1.486 is never used internally.
#pragma once

#include <optional>
#include <string_view>

namespace freshet::units {

enum class System { si, us_customary };

inline constexpr double kMetresPerFoot = 0.3048;                  // exact (1959 agreement)
inline constexpr double kMetresPerInch = 0.0254;                  // exact
inline constexpr double kCubicMetresPerCubicFoot = 0.3048 * 0.3048 * 0.3048;
inline constexpr double kSquareMetresPerAcre = 4046.8564224;      // exact, international acre
inline constexpr double kSquareMetresPerSquareMile = 1609.344 * 1609.344;
inline constexpr double kSecondsPerMinute = 60.0;
inline constexpr double kSecondsPerHour = 3600.0;
inline constexpr double kGravity_m_s2 = 9.80665;                  // standard gravity

// Manning's unit factor k for the system: 1.0 (SI) or 1.486 (US customary, rounded).
inline constexpr double manning_k(System s) { return s == System::si ? 1.0 : 1.486; }

// Conversions from the system's length / discharge / rain units to SI.
inline constexpr double length_to_m(double v, System s) {
  return s == System::si ? v : v * kMetresPerFoot;
}
inline constexpr double area_to_m2(double v, System s) {
  return s == System::si ? v : v * kMetresPerFoot * kMetresPerFoot;
}
inline constexpr double discharge_to_m3s(double v, System s) {
  return s == System::si ? v : v * kCubicMetresPerCubicFoot;
}
// Rain depth: millimetres (SI) or inches (US) to metres.
inline constexpr double rain_depth_to_m(double v, System s) {
  return s == System::si ? v * 1e-3 : v * kMetresPerInch;
}

// "si" / "us" (case-sensitive, as written in a basin file); nullopt otherwise.
std::optional<System> parse_system(std::string_view text);
std::string_view to_string(System s);

}  // namespace freshet::units
