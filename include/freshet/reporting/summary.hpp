// Run summary records and an online per-station accumulator.
//
// Header-only (standard library only). run_report.hpp fills these records from a run; the
// file writers (text, CSV, JSON) live in freshet/io/summary_writer.hpp.
// Units are SI and carried in the names; times are seconds since the run's time origin.
// A quantity that does not apply is NaN (written as empty in CSV, null in JSON).
//
//   freshet::reporting::SummaryAccumulator acc;
//   for (each output time t) acc.add_sample(t, q_m3s, stage_m);
//   StationSummary s = acc.station_summary("mill-outlet", "Mill Lane outlet", rain_centroid_s);
#pragma once

#include <cmath>
#include <limits>
#include <string>
#include <vector>

#include "freshet/core/state_archive.hpp"

namespace freshet::reporting {

inline constexpr double kNotApplicable = std::numeric_limits<double>::quiet_NaN();

struct StationSummary {
  std::string station_id;
  std::string name;
  double peak_discharge_m3s = kNotApplicable;
  double peak_time_s = kNotApplicable;    // time of the peak discharge
  double peak_stage_m = kNotApplicable;   // highest stage (may occur at another time)
  double runoff_volume_m3 = kNotApplicable;
  double centroid_time_s = kNotApplicable;  // first moment of the hydrograph over its volume
  double centroid_lag_s = kNotApplicable;   // centroid_time_s minus the rainfall-excess centroid
};

// What one reach, pond or culvert does to the water it receives: the peak of its total inflow
// (upstream elements plus lateral inflow along a reach, summed into one hydrograph at every
// coupling step) against the peak of its outflow, the timing shift, and the storage that took
// the difference. Positive attenuation = a lower peak out than in. Volumes are exact, from the
// element's ledger: inflow_volume_m3 = outflow_volume_m3 + storage_change_m3 (+ round-off).
struct AttenuationRecord {
  std::string element;
  std::string kind;                                // "reach", "culvert" or "detention"
  double peak_inflow_m3s = kNotApplicable;          // of upstream + lateral, one hydrograph
  double peak_inflow_time_s = kNotApplicable;
  double peak_lateral_inflow_m3s = kNotApplicable;  // of the lateral part alone (reaches)
  double peak_outflow_m3s = kNotApplicable;
  double peak_outflow_time_s = kNotApplicable;
  double attenuation_m3s = kNotApplicable;          // peak inflow - peak outflow
  double attenuation_percent = kNotApplicable;      // 100 (1 - peak outflow / peak inflow)
  double peak_delay_s = kNotApplicable;             // outflow peak time - inflow peak time
  double peak_storage_m3 = kNotApplicable;          // largest volume stored in the element
  double peak_storage_time_s = kNotApplicable;
  double storage_at_outflow_peak_m3 = kNotApplicable;
  double inflow_volume_m3 = kNotApplicable;         // upstream + lateral, over the run
  double lateral_volume_m3 = kNotApplicable;        // the lateral part
  double outflow_volume_m3 = kNotApplicable;
  double storage_change_m3 = kNotApplicable;        // stored at the end - stored at the start
};

// A stretch the study file names (upstream and downstream element on one flow path): the
// upstream element's outflow peak against the downstream element's outflow peak, and what
// entered the path between them (the "side inflow": lateral inflow along its reaches and every
// tributary joining it, i.e. at each element after the upstream one, its total inflow minus
// the outflow of the path element above it). The combined inflow is the upstream outflow plus
// the side inflow, summed at every coupling step with no travel time; its peak against the
// downstream peak is the stretch's attenuation.
struct StretchRecord {
  std::string upstream_id;
  std::string downstream_id;
  std::vector<std::string> path;  // upstream ... downstream, in flow order
  double upstream_peak_m3s = kNotApplicable;  // outflow of the upstream element
  double upstream_peak_time_s = kNotApplicable;
  double downstream_peak_m3s = kNotApplicable;  // outflow of the downstream element
  double downstream_peak_time_s = kNotApplicable;
  double peak_shift_s = kNotApplicable;         // downstream - upstream peak time
  double side_inflow_volume_m3 = kNotApplicable;
  double side_inflow_peak_m3s = kNotApplicable;
  double side_inflow_peak_time_s = kNotApplicable;
  double combined_inflow_peak_m3s = kNotApplicable;
  double attenuation_m3s = kNotApplicable;      // combined inflow peak - downstream peak
  double attenuation_percent = kNotApplicable;  // 100 (1 - downstream / combined inflow peak)
};

// Where and when the flood wave of a reach (or of an overland plane of a subcatchment) breaks,
// predicted from the characteristics of the inflow and lateral inflow it received (Whitham
// 1974, Linear and Nonlinear Waves, ch. 2; routing/breaking_watch.hpp).
struct BreakingRecord {
  std::string element;  // reach or subcatchment id
  std::string plane;    // the overland plane's name; empty for a reach
  bool breaks = false;  // false: no crossing of characteristics inside it during the run
  double time_s = kNotApplicable;      // first crossing
  double chainage_m = kNotApplicable;  // from the upstream end
  double length_m = kNotApplicable;
  std::string message;  // the finding in words
};

// A point of a shock's path.
struct ShockPathPoint {
  double time_s = kNotApplicable;
  double chainage_m = kNotApplicable;
  double rankine_hugoniot_m_s = kNotApplicable;  // [Q]/[A] of the states either side
  double discharge_jump_m3s = kNotApplicable;    // Q_left - Q_right
};

// A shock (kinematic-wave discontinuity) realised in a reach or overland plane.
struct ShockRecord {
  std::string element;  // reach or subcatchment id
  std::string plane;    // the overland plane's name; empty for a reach
  double time_s = kNotApplicable;      // formation
  double chainage_m = kNotApplicable;  // formation, from the upstream end
  double speed_m_s = kNotApplicable;   // least-squares speed of the path
  double rankine_hugoniot_m_s = kNotApplicable;  // mean [Q]/[A] along the path
  double discharge_jump_m3s = kNotApplicable;    // largest along the path (m2/s on a plane)
  double depth_jump_m = kNotApplicable;          // at the largest discharge jump
  // "outlet" (reached it at end_time_s), "merged" (into a later shock), "decayed" (an
  // expansion overtook it), "faded or merged" (left a grid detector's view), "in reach" (still
  // inside at the end of the run).
  std::string fate;
  double end_time_s = kNotApplicable;
  std::string found_by;  // "fronts" (characteristics scheme) or "grid detector"
  std::vector<ShockPathPoint> path;
  std::string message;
};

// One element's volume ledger closure: error = inflow - outflow - storage change.
struct MassBalanceRecord {
  std::string element;
  double inflow_volume_m3 = kNotApplicable;   // inflow + lateral inflow + rain
  double outflow_volume_m3 = kNotApplicable;  // outflow + losses (infiltration, depressions)
  double storage_change_m3 = kNotApplicable;
  double error_m3 = kNotApplicable;
  double relative_error = kNotApplicable;  // error_m3 / max(inflow, outflow), dimensionless
};

// A check of the method's assumptions that failed or is marginal, as free text.
struct ApplicabilityWarning {
  std::string element;
  std::string message;
};

// Applicability numbers of one reach (Ponce 1989 time-of-rise form; routing/applicability.hpp),
// at the reach outlet at the time of peak discharge.
struct WaveNumberRecord {
  std::string element;
  double time_of_rise_s = kNotApplicable;
  double kinematic_number = kNotApplicable;  // t_r S0 u0 / d0, kinematic wave applies >= 85
  double diffusion_number = kNotApplicable;  // t_r S0 (g/d0)^(1/2), diffusion wave >= 15
};

// How one reach was routed: its scheme, the wave that scheme represents, and why it was used
// (the basin file's choice, or wave_choice = "automatic" with Ponce's numbers).
struct ReachMethodRecord {
  std::string element;
  std::string scheme;  // e.g. "muscl-heun", "muskingum-cunge"
  std::string wave;    // "kinematic" or "diffusion"
  std::string reason;
};

struct RunSummary {
  std::string title;   // e.g. "freshet run of basin 'Alder Brook', storm 100-year 6-hour"
  std::string source;  // freshet version string
  std::string time_origin_iso;  // what every time in seconds counts from (ISO 8601); "" unknown
  std::vector<StationSummary> stations;
  std::vector<AttenuationRecord> attenuation;  // every reach, pond and culvert, model order
  std::vector<StretchRecord> stretches;         // as the study file names them
  std::vector<BreakingRecord> breaking;
  std::vector<ShockRecord> shocks;
  std::vector<MassBalanceRecord> mass_balance;
  std::vector<WaveNumberRecord> wave_numbers;
  std::vector<ReachMethodRecord> methods;  // one per reach, network order
  std::vector<ApplicabilityWarning> warnings;
};

// Tracks a station's peak, volume and centroid from streamed samples, in O(1) memory.
//
// Peak discharge and peak stage are the largest samples (times at output samples, no
// interpolation); on a flat top the peak time is where the top is first reached (a later
// sample moves it only when it is more than 0.01 % higher). Volume and centroid integrate the piecewise-linear interpolant of the
// discharge samples exactly (trapezoid rule for the volume; for the first moment, over
// [t0, t1] with q linear: integral of t q dt = (t1 - t0)/6 [t0 (2 q0 + q1) + t1 (q0 + 2 q1)]).
// When the caller knows exact volumes over intervals (a scheme's outflow ledger), it hands
// them in with add_interval_volume(); volume_m3() then reports their sum, and the centroid
// uses each interval's midpoint.
class SummaryAccumulator {
 public:
  // Samples must come in strictly increasing time; stage may be NaN (not recorded).
  void add_sample(double time_s, double discharge_m3s, double stage_m = kNotApplicable) {
    if (count_ > 0) {
      const double a = last_time_s_ - origin_s_, b = time_s - origin_s_;
      const double q0 = last_q_m3s_, q1 = discharge_m3s;
      sample_volume_m3_ += 0.5 * (q0 + q1) * (b - a);
      sample_moment_ += (b - a) / 6.0 * (a * (2.0 * q0 + q1) + b * (q0 + 2.0 * q1));
    } else {
      origin_s_ = time_s;
      first_q_m3s_ = discharge_m3s;
    }
    // On a flat top the peak is where the top is first reached: round-off along a plateau,
    // or a creep towards a limit (a pipe at capacity), must not move the peak time to its
    // far end. A later sample moves it only when it exceeds the discharge at the current
    // peak time by more than kPlateauTolerance.
    if (count_ == 0 ||
        discharge_m3s > q_at_peak_time_ + kPlateauTolerance * std::abs(q_at_peak_time_)) {
      peak_time_s_ = time_s;
      q_at_peak_time_ = discharge_m3s;
    }
    if (count_ == 0 || discharge_m3s > peak_q_m3s_) peak_q_m3s_ = discharge_m3s;
    if (!std::isnan(stage_m) && (std::isnan(peak_stage_m_) || stage_m > peak_stage_m_)) {
      peak_stage_m_ = stage_m;
    }
    last_time_s_ = time_s;
    last_q_m3s_ = discharge_m3s;
    ++count_;
  }

