#include "freshet/hydrology/horton.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "freshet/core/converged_root.hpp"

namespace freshet::hydrology {
namespace {
constexpr double kInfinity = std::numeric_limits<double>::infinity();
}

void HortonParameters::validate(ProblemList& problems) const {
  problems.require_non_negative("final_capacity_m_s", final_capacity_m_s);
  problems.require_finite("initial_capacity_m_s", initial_capacity_m_s);
  if (std::isfinite(initial_capacity_m_s) && std::isfinite(final_capacity_m_s)) {
    problems.require(initial_capacity_m_s >= final_capacity_m_s, "initial_capacity_m_s",
                     initial_capacity_m_s,
                     "must be >= final_capacity_m_s = " + format_value(final_capacity_m_s));
  }
  problems.require_positive("decay_rate_per_s", decay_rate_per_s);
  problems.require_non_negative("recovery_rate_per_s", recovery_rate_per_s);
}

double HortonParameters::ponded_infiltration_m(double time_s) const {
  if (std::isinf(time_s)) return final_capacity_m_s > 0.0 ? kInfinity
                                                          : initial_capacity_m_s / decay_rate_per_s;
  const double k = decay_rate_per_s;
  return final_capacity_m_s * time_s -
         (initial_capacity_m_s - final_capacity_m_s) * std::expm1(-k * time_s) / k;
}

double HortonParameters::capacity_at_time_m_s(double time_s) const {
  return final_capacity_m_s +
         (initial_capacity_m_s - final_capacity_m_s) * std::exp(-decay_rate_per_s * time_s);
}

double HortonParameters::equivalent_time_s(double cumulative_m, std::string_view element) const {
  const double fc = final_capacity_m_s;
  if (cumulative_m <= 0.0) return 0.0;
  if (initial_capacity_m_s == fc) return fc > 0.0 ? cumulative_m / fc : kInfinity;
  if (fc == 0.0 && cumulative_m >= initial_capacity_m_s / decay_rate_per_s) return kInfinity;
  auto fdf = [&](double tau, double& f, double& df) {
    f = ponded_infiltration_m(tau) - cumulative_m;
    df = capacity_at_time_m_s(tau);
  };
  auto g = [&](double tau) { return ponded_infiltration_m(tau); };
  const double hi = expand_upper_bracket(g, cumulative_m, cumulative_m / initial_capacity_m_s);
  if (std::isnan(hi)) return kInfinity;
  return converged_root(solve_bracketed_newton(fdf, 0.0, hi), element,
                        "Horton equivalent time (s)",
                        [&] {
                          return "cumulative infiltration F = " + format_value(cumulative_m) +
                                 " m";
                        });
}

double HortonParameters::recovered_time_s(double tau_s, double dry_s) const {
  const double k = decay_rate_per_s;
  // f_0 - f = (f_0 - f_c)(1 - e^(-k tau)) shrinks by e^(-k_d dt); expm1/log1p keep the
  // small-tau end exact. tau = inf (capacity at f_c) gives expm1 = -1.
  const double lost = -std::expm1(-k * tau_s) * std::exp(-recovery_rate_per_s * dry_s);
  return -std::log1p(-lost) / k;
}

HortonLoss::HortonLoss(const HortonParameters& parameters, const std::string& element)
    : parameters_(parameters), element_(element) {
  ProblemList problems(element);
  parameters_.validate(problems);
  problems.throw_if_any();
}

std::unique_ptr<LossModel> HortonLoss::clone() const {
  return std::make_unique<HortonLoss>(*this);
}

double HortonLoss::capacity_m_s() const {
  return parameters_.capacity_at_time_m_s(parameters_.equivalent_time_s(infiltrated_m_, element_));
}

double HortonLoss::ponded_increment_m(double tau_s, double duration_s) const {
  const HortonParameters& p = parameters_;
  const double fc = p.final_capacity_m_s;
  const double k = p.decay_rate_per_s;
  const double decaying = std::isinf(tau_s) ? 0.0 : (p.initial_capacity_m_s - fc) *
                                                        std::exp(-k * tau_s) *
                                                        -std::expm1(-k * duration_s) / k;
  return fc * duration_s + decaying;
}

void HortonLoss::recover(double dry_s) {
  const HortonParameters& p = parameters_;
  // A soil with f_0 = f_c has nothing to recover; F = 0 is already the full capacity.
  if (p.recovery_rate_per_s <= 0.0 || infiltrated_m_ <= 0.0 ||
      p.initial_capacity_m_s == p.final_capacity_m_s) {
    return;
  }
  const double tau = p.equivalent_time_s(infiltrated_m_, element_);
  infiltrated_m_ = std::min(infiltrated_m_, p.ponded_infiltration_m(p.recovered_time_s(tau, dry_s)));
}

LossStep HortonLoss::split(double rain_depth_m, double step_s) {
  if (rain_depth_m <= 0.0) {
    recover(step_s);
    return {};
  }
  const HortonParameters& p = parameters_;
  const double i = rain_depth_m / step_s;
  const double f = infiltrated_m_;
  const double tau = p.equivalent_time_s(f, element_);
  double infiltration = rain_depth_m;  // capacity stays above i for the whole step
  if (p.capacity_at_time_m_s(tau) <= i) {
    infiltration = ponded_increment_m(tau, step_s);
  } else if (i > p.final_capacity_m_s) {
    // Capacity falls to i at tau_p; the rain fills F up to F(tau_p) first.
    const double tau_p =
        std::log((p.initial_capacity_m_s - p.final_capacity_m_s) / (i - p.final_capacity_m_s)) /
        p.decay_rate_per_s;
    const double f_ponding = p.ponded_infiltration_m(tau_p);
    if (f + rain_depth_m > f_ponding) {
      const double dry_s = std::clamp((f_ponding - f) / i, 0.0, step_s);
      infiltration = std::max(0.0, f_ponding - f) + ponded_increment_m(tau_p, step_s - dry_s);
    }
  }
  infiltration = std::clamp(infiltration, 0.0, rain_depth_m);
  infiltrated_m_ = f + infiltration;
  return {infiltration, rain_depth_m - infiltration};
}

}  // namespace freshet::hydrology
