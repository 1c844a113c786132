// Where and when a reach's flood wave breaks, predicted from the characteristics of the
// inflow it actually receives, as the run goes (Whitham 1974, Linear and Nonlinear Waves,
// ch. 2; Lighthill & Whitham 1955, On kinematic waves I, Proc. R. Soc. A 229).
//
// A characteristic launched from the inlet at time tau carries the area A(Q_in(tau)) and
// moves at c(A) = dQ/dA; under a lateral inflow q(t) per metre, uniform along the reach (as
// the network and the overland planes hand it), every characteristic gains the same area
// dA/dt = q. The wave breaks where two neighbouring characteristics first cross: without
// lateral inflow, at x = c^2 / (dc/dtau), t = tau + c / (dc/dtau), the earliest over the
// inflow (Whitham 1974, sec. 2.1-2.2). The watch traces characteristics launched at the
// start of every linear piece of the inflow and at times graded towards it (a rise begins
// there, and that is where a piecewise-linear rise breaks first), then every
// `max_launch_step_s`; it reports the first crossing inside the reach, 0 <= x <= L, during
// the run. Before that crossing no shock exists in the reach and nothing downstream of L
// acts upstream (every celerity is >= 0), so the first crossing inside the reach is the
// reach's first shock, exactly up to the launch spacing.
//
// Cost and memory: one entry per characteristic inside the reach; runs of characteristics
// with equal areas (steady flow) keep only their two ends. The watch stops at the first
// crossing.
//
//   BreakingWatch watch(flux, 5000.0);
//   watch.start(0.0, 20.0, flux_area_for(20.0));
//   watch.advance(0.0, 60.0, 20.0, 35.0, 0.0);   // inflow 20 -> 35 m3/s over the step
//   if (watch.result().breaks) use(watch.result().time_s, watch.result().chainage_m);
#pragma once

#include <cstddef>
#include <limits>
#include <vector>

#include "freshet/core/time_series.hpp"
#include "freshet/geometry/section_flux.hpp"
#include "freshet/routing/routing_options.hpp"
#include "freshet/routing/shock.hpp"

namespace freshet::routing {

struct PredictedBreaking {
  bool watched = false;  // false: the watch never ran (no advance)
  // True when neighbouring characteristics crossed inside the reach during the run.
  bool breaks = false;
  double time_s = std::numeric_limits<double>::quiet_NaN();
  double chainage_m = std::numeric_limits<double>::quiet_NaN();
  // The launch time of the overtaking characteristic (the inflow that breaks first).
  double launch_time_s = std::numeric_limits<double>::quiet_NaN();
  // The crossing characteristics' discharges at the inlet, when they were launched (m3/s).
  double discharge_behind_m3s = std::numeric_limits<double>::quiet_NaN();
  double discharge_ahead_m3s = std::numeric_limits<double>::quiet_NaN();
  // The overtaken characteristic carried no water (the wave runs onto a dry bed, whose
  // wetting front is a shock from the start).
  bool onto_dry_bed = false;
  // The overtaken characteristic left the inlet with no discharge: the inflow rises from
  // zero, and its leading edge steepens into a shock at once (with no jump at first; it grows
  // as it absorbs the rise).
  bool from_zero_inflow = false;
  double length_m = 0.0;
  double watched_from_s = std::numeric_limits<double>::quiet_NaN();
  double watched_to_s = std::numeric_limits<double>::quiet_NaN();
};

void visit_state(StateVisitor& v, std::string_view name, PredictedBreaking& p);

class BreakingWatch {
 public:
  static constexpr double kDefaultMaxLaunchStep_s = 60.0;

  BreakingWatch() = default;
  // length_m > 0, max_launch_step_s > 0.
  BreakingWatch(geometry::SectionFlux flux, double length_m,
                double max_launch_step_s = kDefaultMaxLaunchStep_s);

  // Starts over at t_s: the reach holds the uniform area initial_area_m2 and the inlet
  // discharge is inflow_m3s.
  void start(double t_s, double inflow_m3s, double initial_area_m2);
  // Starts over at the next advance(), from steady flow carrying the inflow at its start.
  void reset();
  // Over [t0_s, t1_s] (t0_s the end of the last call): the inflow varies linearly from
  // inflow_t0_m3s to inflow_t1_m3s; lateral inflow lateral_m2s per metre, uniform and constant.
  void advance(double t0_s, double t1_s, double inflow_t0_m3s, double inflow_t1_m3s,
               double lateral_m2s);
  // Over [t0_s, t1_s]: every linear piece of a piecewise-linear inflow hydrograph.
  void advance(double t0_s, double t1_s, const PiecewiseLinearSeries& inflow_m3s,
               double lateral_m2s);

