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
// ponds and F follows F(tau) for the rest of the step.
//
// Recovery in dry spells (optional, recovery constant k_d > 0): over a step without rain the
// capacity climbs back towards f_0 along the recovery curve
//   f_0 - f(t) = (f_0 - f(t_w)) e^(-k_d (t - t_w))
// (Bedient, Huber & Vieux, Hydrology and Floodplain Analysis, ch. 2, Horton recovery during
// dry periods; Akan 1993, Urban Stormwater Hydrology, the same exponential form; both from
// memory), and the state F is moved to F(tau') at the equivalent time of the recovered
// capacity, so the next rain starts on the decay curve from there. In equivalent time the
// recovery is closed-form:  1 - e^(-k tau') = (1 - e^(-k tau)) e^(-k_d dt).  F is then the
// infiltration the capacity "remembers", no longer the total infiltrated (the ledger keeps
// that). With k_d = 0 (the default) the capacity does not recover.
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
  double recovery_rate_per_s = 0.0;   // k_d (1/s), >= 0; 0: no recovery in dry spells

  void validate(ProblemList& problems) const;
  // F(tau) (m) and f(tau) (m/s) under continuous ponding from F = 0.
  [[nodiscard]] double ponded_infiltration_m(double time_s) const;
  [[nodiscard]] double capacity_at_time_m_s(double time_s) const;
  // tau with F(tau) = F; +inf when F reaches the limit f_0 / k of a soil with f_c = 0.
  // Throws NumericalError naming `element` when the iteration fails (F(tau) overflowing).
  [[nodiscard]] double equivalent_time_s(double cumulative_m,
                                         std::string_view element = "Horton soil") const;
  // The equivalent time after `dry_s` seconds of recovery from equivalent time tau_s.
  [[nodiscard]] double recovered_time_s(double tau_s, double dry_s) const;
};

class HortonLoss final : public LossModel {
 public:
  HortonLoss(const HortonParameters& parameters, const std::string& element);
  [[nodiscard]] std::unique_ptr<LossModel> clone() const override;
  [[nodiscard]] std::string_view method() const override { return "Horton"; }
  // F: the cumulative infiltration that sets the capacity (less what dry spells recovered).
  [[nodiscard]] double cumulative_infiltration_m() const { return infiltrated_m_; }
  // Current capacity f (m/s), from the cumulative infiltration.
  [[nodiscard]] double capacity_m_s() const;

 private:
  LossStep split(double rain_depth_m, double step_s) override;
  void reset_state() override { infiltrated_m_ = 0.0; }
  void visit_stores(StateVisitor& v) override { v.value("infiltrated_m", infiltrated_m_); }
  void recover(double dry_s);
  // F(tau + duration) - F(tau), exact.
  [[nodiscard]] double ponded_increment_m(double tau_s, double duration_s) const;

  HortonParameters parameters_;
  std::string element_;         // named in a numerical failure
  double infiltrated_m_ = 0.0;  // F
};

}  // namespace freshet::hydrology