  // An exact volume that passed the station over [t0_s, t1_s].
  void add_interval_volume(double t0_s, double t1_s, double volume_m3) {
    handed_volume_m3_ += volume_m3;
    handed_moment_ += volume_m3 * 0.5 * (t0_s + t1_s);
    has_handed_volume_ = true;
  }

  [[nodiscard]] long sample_count() const { return count_; }
  [[nodiscard]] double peak_discharge_m3s() const { return count_ ? peak_q_m3s_ : kNotApplicable; }
  [[nodiscard]] double peak_time_s() const { return count_ ? peak_time_s_ : kNotApplicable; }
  [[nodiscard]] double peak_stage_m() const { return peak_stage_m_; }
  [[nodiscard]] double first_discharge_m3s() const { return count_ ? first_q_m3s_ : kNotApplicable; }
  [[nodiscard]] double last_time_s() const { return count_ ? last_time_s_ : kNotApplicable; }
  [[nodiscard]] double volume_m3() const {
    return has_handed_volume_ ? handed_volume_m3_ : (count_ ? sample_volume_m3_ : kNotApplicable);
  }
  [[nodiscard]] double centroid_time_s() const {
    if (has_handed_volume_) {
      return handed_volume_m3_ > 0.0 ? handed_moment_ / handed_volume_m3_ : kNotApplicable;
    }
    return sample_volume_m3_ > 0.0 ? origin_s_ + sample_moment_ / sample_volume_m3_
                                   : kNotApplicable;
  }

