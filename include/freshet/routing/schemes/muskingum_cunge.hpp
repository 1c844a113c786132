// Muskingum-Cunge: a diffusion-wave scheme (Cunge 1969, J. Hydraul. Res. 7(2); Ponce &
// Yevjevich 1978, J. Hydraul. Div. ASCE 104(HY12); Ponce & Chaganti 1994, J. Hydrol. 162),
// written so that volume is conserved exactly (the concern of Todini 2007, HESS 11).
//
// Each cell is a Muskingum sub-reach of length dx between two faces. The discharge at the
// faces is routed by the Muskingum-Cunge recursion, whose numerical diffusion is matched to
// the hydraulic diffusivity D = Q / (2 B S0) of the diffusion wave A_t + c A_x = D A_xx
// (Hayami 1951):
//   Q_{i+1}^{n+1} = C0 Q_i^{n+1} + C1 Q_i^n + C2 Q_{i+1}^n + C3 q_L dx,
//   C0 = (C + R - 1) / (1 + C + R),  C1 = (1 + C - R) / (1 + C + R),
//   C2 = (1 - C + R) / (1 + C + R),  C3 = 2 C / (1 + C + R),
// with Courant number C = c dt / dx and cell Reynolds number R = Q / (B S0 c dx) (Ponce 1989,
// Engineering Hydrology, ch. 9; a worked problem of that chapter is reproduced in the tests).
// The parameters vary: c = dQ/dA and the top width B are taken at the reference discharge, the
// three-point average (Q_i^n + Q_i^{n+1} + Q_{i+1}^n) / 3 (Ponce & Chaganti 1994), or the
// discharge the cell's stored volume gives when that is larger (so that water stored from
// lateral inflow starts to move). Volume: the cell's area is updated by continuity from the
// mean face discharges over the step, A_i^{n+1} = A_i^n + dt/dx (F_i - F_{i+1}) + V_lat,i / dx
// with F = (Q^n + Q^{n+1}) / 2 (the inlet face carries the exact inflow volume), so storage,
// stage and the ledger agree to round-off; an outflow that would empty a cell below zero is cut
// to what the cell holds (conservative). The scheme times itself: dt = courant x dx / c_max
// (RoutingOptions::diffusion_courant_target, 1 by default), never longer than the advance.
//
// Accuracy (docs/methods-routing.md): the recursion is second order where C + R >= 1 and
// C <= 1 + R (all coefficients non-negative); otherwise it can dip below the true outflow.
// It represents attenuation by diffusion only: no backwater, no inertia (Ponce's diffusion
// number t_r S0 (g/d0)^0.5 >= 15 is its range). It needs the reach's cross-section and bed
// slope (ReachState::shape; make_reach from a FlowSection gives them).
#pragma once

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <limits>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "freshet/routing/detail/kernels.hpp"
#include "freshet/routing/schemes/scheme.hpp"

namespace freshet::routing::schemes {

namespace detail_mc {

// The four routing coefficients for a Courant number C and cell Reynolds number R, written
// with both scaled by a = c B S0 dx so that a dry or full (B = 0) cell stays finite.
struct Coefficients {
  double c0 = 0.0, c1 = 0.0, c2 = 0.0, c3 = 0.0;
};
[[nodiscard]] inline Coefficients coefficients(double courant, double reynolds) noexcept {
  const double den = 1.0 + courant + reynolds;
  return {(courant + reynolds - 1.0) / den, (1.0 + courant - reynolds) / den,
          (1.0 - courant + reynolds) / den, 2.0 * courant / den};
}

// The recursion: the discharge leaving a sub-reach at the end of a step from the discharge
// entering it at the end (in_new) and start (in_old) of the step, the discharge leaving it at
// the start (out_old) and the lateral inflow over its length (lateral_m3s).
[[nodiscard]] inline double route(const Coefficients& k, double in_new_m3s, double in_old_m3s,
                                  double out_old_m3s, double lateral_m3s) noexcept {
  return k.c0 * in_new_m3s + k.c1 * in_old_m3s + k.c2 * out_old_m3s + k.c3 * lateral_m3s;
}

}  // namespace detail_mc

class MuskingumCunge {
 public:
  static constexpr SchemeKind kKind = SchemeKind::kMuskingumCunge;
  static constexpr std::string_view kName = "muskingum-cunge";
  // Routes the diffusion wave, not the kinematic wave (routes_diffusion_wave()).
  static constexpr bool kDiffusionWave = true;
  // A diffusion wave does not break: no kinematic shock to detect (0 turns detection off).
  static int front_cells(const RoutingOptions& /*options*/) { return 0; }

