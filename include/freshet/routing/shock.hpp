// Kinematic shocks: prediction from characteristics and detection in a computed solution.
//
// With c(A) = dQ/dA increasing in A, characteristics of a deeper (faster) state overtake a
// shallower one and the solution of A_t + Q(A)_x = 0 breaks; afterwards a shock travels at
// the Rankine-Hugoniot speed U = (Q_L - Q_R) / (A_L - A_R) (Lighthill & Whitham 1955, On
// kinematic waves I, Proc. R. Soc. A 229; Whitham 1974, Linear and Nonlinear Waves, ch. 2).
//
// Prediction (no time stepping):
//   * from an initial profile A0(x): t_b = -1 / min_x d c(A0(x))/dx, at x_b = x* + c(A0(x*)) t_b;
//   * from an inflow hydrograph at x = 0: the characteristic launched at time tau travels
//     x = c(tau) (t - tau); neighbours cross at x = c^2 / (dc/dtau), t = tau + c / (dc/dtau).
//     The shock is born at the earliest such t; the crossing nearest the inlet,
//     min_tau c^2 / (dc/dtau), is reported too (the two coincide for a linear rise).
// Detection: ShockDetector watches the cell areas at observation times for persistent
// fronts that are resolved within a few cells, and reports every shock of a run (formation,
// path, speed, outlet arrival), in order of formation.
//
//   auto p = predict_breaking_from_profile(PowerLawFlux{0.5, 2.0}, x_m, area_m2);
//   if (p.breaks) std::cout << p.time_s << " s at " << p.position_m << " m\n";
#pragma once

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <functional>
#include <limits>
#include <span>
#include <vector>

#include "freshet/core/state_archive.hpp"
#include "freshet/core/time_series.hpp"
#include "freshet/geometry/flux_law.hpp"
#include "freshet/routing/routing_options.hpp"

