#include "freshet/network/simple_elements.hpp"

namespace freshet::network {

void PassThrough::reset(double /*start_s*/) {
  end_m3s_ = 0.0;
  ledger_ = {};
}

StepOutflow PassThrough::advance(const StepInflow& in) {
  ledger_.inflow_m3 += in.inflow_mean_m3s * in.dt_s();
  ledger_.lateral_m3 += in.lateral_mean_m3s * in.dt_s();
  const StepOutflow out{in.inflow_mean_m3s + in.lateral_mean_m3s,
                        in.inflow_end_m3s + in.lateral_end_m3s};
  ledger_.outflow_m3 += out.mean_m3s * in.dt_s();
  end_m3s_ = out.end_m3s;
  return out;
}

void Element::visit_state(StateVisitor& /*v*/) {
  FRESHET_ASSERT(false, "this element kind cannot save its state");
}

void PassThrough::visit_state(StateVisitor& v) {
  v.value("end_m3s", end_m3s_);
  freshet::visit_state(v, "ledger", ledger_);
}

void InflowHydrograph::visit_state(StateVisitor& v) {
  v.value("time_s", t_s_);
  freshet::visit_state(v, "ledger", ledger_);
}

StationSample PassThrough::sample() const {
  StationSample s;
  s.discharge_m3s = end_m3s_;
  return s;
}

void InflowHydrograph::reset(double start_s) {
  t_s_ = start_s;
  ledger_ = {};
}

StepOutflow InflowHydrograph::advance(const StepInflow& in) {
  const double volume_m3 = q_.integral(in.t0_s, in.t1_s);
  ledger_.inflow_m3 += volume_m3;
  ledger_.outflow_m3 += volume_m3;
  t_s_ = in.t1_s;
  return {volume_m3 / in.dt_s(), q_.value_at(in.t1_s)};
}

StationSample InflowHydrograph::sample() const {
  StationSample s;
  s.discharge_m3s = q_.value_at(t_s_);
  return s;
}

}  // namespace freshet::network