  MuskingumCunge() = default;
  MuskingumCunge(const RoutingOptions& options, std::size_t cells)
      : options_(options), q_old_(cells + 1, 0.0), q_new_(cells + 1, 0.0) {}

  [[nodiscard]] std::size_t memory_bytes() const noexcept {
    return (q_old_.capacity() + q_new_.capacity()) * sizeof(double);
  }

  template <geometry::FluxLaw F>
  AdvanceResult advance(detail::ReachState<F>& s, double t0, double t1,
                        const PiecewiseLinearSeries& inflow, const LateralInflow& lateral) {
    AdvanceResult r;
    r.reached_time_s = t0;
    if (!(s.shape.section && s.shape.bed_slope > 0.0)) {
      r.status = AdvanceStatus::kSolverFailed;
      r.message = std::string(kName) +
                  " needs the reach's cross-section and bed slope (build the reach from a "
                  "FlowSection)";
      return r;
    }
    if (s.generation != seen_generation_) start(s);
    q_old_[0] = inflow.value_at(t0);
    double t = t0;
    while (t < t1) {
      double dt = choose_dt(s, t, t1, inflow);
      const double t_next = dt >= (t1 - t) * (1.0 - 1e-12) ? t1 : t + dt;
      dt = t_next - t;
      const double inflow_m3 = inflow.integral(t, t_next);
      const double lateral_m3 =
          s.has_lateral() ? s.lateral_map.volumes_m3(lateral, t, t_next, s.lateral_m3) : 0.0;
      q_new_[0] = inflow.value_at(t_next);
      const double outflow_m3 = detail::with_flag(s.has_lateral(), [&](auto lat) {
        return step<decltype(lat)::value>(s, dt, inflow_m3 / dt);
      });
      s.ledger.inflow_m3 += inflow_m3, r.inflow_m3 += inflow_m3;
      s.ledger.lateral_m3 += lateral_m3, r.lateral_m3 += lateral_m3;
      s.ledger.outflow_m3 += outflow_m3, r.outflow_m3 += outflow_m3;
      std::swap(q_old_, q_new_);
      const double c_before = s.c_max_m_s;
      s.c_max_m_s = s.current_c_max();
      s.diag.max_courant = std::max(s.diag.max_courant,
                                    dt * std::max(c_before, s.c_max_m_s) / s.dx_m);
      s.diag.cell_updates += static_cast<long>(s.n());
      ++r.steps;
      t = t_next;
      r.reached_time_s = t;
    }
    std::copy(q_old_.begin(), q_old_.end(), s.face_flux_m3s.begin());
    return r;
  }

  // Hot start: the face discharges carried from one step to the next.
  void visit_state(StateVisitor& v) {
    StateGroup g(v, "muskingum_cunge");
    v.doubles("q_old_m3s", q_old_);
    v.doubles("q_new_m3s", q_new_);
    v.value("seen_generation", seen_generation_);
  }

 private:
  // Face discharges from the cells' stored volumes (after construction or a new state).
  template <geometry::FluxLaw F>
  void start(const detail::ReachState<F>& s) {
    for (std::size_t i = 0; i < s.n(); ++i) q_old_[i + 1] = s.law(i).discharge_m3s(s.area_m2[i]);
    q_old_[0] = q_old_[1];
    seen_generation_ = s.generation;
  }