namespace freshet::routing {

struct BreakingPrediction {
  bool breaks = false;  // false: no compressive characteristics in the data
  // The shock's birth: the earliest crossing of neighbouring characteristics.
  double time_s = std::numeric_limits<double>::infinity();
  double position_m = std::numeric_limits<double>::quiet_NaN();
  // Where the first-crossing characteristic starts: x* (profile) or launch time tau* (inflow).
  double origin = std::numeric_limits<double>::quiet_NaN();
  // Inflow only: the crossing nearest the inlet, x = min_tau c^2 / (dc/dtau), and its time.
  // Equal to the birth for a linear rise; for a curved rise it can lie nearer the inlet but
  // later than the birth.
  double nearest_position_m = std::numeric_limits<double>::quiet_NaN();
  double nearest_time_s = std::numeric_limits<double>::quiet_NaN();
};

namespace detail {
// Vertex of the parabola through (-1, ym), (0, y0), (1, yp): offset in [-1, 1] and value.
inline void parabola_vertex(double ym, double y0, double yp, double& offset, double& value) {
  const double curvature = ym - 2.0 * y0 + yp;
  offset = curvature > 0.0 ? std::clamp(0.5 * (ym - yp) / curvature, -1.0, 1.0) : 0.0;
  value = y0 + 0.5 * offset * (yp - ym) + 0.5 * offset * offset * curvature;
}
}  // namespace detail

// Breaking of an initial profile sampled at equally spaced x_m (at least 3 points).
template <geometry::FluxLaw F>
[[nodiscard]] BreakingPrediction predict_breaking_from_profile(const F& law,
                                                              std::span<const double> x_m,
                                                              std::span<const double> area_m2) {
  BreakingPrediction p;
  const std::size_t n = std::min(x_m.size(), area_m2.size());
  if (n < 3) return p;
  const double h = x_m[1] - x_m[0];
  std::vector<double> c(n), dcdx(n, 0.0);
  for (std::size_t i = 0; i < n; ++i) c[i] = law.celerity_m_s(area_m2[i]);
  std::size_t k = 1;
  for (std::size_t i = 1; i + 1 < n; ++i) {
    dcdx[i] = (c[i + 1] - c[i - 1]) / (2.0 * h);  // central difference, O(h^2)
    if (dcdx[i] < dcdx[k]) k = i;
  }
  if (!(dcdx[k] < 0.0)) return p;
  double offset = 0.0, min_slope = dcdx[k];
  if (k >= 2 && k + 2 < n) detail::parabola_vertex(dcdx[k - 1], dcdx[k], dcdx[k + 1], offset,
                                                   min_slope);
  const double c_star = c[k] + 0.5 * offset * (c[k + 1] - c[k - 1]);
  p.breaks = true;
  p.time_s = -1.0 / min_slope;
  p.origin = x_m[k] + offset * h;
  p.position_m = p.origin + c_star * p.time_s;
  return p;
}

// First crossing of characteristics launched from x = 0 by an inflow hydrograph over
// [t_begin_s, t_end_s], sampled at `samples` equally spaced launch times.
template <geometry::FluxLaw F>
[[nodiscard]] BreakingPrediction predict_breaking_from_inflow(
    const F& law, const PiecewiseLinearSeries& inflow_m3s, double t_begin_s, double t_end_s,
    int samples = 20000) {
  BreakingPrediction p;
  if (samples < 3 || !(t_end_s > t_begin_s)) return p;
  const double h = (t_end_s - t_begin_s) / (samples - 1);
  auto celerity_at = [&](double tau) {
    return law.celerity_m_s(law.area_for_discharge_m2(inflow_m3s.value_at(tau)));
  };
  double nearest = std::numeric_limits<double>::infinity();
  for (int k = 1; k + 1 < samples; ++k) {
    const double tau = t_begin_s + k * h;
    const double dc = (celerity_at(tau + h) - celerity_at(tau - h)) / (2.0 * h);
    const double c = celerity_at(tau);
    if (!(dc > 0.0)) continue;
    const double x = c * c / dc;      // where characteristics tau and tau + dtau cross
    const double t = tau + c / dc;    // and when
    p.breaks = true;
    if (t < p.time_s) p.time_s = t, p.position_m = x, p.origin = tau;
    if (x < nearest) nearest = x, p.nearest_position_m = x, p.nearest_time_s = t;
  }
  return p;
}

// Hot start (core/state_archive.hpp): a prediction, and every shock report with its path.
void visit_state(StateVisitor& v, std::string_view name, BreakingPrediction& p);

struct ShockSample {
  double time_s = 0.0;
  double position_m = 0.0;         // where A crosses (A_left + A_right) / 2
  double area_left_m2 = 0.0;       // upstream plateau
  double area_right_m2 = 0.0;      // downstream plateau
  double rankine_hugoniot_m_s = 0.0;  // (Q_L - Q_R) / (A_L - A_R)
};

struct ShockReport {
  bool formed = false;
  double formation_time_s = std::numeric_limits<double>::quiet_NaN();
  double formation_position_m = std::numeric_limits<double>::quiet_NaN();
  // Least-squares slope of the path (needs >= 2 samples), and the mean Rankine-Hugoniot
  // speed of the samples, for comparison.
  double speed_m_s = std::numeric_limits<double>::quiet_NaN();
  double rankine_hugoniot_m_s = std::numeric_limits<double>::quiet_NaN();
  std::vector<ShockSample> path;
  bool reached_outlet = false;
  double outlet_arrival_time_s = std::numeric_limits<double>::quiet_NaN();
  // Left the detector's view inside the reach: the front decayed (no steep front near its
  // extrapolated position for `persistence` observations) or was overtaken by a later shock
  // and merged with it. end_time_s is the last observation in which it was seen.
  bool ended = false;
  double end_time_s = std::numeric_limits<double>::quiet_NaN();
  // Known to have ended by merging into another shock (the characteristics scheme knows; a
  // grid detector cannot tell merging from decay).
  bool merged = false;
};

// Watches one reach. observe() is called at increasing times with the cell areas and a way to
// evaluate the discharges Q_i(A_i) and celerities c_i(A_i); it tracks every shock of the run, each in its own
// ShockReport (in order of formation):
//   * each tracked shock is looked for within plateau_cells cells of its position
//     extrapolated along its fitted speed; it leaves the view through the outlet (arrival
//     time extrapolated) or, when not found for `persistence` observations, as ended;
//   * the steepest front away from every tracked shock is a candidate; once it persists for
//     `persistence` observations along a consistent path it is reported as a new shock.
// Formation time and place are refined from the last observation in which the
// compression still steepened as the characteristics predict: along a
// characteristic, d c/dx = c0' / (1 + c0' t), so 1 / max(-dc/dx) falls linearly to zero at
// the breaking time, t_b = t + 1 / max(-dc/dx), and the break is at x* + c(x*) (t_b - t),
// where x* is the steepest point (Whitham 1974, Linear and Nonlinear Waves, sec. 2.3).
void visit_state(StateVisitor& v, std::string_view name, std::vector<ShockReport>& reports);

class ShockDetector {
 public:
  ShockDetector() = default;
  ShockDetector(const ShockDetectionOptions& options, double cell_width_m, int cell_count);

