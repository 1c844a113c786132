#include "run_watch.hpp"

#include <cmath>
#include <limits>

#include "freshet/network/element.hpp"
#include "freshet/reporting/reported_as.hpp"

namespace freshet::reporting::detail {

namespace {
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
}  // namespace

void DecimatedSeries::add(double t_s, double value) {
  if (count_++ % stride_ != 0) return;
  t_s_.push_back(t_s);
  value_.push_back(value);
  if (t_s_.size() < kCapacity) return;
  std::size_t kept = 0;
  for (std::size_t k = 0; k < t_s_.size(); k += 2, ++kept) {
    t_s_[kept] = t_s_[k];
    value_[kept] = value_[k];
  }
  t_s_.resize(kept);
  value_.resize(kept);
  stride_ *= 2;
}

double DecimatedSeries::last_time_at_or_below(double threshold, double until_s) const {
  double found = t_s_.empty() ? kNaN : t_s_.front();
  for (std::size_t k = 0; k < t_s_.size() && t_s_[k] <= until_s; ++k) {
    if (value_[k] <= threshold) found = t_s_[k];
  }
  return found;
}

RunWatch::RunWatch(const network::Model& model, const std::vector<StationDescription>& stations)
    : upstream_subcatchments_(stations.size()),
      area_m2_(stations.size(), 0.0),
      excess_m3_(stations.size(), 0.0),
      excess_moment_(stations.size(), 0.0),
      series_(stations.size()),
      start_m3s_(stations.size(), 0.0),
      tracked_(stations.size(), false),
      pond_below_(stations.size(), -1),
      backwater_m_(stations.size(), kNaN),
      backwater_time_s_(stations.size(), kNaN) {
  const auto& down = model.topology.downstream;
  for (std::size_t i = 0; i < stations.size(); ++i) {
    const bool sub = is_subcatchment(model.links[i].kind);
    if (sub) {
      area_m2_[i] = model.elements[i]->report().subcatchment().area_m2;
      for (std::ptrdiff_t j = static_cast<std::ptrdiff_t>(i); j >= 0;
           j = down[static_cast<std::size_t>(j)]) {
        upstream_subcatchments_[static_cast<std::size_t>(j)].push_back(i);
      }
    }
    const bool reach = is_reach(model.links[i].kind);
    tracked_[i] = reach || sub;
    if (reach && down[i] >= 0 && stations[i].stage_is_elevation &&
        is_pool(model.links[static_cast<std::size_t>(down[i])].kind)) {
      pond_below_[i] = down[i];
      backwater_m_[i] = -std::numeric_limits<double>::infinity();
    }
  }
}

void RunWatch::observe(double t_s, std::span<const network::StationSample> samples) {
  const double dt_s = started_ ? t_s - last_t_s_ : 0.0;
  for (std::size_t i = 0; i < samples.size(); ++i) {
    if (area_m2_[i] > 0.0 && dt_s > 0.0) {
      const double v = samples[i].excess_m_s * area_m2_[i] * dt_s;
      excess_m3_[i] += v;
      excess_moment_[i] += v * (t_s - 0.5 * dt_s);
    }
    if (!started_) start_m3s_[i] = samples[i].discharge_m3s;
    if (tracked_[i]) series_[i].add(t_s, samples[i].discharge_m3s);
    if (pond_below_[i] >= 0) {
      const double excess =
          samples[static_cast<std::size_t>(pond_below_[i])].stage_m - samples[i].stage_m;
      if (excess > backwater_m_[i]) {
        backwater_m_[i] = excess;
        backwater_time_s_[i] = t_s;
      }
    }
  }
  last_t_s_ = t_s;
  started_ = true;
}

double RunWatch::excess_centroid_s(std::size_t i) const {
  double volume = 0.0, moment = 0.0;
  for (std::size_t s : upstream_subcatchments_[i]) {
    volume += excess_m3_[s];
    moment += excess_moment_[s];
  }
  return volume > 0.0 ? moment / volume : kNaN;
}

double RunWatch::rise_start_s(std::size_t i, double peak_time_s, double peak_m3s) const {
  const double threshold = start_m3s_[i] + 0.05 * (peak_m3s - start_m3s_[i]);
  if (!tracked_[i]) return kNaN;
  return series_[i].last_time_at_or_below(threshold, peak_time_s);
}

}  // namespace freshet::reporting::detail
