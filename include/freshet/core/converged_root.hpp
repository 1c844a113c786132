// A root finder's result, or a NumericalError that says what was not found. Every solver whose
// failure to converge is a numerical failure (not a retry) goes through here, so that the
// message always names the element, the quantity sought and the value it was sought for.
#pragma once

#include <string>
#include <string_view>
#include <type_traits>

#include "freshet/core/error.hpp"
#include "freshet/core/root_finding.hpp"

namespace freshet {

// The root found, or NumericalError when `r` did not converge, e.g.
//   "culvert 'mill-lane': critical depth (m) did not converge for barrel discharge 30 m3/s
//    (200 iterations, last estimate nan)".
// `sought_for` is called only on failure and returns what the root was sought for: solvers in
// hot loops (a culvert's rating, a loss per step) must not format a message for every root.
//   converged_root(r, element_, "normal depth (m)",
//                  [&] { return "barrel discharge " + format_value(q) + " m3/s"; });
template <class Describe>
  requires std::is_invocable_r_v<std::string, Describe&>
double converged_root(const RootResult& r, std::string_view element, std::string_view quantity,
                      Describe&& sought_for) {
  if (r.converged) return r.x;
  throw NumericalError(std::string(element) + ": " + std::string(quantity) +
                       " did not converge for " + sought_for() + " (" +
                       std::to_string(r.iterations) + " iterations, last estimate " +
                       format_value(r.x) + ")");
}

}  // namespace freshet
