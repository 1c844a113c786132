// The run-time interface of one routed reach: what a network driver, an overland plane or a
// report sees, with no scheme, flux law or numerical library in it.
//
// A reach routes the kinematic wave A_t + Q(A)_x = q_lat(x, t) on `cell_count` finite volumes
// of equal width; the state is the flow area per cell (m2, N values) and the fluxes applied
// by the last step are kept per face (m3/s, N+1 values: face 0 the inlet, face N the outlet).
// Build one with make_reach() (make_reach.hpp) from a geometry::SectionFlux, or as
// KinematicReach<F> (kinematic_reach.hpp) for a known flux law F.
//
//   std::unique_ptr<ReachModel> reach = make_reach({"mill-race", 1500.0, 300}, flux, options);
//   reach->set_uniform_discharge(2.0);
//   AdvanceResult r = reach->advance(0.0, 600.0, inflow_m3s, LateralInflow::none());
//   double q_down = r.mean_outflow_m3s;   // volume-exact handover downstream
//
// Units: metres, seconds, m2 (areas), m3/s (fluxes), m2/s (lateral inflow per unit length).
#pragma once

#include <memory>
#include <span>
#include <string>
#include <vector>

#include "freshet/core/error.hpp"
#include "freshet/core/state_archive.hpp"
#include "freshet/core/time_series.hpp"
#include "freshet/geometry/cross_section.hpp"
#include "freshet/routing/breaking_watch.hpp"
#include "freshet/routing/diagnostics.hpp"
#include "freshet/routing/lateral_inflow.hpp"
#include "freshet/routing/routing_options.hpp"
#include "freshet/routing/shock.hpp"

namespace freshet::routing {

struct ReachSpec {
  std::string name = "reach";  // used in messages, e.g. "reach 'mill-race'"
  double length_m = 0.0;
  int cell_count = 0;
  [[nodiscard]] std::vector<Problem> validate() const;
};

// What a diffusion-wave scheme needs beyond the flux law Q(A): the reach's cross-section (its
// top width B at each area) and its bed slope S0, for the hydraulic diffusivity Q / (2 B S0).
// The kinematic schemes do not read it. make_reach from a geometry::FlowSection fills it.
struct ChannelShape {
  std::shared_ptr<const geometry::CrossSection> section;  // null: not known
  double bed_slope = 0.0;                                  // m/m; 0: not known
};

// Run-time interface: one virtual call per advance(), never inside the cell loops.
class ReachModel {
 public:
  virtual ~ReachModel() = default;
  virtual AdvanceResult advance(double t0_s, double t1_s, const PiecewiseLinearSeries& inflow_m3s,
                                const LateralInflow& lateral) = 0;
  // Hand-over form for a driver: the inflow is constant at mean_inflow_m3s over [t0, t1] (for
  // example the mean_outflow_m3s of the elements upstream), so exactly mean x (t1 - t0) enters.
  AdvanceResult advance(double t0_s, double t1_s, double mean_inflow_m3s,
                        const LateralInflow& lateral) {
    return advance(t0_s, t1_s, PiecewiseLinearSeries::constant(mean_inflow_m3s), lateral);
  }
  // Initial states; both restart the volume ledger and the clock.
  virtual void set_initial_areas(std::span<const double> area_m2) = 0;
  virtual void set_uniform_discharge(double discharge_m3s) = 0;  // normal depth in every cell

  [[nodiscard]] virtual const ReachSpec& spec() const noexcept = 0;
  [[nodiscard]] virtual const RoutingOptions& options() const noexcept = 0;
  [[nodiscard]] virtual double cell_width_m() const noexcept = 0;
  [[nodiscard]] virtual std::span<const double> cell_area_m2() const noexcept = 0;
  [[nodiscard]] virtual std::span<const double> face_flux_m3s() const noexcept = 0;
  [[nodiscard]] virtual double cell_discharge_m3s(int cell) const = 0;  // Q_i(A_i) now
  [[nodiscard]] virtual double time_s() const noexcept = 0;  // NaN before the first advance
  [[nodiscard]] virtual const VolumeLedger& ledger() const noexcept = 0;
  [[nodiscard]] virtual RunDiagnostics diagnostics() const = 0;
  // The first kinematic shock of the run (formed == false when none), and every shock in
  // order of formation.
  [[nodiscard]] virtual const ShockReport& shock_report() const noexcept = 0;
  [[nodiscard]] virtual const std::vector<ShockReport>& shock_reports() const noexcept = 0;
  // Breaking predicted from the characteristics of the inflow (and initial profile) so far,
  // and whether this reach's grid and coupling step can show that shock (shock.hpp).
  [[nodiscard]] virtual const BreakingOutlook& breaking_outlook() const noexcept = 0;
  // Bytes of per-cell arrays held (state, faces, the scheme's scratch, per-cell laws, lateral
  // map) divided by N. Per-reach constants (a 6.4 kB celerity envelope for laws whose
  // celerity may fall with area) are not included.
  [[nodiscard]] virtual double memory_bytes_per_cell() const noexcept = 0;
  // Hot start: saves the whole state after an advance() (cells or fronts, ledger, clock,
  // counters, shock detector, breaking outlook, the scheme's own state) or restores it into
  // a reach built from the same spec and options, which then continues bit for bit as the
  // reach that saved it. Wall-clock time is not state.
  virtual void visit_state(StateVisitor& v) = 0;
};

}  // namespace freshet::routing
