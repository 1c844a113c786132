#include "run_watch.hpp"

#include <cmath>
#include <limits>

#include "freshet/core/error.hpp"
#include "freshet/network/element.hpp"
#include "freshet/reporting/reported_as.hpp"

namespace freshet::reporting::detail {

namespace {
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
}  // namespace

// start + 5 % of the rise to the peak: never lower for a higher peak (each rounding is
// monotone), which the rise tracker's pruning relies on.
double rise_threshold(double start, double peak) { return start + 0.05 * (peak - start); }

void RiseTracker::add(double t_s, double value) {
  if (std::isnan(first_t_s_)) first_t_s_ = t_s;
  while (!since_.empty() && since_.back().value >= value) since_.pop_back();
  since_.push_back({t_s, value});
  if (since_.size() > kCapacity) thin(since_);
  last_value_ = value;
}

void RiseTracker::mark_peak(double floor) {
  FRESHET_ASSERT(!since_.empty(), "a peak is a sample just added");
  const double lowest_since = since_.front().value;
  while (!lows_.empty() && lows_.back().value >= lowest_since) lows_.pop_back();
  lows_.insert(lows_.end(), since_.begin(), since_.end());
  peak_time_s_ = since_.back().t_s;
  since_.clear();
  // Keep the last entry at or below the floor and everything above it.
  std::size_t last_low = 0;
  while (last_low + 1 < lows_.size() && lows_[last_low + 1].value <= floor) ++last_low;
  lows_.erase(lows_.begin(), lows_.begin() + static_cast<std::ptrdiff_t>(last_low));
  if (lows_.size() > kCapacity) thin(lows_);
}

// Every other entry between the oldest and the newest, which stay: the oldest is the lowest
// (in lows_, the last one at or below the floor; in since_, the lowest since the peak).
void RiseTracker::thin(std::vector<Low>& lows) {
  std::size_t kept = 1;
  for (std::size_t k = 2; k + 1 < lows.size(); k += 2) lows[kept++] = lows[k];
  lows[kept++] = lows.back();
  lows.resize(kept);
}

double RiseTracker::last_time_at_or_below(double threshold) const {
  for (auto it = lows_.rbegin(); it != lows_.rend(); ++it) {
    if (it->value <= threshold) return it->t_s;
  }
  return first_t_s_;
}

RunWatch::RunWatch(const network::Model& model, const std::vector<StationDescription>& stations)
    : upstream_subcatchments_(stations.size()),
      area_m2_(stations.size(), 0.0),
      excess_m3_(stations.size(), 0.0),
      excess_moment_(stations.size(), 0.0),
      rises_(stations.size()),
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
    if (tracked_[i]) rises_[i].add(t_s, samples[i].discharge_m3s);
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

void RunWatch::mark_peak(std::size_t i) {
  if (!tracked_[i]) return;
  rises_[i].mark_peak(rise_threshold(start_m3s_[i], rises_[i].last_value()));
}

double RunWatch::rise_start_s(std::size_t i, double peak_time_s, double peak_m3s) const {
  if (!tracked_[i]) return kNaN;
  FRESHET_ASSERT(std::isnan(peak_time_s) || peak_time_s == rises_[i].peak_time_s(),
                 "the rise start is asked for the peak last marked");
  return rises_[i].last_time_at_or_below(rise_threshold(start_m3s_[i], peak_m3s));
}

void RiseTracker::visit_state(StateVisitor& v, std::string_view name) {
  StateGroup g(v, name);
  v.records("lows", lows_, &Low::t_s, &Low::value);
  v.records("since", since_, &Low::t_s, &Low::value);
  v.value("first_time_s", first_t_s_);
  v.value("peak_time_s", peak_time_s_);
  v.value("last_value", last_value_);
}

void RunWatch::visit_state(StateVisitor& v) {
  StateGroup g(v, "watch");
  v.doubles("excess_m3", excess_m3_);
  v.doubles("excess_moment", excess_moment_);
  for (std::size_t i = 0; i < rises_.size(); ++i) {
    if (tracked_[i]) rises_[i].visit_state(v, "series" + std::to_string(i));
  }
  v.doubles("start_m3s", start_m3s_);
  v.doubles("backwater_m", backwater_m_);
  v.doubles("backwater_time_s", backwater_time_s_);
  v.value("last_time_s", last_t_s_);
  v.value("started", started_);
}

}  // namespace freshet::reporting::detail