  // Courant target on the larger of the state's and the inflow's celerity.
  template <geometry::FluxLaw F>
  double choose_dt(const detail::ReachState<F>& s, double t, double t1,
                   const PiecewiseLinearSeries& inflow) const {
    double dt = std::min(t1 - t, options_.max_dt_s);
    const F& law0 = s.laws.front();
    const double q_in = detail::series_max(inflow, t, std::min(t1, t + dt));
    const double c = std::max(s.c_max_m_s, law0.celerity_m_s(law0.area_for_discharge_m2(q_in)));
    if (c > 0.0) dt = std::min(dt, options_.diffusion_courant_target * s.dx_m / c);
    return dt;
  }

  // One time step over every cell, upstream first (the recursion needs Q_i^{n+1} before
  // Q_{i+1}^{n+1}). Returns the outflow volume.
  template <bool kLateral, geometry::FluxLaw F>
  double step(detail::ReachState<F>& s, double dt, double inlet_flux_m3s) {
    const std::size_t cells = s.n();
    const double dx = s.dx_m;
    const double lambda = dt / dx;
    double flux_in = inlet_flux_m3s;  // the volume-exact inflow over the step
    for (std::size_t i = 0; i < cells; ++i) {
      const F& law = s.law(i);
      const double lateral_m3s = kLateral ? s.lateral_m3[i] / dt : 0.0;
      const double q_routed = routed_discharge(s, law, i, dt, lateral_m3s);
      double flux_out = 0.5 * (q_old_[i + 1] + q_routed);
      const double area_old = s.area_m2[i];
      const double available_m3s = (area_old * dx + lateral_m3s * dt) / dt + flux_in;
      if (flux_out > available_m3s) {  // would empty the cell: pass on what it holds
        flux_out = std::max(available_m3s, 0.0);
        s.area_m2[i] = 0.0;
        q_new_[i + 1] = std::max(0.0, 2.0 * flux_out - q_old_[i + 1]);
      } else {
        s.area_m2[i] = std::max(0.0, area_old + lambda * (flux_in - flux_out) +
                                         (kLateral ? s.lateral_m3[i] / dx : 0.0));
        q_new_[i + 1] = q_routed;
      }
      flux_in = flux_out;
    }
    return flux_in * dt;
  }

  // The Muskingum-Cunge discharge at face i + 1 at the end of the step (>= 0).
  template <geometry::FluxLaw F>
  double routed_discharge(const detail::ReachState<F>& s, const F& law, std::size_t i,
                          double dt, double lateral_m3s) const {
    const double three_point = (q_old_[i] + q_new_[i] + q_old_[i + 1]) / 3.0;
    const double q_ref = std::max(three_point, law.discharge_m3s(s.area_m2[i]));
    if (!(q_ref > 0.0)) return 0.0;
    const double area_ref = law.area_for_discharge_m2(q_ref);
    const double c = law.celerity_m_s(area_ref);
    const geometry::CrossSection& section = *s.shape.section;
    const double width = section.top_width_m(section.depth_from_area_m(area_ref));
    const double courant = c * dt / s.dx_m;
    const double denom = width * s.shape.bed_slope * c * s.dx_m;
    // A full conduit (B = 0) or a flat celerity: infinite diffusion, the limit of the
    // coefficients (C0, C1, C2, C3) -> (1, -1, 1, 0).
    const double reynolds = denom > 0.0 ? q_ref / denom : std::numeric_limits<double>::infinity();
    const detail_mc::Coefficients k =
        std::isfinite(reynolds) ? detail_mc::coefficients(courant, reynolds)
                                : detail_mc::Coefficients{1.0, -1.0, 1.0, 0.0};
    return std::max(detail_mc::route(k, q_new_[i], q_old_[i], q_old_[i + 1], lateral_m3s), 0.0);
  }

  RoutingOptions options_;
  std::vector<double> q_old_;  // N+1: face discharges at the start of the step
  std::vector<double> q_new_;  // N+1: face discharges at the end of the step
  std::uint64_t seen_generation_ = std::numeric_limits<std::uint64_t>::max();
};

}  // namespace freshet::routing::schemes
