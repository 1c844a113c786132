#include "freshet/routing/lateral_inflow.hpp"

#include <algorithm>
#include <cmath>

#include "freshet/core/error.hpp"

namespace freshet::routing {

LateralInflow LateralInflow::none() { return LateralInflow(); }

LateralInflow LateralInflow::uniform(double length_m, PiecewiseLinearSeries rate_m2s) {
  return LateralInflow({0.0, length_m}, {std::move(rate_m2s)});
}

void LateralInflow::set_uniform_constant(double length_m, double rate_m2s) {
  if (rate_m2s_.size() == 1 && station_m_.size() == 2 && station_m_[1] == length_m &&
      rate_m2s_[0].times_s().size() == 1) {
    rate_m2s_[0].set_constant(rate_m2s);
    return;
  }
  *this = uniform(length_m, PiecewiseLinearSeries::constant(rate_m2s));
}

LateralInflow::LateralInflow(std::vector<double> station_m,
                             std::vector<PiecewiseLinearSeries> rate_m2s, const std::string& what)
    : station_m_(std::move(station_m)), rate_m2s_(std::move(rate_m2s)) {
  ProblemList problems(what);
  if (station_m_.size() != rate_m2s_.size() + 1) {
    problems.add("station_m", "has " + std::to_string(station_m_.size()) +
                                  " entries: must have one more than the " +
                                  std::to_string(rate_m2s_.size()) + " rate series");
  }
  if (!station_m_.empty()) problems.require(station_m_.front() == 0.0, "station_m[1]",
                                            station_m_.front(), "must be 0 (the reach inlet)");
  for (std::size_t k = 1; k < station_m_.size(); ++k) {
    problems.require(std::isfinite(station_m_[k]) && station_m_[k] > station_m_[k - 1],
                     "station_m[" + std::to_string(k + 1) + "]", station_m_[k],
                     "must be finite and greater than the previous station");
  }
  for (std::size_t k = 0; k < rate_m2s_.size(); ++k) {
    if (rate_m2s_[k].empty()) {
      problems.add("rate_m2s[" + std::to_string(k + 1) + "]", "has no samples");
      continue;
    }
    for (double v : rate_m2s_[k].values()) {
      if (v < 0.0) {
        problems.require(false, "rate_m2s[" + std::to_string(k + 1) + "]", v,
                         "lateral inflow must be >= 0");
        break;
      }
    }
  }
  problems.throw_if_any();
}

std::vector<double> LateralInflow::breakpoint_times_s() const {
  std::vector<double> t;
  for (const auto& s : rate_m2s_) t.insert(t.end(), s.times_s().begin(), s.times_s().end());
  std::sort(t.begin(), t.end());
  t.erase(std::unique(t.begin(), t.end()), t.end());
  return t;
}

CellLateralMap::CellLateralMap(const LateralInflow& lateral, int cell_count, double cell_width_m)
    : cell_count_(cell_count),
      cell_width_m_(cell_width_m),
      station_m_(lateral.station_m()),
      row_begin_(static_cast<std::size_t>(cell_count) + 1, 0) {
  const auto& st = lateral.station_m();
  per_stretch_.assign(lateral.rate_m2s().size(), 0.0);
  for (int i = 0; i < cell_count; ++i) {
    const double x0 = i * cell_width_m;
    const double x1 = (i + 1) * cell_width_m;
    for (std::size_t k = 0; k + 1 < st.size(); ++k) {
      // The last stretch also covers any part of the reach beyond its end station.
      const double hi = (k + 2 == st.size()) ? std::max(st[k + 1], x1) : st[k + 1];
      const double overlap = std::min(x1, hi) - std::max(x0, st[k]);
      if (overlap > 0.0) {
        stretch_.push_back(static_cast<int>(k));
        overlap_m_.push_back(overlap);
      }
    }
    row_begin_[static_cast<std::size_t>(i) + 1] = static_cast<int>(stretch_.size());
  }
}

double CellLateralMap::volumes_m3(const LateralInflow& lateral, double t0_s, double t1_s,
                                  std::vector<double>& volume_m3) const {
  volume_m3.assign(static_cast<std::size_t>(cell_count_), 0.0);
  if (stretch_.empty()) return 0.0;
  const auto& rates = lateral.rate_m2s();
  for (std::size_t k = 0; k < rates.size(); ++k) per_stretch_[k] = rates[k].integral(t0_s, t1_s);
  double total = 0.0;
  for (int i = 0; i < cell_count_; ++i) {
    double v = 0.0;
    for (int j = row_begin_[i]; j < row_begin_[i + 1]; ++j) v += overlap_m_[j] * per_stretch_[stretch_[j]];
    volume_m3[static_cast<std::size_t>(i)] = v;
    total += v;
  }
  return total;
}

double CellLateralMap::rates_m3s(const LateralInflow& lateral, double t_s,
                                 std::vector<double>& rate_m3s) const {
  rate_m3s.assign(static_cast<std::size_t>(cell_count_), 0.0);
  if (stretch_.empty()) return 0.0;
  const auto& rates = lateral.rate_m2s();
  for (std::size_t k = 0; k < rates.size(); ++k) per_stretch_[k] = rates[k].value_at(t_s);
  double total = 0.0;
  for (int i = 0; i < cell_count_; ++i) {
    double v = 0.0;
    for (int j = row_begin_[i]; j < row_begin_[i + 1]; ++j) v += overlap_m_[j] * per_stretch_[stretch_[j]];
    rate_m3s[static_cast<std::size_t>(i)] = v;
    total += v;
  }
  return total;
}

}  // namespace freshet::routing
