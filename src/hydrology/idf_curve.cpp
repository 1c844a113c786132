#include "freshet/hydrology/idf_curve.hpp"

#include <algorithm>
#include <cmath>

#include "freshet/core/error.hpp"
#include "freshet/core/units.hpp"

namespace freshet::hydrology {
namespace {
constexpr double kMetresPerSecondPerMmPerHour = 1e-3 / units::kSecondsPerHour;
}

IdfCurve IdfCurve::from_formula(const IdfFormula& formula, const std::string& what) {
  ProblemList problems(what);
  problems.require_positive("a", formula.a);
  problems.require_non_negative("b_min", formula.b_min);
  problems.require_positive("c", formula.c);
  if (std::isfinite(formula.c)) {
    problems.require(formula.c <= 1.0, "c", formula.c,
                     "must be <= 1 (with c > 1 the IDF depth would decrease with duration)");
  }
  problems.throw_if_any();
  IdfCurve curve;
  curve.formula_ = formula;
  return curve;
}

IdfCurve IdfCurve::from_table(std::vector<double> durations_s, std::vector<double> intensity_m_s,
                              const std::string& what) {
  ProblemList problems(what);
  if (durations_s.size() != intensity_m_s.size()) {
    problems.add("intensity", "has " + std::to_string(intensity_m_s.size()) +
                                  " entries but duration has " +
                                  std::to_string(durations_s.size()));
  } else if (durations_s.size() < 2) {
    problems.add("duration", "has " + std::to_string(durations_s.size()) +
                                 " points: an IDF table needs at least 2");
  }
  problems.throw_if_any();
  for (std::size_t k = 0; k < durations_s.size(); ++k) {
    const std::string at = "[" + std::to_string(k + 1) + "]";
    problems.require_positive("duration" + at, durations_s[k]);
    problems.require_positive("intensity" + at, intensity_m_s[k]);
    if (k == 0 || !problems.empty()) continue;
    problems.require(durations_s[k] > durations_s[k - 1], "duration" + at, durations_s[k],
                     "durations must strictly increase");
    problems.require(intensity_m_s[k] * durations_s[k] >=
                         intensity_m_s[k - 1] * durations_s[k - 1],
                     "intensity" + at, intensity_m_s[k],
                     "depth (intensity x duration) must not decrease with duration");
  }
  problems.throw_if_any();
  IdfCurve curve;
  for (std::size_t k = 0; k < durations_s.size(); ++k) {
    curve.log_duration_.push_back(std::log(durations_s[k]));
    curve.log_intensity_.push_back(std::log(intensity_m_s[k]));
  }
  return curve;
}

double IdfCurve::table_intensity_m_s(double duration_s) const {
  const double x = std::log(duration_s);
  const auto it = std::upper_bound(log_duration_.begin(), log_duration_.end(), x);
  std::size_t k = static_cast<std::size_t>(std::max<std::ptrdiff_t>(it - log_duration_.begin(), 1));
  k = std::min(k, log_duration_.size() - 1);  // segment [k-1, k]; end segments extrapolate
  const double slope = (log_intensity_[k] - log_intensity_[k - 1]) /
                       (log_duration_[k] - log_duration_[k - 1]);
  return std::exp(log_intensity_[k - 1] + slope * (x - log_duration_[k - 1]));
}

double IdfCurve::intensity_m_s(double duration_s) const {
  FRESHET_ASSERT(duration_s > 0.0, "IDF intensity needs a positive duration");
  if (!formula_) return table_intensity_m_s(duration_s);
  const double t_min = duration_s / units::kSecondsPerMinute;
  return formula_->a / std::pow(t_min + formula_->b_min, formula_->c) *
         kMetresPerSecondPerMmPerHour;
}

double IdfCurve::depth_m(double duration_s) const {
  return duration_s > 0.0 ? intensity_m_s(duration_s) * duration_s : 0.0;
}

}  // namespace freshet::hydrology
