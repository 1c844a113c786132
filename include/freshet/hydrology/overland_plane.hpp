// Overland flow on kinematic-wave planes (Wooding 1965, "A hydraulic model for the
// catchment-stream problem", J. Hydrol. 3; Eagleson 1970, Dynamic Hydrology, ch. 12; Singh
// 1996, Kinematic Wave Modeling in Water Resources).
//
// A plane of unit width, flow length L (m), slope S and Manning sheet-flow roughness n
// carries depth h (m) and discharge per unit width q = alpha h^m (m2/s) with
// alpha = sqrt(S)/n and m = 5/3, driven by the rainfall excess i_e (m/s) as lateral inflow:
//   h_t + q_x = i_e(t).
// The plane is a routing::KinematicReach<geometry::PowerLawFlux> (area = depth x 1 m,
// Q = q, lateral inflow per metre = i_e x 1 m), so it runs the routing core's schemes
// (RoutingOptions). A PlaneCascade chains planes in series, each plane's mean outflow over a
// step being the next one's inflow. Volumes are per metre of width (m3/m = m2).
//
// Under constant excess i from a dry start (Wooding 1965; Singh 1996 ch. 5):
//   time to equilibrium t_e = (L i^(1-m) / alpha)^(1/m), equilibrium discharge q_e = i L,
//   rising limb q(L, t) = alpha (i t)^m for t <= t_e;
// kinematic_plane_outflow_m2s() evaluates that solution, with the plateau when the rain
// stops before t_e and the recession t = t_r + (L - q/i) / (m alpha^(1/m) q^(1 - 1/m)).
//
//   OverlandPlane lawn({.name = "lawn", .length_m = 60.0, .slope = 0.01, .manning_n = 0.15});
//   lawn.advance(0.0, 60.0, 50e-3 / 3600.0);  // one minute of 50 mm/h excess
//   double q = lawn.outflow_m2s();            // outlet discharge per metre of width
#pragma once

#include <limits>
#include <memory>
#include <string>
#include <vector>

#include "freshet/core/error.hpp"
#include "freshet/geometry/flux_law.hpp"
#include "freshet/routing/breaking_watch.hpp"
#include "freshet/routing/reach_model.hpp"

namespace freshet::hydrology {

inline constexpr double kSheetFlowExponent = 5.0 / 3.0;

struct OverlandPlaneSpec {
  std::string name = "plane";  // used in messages: "plane 'lawn'"
  double length_m = 0.0;       // flow length along the slope (m), > 0
  double slope = 0.0;          // m/m, > 0
  double manning_n = 0.0;      // sheet-flow Manning's n (s m^(-1/3)), > 0
  int cell_count = 200;        // finite-volume cells along the plane, >= 1

  [[nodiscard]] std::vector<Problem> validate() const;
  // q = alpha h^(5/3), alpha = sqrt(S) / n.
  [[nodiscard]] geometry::PowerLawFlux flux() const;
};

// The analytical outlet discharge per unit width (m2/s) at time t_s (from t = 0) of a dry
// plane under constant excess intensity i (m/s) for 0 <= t < rain_end_s (see header text).
double kinematic_plane_outflow_m2s(const geometry::PowerLawFlux& flux, double length_m,
                                   double intensity_m_s, double rain_end_s, double t_s);
// t_e = (L i^(1-m) / alpha)^(1/m).
double kinematic_plane_equilibrium_time_s(const geometry::PowerLawFlux& flux, double length_m,
                                          double intensity_m_s);

class OverlandPlane {
 public:
  // Throws InputError naming the plane for invalid spec or options.
  explicit OverlandPlane(OverlandPlaneSpec spec, routing::RoutingOptions options = {});

  // Advances from t0_s (the plane's clock; any value first) to t1_s under uniform excess
  // intensity excess_m_s >= 0 and a constant upstream inflow per unit width inflow_m2s >= 0
  // (its mean over the step). inflow_end_m2s, the upstream rate at t1_s (NaN: inflow_m2s),
  // is what the breaking prediction reads: the inflow linear between step ends.
  routing::AdvanceResult advance(double t0_s, double t1_s, double excess_m_s,
                                 double inflow_m2s = 0.0,
                                 double inflow_end_m2s = std::numeric_limits<double>::quiet_NaN());
  // Dry plane, ledger restarted.
  void reset();

  [[nodiscard]] double outflow_m2s() const;  // outlet q now: the flux through the outlet face
  [[nodiscard]] double storage_m2() const;   // water on the plane per metre of width
  [[nodiscard]] const routing::VolumeLedger& ledger() const { return reach_->ledger(); }
  [[nodiscard]] const OverlandPlaneSpec& spec() const noexcept { return spec_; }
  [[nodiscard]] const routing::ReachModel& reach() const noexcept { return *reach_; }
  // Where and when the sheet flow breaks, from the characteristics of its inflow and excess
  // (routing/breaking_watch.hpp).
  [[nodiscard]] const routing::PredictedBreaking& breaking() const noexcept {
    return watch_.result();
  }
  [[nodiscard]] double peak_outflow_m2s() const noexcept { return peak_outflow_m2s_; }
  // Hot start: the plane's reach, its breaking watch, its inflow rate and peak.
  void visit_state(StateVisitor& v);

 private:
  OverlandPlaneSpec spec_;
  std::unique_ptr<routing::ReachModel> reach_;  // a KinematicReach<PowerLawFlux>
  routing::BreakingWatch watch_;
  double inflow_end_m2s_ = 0.0;    // upstream rate at the end of the last step
  double peak_outflow_m2s_ = 0.0;  // at step ends
};

// Planes in series, all receiving the same excess; outflow is the last plane's. A plane
// hands its mean outflow over a handover step to the next as a constant inflow (volume
// exact); advance() cuts its interval into handover steps of at most `handover_step_s`, since
// a longer constant hold delays the wave (about 2 % of the peak for 30-s holds on a 23-min
// rising limb, against 0.1 % for 5 s).
class PlaneCascade {
 public:
  static constexpr double kDefaultHandoverStep_s = 5.0;
  // At least one plane, handover_step_s > 0. Throws InputError listing every problem.
  explicit PlaneCascade(const std::vector<OverlandPlaneSpec>& planes,
                        routing::RoutingOptions options = {},
                        double handover_step_s = kDefaultHandoverStep_s);

  // Returns the mean outflow per unit width (m2/s) of the last plane over [t0_s, t1_s].
  double advance(double t0_s, double t1_s, double excess_m_s);
  void reset();

  [[nodiscard]] double outflow_m2s() const { return planes_.back().outflow_m2s(); }
  [[nodiscard]] double storage_m2() const;
  [[nodiscard]] double length_m() const;
  // Per unit width: excess received (lateral), outflow of the last plane, storage.
  [[nodiscard]] double excess_received_m2() const;
  [[nodiscard]] double outflow_volume_m2() const { return planes_.back().ledger().outflow_m3; }
  [[nodiscard]] const std::vector<OverlandPlane>& planes() const noexcept { return planes_; }
  void visit_state(StateVisitor& v);

 private:
  double advance_once(double t0_s, double t1_s, double excess_m_s);

  std::vector<OverlandPlane> planes_;
  double handover_step_s_ = kDefaultHandoverStep_s;
};

}  // namespace freshet::hydrology
