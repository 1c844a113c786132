#include "freshet/reporting/run_recorder.hpp"

#include <algorithm>

#include "freshet/core/error.hpp"
#include "freshet/reporting/reported_as.hpp"
#include "run_watch.hpp"

namespace freshet::reporting {

RunRecorder::RunRecorder(const network::Model& model, std::vector<StationDescription> stations)
    : stations_(std::move(stations)),
      acc_(stations_.size()),
      inflow_(stations_.size()),
      lateral_(stations_.size()),
      storage_(stations_.size()),
      at_peak_(stations_.size()),
      watch_(std::make_unique<detail::RunWatch>(model, stations_)),
      model_(&model) {}

RunRecorder::~RunRecorder() = default;

void RunRecorder::watch_stretch(std::vector<std::size_t> path) {
  FRESHET_ASSERT(path.size() >= 2, "a stretch has an upstream and a downstream element");
  for (std::size_t i : path) FRESHET_ASSERT(i < stations_.size(), "stretch element in the model");
  stretches_.push_back({std::move(path), {}, {}});
}

namespace {

// What enters a path below its first element at one sample time: at each later element, its
// total inflow minus the outflow of the path element above it.
double side_inflow_m3s(const std::vector<std::size_t>& path,
                       std::span<const network::StationSample> samples) {
  double side = 0.0;
  for (std::size_t k = 1; k < path.size(); ++k) {
    side += samples[path[k]].inflow_m3s - samples[path[k - 1]].discharge_m3s;
  }
  return side;
}

}  // namespace

void RunRecorder::record(double time_s, std::span<const network::StationSample> samples) {
  observe(time_s, samples);
  if (keep_output_) keep_output_sample(time_s, samples);
}

void RunRecorder::keep_output_series() {
  keep_output_ = true;
  series_ = {};
  series_.stations.resize(stations_.size());
  rain_depth_m_.assign(stations_.size(), 0.0);
  excess_depth_m_.assign(stations_.size(), 0.0);
  for (std::size_t i = 0; i < stations_.size(); ++i) {
    if (!is_reach(stations_[i].kind)) continue;
    ReachPeakProfile p;
    p.station = i;
    for (const network::CellSample& c : model_->elements[i]->cell_samples()) {
      p.chainage_m.push_back(c.chainage_m);
      p.peak_depth_m.push_back(0.0);
    }
    series_.reach_profiles.push_back(std::move(p));
  }
}

// Each coupling step's mean rain and excess rates, times the step: the depths that fell
// since the last output time.
void RunRecorder::add_rain_depths(double time_s,
                                  std::span<const network::StationSample> samples) {
  if (observed_) {
    const double dt_s = time_s - last_observed_s_;
    for (std::size_t i = 0; i < samples.size(); ++i) {
      if (!is_subcatchment(stations_[i].kind)) continue;
      rain_depth_m_[i] += samples[i].rain_m_s * dt_s;
      excess_depth_m_[i] += samples[i].excess_m_s * dt_s;
    }
  }
  observed_ = true;
  last_observed_s_ = time_s;
}

void RunRecorder::keep_output_sample(double time_s,
                                     std::span<const network::StationSample> samples) {
  const double interval_s = series_.times_s.empty() ? 0.0 : time_s - series_.times_s.back();
  series_.times_s.push_back(time_s);
  for (std::size_t i = 0; i < samples.size(); ++i) {
    StationSeries& s = series_.stations[i];
    s.discharge_m3s.push_back(samples[i].discharge_m3s);
    s.stage_m.push_back(samples[i].stage_m);
    if (!is_subcatchment(stations_[i].kind)) continue;
    // No interval ends at the first output time.
    const double nan = kNotApplicable;
    s.rain_m_s.push_back(interval_s > 0.0 ? rain_depth_m_[i] / interval_s : nan);
    s.excess_m_s.push_back(interval_s > 0.0 ? excess_depth_m_[i] / interval_s : nan);
    rain_depth_m_[i] = excess_depth_m_[i] = 0.0;
  }
  for (ReachPeakProfile& p : series_.reach_profiles) {
    const std::vector<network::CellSample> cells = model_->elements[p.station]->cell_samples();
    for (std::size_t k = 0; k < cells.size() && k < p.peak_depth_m.size(); ++k) {
      p.peak_depth_m[k] = std::max(p.peak_depth_m[k], cells[k].depth_m);
    }
  }
}

void RunRecorder::observe(double time_s, std::span<const network::StationSample> samples) {
  if (keep_output_) add_rain_depths(time_s, samples);
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
      watch_->mark_peak(i);
    }
    inflow_[i].add_sample(time_s, s.inflow_m3s);
    lateral_[i].add_sample(time_s, s.lateral_inflow_m3s);
    storage_[i].add_sample(time_s, s.storage_m3);
  }
  for (Stretch& st : stretches_) {
    const double side = side_inflow_m3s(st.path, samples);
    st.side_inflow.add_sample(time_s, side);
    st.combined_inflow.add_sample(time_s, samples[st.path.front()].discharge_m3s + side);
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

namespace {
void visit_sample(StateVisitor& v, std::string_view name, network::StationSample& s) {
  std::vector<double> x{s.discharge_m3s, s.stage_m,   s.depth_m,    s.velocity_m_s,
                        s.rain_m_s,      s.excess_m_s, s.outflow_volume_m3, s.inflow_m3s,
                        s.lateral_inflow_m3s, s.storage_m3};
  const std::size_t n = x.size();
  v.fixed_doubles(name, x);
  FRESHET_ASSERT(x.size() == n, "a station sample has ten values");
  s = {x[0], x[1], x[2], x[3], x[4], x[5], x[6], x[7], x[8], x[9]};
}
}  // namespace

void RunRecorder::visit_state(StateVisitor& v) {
  for (std::size_t i = 0; i < stations_.size(); ++i) {
    StateGroup g(v, "station" + std::to_string(i));
    acc_[i].visit_state(v, "outflow");
    inflow_[i].visit_state(v, "inflow");
    lateral_[i].visit_state(v, "lateral_inflow");
    storage_[i].visit_state(v, "storage");
    visit_sample(v, "sample_at_peak", at_peak_[i]);
  }
  for (std::size_t k = 0; k < stretches_.size(); ++k) {
    StateGroup g(v, "stretch" + std::to_string(k));
    stretches_[k].side_inflow.visit_state(v, "side_inflow");
    stretches_[k].combined_inflow.visit_state(v, "combined_inflow");
  }
  watch_->visit_state(v);
  for (auto& [station, kept] : kept_) {
    StateGroup g(v, "kept_series" + std::to_string(station));
    v.doubles("time_s", kept.times_s);
    v.doubles("discharge_m3s", kept.discharge_m3s);
    v.doubles("volume_m3", kept.volume_m3);
  }
  if (keep_output_) {
    StateGroup g(v, "output_series");
    v.doubles("time_s", series_.times_s);
    for (std::size_t i = 0; i < series_.stations.size(); ++i) {
      StateGroup s(v, "station" + std::to_string(i));
      v.doubles("discharge_m3s", series_.stations[i].discharge_m3s);
      v.doubles("stage_m", series_.stations[i].stage_m);
      v.doubles("rain_m_s", series_.stations[i].rain_m_s);
      v.doubles("excess_m_s", series_.stations[i].excess_m_s);
    }
    for (ReachPeakProfile& p : series_.reach_profiles) {
      v.fixed_doubles("peak_depth_m" + std::to_string(p.station), p.peak_depth_m);
    }
  }
  v.value("last_observed_s", last_observed_s_);
  v.value("observed", observed_);
  v.doubles("rain_depth_m", rain_depth_m_);
  v.doubles("excess_depth_m", excess_depth_m_);
}

}  // namespace freshet::reporting
