#include "freshet/uncertainty/ensemble_summary.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <span>

#include "freshet/core/error.hpp"
#include "freshet/uncertainty/ensemble_statistics.hpp"

namespace freshet::uncertainty {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr std::array kQuantities{
    PeakQuantity::discharge, PeakQuantity::stage, PeakQuantity::time, PeakQuantity::volume};

// Percentiles of the first `count` values; NaN throughout when one of them is NaN (a member
// without the quantity: the band would describe a different set of members).
std::vector<double> percentiles_of(std::span<const double> values,
                                   std::size_t count,
                                   const std::vector<double>& qs) {
  const auto first = values.first(count);
  if (std::any_of(first.begin(), first.end(), [](double x) { return std::isnan(x); })) {
    return std::vector<double>(qs.size(), kNaN);
  }
  return percentiles(first, qs);
}

ExceedanceResult exceedance(const MemberPeaks& station, const Threshold& t) {
  ExceedanceResult r{t, 0, 0, kNaN, kNaN};
  const std::vector<double>& v = values_of(station, t.quantity);
  r.members = v.size();
  if (std::any_of(v.begin(), v.end(), [](double x) { return std::isnan(x); })) return r;
  r.exceeded = static_cast<std::size_t>(
      std::count_if(v.begin(), v.end(), [&t](double x) { return x > t.value_si; }));
  r.probability = exceedance_fraction(v, t.value_si);
  r.standard_error =
      std::sqrt(r.probability * (1.0 - r.probability) / static_cast<double>(r.members));
  return r;
}

}  // namespace

std::string_view column_name(PeakQuantity q) {
  switch (q) {
    case PeakQuantity::discharge:
      return "peak_discharge_m3s";
    case PeakQuantity::stage:
      return "peak_stage_m";
    case PeakQuantity::time:
      return "peak_time_s";
    case PeakQuantity::volume:
      return "outflow_volume_m3";
  }
  return "";  // not reached: every quantity is listed above
}

std::string_view unit_name(PeakQuantity q) {
  switch (q) {
    case PeakQuantity::discharge:
      return "m3 s-1";
    case PeakQuantity::stage:
      return "m";
    case PeakQuantity::time:
      return "s";
    case PeakQuantity::volume:
      return "m3";
  }
  return "";  // not reached
}

const std::vector<double>& values_of(const MemberPeaks& m, PeakQuantity q) {
  switch (q) {
    case PeakQuantity::discharge:
      return m.peak_discharge_m3s;
    case PeakQuantity::stage:
      return m.peak_stage_m;
    case PeakQuantity::time:
      return m.peak_time_s;
    case PeakQuantity::volume:
      return m.outflow_volume_m3;
  }
  return m.peak_discharge_m3s;  // not reached
}

std::vector<std::size_t> convergence_sizes(std::size_t members) {
  std::vector<std::size_t> sizes;
  for (std::size_t divisor : {8, 4, 2, 1}) {
    const std::size_t m = members / divisor;
    if (m >= 2 && (sizes.empty() || sizes.back() != m)) sizes.push_back(m);
  }
  return sizes;
}

EnsembleSummary summarize_ensemble(const std::vector<MemberPeaks>& stations,
                                   const std::vector<double>& percentiles,
                                   const std::vector<Threshold>& thresholds) {
  EnsembleSummary s;
  s.percentiles = percentiles;
  s.members = stations.empty() ? 0 : stations.front().peak_discharge_m3s.size();
  FRESHET_ASSERT(s.members >= 2, "an ensemble summary needs at least two members");
  for (const MemberPeaks& m : stations) {
    StationPercentiles p{m.id, {}};
    for (const PeakQuantity q : kQuantities) {
      FRESHET_ASSERT(values_of(m, q).size() == s.members, "stations differ in member count");
      p.values[index(q)] = percentiles_of(values_of(m, q), s.members, percentiles);
    }
    s.stations.push_back(std::move(p));
  }
  for (const Threshold& t : thresholds) {
    const auto it = std::find_if(stations.begin(), stations.end(), [&t](const MemberPeaks& m) {
      return m.id == t.station_id;
    });
    FRESHET_ASSERT(it != stations.end(), "a threshold names no station");
    FRESHET_ASSERT(t.quantity == PeakQuantity::discharge || t.quantity == PeakQuantity::stage,
                   "a threshold is on peak discharge or peak stage");
    s.exceedances.push_back(exceedance(*it, t));
  }
  for (const std::size_t size : convergence_sizes(s.members)) {
    for (const MemberPeaks& m : stations) {
      for (const PeakQuantity q : kQuantities) {
        s.convergence.push_back(
            {size, m.id, q, percentiles_of(values_of(m, q), size, percentiles)});
      }
    }
  }
  return s;
}

}  // namespace freshet::uncertainty
