// NRCS 24-hour dimensionless rainfall distributions, Types I, IA, II and III (USDA Soil
// Conservation Service 1986, "Urban Hydrology for Small Watersheds", TR-55, 2nd ed.,
// Appendix B; USDA NRCS National Engineering Handbook Part 630, ch. 4): the cumulative
// fraction of the 24-hour depth fallen by each hour. Between tabulated hours the fraction is
// linear, so the mass curve is piecewise linear and a storm scaled to depth D holds exactly D.
//
//   Hyetograph storm = nrcs_24h_storm(NrcsRainType::type_ii, 0.127, 360.0, "storm 'T100'");
//   nrcs_cumulative_fraction(NrcsRainType::type_ii, 12.0 * 3600.0);  // 0.663
#pragma once

#include <optional>
#include <span>
#include <string>
#include <string_view>

#include "freshet/hydrology/hyetograph.hpp"

namespace freshet::hydrology {

enum class NrcsRainType { type_i, type_ia, type_ii, type_iii };

// "I", "IA", "II", "III" (as written in a basin file; case-sensitive).
std::string_view to_string(NrcsRainType type);
std::optional<NrcsRainType> parse_nrcs_rain_type(std::string_view text);

struct NrcsOrdinate {
  double hour;      // hours from the start of the 24-hour storm
  double fraction;  // cumulative fraction of the 24-hour depth, 0 at 0 h, 1 at 24 h
};

inline constexpr double kNrcsStormDuration_s = 24.0 * 3600.0;

// The tabulated ordinates of one type (0 h to 24 h, increasing).
std::span<const NrcsOrdinate> nrcs_ordinates(NrcsRainType type);
// Cumulative fraction at `elapsed_s` from the storm's start: 0 before, 1 after 24 h.
double nrcs_cumulative_fraction(NrcsRainType type, double elapsed_s);

// The 24-hour storm of `total_depth_m` in blocks of `step_s` (the last block is shorter when
// step_s does not divide 24 h), starting at `start_s`. Throws InputError naming `what` for a
// negative or non-finite depth, a step <= 0, or a step longer than the 24-hour storm.
Hyetograph nrcs_24h_storm(NrcsRainType type, double total_depth_m, double step_s,
                          const std::string& what = "design storm", double start_s = 0.0);

}  // namespace freshet::hydrology
