// The in-memory record of one run: a network::RecordSink that keeps, for every station, the
// peak, volume and centroid accumulator (summary.hpp), the sample at the time of the peak,
// and the watchers the warnings need (the centroid of the rainfall excess upstream, the start
// of the rising limb, the rise of a pond above the reach feeding it), in memory that does not
// grow with the length of the run. Stations named with keep_series() also keep their whole
// discharge series (24 bytes per coupling step) for hydrograph exports.
//
// It writes no file: tests drive a network with it and read the reports (run_report.hpp) in
// memory; a study run wraps it in a sink that also streams the samples to NetCDF.
//
//   network::Model model = ...;
//   RunRecorder recorder(model, stations);
//   const network::RunSummary numerics = network::simulate(model, clock, recorder);
//   RunReport report = report_run(model, numerics, recorder, {"title", "freshet", 60.0});
#pragma once

#include <cstddef>
#include <map>
#include <memory>
#include <span>
#include <string>
#include <vector>

#include "freshet/core/time_series.hpp"
#include "freshet/network/driver.hpp"
#include "freshet/reporting/run_series.hpp"
#include "freshet/reporting/station.hpp"
#include "freshet/reporting/summary.hpp"

namespace freshet::reporting {

namespace detail {
class RunWatch;
}  // namespace detail

class RunRecorder final : public network::RecordSink {
 public:
  // `stations` describes model.elements, in model order.
  RunRecorder(const network::Model& model, std::vector<StationDescription> stations);
  ~RunRecorder() override;
  RunRecorder(const RunRecorder&) = delete;
  RunRecorder& operator=(const RunRecorder&) = delete;

  // Output times and coupling-step ends feed the same accumulators (peaks between output
  // times are not missed).
  void record(double time_s, std::span<const network::StationSample> samples) override;
  [[nodiscard]] bool observes_every_step() const override { return true; }
  void observe(double time_s, std::span<const network::StationSample> samples) override;

  [[nodiscard]] const std::vector<StationDescription>& stations() const { return stations_; }
  [[nodiscard]] const SummaryAccumulator& accumulator(std::size_t i) const { return acc_[i]; }
  // Station i's total inflow (upstream plus lateral, network::StationSample::inflow_m3s), its
  // lateral part, and the volume it stores, each as a hydrograph of its own (peaks and times).
  [[nodiscard]] const SummaryAccumulator& inflow(std::size_t i) const { return inflow_[i]; }
  [[nodiscard]] const SummaryAccumulator& lateral_inflow(std::size_t i) const { return lateral_[i]; }
  [[nodiscard]] const SummaryAccumulator& storage(std::size_t i) const { return storage_[i]; }

  // A stretch along one flow path (station indices, upstream first, each draining into the
  // next; the caller checks that): call before the run. The recorder sums, at every sample,
  // what enters the path below its first element (side inflow) and that plus the first
  // element's outflow (combined inflow); summary.hpp's StretchRecord says what they mean.
  struct Stretch {
    std::vector<std::size_t> path;
    SummaryAccumulator side_inflow;
    SummaryAccumulator combined_inflow;
  };
  void watch_stretch(std::vector<std::size_t> path);
  [[nodiscard]] const std::vector<Stretch>& stretches() const { return stretches_; }
  // Station i's sample at the time of its peak discharge (the first sample of a flat top).
  [[nodiscard]] const network::StationSample& at_peak(std::size_t i) const { return at_peak_[i]; }
  // Centroid time of the rainfall excess of the subcatchments upstream of station i (or of
  // the station itself); NaN when no rain excess reaches it.
  [[nodiscard]] double excess_centroid_s(std::size_t i) const;
  // Length of station i's rising limb: from when its discharge last stood within 5 % of its
  // rise (first sample to peak) to the peak. Reaches and subcatchments only (NaN otherwise).
  [[nodiscard]] double rise_duration_s(std::size_t i) const;
  // For a reach draining into a pond: the largest (pond level - reach outlet level) over the
  // run and when it occurred; excess <= 0 means no backwater. NaN when not applicable.
  [[nodiscard]] double backwater_excess_m(std::size_t i) const;
  [[nodiscard]] double backwater_time_s(std::size_t i) const;

  // Keeps the whole discharge series of station i (every coupling step from now on), with
  // the volume that has left it so far (exact, from its ledger).
  void keep_series(std::size_t i) { kept_[i]; }
  // The kept series of station i (precondition: keep_series(i) before the run); `what`
  // names it in error messages.
  [[nodiscard]] PiecewiseLinearSeries series(std::size_t i, const std::string& what) const;
  [[nodiscard]] PiecewiseLinearSeries volume_series(std::size_t i, const std::string& what) const;

  // Keeps every station's samples at the output times, and each reach cell's largest depth
  // at those times, for the run's report (run_series.hpp); call before the run. Rain and
  // excess are kept as their means over each output interval (exact: every coupling step's
  // mean is added in).
  void keep_output_series();
  [[nodiscard]] const RunSeries& output_series() const { return series_; }

  // Hot start: every accumulator, watcher, sample at a peak and kept series, so that a resumed
  // run's summaries, exports and report equal the unsplit run's.
  void visit_state(StateVisitor& v) override;

 private:
  struct KeptSeries {
    std::vector<double> times_s, discharge_m3s, volume_m3;
  };
  std::vector<StationDescription> stations_;
  std::vector<SummaryAccumulator> acc_;
  std::vector<SummaryAccumulator> inflow_, lateral_, storage_;
  std::vector<Stretch> stretches_;
  std::vector<network::StationSample> at_peak_;
  std::unique_ptr<detail::RunWatch> watch_;
  std::map<std::size_t, KeptSeries> kept_;
  void keep_output_sample(double time_s, std::span<const network::StationSample> samples);
  void add_rain_depths(double time_s, std::span<const network::StationSample> samples);
  const network::Model* model_ = nullptr;
  bool keep_output_ = false;
  RunSeries series_;
  double last_observed_s_ = 0.0;
  bool observed_ = false;
  std::vector<double> rain_depth_m_, excess_depth_m_;  // since the last output time
};

}  // namespace freshet::reporting