  // Q_i(A_i) and c_i(A_i) of one cell of the observed profile, evaluated on demand: the
  // detector reads c in every cell once per observation and Q at a few plateau cells, and
  // keeps no per-cell array.
  using CellFlux = std::function<void(std::size_t cell, double& discharge_m3s, double& celerity_m_s)>;
  void observe(double t_s, std::span<const double> cell_area_m2, const CellFlux& cell_flux);
  // Every shock formed so far, in order of formation.
  [[nodiscard]] const std::vector<ShockReport>& reports() const noexcept { return reports_; }
  // The first shock formed (formed == false when there is none).
  [[nodiscard]] const ShockReport& report() const noexcept {
    return reports_.empty() ? empty_ : reports_.front();
  }
  [[nodiscard]] int shocks_found() const noexcept { return static_cast<int>(reports_.size()); }
  void reset();
  // Saves or restores everything observe() has built up (hot start).
  void visit_state(StateVisitor& v);
  // No new shock is formed from observations before t_s, the earliest birth the
  // characteristics allow (-infinity: no bound), at position_m. A steep compression seen
  // earlier is a front the grid cannot tell from a shock, not a shock. After it, when the
  // grid can resolve it (BreakingOutlook::resolvable), the first shock may be a front
  // smeared wider than front_cells, at or below position_m.
  void set_earliest_birth(double t_s, double position_m, bool resolvable) noexcept {
    earliest_birth_s_ = t_s;
    earliest_birth_position_m_ = position_m;
    predicted_resolvable_ = resolvable;
  }

  // The steep-front test on one profile, exposed for tests: returns true and fills `sample`
  // (time_s left 0) when the profile has a front resolved within options.front_cells cells.
  [[nodiscard]] bool find_steep_front(std::span<const double> cell_area_m2,
                                      std::span<const double> cell_discharge_m3s,
                                      ShockSample& sample) const;

 private:
  // Faces [first, last] (face i lies between cells i and i+1).
  struct FaceRange {
    int first = 0;
    int last = -1;
  };
  struct Track {  // a formed shock still in view
    std::size_t report = 0;
    int misses = 0;
  };

  // kNotSteep: a jump above min_relative_jump (sample filled), but not resolved within
  // front_cells cells.
  enum class FrontTest { kNone, kNotSteep, kSteep };
  using DischargeAt = std::function<double(std::size_t cell)>;
  [[nodiscard]] FrontTest find_front(std::span<const double> a, const DischargeAt& q,
                                     FaceRange search, const std::vector<FaceRange>& excluded,
                                     ShockSample& sample) const;
  [[nodiscard]] double predicted_position_m(const ShockReport& r, double t_s) const;
  [[nodiscard]] FaceRange faces_near(double position_m, int radius_cells) const;
  [[nodiscard]] std::vector<FaceRange> tracked_faces(double t_s) const;
  void follow_tracks(double t_s, std::span<const double> a, const DischargeAt& q);
  bool follow(Track& track, double t_s, std::span<const double> a, const DischargeAt& q);
  void merge_tracks(double t_s);
  void look_for_new_front(double t_s, std::span<const double> a, const DischargeAt& q);
  void form_shock();
  void update_breaking_estimate(double t_s, std::span<const double> a, const CellFlux& cell_flux);
  static void update_speeds(ShockReport& report);

  ShockDetectionOptions options_;
  double dx_ = 1.0;
  int n_ = 0;
  std::vector<ShockSample> pending_;  // candidate front not yet persistent
  std::vector<ShockReport> reports_;
  std::vector<Track> tracks_;
  ShockReport empty_;
  double earliest_birth_s_ = -std::numeric_limits<double>::infinity();
  double earliest_birth_position_m_ = 0.0;
  bool predicted_resolvable_ = false;
  // Latest breaking estimate from a resolved compression (NaN when none yet).
  double estimated_break_time_s_ = std::numeric_limits<double>::quiet_NaN();
  double estimated_break_position_m_ = std::numeric_limits<double>::quiet_NaN();
  double last_gradient_time_s_ = std::numeric_limits<double>::quiet_NaN();
  double last_inverse_gradient_s_ = std::numeric_limits<double>::quiet_NaN();
};

}  // namespace freshet::routing
