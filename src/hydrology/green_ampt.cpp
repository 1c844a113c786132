#include "freshet/hydrology/green_ampt.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "freshet/core/converged_root.hpp"

namespace freshet::hydrology {
namespace {

constexpr double kInfinity = std::numeric_limits<double>::infinity();

void require_fraction_open(ProblemList& problems, std::string_view field, double value) {
  if (!std::isfinite(value)) return problems.require_finite(field, value);
  problems.require(value > 0.0 && value < 1.0, field, value, "must be in (0, 1)");
}

// Increment dF of ponded infiltration over `duration_s` starting from F0 (CMM eq. 4.4.6):
//   dF - psi dtheta ln(1 + dF / (F0 + psi dtheta)) = K duration.
// NumericalError naming `element` when the iteration fails (K t overflowing, for instance).
double ponded_increment_m(const GreenAmptParameters& p, double f0_m, double duration_s,
                          std::string_view element) {
  if (duration_s <= 0.0) return 0.0;
  const double a = p.suction_deficit_m();
  const double k_t = p.hydraulic_conductivity_m_s * duration_s;
  const double base = f0_m + a;
  auto fdf = [&](double d, double& f, double& df) {
    f = d - a * std::log1p(d / base) - k_t;
    df = (f0_m + d) / (base + d);
  };
  auto g = [&](double d) { return d - a * std::log1p(d / base); };
  const double hi = expand_upper_bracket(g, k_t, k_t + std::sqrt(2.0 * a * k_t));
  return converged_root(solve_bracketed_newton(fdf, 0.0, hi), element,
                        "Green-Ampt ponded infiltration increment (m)",
                        [&] {
                          return "K t = " + format_value(k_t) + " m from F = " +
                                 format_value(f0_m) + " m over " + format_value(duration_s) +
                                 " s";
                        });
}

}  // namespace

void GreenAmptParameters::validate(ProblemList& problems) const {
  problems.require_positive("hydraulic_conductivity_m_s", hydraulic_conductivity_m_s);
  problems.require_positive("suction_head_m", suction_head_m);
  require_fraction_open(problems, "porosity", porosity);
  require_fraction_open(problems, "effective_porosity", effective_porosity);
  if (std::isfinite(porosity) && std::isfinite(effective_porosity)) {
    problems.require(effective_porosity <= porosity, "effective_porosity", effective_porosity,
                     "must not exceed porosity = " + format_value(porosity));
  }
  if (!std::isfinite(initial_effective_saturation)) {
    problems.require_finite("initial_effective_saturation", initial_effective_saturation);
  } else {
    problems.require(initial_effective_saturation >= 0.0 && initial_effective_saturation < 1.0,
                     "initial_effective_saturation", initial_effective_saturation,
                     "must be in [0, 1) (initial moisture below saturation, theta_i < theta_s)");
  }
  problems.require_non_negative("recovery_rate_per_s", recovery_rate_per_s);
}

double GreenAmptParameters::moisture_deficit() const {
  return (1.0 - initial_effective_saturation) * effective_porosity;
}

double GreenAmptParameters::suction_deficit_m() const {
  return suction_head_m * moisture_deficit();
}

double green_ampt_capacity_m_s(const GreenAmptParameters& p, double cumulative_m) {
  if (cumulative_m <= 0.0) return kInfinity;
  return p.hydraulic_conductivity_m_s * (1.0 + p.suction_deficit_m() / cumulative_m);
}

double green_ampt_ponded_infiltration_m(const GreenAmptParameters& p, double time_s,
                                        std::string_view element) {
  return ponded_increment_m(p, 0.0, time_s, element);
}

double green_ampt_ponding_time_s(const GreenAmptParameters& p, double intensity_m_s) {
  const double k = p.hydraulic_conductivity_m_s;
  if (intensity_m_s <= k) return kInfinity;
  return k * p.suction_deficit_m() / (intensity_m_s * (intensity_m_s - k));
}

GreenAmptLoss::GreenAmptLoss(const GreenAmptParameters& parameters, const std::string& element)
    : parameters_(parameters), element_(element) {
  ProblemList problems(element);
  parameters_.validate(problems);
  problems.throw_if_any();
}

std::unique_ptr<LossModel> GreenAmptLoss::clone() const {
  return std::make_unique<GreenAmptLoss>(*this);
}

// CMM 1988 sec. 4.4 (Fig. 4.4.2): the three cases of one step of constant intensity.
LossStep GreenAmptLoss::split(double rain_depth_m, double step_s) {
  if (rain_depth_m <= 0.0) {
    infiltrated_m_ *= std::exp(-parameters_.recovery_rate_per_s * step_s);
    return {};
  }
  const GreenAmptParameters& p = parameters_;
  const double i = rain_depth_m / step_s;
  const double f = infiltrated_m_;
  double infiltration = rain_depth_m;  // no ponding during the step
  if (green_ampt_capacity_m_s(p, f) <= i) {
    infiltration = ponded_increment_m(p, f, step_s, element_);  // ponded throughout
  } else if (i > p.hydraulic_conductivity_m_s) {
    const double f_ponding = p.hydraulic_conductivity_m_s * p.suction_deficit_m() /
                             (i - p.hydraulic_conductivity_m_s);
    if (f + rain_depth_m > f_ponding) {  // ponds inside the step, at t + (F_p - F_t) / i
      const double dry_s = std::clamp((f_ponding - f) / i, 0.0, step_s);
      infiltration = std::max(0.0, f_ponding - f) + ponded_increment_m(p, f_ponding, step_s - dry_s, element_);
    }
  }
  infiltration = std::clamp(infiltration, 0.0, rain_depth_m);
  infiltrated_m_ = f + infiltration;
  return {infiltration, rain_depth_m - infiltration};
}

}  // namespace freshet::hydrology
