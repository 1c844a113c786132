// What an ensemble's members say at each station, as the outputs report it: percentiles of
// each member quantity (peak discharge, peak stage, time of peak, outflow volume), the
// probability that a stated threshold is exceeded, and how the percentiles move as members are
// added (the convergence table). Pure numerics: no I/O, nothing of the network; the members'
// values come from whoever ran them (threads of one process today, other processes later).
//
//   std::vector<MemberPeaks> peaks = ...;              // one entry per station
//   EnsembleSummary s = summarize_ensemble(peaks, {5, 50, 95}, thresholds);
//   s.stations[0].values[index(PeakQuantity::discharge)]   // p5, p50, p95 of peak discharge
#pragma once

#include <array>
#include <cstddef>
#include <string>
#include <string_view>
#include <vector>

namespace freshet::uncertainty {

// One station's members: one value per member, in member order.
struct MemberPeaks {
  std::string id;
  std::vector<double> peak_discharge_m3s;
  std::vector<double> peak_stage_m;  // NaN where the element has no stage
  std::vector<double> peak_time_s;
  std::vector<double> outflow_volume_m3;
};

// The member quantities summarised, in the order of every table.
enum class PeakQuantity { discharge, stage, time, volume };
inline constexpr std::size_t kPeakQuantities = 4;
[[nodiscard]] constexpr std::size_t index(PeakQuantity q) { return static_cast<std::size_t>(q); }
// Column stem and SI unit: "peak_discharge_m3s"/"m3 s-1", "peak_stage_m"/"m",
// "peak_time_s"/"s", "outflow_volume_m3"/"m3".
[[nodiscard]] std::string_view column_name(PeakQuantity q);
[[nodiscard]] std::string_view unit_name(PeakQuantity q);
// The members' values of one quantity.
[[nodiscard]] const std::vector<double>& values_of(const MemberPeaks& m, PeakQuantity q);

// A level whose exceedance is asked for: a station's peak discharge (a pipe's capacity) or
// peak stage (a road crest) above `value_si` (m3 s-1 or m).
struct Threshold {
  std::string name;  // e.g. "Mill Lane road crest"
  std::string station_id;
  PeakQuantity quantity = PeakQuantity::stage;  // discharge or stage
  double value_si = 0.0;
};

struct StationPercentiles {
  std::string id;
  // [quantity][percentile]; NaN for a quantity some member lacks (a station with no stage).
  std::array<std::vector<double>, kPeakQuantities> values;
};

struct ExceedanceResult {
  Threshold threshold;
  std::size_t members = 0;
  std::size_t exceeded = 0;  // members whose peak is strictly above the threshold
  double probability = 0.0;  // exceeded / members; NaN when the station has no such peak
  // Binomial standard error of that fraction, sqrt(p (1 - p) / members) (common practice, no
  // source): how far the estimate may move with another draw of the same number of members.
  double standard_error = 0.0;
};

// The percentiles of the first `members` members (the convergence table: a row per size).
struct ConvergenceRow {
  std::size_t members = 0;
  std::string station_id;
  PeakQuantity quantity = PeakQuantity::discharge;
  std::vector<double> values;  // one per percentile; NaN as above
};

struct EnsembleSummary {
  std::size_t members = 0;
  std::vector<double> percentiles;
  std::vector<StationPercentiles> stations;   // in the order given
  std::vector<ExceedanceResult> exceedances;  // in the order given
  std::vector<ConvergenceRow> convergence;    // by size, then station, then quantity
};

// The member counts of the convergence table: N/8, N/4, N/2 and N (integer division), those
// of at least 2 members, each once, increasing.
[[nodiscard]] std::vector<std::size_t> convergence_sizes(std::size_t members);

// Every station must have the same number (>= 2) of members in each quantity, and every
// threshold must name one of the stations with quantity discharge or stage (FRESHET_ASSERT:
// the caller checked the input).
[[nodiscard]] EnsembleSummary summarize_ensemble(const std::vector<MemberPeaks>& stations,
                                                 const std::vector<double>& percentiles,
                                                 const std::vector<Threshold>& thresholds);

}  // namespace freshet::uncertainty
