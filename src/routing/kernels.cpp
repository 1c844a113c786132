// Non-template kernels of the routing schemes, and the Boost.Odeint integration (kept in one
// translation unit so that Odeint is compiled once).
#include "freshet/routing/detail/kernels.hpp"

#include <algorithm>

#include <Eigen/Core>
#include <boost/numeric/odeint.hpp>
// Boost.Odeint's adaptor for Eigen state types: it supplies their resizing and the
// vector-space algebra the steppers need.
#include <boost/numeric/odeint/external/eigen/eigen.hpp>

#include "freshet/core/error.hpp"

namespace freshet::routing::detail {

namespace {
template <class Pick>
double series_extreme(const PiecewiseLinearSeries& s, double t0_s, double t1_s, Pick pick) {
  double v = pick(s.value_at(t0_s), s.value_at(t1_s));
  const auto times = s.times_s();
  auto it = std::upper_bound(times.begin(), times.end(), t0_s);
  for (; it != times.end() && *it < t1_s; ++it) {
    v = pick(v, s.values()[static_cast<std::size_t>(it - times.begin())]);
  }
  return v;
}
}  // namespace

double series_max(const PiecewiseLinearSeries& s, double t0_s, double t1_s) {
  return series_extreme(s, t0_s, t1_s, [](double a, double b) { return std::max(a, b); });
}

double series_min(const PiecewiseLinearSeries& s, double t0_s, double t1_s) {
  return series_extreme(s, t0_s, t1_s, [](double a, double b) { return std::min(a, b); });
}

std::vector<double> segment_times(double t0_s, double t1_s,
                                  const std::vector<double>& breakpoints_s) {
  std::vector<double> t{t0_s};
  for (double b : breakpoints_s) {
    if (b > t0_s && b < t1_s) t.push_back(b);
  }
  std::sort(t.begin(), t.end());
  t.erase(std::unique(t.begin(), t.end()), t.end());
  if (t1_s > t0_s) t.push_back(t1_s);
  return t;
}

// Controlled Dormand-Prince 5(4) (Dormand & Prince 1980, J. Comput. Appl. Math. 6) stepped by
// hand with try_step so that rejected steps are counted and the last step lands on t1.
OdeSegmentResult integrate_ode_segment(const OdeRhs& rhs, std::span<double> y_inout, double t0_s,
                                       double t1_s, double dt_initial_s,
                                       const RoutingOptions& options) {
  namespace odeint = boost::numeric::odeint;
  using State = Eigen::VectorXd;
  auto stepper = odeint::make_controlled(options.ode_abs_tolerance_m2, options.ode_rel_tolerance,
                                         odeint::runge_kutta_dopri5<State>());
  auto system = [&rhs](const State& x, State& dxdt, double t) {
    rhs(std::span<const double>(x.data(), static_cast<std::size_t>(x.size())),
        std::span<double>(dxdt.data(), static_cast<std::size_t>(dxdt.size())), t);
  };
  State y = Eigen::Map<const State>(y_inout.data(), static_cast<Eigen::Index>(y_inout.size()));
  OdeSegmentResult r;
  double t = t0_s;
  double dt = std::min(dt_initial_s, t1_s - t0_s);
  int consecutive_rejections = 0;
  while (t < t1_s) {
    dt = std::min(dt, options.max_dt_s);
    const bool last = t + dt >= t1_s;
    if (last) dt = t1_s - t;
    const double dt_tried = dt;
    if (stepper.try_step(system, y, t, dt) == odeint::success) {
      ++r.steps;
      consecutive_rejections = 0;
      r.largest_dt_s = std::max(r.largest_dt_s, dt_tried);
      if (last) t = t1_s;
      continue;
    }
    ++r.rejected;
    if (++consecutive_rejections > options.max_consecutive_rejections || dt < options.min_dt_s) {
      r.ok = false;
      r.message = "Runge-Kutta step size control failed (dt " + format_value(dt) + " s after " +
                  std::to_string(consecutive_rejections) + " consecutive rejections)";
      return r;
    }
  }
  r.last_dt_s = dt;
  std::copy(y.data(), y.data() + y.size(), y_inout.begin());
  return r;
}

}  // namespace freshet::routing::detail
