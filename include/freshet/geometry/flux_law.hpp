// The flux law of the kinematic wave: discharge Q as a function of flow area A.
//
// Every routing scheme is written against this concept, so one scheme serves every section
// shape, overland sheet flow, and the test laws (Burgers' Q = A^2/2). A flux law is a small
// value type with pure, const, noexcept members and no I/O:
//   discharge_m3s(A)        Q(A) >= 0, non-decreasing in A, Q(0) = 0;
//   celerity_m_s(A)         c(A) = dQ/dA >= 0, the kinematic wave speed;
//   area_for_discharge_m2(Q) the inverse of Q(A) (for steady initial states and boundaries).
//
//   PowerLawFlux wide{alpha, 5.0 / 3.0};  // wide channel: Q = alpha A^(5/3)
//   double c = wide.celerity_m_s(12.0);   // = (5/3) Q / A
#pragma once

#include <cmath>
#include <concepts>

namespace freshet::geometry {

template <class F>
concept FluxLaw = requires(const F& f, double x) {
  { f.discharge_m3s(x) } -> std::same_as<double>;
  { f.celerity_m_s(x) } -> std::same_as<double>;
  { f.area_for_discharge_m2(x) } -> std::same_as<double>;
};

// Q = alpha * A^m. With m = 5/3 and alpha = sqrt(S) / (n B^(2/3)) this is Manning's law for a
// wide rectangular channel of width B (hydraulic radius ~ depth); with m = 2, alpha = 1/2 it
// is the flux of the inviscid Burgers equation, u_t + (u^2/2)_x = 0 (Whitham 1974, ch. 2).
// For unit-width sheet flow, A is the depth h and Q the discharge per unit width q = alpha h^m.
class PowerLawFlux {
 public:
  PowerLawFlux(double alpha, double exponent) : alpha_(alpha), m_(exponent) {}

  [[nodiscard]] double discharge_m3s(double area_m2) const noexcept {
    return area_m2 > 0.0 ? alpha_ * std::pow(area_m2, m_) : 0.0;
  }
  [[nodiscard]] double celerity_m_s(double area_m2) const noexcept {
    return area_m2 > 0.0 ? m_ * alpha_ * std::pow(area_m2, m_ - 1.0) : (m_ == 1.0 ? alpha_ : 0.0);
  }
  [[nodiscard]] double area_for_discharge_m2(double q_m3s) const noexcept {
    return q_m3s > 0.0 ? std::pow(q_m3s / alpha_, 1.0 / m_) : 0.0;
  }
  [[nodiscard]] double alpha() const noexcept { return alpha_; }
  [[nodiscard]] double exponent() const noexcept { return m_; }

 private:
  double alpha_;
  double m_;
};

static_assert(FluxLaw<PowerLawFlux>);

}  // namespace freshet::geometry
