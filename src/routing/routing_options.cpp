#include "freshet/routing/routing_options.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <string>
#include <utility>

#include "freshet/routing/schemes/registry.hpp"

namespace freshet::routing {

namespace {
// The registered schemes' names, in the order of SchemeKind.
constexpr std::array<std::pair<SchemeKind, std::string_view>, schemes::kSchemeCount> kSchemeNames =
    [] {
      std::array<std::pair<SchemeKind, std::string_view>, schemes::kSchemeCount> names{};
      std::size_t k = 0;
      schemes::for_each_scheme([&](auto type) {
        using S = typename decltype(type)::type;
        names[k++] = {S::kKind, S::kName};
        return false;
      });
      return names;
    }();
constexpr std::array<std::pair<Limiter, std::string_view>, 2> kLimiterNames{{
    {Limiter::kMinmod, "minmod"},
    {Limiter::kVanLeer, "van-leer"},
}};

template <class E, std::size_t N>
E parse_name(const std::array<std::pair<E, std::string_view>, N>& names, std::string_view name,
             std::string_view field) {
  std::string choices;
  for (const auto& [value, text] : names) {
    if (text == name) return value;
    choices += (choices.empty() ? "" : ", ") + std::string(text);
  }
  ProblemList p("routing options");
  p.add(field, "= '" + std::string(name) + "': must be one of " + choices);
  p.throw_if_any();
  return names.front().first;  // not reached
}
}  // namespace

std::string_view to_string(SchemeKind kind) noexcept {
  for (const auto& [value, text] : kSchemeNames) if (value == kind) return text;
  return "?";
}

std::string_view to_string(Limiter limiter) noexcept {
  for (const auto& [value, text] : kLimiterNames) if (value == limiter) return text;
  return "?";
}

SchemeKind parse_scheme_kind(std::string_view name) {
  return parse_name(kSchemeNames, name, "scheme");
}

std::vector<std::string> scheme_names() {
  std::vector<std::string> names;
  for (const auto& [value, text] : kSchemeNames) names.emplace_back(text);
  return names;
}

bool routes_diffusion_wave(SchemeKind kind) noexcept {
  bool diffusion = false;
  schemes::for_each_scheme([&](auto type) {
    using S = typename decltype(type)::type;
    if (S::kKind != kind) return false;
    diffusion = requires { S::kDiffusionWave; };
    return true;
  });
  return diffusion;
}

Limiter parse_limiter(std::string_view name) { return parse_name(kLimiterNames, name, "limiter"); }

std::vector<Problem> ShockDetectionOptions::validate() const {
  ProblemList p("shock detection options");
  p.require(steep_fraction > 0.0 && steep_fraction <= 1.0, "steep_fraction", steep_fraction,
            "must be in (0, 1]");
  p.require(front_cells >= 0, "front_cells", front_cells, "must be >= 0 (0 = automatic)");
  p.require(plateau_cells == 0 || plateau_cells >= front_cells, "plateau_cells", plateau_cells,
            "must be 0 (automatic) or >= front_cells");
  p.require_non_negative("min_relative_jump", min_relative_jump);
  p.require(steepening_rate_min > 0.0 && steepening_rate_min <= 1.0, "steepening_rate_min",
            steepening_rate_min, "must be in (0, 1]");
  p.require(persistence >= 1, "persistence", persistence, "must be >= 1");
  return p.problems();
}

ShockDetectionOptions resolved_shock_options(const RoutingOptions& routing) {
  ShockDetectionOptions s = routing.shock;
  if (s.front_cells == 0) {
    schemes::for_each_scheme([&](auto type) {
      using S = typename decltype(type)::type;
      if (S::kKind != routing.scheme) return false;
      s.front_cells = S::front_cells(routing);
      return true;
    });
    // A scheme whose waves do not break (a diffusion wave) has no front width: no detection.
    if (s.front_cells == 0) s.enabled = false;
  }
  if (s.plateau_cells == 0) s.plateau_cells = 3 * s.front_cells;
  return s;
}

std::vector<Problem> RoutingOptions::validate() const {
  ProblemList p("routing options");
  p.require(std::isfinite(courant_limit) && courant_limit > 0.0 && courant_limit <= 1.0,
            "courant_limit", courant_limit, "must be in (0, 1] (explicit upwind stability)");
  p.require(courant_target > 0.0 && courant_target <= courant_limit, "courant_target",
            courant_target, "must be in (0, courant_limit]");
  p.require(std::isfinite(tvd_courant_limit) && tvd_courant_limit > 0.0 &&
                tvd_courant_limit <= 1.0,
            "tvd_courant_limit", tvd_courant_limit, "must be in (0, 1]");
  p.require(tvd_courant_target > 0.0 && tvd_courant_target <= tvd_courant_limit,
            "tvd_courant_target", tvd_courant_target, "must be in (0, tvd_courant_limit]");
  p.require(implicit_courant > 0.0, "implicit_courant", implicit_courant,
            "must be > 0 (infinity allowed)");
  p.require(newton_max_iterations >= 1, "newton_max_iterations", newton_max_iterations,
            "must be >= 1");
  p.require_positive("ode_abs_tolerance_m2", ode_abs_tolerance_m2);
  p.require_positive("ode_rel_tolerance", ode_rel_tolerance);
  p.require(max_dt_s > 0.0, "max_dt_s", max_dt_s, "must be > 0 (infinity allowed)");
  p.require_positive("min_dt_s", min_dt_s);
  p.require(max_consecutive_rejections >= 1, "max_consecutive_rejections",
            max_consecutive_rejections, "must be >= 1");
  p.require(front_node_spacing >= 1e-6 && front_node_spacing <= 0.1, "front_node_spacing",
            front_node_spacing, "must be in [1e-6, 0.1]");
  p.require(front_fan_max_fronts >= 1, "front_fan_max_fronts", front_fan_max_fronts,
            "must be >= 1");
  p.require(std::isfinite(front_merge_length_m) && front_merge_length_m >= 0.0,
            "front_merge_length_m", front_merge_length_m, "must be >= 0 (0 = automatic)");
  p.require(std::isfinite(lateral_split_step_s) && lateral_split_step_s > 0.0,
            "lateral_split_step_s", lateral_split_step_s, "must be > 0");
  p.require(std::isfinite(diffusion_courant_target) && diffusion_courant_target > 0.0,
            "diffusion_courant_target", diffusion_courant_target, "must be finite and > 0");
  p.append(shock.validate());
  return p.problems();
}

}  // namespace freshet::routing
