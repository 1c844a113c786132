// NRCS curve number loss (USDA SCS 1986, "Urban Hydrology for Small Watersheds", TR-55,
// 2nd ed., ch. 2, eqs. 2-1 to 2-4; NEH Part 630 ch. 10).
//
//   S = 25400 / CN - 254           potential maximum retention (mm) [S = 1000/CN - 10 in]
//   Ia = lambda S                   initial abstraction, lambda = 0.2 by default
//   Q = (P - Ia)^2 / (P - Ia + S)   cumulative runoff for cumulative rain P > Ia, else 0
// Step by step, the excess of a step is Q(P_new) - Q(P_old) and its loss the rest, so the
// storm's excess does not depend on the step.
// With lambda = 0.05, Hawkins et al. (2002, "Runoff curve number method: examination of the
// initial abstraction ratio", ASCE Federal Interagency Hydrologic Modeling Conference) give
// S_0.05 = 1.33 S_0.2^1.15 (inches) to keep the handbook CN; set
// convert_storage_for_ratio_0_05 to apply it (coefficients from memory). Otherwise Ia is
// simply lambda S.
//
// Antecedent moisture for continuous runs (optional, `antecedent.season` not `none`): the rain
// is cut into events, an event ending after `event_gap_s` without rain; each event starts with
// P = 0, and every event after the first takes the curve number of its antecedent moisture
// class (AMC) from the rain of the 5 days before it (Chow, Maidment & Mays 1988, Applied
// Hydrology, Table 5.5.1, after SCS 1972, NEH-4; from memory):
//   5-day rain (in)     AMC I    AMC II       AMC III
//   dormant season      < 0.5    0.5 to 1.1   > 1.1
//   growing season      < 1.4    1.4 to 2.1   > 2.1
//   CN_I = 4.2 CN / (10 - 0.058 CN),  CN_III = 23 CN / (10 + 0.13 CN)   (CN = CN_II)
// (Chow, Maidment & Mays 1988 eqs. 5.5.4-5.5.5, from memory; NRCS NEH Part 630 ch. 10
// tabulates the same adjustment). The first event uses the curve number as given (AMC II):
// the rain before the record is unknown. The 5-day window keeps one entry per rainy step.
//
//   CurveNumberLoss soil({.curve_number = 75.0}, "subcatchment 'alder'");
//   curve_number_runoff_m({.curve_number = 75.0}, 0.1016);  // 4.0 in of rain -> 1.67 in
#pragma once

#include <deque>
#include <string>

#include "freshet/core/error.hpp"
#include "freshet/hydrology/loss_model.hpp"

namespace freshet::hydrology {

enum class GrowingSeason { none, dormant, growing };

struct AntecedentMoisture {
  GrowingSeason season = GrowingSeason::none;  // none: one event for the whole run, no AMC
  double event_gap_s = 6.0 * 3600.0;           // dry time that ends an event (s), > 0
};

// CN of antecedent moisture class 1, 2 or 3 for a class-II curve number (the equations above).
[[nodiscard]] double curve_number_for_class(double curve_number, int moisture_class);
// The class (1, 2, 3) of 5-day antecedent rain `rain_m` (m) in `season` (not none).
[[nodiscard]] int antecedent_moisture_class(double rain_m, GrowingSeason season);

struct CurveNumberParameters {
  double curve_number = 0.0;                    // CN, dimensionless, in (30, 100]
  double initial_abstraction_ratio = 0.2;       // lambda, in [0, 1)
  bool convert_storage_for_ratio_0_05 = false;  // Hawkins et al. 2002; needs lambda = 0.05
  AntecedentMoisture antecedent = {};           // continuous runs; off by default

  void validate(ProblemList& problems) const;
  [[nodiscard]] double retention_m() const;             // S (m)
  [[nodiscard]] double initial_abstraction_m() const;   // Ia = lambda S (m)
};

// Cumulative runoff Q (m) for cumulative rain P (m).
double curve_number_runoff_m(const CurveNumberParameters& parameters, double rain_m);

class CurveNumberLoss final : public LossModel {
 public:
  // Throws InputError naming `element` (e.g. "subcatchment 'alder'") for invalid parameters.
  CurveNumberLoss(const CurveNumberParameters& parameters, const std::string& element);
  [[nodiscard]] std::unique_ptr<LossModel> clone() const override;
  [[nodiscard]] std::string_view method() const override { return "curve number"; }
  // Rain of the current event (m), and the curve number it uses.
  [[nodiscard]] double cumulative_rain_m() const { return rain_m_; }
  [[nodiscard]] double event_curve_number() const { return event_.curve_number; }

 private:
  struct RainyStep {
    double end_s;
    double start_s;
    double depth_m;
  };
  LossStep split(double rain_depth_m, double step_s) override;
  void reset_state() override;
  void visit_stores(StateVisitor& v) override {
    v.value("event_curve_number", event_.curve_number);
    v.value("event_rain_m", rain_m_);
    v.value("clock_s", clock_s_);
    v.value("dry_s", dry_s_);
    v.value("had_event", had_event_);
    v.records("window", window_, &RainyStep::end_s, &RainyStep::start_s, &RainyStep::depth_m);
  }
  void start_event();
  [[nodiscard]] double rain_in_window_m() const;

  CurveNumberParameters parameters_;
  CurveNumberParameters event_;  // the parameters of the current event (its curve number)
  double rain_m_ = 0.0;
  // Antecedent moisture only: the clock (s from the first step), dry time since the last
  // rain, whether an event has been seen, and the rainy steps of the last 5 days.
  double clock_s_ = 0.0;
  double dry_s_ = 0.0;
  bool had_event_ = false;
  std::deque<RainyStep> window_;
};

}  // namespace freshet::hydrology
