// What every routing scheme reads and updates on one reach (detail): the flux laws, the cell
// areas and face fluxes, the lateral forcing per cell, the celerity bound of the state, the
// volume ledger and the run counters. The reach (KinematicReach<F>) owns one; a scheme owns
// only its own scratch arrays (see schemes/scheme.hpp).
#pragma once

#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <span>
#include <vector>

#include "freshet/geometry/flux_law.hpp"
#include "freshet/routing/detail/celerity_envelope.hpp"
#include "freshet/routing/detail/flux_eval.hpp"
#include "freshet/routing/diagnostics.hpp"
#include "freshet/routing/lateral_inflow.hpp"
#include "freshet/routing/reach_model.hpp"

namespace freshet::routing::detail {

template <geometry::FluxLaw F>
struct ReachState {
  ReachState() = default;
  // One law (uniform) or one per cell; `cells` >= 1 and dx_m > 0 checked by the reach.
  ReachState(std::vector<F> flux_laws, double cell_width_m, std::size_t cells)
      : laws(std::move(flux_laws)), dx_m(cell_width_m), area_m2(cells, 0.0),
        face_flux_m3s(cells + 1, 0.0) {
    monotone = uniform() && celerity_non_decreasing(laws.front());
    if (uniform() && !monotone) envelope = CelerityEnvelope(laws.front());
  }

  [[nodiscard]] std::size_t n() const noexcept { return area_m2.size(); }
  [[nodiscard]] bool uniform() const noexcept { return laws.size() == 1; }
  [[nodiscard]] const F& law(std::size_t cell) const noexcept {
    return laws[laws.size() == 1 ? 0 : cell];
  }
  [[nodiscard]] bool has_lateral() const noexcept { return !lateral_map.is_none(); }

  [[nodiscard]] double storage_m3() const noexcept {
    double sum = 0.0;
    for (double a : area_m2) sum += a;
    return sum * dx_m;
  }

  // Uniform law: a bound on max_i c(A_i) from the largest area (exact for monotone c).
  [[nodiscard]] double celerity_bound(double max_area_m2,
                                      std::span<const double> areas) const noexcept {
    const double c_at_max = laws.front().celerity_m_s(max_area_m2);
    if (monotone) return c_at_max;
    const double bound = envelope.bound(laws.front(), max_area_m2, c_at_max);
    if (bound >= 0.0) return bound;
    double c = 0.0;  // beyond the envelope table: evaluate every cell
    for (double a : areas) c = std::max(c, laws.front().celerity_m_s(a));
    return c;
  }

  // max_i c_i(A_i) of the state (a bound for a uniform law).
  [[nodiscard]] double current_c_max() const noexcept {
    if (uniform()) return celerity_bound(*std::max_element(area_m2.begin(), area_m2.end()), area_m2);
    double c = 0.0;
    for (std::size_t i = 0; i < n(); ++i) c = std::max(c, law(i).celerity_m_s(area_m2[i]));
    return c;
  }

  std::vector<F> laws;                  // size 1 (uniform) or N
  double dx_m = 0.0;
  bool monotone = false;                // uniform law whose celerity never decreases with A
  CelerityEnvelope envelope;            // uniform law with possibly decreasing celerity
  std::vector<double> area_m2;          // N: the state
  std::vector<double> face_flux_m3s;    // N+1: fluxes applied by the last step
  std::vector<double> lateral_m3;       // N: lateral volume per cell over a step (if any)
  CellLateralMap lateral_map;           // where the lateral inflow enters (none: empty)
  double c_max_m_s = 0.0;               // celerity bound of the current state
  ChannelShape shape;                   // section and bed slope (diffusion-wave schemes)
  VolumeLedger ledger;
  RunDiagnostics diag;
  // Counts restarts (new initial state): a scheme with a state of its own rebuilds it.
  std::uint64_t generation = 0;
};

}  // namespace freshet::routing::detail
