#include "freshet/hydrology/nrcs_distribution.hpp"

#include <algorithm>
#include <array>
#include <cmath>

#include "freshet/core/error.hpp"
#include "freshet/core/units.hpp"

namespace freshet::hydrology {
namespace {

// Ordinates at the hours commonly tabulated for the four distributions (USDA SCS 1986, TR-55
// Appendix B; NEH Part 630 ch. 4). FROM MEMORY: these tables were typed without the source at
// hand. What each is checked against (tests/hydrology/nrcs_distribution_test.cpp):
// - every type: 0 at 0 h, 1 at 24 h, never decreasing;
// - Types I and IA: nothing independent with a citable source found; from memory only;
// - Type II: the fitted equation of Haan, Barfield & Hayes (1994) within 0.003 at the hours
//   up to 11.5 h and from 14 h;
// - Type III: a published 5-min table (City of Austin; see below).
constexpr std::array<NrcsOrdinate, 23> kTypeI{{
    {0.0, 0.000},  {2.0, 0.035},   {4.0, 0.076},  {6.0, 0.125},   {7.0, 0.156},  {8.0, 0.194},
    {8.5, 0.219},  {9.0, 0.254},   {9.5, 0.303},  {9.75, 0.362},  {10.0, 0.515}, {10.5, 0.583},
    {11.0, 0.624}, {11.5, 0.654},  {11.75, 0.669}, {12.0, 0.682}, {12.5, 0.706}, {13.0, 0.727},
    {13.5, 0.748}, {14.0, 0.767},  {16.0, 0.830}, {20.0, 0.926},  {24.0, 1.000}}};
constexpr std::array<NrcsOrdinate, 23> kTypeIA{{
    {0.0, 0.000},  {2.0, 0.050},   {4.0, 0.116},  {6.0, 0.206},   {7.0, 0.268},  {8.0, 0.425},
    {8.5, 0.480},  {9.0, 0.520},   {9.5, 0.550},  {9.75, 0.564},  {10.0, 0.577}, {10.5, 0.601},
    {11.0, 0.624}, {11.5, 0.645},  {11.75, 0.655}, {12.0, 0.664}, {12.5, 0.683}, {13.0, 0.701},
    {13.5, 0.719}, {14.0, 0.736},  {16.0, 0.800}, {20.0, 0.906},  {24.0, 1.000}}};
constexpr std::array<NrcsOrdinate, 23> kTypeII{{
    {0.0, 0.000},  {2.0, 0.022},   {4.0, 0.048},  {6.0, 0.080},   {7.0, 0.098},  {8.0, 0.120},
    {8.5, 0.133},  {9.0, 0.147},   {9.5, 0.163},  {9.75, 0.172},  {10.0, 0.181}, {10.5, 0.204},
    {11.0, 0.235}, {11.5, 0.283},  {11.75, 0.357}, {12.0, 0.663}, {12.5, 0.735}, {13.0, 0.772},
    {13.5, 0.799}, {14.0, 0.820},  {16.0, 0.880}, {20.0, 0.952},  {24.0, 1.000}}};
// Type III at 8.0, 8.5, 9.0 and 17.0 h: City of Austin, Drainage Criteria Manual, sec. 2.5.1,
// Table 2-6 (Type III ordinates at 5-min steps); 8.0 h is its 8:05 value less the 8:05
// increment. The other Type III ordinates are from memory as above (tests compare them with
// the visible rows of that table).
constexpr std::array<NrcsOrdinate, 24> kTypeIII{{
    {0.0, 0.000},  {2.0, 0.020},   {4.0, 0.043},  {6.0, 0.072},    {7.0, 0.089},  {8.0, 0.1140},
    {8.5, 0.1284}, {9.0, 0.1458},  {9.5, 0.167},  {9.75, 0.178},   {10.0, 0.189}, {10.5, 0.216},
    {11.0, 0.250}, {11.5, 0.298},  {11.75, 0.339}, {12.0, 0.500},  {12.5, 0.702}, {13.0, 0.751},
    {13.5, 0.785}, {14.0, 0.811},  {16.0, 0.886}, {17.0, 0.9095}, {20.0, 0.957},  {24.0, 1.000}}};

}  // namespace

std::string_view to_string(NrcsRainType type) {
  switch (type) {
    case NrcsRainType::type_i: return "I";
    case NrcsRainType::type_ia: return "IA";
    case NrcsRainType::type_ii: return "II";
    case NrcsRainType::type_iii: return "III";
  }
  return "?";
}

std::optional<NrcsRainType> parse_nrcs_rain_type(std::string_view text) {
  for (auto t : {NrcsRainType::type_i, NrcsRainType::type_ia, NrcsRainType::type_ii,
                 NrcsRainType::type_iii}) {
    if (text == to_string(t)) return t;
  }
  return std::nullopt;
}

std::span<const NrcsOrdinate> nrcs_ordinates(NrcsRainType type) {
  switch (type) {
    case NrcsRainType::type_i: return kTypeI;
    case NrcsRainType::type_ia: return kTypeIA;
    case NrcsRainType::type_ii: return kTypeII;
    case NrcsRainType::type_iii: return kTypeIII;
  }
  return kTypeII;
}

double nrcs_cumulative_fraction(NrcsRainType type, double elapsed_s) {
  const double hour = elapsed_s / units::kSecondsPerHour;
  const auto table = nrcs_ordinates(type);
  if (hour <= table.front().hour) return 0.0;
  if (hour >= table.back().hour) return 1.0;
  const auto it = std::upper_bound(table.begin(), table.end(), hour,
                                   [](double h, const NrcsOrdinate& o) { return h < o.hour; });
  const NrcsOrdinate& hi = *it;
  const NrcsOrdinate& lo = *(it - 1);
  const double w = (hour - lo.hour) / (hi.hour - lo.hour);
  return lo.fraction + w * (hi.fraction - lo.fraction);
}

Hyetograph nrcs_24h_storm(NrcsRainType type, double total_depth_m, double step_s,
                          const std::string& what, double start_s) {
  ProblemList problems(what);
  problems.require_non_negative("total_depth_m", total_depth_m);
  problems.require_positive("step_s", step_s);
  problems.require_finite("start_s", start_s);
  if (step_s > 0.0) {
    problems.require(step_s <= kNrcsStormDuration_s, "step_s", step_s,
                     "the 24-hour storm is shorter than one time step");
  }
  problems.throw_if_any();
  const auto n = static_cast<std::size_t>(std::ceil(kNrcsStormDuration_s / step_s * (1 - 1e-12)));
  std::vector<double> times(n + 1), depth(n);
  double previous = 0.0;
  for (std::size_t k = 0; k < n; ++k) {
    const double elapsed = k + 1 == n ? kNrcsStormDuration_s : static_cast<double>(k + 1) * step_s;
    const double next = total_depth_m * nrcs_cumulative_fraction(type, elapsed);
    times[k] = start_s + static_cast<double>(k) * step_s;
    depth[k] = next - previous;
    previous = next;
  }
  times[n] = start_s + kNrcsStormDuration_s;
  return Hyetograph::from_depths(std::move(times), std::move(depth), what);
}

}  // namespace freshet::hydrology