  // The record for this station; `excess_centroid_s` (NaN if unknown) gives the centroid lag.
  [[nodiscard]] StationSummary station_summary(std::string id, std::string name,
                                               double excess_centroid_s = kNotApplicable) const {
    StationSummary s;
    s.station_id = std::move(id);
    s.name = std::move(name);
    s.peak_discharge_m3s = peak_discharge_m3s();
    s.peak_time_s = peak_time_s();
    s.peak_stage_m = peak_stage_m();
    s.runoff_volume_m3 = volume_m3();
    s.centroid_time_s = centroid_time_s();
    s.centroid_lag_s = s.centroid_time_s - excess_centroid_s;
    return s;
  }

  // Hot start: every running sum, as it stands.
  void visit_state(StateVisitor& v, std::string_view name) {
    StateGroup g(v, name);
    v.value("q_at_peak_time_m3s", q_at_peak_time_);
    v.value("count", count_);
    v.value("origin_s", origin_s_);
    v.value("last_time_s", last_time_s_);
    v.value("first_q_m3s", first_q_m3s_);
    v.value("last_q_m3s", last_q_m3s_);
    v.value("peak_q_m3s", peak_q_m3s_);
    v.value("peak_time_s", peak_time_s_);
    v.value("peak_stage_m", peak_stage_m_);
    v.value("sample_volume_m3", sample_volume_m3_);
    v.value("sample_moment", sample_moment_);
    v.value("handed_volume_m3", handed_volume_m3_);
    v.value("handed_moment", handed_moment_);
    v.value("has_handed_volume", has_handed_volume_);
  }

 private:
  static constexpr double kPlateauTolerance = 1e-4;  // relative; our choice, no source
  double q_at_peak_time_ = 0.0;
  long count_ = 0;
  double origin_s_ = 0.0;  // first sample time: moments are taken about it (less round-off)
  double last_time_s_ = 0.0;
  double first_q_m3s_ = 0.0;
  double last_q_m3s_ = 0.0;
  double peak_q_m3s_ = 0.0;
  double peak_time_s_ = 0.0;
  double peak_stage_m_ = kNotApplicable;
  double sample_volume_m3_ = 0.0;
  double sample_moment_ = 0.0;  // integral of (t - origin) q dt
  double handed_volume_m3_ = 0.0;
  double handed_moment_ = 0.0;
  bool has_handed_volume_ = false;
};

}  // namespace freshet::reporting
