// What a study run is watched for beyond peaks and volumes, with memory that does not grow
// with the length of the run:
//  * the centroid of the rainfall excess upstream of each station (for centroid lags);
//  * when each reach's or subcatchment's discharge began to rise towards its peak (for the
//    Ponce number and the coupling-step check);
//  * the largest rise of a pond's level above the water level at the outlet of the reach
//    feeding it (backwater that the kinematic wave cannot carry upstream).
#pragma once

#include <cstddef>
#include <span>
#include <vector>

#include "freshet/reporting/station.hpp"
#include "freshet/network/driver.hpp"

namespace freshet::reporting::detail {

// A bounded record of one series: when full, every other sample is dropped and the
// sampling stride doubles, so it keeps at most kCapacity samples spread over the whole run.
class DecimatedSeries {
 public:
  static constexpr std::size_t kCapacity = 4096;
  void add(double t_s, double value);
  // The last kept time at or before `until_s` at which the value was <= threshold; the
  // first kept time when there is none.
  [[nodiscard]] double last_time_at_or_below(double threshold, double until_s) const;

 private:
  std::vector<double> t_s_, value_;
  long count_ = 0;
  long stride_ = 1;
};

class RunWatch {
 public:
  RunWatch(const network::Model& model, const std::vector<StationDescription>& stations);
  // Samples at the end of a coupling step; subcatchment rates are means over that step.
  void observe(double t_s, std::span<const network::StationSample> samples);

  // Centroid time of the rainfall excess of the subcatchments upstream of station i (or the
  // station itself); NaN when no rain excess reaches it.
  [[nodiscard]] double excess_centroid_s(std::size_t i) const;
  // When station i's discharge last stood within 5 % of its rise (from its starting value to
  // its peak) before the peak: the start of the rising limb. Reaches and subcatchments only
  // (NaN for other stations).
  [[nodiscard]] double rise_start_s(std::size_t i, double peak_time_s, double peak_m3s) const;
  // For a reach draining into a pond: the largest (pond level - reach outlet level) over the
  // run and when it occurred; excess <= 0 means no backwater. NaN when not applicable.
  [[nodiscard]] double backwater_excess_m(std::size_t i) const { return backwater_m_[i]; }
  [[nodiscard]] double backwater_time_s(std::size_t i) const { return backwater_time_s_[i]; }

 private:
  std::vector<std::vector<std::size_t>> upstream_subcatchments_;  // per station
  std::vector<double> area_m2_;                                   // per subcatchment station
  std::vector<double> excess_m3_, excess_moment_;                 // per subcatchment station
  std::vector<DecimatedSeries> series_;  // per station (reaches and subcatchments only)
  std::vector<double> start_m3s_;
  std::vector<bool> tracked_;
  std::vector<std::ptrdiff_t> pond_below_;                        // per reach: pool index or -1
  std::vector<double> backwater_m_, backwater_time_s_;
  double last_t_s_ = 0.0;
  bool started_ = false;
};

}  // namespace freshet::reporting::detail
