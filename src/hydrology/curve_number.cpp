#include "freshet/hydrology/curve_number.hpp"

#include <algorithm>
#include <cmath>

#include "freshet/core/units.hpp"

namespace freshet::hydrology {

void CurveNumberParameters::validate(ProblemList& problems) const {
  if (!std::isfinite(curve_number)) {
    problems.require_finite("curve_number", curve_number);
  } else {
    problems.require(curve_number > 30.0 && curve_number <= 100.0, "curve_number", curve_number,
                     "must be in (30, 100]");
  }
  if (!std::isfinite(initial_abstraction_ratio)) {
    problems.require_finite("initial_abstraction_ratio", initial_abstraction_ratio);
  } else {
    problems.require(initial_abstraction_ratio >= 0.0 && initial_abstraction_ratio < 1.0,
                     "initial_abstraction_ratio", initial_abstraction_ratio,
                     "must be in [0, 1)");
  }
  if (antecedent.season != GrowingSeason::none) {
    problems.require_positive("event_gap_s", antecedent.event_gap_s);
  }
  if (convert_storage_for_ratio_0_05) {
    problems.require(initial_abstraction_ratio == 0.05, "initial_abstraction_ratio",
                     initial_abstraction_ratio,
                     "must be 0.05 when convert_storage_for_ratio_0_05 is set");
  }
}

double CurveNumberParameters::retention_m() const {
  const double s_in = 1000.0 / curve_number - 10.0;  // TR-55 eq. 2-4, inches
  // Hawkins et al. (2002): S_0.05 = 1.33 S_0.2^1.15, S in inches (from memory).
  const double s = convert_storage_for_ratio_0_05 ? 1.33 * std::pow(s_in, 1.15) : s_in;
  return s * units::kMetresPerInch;
}

double CurveNumberParameters::initial_abstraction_m() const {
  return initial_abstraction_ratio * retention_m();
}

double curve_number_runoff_m(const CurveNumberParameters& parameters, double rain_m) {
  const double s = parameters.retention_m();
  const double surplus = rain_m - parameters.initial_abstraction_ratio * s;
  if (surplus <= 0.0) return 0.0;
  return surplus * surplus / (surplus + s);  // TR-55 eq. 2-3
}

double curve_number_for_class(double curve_number, int moisture_class) {
  FRESHET_ASSERT(moisture_class >= 1 && moisture_class <= 3, "moisture class is 1, 2 or 3");
  if (moisture_class == 1) return 4.2 * curve_number / (10.0 - 0.058 * curve_number);
  if (moisture_class == 3) return 23.0 * curve_number / (10.0 + 0.13 * curve_number);
  return curve_number;
}

int antecedent_moisture_class(double rain_m, GrowingSeason season) {
  FRESHET_ASSERT(season != GrowingSeason::none, "a season is needed for the moisture class");
  const double rain_in = rain_m / units::kMetresPerInch;
  const bool growing = season == GrowingSeason::growing;
  const double dry_below_in = growing ? 1.4 : 0.5;
  const double wet_above_in = growing ? 2.1 : 1.1;
  if (rain_in < dry_below_in) return 1;
  return rain_in > wet_above_in ? 3 : 2;
}

namespace {
constexpr double kAntecedentWindowS = 5.0 * 86400.0;  // 5 days
}

CurveNumberLoss::CurveNumberLoss(const CurveNumberParameters& parameters,
                                 const std::string& element)
    : parameters_(parameters), event_(parameters) {
  ProblemList problems(element);
  parameters_.validate(problems);
  problems.throw_if_any();
}

void CurveNumberLoss::reset_state() {
  event_ = parameters_;
  rain_m_ = 0.0;
  clock_s_ = 0.0;
  dry_s_ = 0.0;
  had_event_ = false;
  window_.clear();
}

double CurveNumberLoss::rain_in_window_m() const {
  const double from = clock_s_ - kAntecedentWindowS;
  double sum = 0.0;
  for (const RainyStep& r : window_) {
    // Rain is uniform within its step: count the part inside the window.
    const double inside = r.end_s - std::max(r.start_s, from);
    sum += r.depth_m * std::clamp(inside / (r.end_s - r.start_s), 0.0, 1.0);
  }
  return sum;
}

void CurveNumberLoss::start_event() {
  rain_m_ = 0.0;
  event_ = parameters_;
  if (had_event_) {
    const int amc = antecedent_moisture_class(rain_in_window_m(), parameters_.antecedent.season);
    event_.curve_number = curve_number_for_class(parameters_.curve_number, amc);
  }
  had_event_ = true;
}

std::unique_ptr<LossModel> CurveNumberLoss::clone() const {
  return std::make_unique<CurveNumberLoss>(*this);
}

LossStep CurveNumberLoss::split(double rain_depth_m, double step_s) {
  if (parameters_.antecedent.season != GrowingSeason::none) {
    if (rain_depth_m > 0.0) {
      if (!had_event_ || dry_s_ >= parameters_.antecedent.event_gap_s) start_event();
      dry_s_ = 0.0;
      window_.push_back({clock_s_ + step_s, clock_s_, rain_depth_m});
    } else {
      dry_s_ += step_s;
    }
    clock_s_ += step_s;
    while (!window_.empty() && window_.front().end_s <= clock_s_ - kAntecedentWindowS) {
      window_.pop_front();
    }
  }
  const double p_old = rain_m_;
  const double p_new = rain_m_ + rain_depth_m;
  const double q_old = curve_number_runoff_m(event_, p_old);
  const double q_new = curve_number_runoff_m(event_, p_new);
  rain_m_ = p_new;
  // Loss as the change of the cumulative retention P - Q, so the ledger telescopes.
  return {(p_new - q_new) - (p_old - q_old), q_new - q_old};
}

}  // namespace freshet::hydrology
