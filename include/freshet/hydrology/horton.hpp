// Horton infiltration in its cumulative-infiltration form (Horton 1940, "An approach toward
// a physical interpretation of infiltration-capacity", Soil Sci. Soc. Am. Proc. 5; Chow,
// Maidment & Mays 1988, Applied Hydrology, sec. 4.2, eq. 4.2.13-4.2.14).
//
//   f(t) = f_c + (f_0 - f_c) e^(-k t)                   capacity under continuous ponding
//   F(t) = f_c t + (f_0 - f_c) (1 - e^(-k t)) / k        its cumulative infiltration
// Under intermittent or light rain the capacity is tracked by the cumulative infiltration F
// rather than by clock time: the state is F, and the capacity is f(tau) at the "equivalent
// time" tau with F(tau) = F (found by safeguarded Newton). Within a step of constant
// intensity i: while f > i all rain infiltrates; once f falls to i (if i > f_c) the surface
// ponds and F follows F(tau) for the rest of the step. No recovery between storms.
//
//   HortonLoss soil({.initial_capacity_m_s = 75e-3 / 3600, .final_capacity_m_s = 10e-3 / 3600,
//                    .decay_rate_per_s = 4.0 / 3600}, "subcatchment 'alder'");
#pragma once

#include <string>
#include <string_view>

#include "freshet/core/error.hpp"
#include "freshet/hydrology/loss_model.hpp"

namespace freshet::hydrology {

struct HortonParameters {
  double initial_capacity_m_s = 0.0;  // f_0 (m/s), >= f_c
  double final_capacity_m_s = 0.0;    // f_c (m/s), >= 0
  double decay_rate_per_s = 0.0;      // k (1/s), > 0

  void validate(ProblemList& problems) const;
  // F(tau) (m) and f(tau) (m/s) under continuous ponding from F = 0.
  [[nodiscard]] double ponded_infiltration_m(double time_s) const;
  [[nodiscard]] double capacity_at_time_m_s(double time_s) const;
  // tau with F(tau) = F; +inf when F reaches the limit f_0 / k of a soil with f_c = 0.
  // Throws NumericalError naming `element` when the iteration fails (F(tau) overflowing).
  [[nodiscard]] double equivalent_time_s(double cumulative_m,
                                         std::string_view element = "Horton soil") const;
};

class HortonLoss final : public LossModel {
 public:
  HortonLoss(const HortonParameters& parameters, const std::string& element);
  [[nodiscard]] std::unique_ptr<LossModel> clone() const override;
  [[nodiscard]] std::string_view method() const override { return "Horton"; }
  [[nodiscard]] double cumulative_infiltration_m() const { return infiltrated_m_; }
  // Current capacity f (m/s), from the cumulative infiltration.
  [[nodiscard]] double capacity_m_s() const;

 private:
  LossStep split(double rain_depth_m, double step_s) override;
  void reset_state() override { infiltrated_m_ = 0.0; }
  // F(tau + duration) - F(tau), exact.
  [[nodiscard]] double ponded_increment_m(double tau_s, double duration_s) const;

  HortonParameters parameters_;
  std::string element_;         // named in a numerical failure
  double infiltrated_m_ = 0.0;  // F
};

}  // namespace freshet::hydrology
