// Method of lines: the upwind semi-discretisation dA_i/dt = (F_i - F_{i+1})/dx + q_lat,i
// integrated by an adaptive Dormand-Prince 5(4) Runge-Kutta (Boost.Odeint, in kernels.cpp),
// plus one extra component dV_out/dt = Q_N(A_N) so the outflow volume comes from the same
// integrator (every Runge-Kutta method preserves the linear invariant dx sum A + V_out - V_in
// - V_lat, and integrates the piecewise-linear forcing exactly between breakpoints). The
// scheme times itself: one controlled integration per forcing segment between breakpoints.
#pragma once

#include <algorithm>
#include <string_view>
#include <vector>

#include "freshet/routing/detail/kernels.hpp"
#include "freshet/routing/schemes/scheme.hpp"

namespace freshet::routing::schemes {

class MethodOfLines {
 public:
  static constexpr SchemeKind kKind = SchemeKind::kMethodOfLines;
  static constexpr std::string_view kName = "method-of-lines";
  static constexpr int kCellUpdatesPerStep = 1;  // per accepted Runge-Kutta step
  // Initial step of each segment: Courant 0.5 on the larger of the state's and the
  // inflow's celerity; the controller takes over from there.
  static constexpr double kInitialCourant = 0.5;
  // A captured shock is smeared over about 8 cells (docs/methods-routing.md).
  static int front_cells(const RoutingOptions& /*options*/) { return 8; }

  MethodOfLines() = default;
  MethodOfLines(const RoutingOptions& options, std::size_t cells)
      : options_(options), ode_state_(cells + 1, 0.0) {}

  [[nodiscard]] std::size_t memory_bytes() const noexcept {
    return (ode_state_.capacity() + lateral_rate_m3s_.capacity()) * sizeof(double);
  }

  template <geometry::FluxLaw F>
  AdvanceResult advance(detail::ReachState<F>& s, double t0, double t1,
                        const PiecewiseLinearSeries& inflow, const LateralInflow& lateral) {
    const std::size_t cells = s.n();
    const bool lat = s.has_lateral();
    if (lat) lateral_rate_m3s_.resize(cells);
    const detail::OdeRhs rhs = [&](std::span<const double> y, std::span<double> dydt, double t) {
      if (lat) s.lateral_map.rates_m3s(lateral, t, lateral_rate_m3s_);
      double flux_left = inflow.value_at(t);
      for (std::size_t i = 0; i < cells; ++i) {
        const double flux_right = s.law(i).discharge_m3s(std::max(y[i], 0.0));
        dydt[i] = (flux_left - flux_right + (lat ? lateral_rate_m3s_[i] : 0.0)) / s.dx_m;
        flux_left = flux_right;
      }
      dydt[cells] = flux_left;
    };
    std::vector<double> breaks(inflow.times_s().begin(), inflow.times_s().end());
    if (!lateral.is_none()) {
      const auto more = lateral.breakpoint_times_s();
      breaks.insert(breaks.end(), more.begin(), more.end());
    }
    const std::vector<double> times = detail::segment_times(t0, t1, breaks);
    AdvanceResult r;
    r.reached_time_s = t0;
    for (std::size_t k = 0; k + 1 < times.size(); ++k) {
      if (!integrate_segment(s, rhs, times[k], times[k + 1], inflow, lateral, r)) return r;
    }
    s.face_flux_m3s[0] = inflow.value_at(r.reached_time_s);
    for (std::size_t i = 0; i < cells; ++i) s.face_flux_m3s[i + 1] = s.law(i).discharge_m3s(s.area_m2[i]);
    return r;
  }

 private:
  // One smooth forcing segment [ta, tb]: a fresh controlled stepper, then the areas, the
  // outflow volume (ODE component) and the exact forcing volumes booked.
  template <geometry::FluxLaw F>
  bool integrate_segment(detail::ReachState<F>& s, const detail::OdeRhs& rhs, double ta,
                         double tb, const PiecewiseLinearSeries& inflow,
                         const LateralInflow& lateral, AdvanceResult& r) {
    const std::size_t cells = s.n();
    std::copy(s.area_m2.begin(), s.area_m2.end(), ode_state_.begin());
    ode_state_[cells] = 0.0;
    const F& law0 = s.laws.front();
    const double c_in = law0.celerity_m_s(law0.area_for_discharge_m2(detail::series_max(inflow, ta, tb)));
    const double c = std::max(s.c_max_m_s, c_in);
    const double dt0 =
        std::min({tb - ta, options_.max_dt_s, c > 0.0 ? kInitialCourant * s.dx_m / c : tb - ta});
    const detail::OdeSegmentResult seg =
        detail::integrate_ode_segment(rhs, ode_state_, ta, tb, dt0, options_);
    r.steps += seg.steps;
    r.rejected_steps += seg.rejected;
    if (!seg.ok) {
      r.status = AdvanceStatus::kSolverFailed;
      r.message = seg.message;
      return false;
    }
    std::copy(ode_state_.begin(), ode_state_.begin() + static_cast<std::ptrdiff_t>(cells),
              s.area_m2.begin());
    const double outflow_m3 = ode_state_[cells] + clear_negative_areas_into_outflow(s);
    const double inflow_m3 = inflow.integral(ta, tb);
    const double lateral_m3 =
        s.has_lateral() ? s.lateral_map.volumes_m3(lateral, ta, tb, s.lateral_m3) : 0.0;
    s.ledger.inflow_m3 += inflow_m3, r.inflow_m3 += inflow_m3;
    s.ledger.lateral_m3 += lateral_m3, r.lateral_m3 += lateral_m3;
    s.ledger.outflow_m3 += outflow_m3, r.outflow_m3 += outflow_m3;
    s.c_max_m_s = s.current_c_max();
    s.diag.max_courant = std::max(s.diag.max_courant, seg.largest_dt_s * s.c_max_m_s / s.dx_m);
    s.diag.cell_updates += static_cast<long>(cells) * kCellUpdatesPerStep * seg.steps;
    r.reached_time_s = tb;
    return true;
  }

  // Moves round-off-level negative areas (possible inside Runge-Kutta stages near a dry
  // front) to the next cell downstream, and off the outlet cell into the outflow; exactly
  // conservative. Returns the change in outflow volume (<= 0).
  template <geometry::FluxLaw F>
  static double clear_negative_areas_into_outflow(detail::ReachState<F>& s) {
    double outflow_change = 0.0;
    std::vector<double>& area = s.area_m2;
    for (std::size_t i = 0; i < s.n(); ++i) {
      if (area[i] >= 0.0) continue;
      const double deficit = area[i];
      area[i] = 0.0;
      s.diag.positivity_transfer_m3 -= deficit * s.dx_m;
      if (i + 1 < s.n()) area[i + 1] += deficit;
      else outflow_change += deficit * s.dx_m;
    }
    return outflow_change;
  }

  RoutingOptions options_;
  std::vector<double> ode_state_;         // N+1: cell areas and outflow volume being integrated
  std::vector<double> lateral_rate_m3s_;  // N: lateral inflow rate per cell at a stage time
};

}  // namespace freshet::routing::schemes
