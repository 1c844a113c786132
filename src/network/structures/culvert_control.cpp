// Inlet- and outlet-control headwater of a culvert (HDS-5 2012, chapter 3 and Appendix A).
#include <algorithm>
#include <cmath>

#include "bracketed_solve.hpp"
#include "freshet/core/error.hpp"
#include "freshet/core/units.hpp"
#include "freshet/network/structures/culvert.hpp"

namespace freshet::network::structures {
namespace {
constexpr double kG = units::kGravity_m_s2;
constexpr double kInf = std::numeric_limits<double>::infinity();
}  // namespace

// HDS-5 (2012) Appendix A, unsubmerged inlet control:
//   form 1: HW/D = Hc/D + K (K_u Q/(A D^0.5))^M + K_s S,  Hc = dc + Vc^2/(2g);
//   form 2: HW/D = K (K_u Q/(A D^0.5))^M.
double Culvert::unsubmerged_depth_m(double barrel_q) const {
  const double d = spec_.rise_m;
  const double x = kInletUnitFactorSi * barrel_q / (full_area_m2_ * std::sqrt(d));
  const double weir_term = coef_.k * std::pow(x, coef_.m);
  if (coef_.equation_form == 2) return d * weir_term;
  const double dc = critical_depth_m(barrel_q);
  const double ac = flow_area_m2(dc);
  const double vc = ac > 0.0 ? barrel_q / ac : 0.0;
  const double specific_head = dc + vc * vc / (2.0 * kG);
  return specific_head + d * (weir_term + coef_.slope_term * slope_);
}

// HDS-5 (2012) Appendix A, submerged inlet control: HW/D = c (K_u Q/(A D^0.5))^2 + Y + K_s S.
double Culvert::submerged_depth_m(double barrel_q) const {
  const double d = spec_.rise_m;
  const double x = kInletUnitFactorSi * barrel_q / (full_area_m2_ * std::sqrt(d));
  return d * (coef_.c * x * x + coef_.y + coef_.slope_term * slope_);
}

// Unsubmerged up to K_u Q/(A D^0.5) = 3.5, submerged from 4.0, and between them a straight
// line from the unsubmerged headwater at 3.5 to the submerged headwater at 4.0.
double Culvert::inlet_control_depth_m(double discharge_m3s) const {
  if (!(discharge_m3s > 0.0)) return 0.0;
  const double q = discharge_m3s / spec_.barrel_count;
  const double scale = full_area_m2_ * std::sqrt(spec_.rise_m) / kInletUnitFactorSi;
  const double x = q / scale;
  double depth = 0.0;
  if (x <= kUnsubmergedLimit) {
    depth = unsubmerged_depth_m(q);
  } else if (x >= kSubmergedLimit) {
    depth = submerged_depth_m(q);
  } else {
    const double lo = unsubmerged_depth_m(kUnsubmergedLimit * scale);
    const double hi = submerged_depth_m(kSubmergedLimit * scale);
    depth = lo + (hi - lo) * (x - kUnsubmergedLimit) / (kSubmergedLimit - kUnsubmergedLimit);
  }
  return std::max(0.0, depth);
}

// HDS-5 (2012) ch. 3 outlet control, full flow and the approximate method for partly full
// barrels: HW = h_o + H - L S with h_o = max(TW, (dc + D)/2) and
// H = (1 + k_e + 2 g n^2 L / R^(4/3)) V^2 / (2g)  (SI, k_u = 1).
double Culvert::full_flow_depth_m(double barrel_q, double tailwater_depth_m) const {
  const double d = spec_.rise_m;
  const double v = barrel_q / full_area_m2_;
  const double friction = 2.0 * kG * spec_.manning_n * spec_.manning_n * spec_.length_m /
                          std::pow(full_radius_m_, 4.0 / 3.0);
  const double losses = (1.0 + coef_.entrance_loss + friction) * v * v / (2.0 * kG);
  const double dc = std::min(critical_depth_m(barrel_q), d);
  const double h_o = std::max(tailwater_depth_m, 0.5 * (dc + d));
  return h_o + losses - (spec_.inlet_invert_stage_m - spec_.outlet_invert_stage_m);
}

// Part-full estimate (freshet's own simplification, no source): with the outlet not
// submerged, the depth at the inlet is the largest of normal depth, critical depth and the
// tailwater level carried back level, plus the entrance loss and velocity head there. Infinite when
// normal depth does not exist (the barrel must flow full) or the outlet is submerged.
double Culvert::part_full_depth_m(double barrel_q, double tailwater_depth_m) const {
  const double d = spec_.rise_m;
  if (tailwater_depth_m >= d) return kInf;
  const double yn = normal_depth_m(barrel_q);
  if (!std::isfinite(yn)) return kInf;
  const double fall = spec_.inlet_invert_stage_m - spec_.outlet_invert_stage_m;
  // Water entering from a pool passes through critical depth at least (steep barrels).
  const double y_floor = std::max(critical_depth_m(barrel_q), tailwater_depth_m - fall);
  const double y_in = std::min(d, std::max(yn, y_floor));
  const double v = barrel_q / flow_area_m2(y_in);
  return y_in + (1.0 + coef_.entrance_loss) * v * v / (2.0 * kG);
}

double Culvert::outlet_control_depth_m(double discharge_m3s,
                                       std::optional<double> tailwater_stage_m) const {
  const double tw = tailwater_stage_m
                        ? std::max(0.0, *tailwater_stage_m - spec_.outlet_invert_stage_m)
                        : 0.0;
  const double fall = spec_.inlet_invert_stage_m - spec_.outlet_invert_stage_m;
  if (!(discharge_m3s > 0.0)) return std::max(0.0, tw - fall);
  const double q = discharge_m3s / spec_.barrel_count;
  const double full = full_flow_depth_m(q, tw);
  return std::max(0.0, std::min(full, part_full_depth_m(q, tw)));
}

Headwater Culvert::headwater(double discharge_m3s, std::optional<double> tailwater_stage_m) const {
  Headwater h;
  h.inlet_control_m = inlet_control_depth_m(discharge_m3s);
  h.outlet_control_m = outlet_control_depth_m(discharge_m3s, tailwater_stage_m);
  h.control = h.outlet_control_m > h.inlet_control_m ? Control::outlet : Control::inlet;
  h.depth_m = std::max(h.inlet_control_m, h.outlet_control_m);
  h.stage_m = spec_.inlet_invert_stage_m + h.depth_m;
  return h;
}

double Culvert::discharge_for_headwater_m3s(double headwater_stage_m,
                                            std::optional<double> tailwater_stage_m) const {
  const double depth = headwater_stage_m - spec_.inlet_invert_stage_m;
  if (!(depth > headwater(0.0, tailwater_stage_m).depth_m)) return 0.0;
  auto g = [&](double q) { return headwater(q, tailwater_stage_m).depth_m - depth; };
  const double start = spec_.barrel_count * full_area_m2_ * std::sqrt(kG * spec_.rise_m) * 0.01;
  const double hi = expand_upper_bracket([&](double q) { return g(q); }, 0.0, start);
  if (!std::isfinite(hi))
    throw NumericalError(element_ + ": no discharge found for headwater stage " +
                         format_value(headwater_stage_m) + " m (bracket search exhausted)");
  const RootResult r = detail::solve_monotone(g, 0.0, hi, 1e-12);
  if (!r.converged)
    throw NumericalError(element_ + ": discharge for headwater stage " +
                         format_value(headwater_stage_m) + " m did not converge");
  return r.x;
}

}  // namespace freshet::network::structures