  [[nodiscard]] const PredictedBreaking& result() const noexcept { return result_; }
  // Saves or restores the characteristics in the reach and the result (hot start).
  void visit_state(StateVisitor& v, std::string_view name);
  [[nodiscard]] std::size_t characteristics() const noexcept { return chars_.size(); }
  // The fastest celerity of the inflow so far (m/s): of every characteristic launched and,
  // once the watch has found its crossing and launches no more, of the inflow at the end of
  // every piece.
  [[nodiscard]] double fastest_celerity_m_s() const noexcept { return fastest_m_s_; }

 private:
  struct Characteristic {
    double x_m = 0.0;
    double area_m2 = 0.0;      // now
    double celerity_m_s = 0.0; // c(area) now
    double launch_time_s = 0.0;
    double launch_discharge_m3s = 0.0;
  };

  void launch(double t_s, double discharge_m3s);
  void move_to(double t_s, double lateral_m2s);
  void check_crossings(double t0_s, double t1_s);

  geometry::SectionFlux flux_{geometry::PowerLawFlux{1.0, 1.0}};  // replaced on construction
  double length_m_ = 0.0;
  double max_step_s_ = kDefaultMaxLaunchStep_s;
  double t_now_ = std::numeric_limits<double>::quiet_NaN();
  bool done_ = false;
  // Oldest first (furthest downstream).
  std::vector<Characteristic> chars_;
  std::vector<double> x_before_;
  std::vector<double> launch_times_;
  PredictedBreaking result_;
  double fastest_m_s_ = 0.0;
};

// Breaking as a grid reach sees it: the watch's prediction from the inflow the reach has been
// given (and from its initial profile when that is not uniform), and whether the reach's grid
// and coupling step can show that shock. KinematicReach keeps one
// (ReachModel::breaking_outlook()) and holds its shock detector back until the predicted birth
// (ShockDetector::set_earliest_birth; docs/shock-detection.md).
struct BreakingOutlook {
  PredictedBreaking prediction;  // breaks: a crossing inside the reach so far
  // False once lateral inflow has entered: its characteristics curve and can break a wave by
  // themselves, so the prediction is no longer a bound on the first shock.
  bool exact = true;
  // Whether the reach's shock detector can show the predicted shock: its plateau windows fit
  // in the reach, and a shock born at the predicted place, moving at the fastest celerity of
  // the inflow so far, stays in view (upstream of the last plateau window) for at least
  // `persistence` observations at the longest advance() interval so far.
  bool resolvable = true;
  double time_in_view_s = std::numeric_limits<double>::quiet_NaN();
  double longest_interval_s = 0.0;
  int cells_needed = 0;  // 2 plateau windows + 2 (cells)
};

namespace detail {
// Keeps a reach's BreakingOutlook: a BreakingWatch fed with every advance()'s inflow series
// (a network driver hands over one constant mean per coupling step: a staircase whose steps
// launch one characteristic each), plus the initial profile's own breaking.
class ReachBreakingOutlook {
 public:
  ReachBreakingOutlook() = default;
  ReachBreakingOutlook(geometry::SectionFlux flux, double length_m, int cells,
                       const ShockDetectionOptions& resolved)
      : watch_(std::move(flux), length_m), length_m_(length_m), cells_(cells), options_(resolved) {}

  // A new initial state, seen at the first advance from t_s: the inlet's area and discharge
  // then, and the breaking of the initial profile (time relative to its start).
  void restart(double t_s, double inflow_m3s, double inlet_area_m2,
               const BreakingPrediction& from_profile);
  void advance(double t0_s, double t1_s, const PiecewiseLinearSeries& inflow_m3s, bool lateral);

  [[nodiscard]] const BreakingOutlook& outlook() const noexcept { return outlook_; }
  void visit_state(StateVisitor& v);
  // Earliest time a shock may be born: +infinity while nothing crosses inside the reach,
  // -infinity (no bound) once lateral inflow has entered; and where (0 when unbounded).
  [[nodiscard]] double earliest_birth_s() const noexcept;
  [[nodiscard]] double earliest_birth_position_m() const noexcept {
    return outlook_.exact && outlook_.prediction.breaks ? outlook_.prediction.chainage_m : 0.0;
  }

 private:
  void update();

  BreakingWatch watch_;
  double length_m_ = 0.0;
  int cells_ = 0;
  ShockDetectionOptions options_;
  PredictedBreaking profile_;  // the initial profile's breaking, in run time
  BreakingOutlook outlook_;
};
}  // namespace detail

}  // namespace freshet::routing
