// What a study run is watched for beyond peaks and volumes, with memory that does not grow
// with the length of the run:
//  * the centroid of the rainfall excess upstream of each station (for centroid lags);
//  * when each reach's or subcatchment's discharge began to rise towards its peak (for the
//    Ponce number and the coupling-step check);
//  * the largest rise of a pond's level above the water level at the outlet of the reach
//    feeding it (backwater that the kinematic wave cannot carry upstream).
#pragma once

#include <cstddef>
#include <limits>
#include <span>
#include <string_view>
#include <vector>

#include "freshet/reporting/station.hpp"
#include "freshet/network/driver.hpp"

namespace freshet::reporting::detail {

// The start of a station's rising limb, from streamed samples: the last sample at or before
// the peak whose value is at or below a threshold known only at the end of the run (the
// start plus 5 % of the rise to the final peak), in memory that does not grow with the run.
//
// The last sample at or below x up to time T is lower than every later sample up to T, so it
// is one of the suffix minima of those samples; only they are kept (values rising with
// time): `lows_`, those of the samples up to the peak as last marked, and `since_`, those of
// the samples after it. At a new peak the two merge (an entry of lows_ not below the lowest
// sample since is no minimum any more). The threshold only rises with the peak, so of the
// entries at or below the threshold of the peak just marked only the last can still be the
// answer, and the others go: what stays is the rise above that threshold, so the memory
// follows the longest rise, not the run's length. Should a list exceed kCapacity entries (a
// rise over more than kCapacity coupling steps), every other entry but the oldest and the
// newest goes, and the answer may then come from an earlier kept sample (the decimated
// series this replaces had the same bound on the whole run).
class RiseTracker {
 public:
  static constexpr std::size_t kCapacity = 4096;
  // Samples in strictly increasing time.
  void add(double t_s, double value);
  // The sample just added is the peak; `floor` is the threshold for its value, so the final
  // threshold is at least that.
  void mark_peak(double floor);
  // The last sample at or before the marked peak whose value is <= threshold (a threshold at
  // or above every floor marked); the first sample when there is none. NaN before any sample.
  [[nodiscard]] double last_time_at_or_below(double threshold) const;
  [[nodiscard]] double peak_time_s() const noexcept { return peak_time_s_; }
  [[nodiscard]] double last_value() const noexcept { return last_value_; }
  void visit_state(StateVisitor& v, std::string_view name);

 private:
  struct Low {
    double t_s;
    double value;
  };
  static void thin(std::vector<Low>& lows);
  std::vector<Low> lows_, since_;
  double first_t_s_ = std::numeric_limits<double>::quiet_NaN();
  double peak_time_s_ = std::numeric_limits<double>::quiet_NaN();
  double last_value_ = std::numeric_limits<double>::quiet_NaN();
};

class RunWatch {
 public:
  RunWatch(const network::Model& model, const std::vector<StationDescription>& stations);
  // Samples at the end of a coupling step; subcatchment rates are means over that step.
  void observe(double t_s, std::span<const network::StationSample> samples);
  // Station i's sample just observed is its peak (as its summary accumulator judges it).
  void mark_peak(std::size_t i);

  // Centroid time of the rainfall excess of the subcatchments upstream of station i (or the
  // station itself); NaN when no rain excess reaches it.
  [[nodiscard]] double excess_centroid_s(std::size_t i) const;
  // When station i's discharge last stood within 5 % of its rise (from its starting value to
  // its peak) before the peak: the start of the rising limb. Reaches and subcatchments only
  // (NaN for other stations). peak_time_s must be the time last marked with mark_peak().
  [[nodiscard]] double rise_start_s(std::size_t i, double peak_time_s, double peak_m3s) const;
  // For a reach draining into a pond: the largest (pond level - reach outlet level) over the
  // run and when it occurred; excess <= 0 means no backwater. NaN when not applicable.
  [[nodiscard]] double backwater_excess_m(std::size_t i) const { return backwater_m_[i]; }
  [[nodiscard]] double backwater_time_s(std::size_t i) const { return backwater_time_s_[i]; }
  void visit_state(StateVisitor& v);

 private:
  std::vector<std::vector<std::size_t>> upstream_subcatchments_;  // per station
  std::vector<double> area_m2_;                                   // per subcatchment station
  std::vector<double> excess_m3_, excess_moment_;                 // per subcatchment station
  std::vector<RiseTracker> rises_;  // per station (reaches and subcatchments only)
  std::vector<double> start_m3s_;
  std::vector<bool> tracked_;
  std::vector<std::ptrdiff_t> pond_below_;                        // per reach: pool index or -1
  std::vector<double> backwater_m_, backwater_time_s_;
  double last_t_s_ = 0.0;
  bool started_ = false;
};

}  // namespace freshet::reporting::detail
