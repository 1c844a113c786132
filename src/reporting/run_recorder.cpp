#include "freshet/reporting/run_recorder.hpp"

#include "run_watch.hpp"

namespace freshet::reporting {

RunRecorder::RunRecorder(const network::Model& model, std::vector<StationDescription> stations)
    : stations_(std::move(stations)),
      acc_(stations_.size()),
      at_peak_(stations_.size()),
      watch_(std::make_unique<detail::RunWatch>(model, stations_)) {}

RunRecorder::~RunRecorder() = default;

void RunRecorder::observe(double time_s, std::span<const network::StationSample> samples) {
  watch_->observe(time_s, samples);
  for (auto& [i, kept] : kept_) {
    kept.times_s.push_back(time_s);
    kept.discharge_m3s.push_back(samples[i].discharge_m3s);
    kept.volume_m3.push_back(samples[i].outflow_volume_m3);
  }
  for (std::size_t i = 0; i < samples.size(); ++i) {
    const network::StationSample& s = samples[i];
    const double peak_time_before = acc_[i].peak_time_s();
    acc_[i].add_sample(time_s, s.discharge_m3s, s.stage_m);
    if (acc_[i].sample_count() == 1 || acc_[i].peak_time_s() != peak_time_before) {
      at_peak_[i] = s;
    }
  }
}

double RunRecorder::excess_centroid_s(std::size_t i) const { return watch_->excess_centroid_s(i); }

double RunRecorder::rise_duration_s(std::size_t i) const {
  const SummaryAccumulator& acc = acc_[i];
  return acc.peak_time_s() -
         watch_->rise_start_s(i, acc.peak_time_s(), acc.peak_discharge_m3s());
}

double RunRecorder::backwater_excess_m(std::size_t i) const {
  return watch_->backwater_excess_m(i);
}

double RunRecorder::backwater_time_s(std::size_t i) const { return watch_->backwater_time_s(i); }

PiecewiseLinearSeries RunRecorder::series(std::size_t i, const std::string& what) const {
  const KeptSeries& k = kept_.at(i);
  return PiecewiseLinearSeries(k.times_s, k.discharge_m3s, what);
}

PiecewiseLinearSeries RunRecorder::volume_series(std::size_t i, const std::string& what) const {
  const KeptSeries& k = kept_.at(i);
  return PiecewiseLinearSeries(k.times_s, k.volume_m3, what);
}

}  // namespace freshet::reporting
