// Routing-side customisation points on flux laws (detail; not part of the public contract).
//
// flux_and_celerity(law, A, q, c) evaluates Q(A) and c(A) = dQ/dA together; the generic
// version calls the two members, a law may get a cheaper overload (the power law derives c
// from Q: c = m Q / A, one pow instead of two). celerity_non_decreasing(law) says whether
// c(A) never decreases with A, so that max_i c(A_i) = c(max_i A_i) (true for convex Q(A),
// e.g. the power law with m >= 1; false by default, which is always safe).
#pragma once

#include "freshet/geometry/flux_law.hpp"
#include "freshet/geometry/section_flux.hpp"

namespace freshet::routing::detail {

inline void flux_and_celerity(const geometry::PowerLawFlux& law, double area_m2, double& q_m3s,
                              double& c_m_s) noexcept {
  if (area_m2 > 0.0) {
    q_m3s = law.alpha() * std::pow(area_m2, law.exponent());
    c_m_s = law.exponent() * q_m3s / area_m2;
  } else {
    q_m3s = 0.0;
    c_m_s = law.celerity_m_s(0.0);
  }
}

template <geometry::FluxLaw F>
inline void flux_and_celerity(const F& law, double area_m2, double& q_m3s,
                              double& c_m_s) noexcept {
  q_m3s = law.discharge_m3s(area_m2);
  c_m_s = law.celerity_m_s(area_m2);
}

inline bool celerity_non_decreasing(const geometry::PowerLawFlux& law) noexcept {
  return law.exponent() >= 1.0;
}

// Rectangle, Manning: with b = 1, dQ/dh ~ g(h) = h^(2/3) (5/3 + 2h) (1 + 2h)^(-5/3), and
// d ln g / dh = 10 / (3h (5 + 6h) (1 + 2h)) > 0, so c increases with A for every width.
inline bool celerity_non_decreasing(const geometry::RectangularFlux& /*law*/) noexcept {
  return true;
}

template <geometry::FluxLaw F>
inline bool celerity_non_decreasing(const F& /*law*/) noexcept {
  return false;
}

}  // namespace freshet::routing::detail
