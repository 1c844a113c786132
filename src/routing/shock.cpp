#include "freshet/routing/shock.hpp"

namespace freshet::routing {

ShockDetector::ShockDetector(const ShockDetectionOptions& options, double cell_width_m,
                             int cell_count)
    : options_(options), dx_(cell_width_m), n_(cell_count) {}

void ShockDetector::reset() {
  estimated_break_time_s_ = estimated_break_position_m_ = std::numeric_limits<double>::quiet_NaN();
  last_gradient_time_s_ = last_inverse_gradient_s_ = std::numeric_limits<double>::quiet_NaN();
  consecutive_ = 0;
  pending_.clear();
  report_ = ShockReport{};
}

// The steepest downstream drop in area, its plateau states within plateau_cells either side,
// and how much of the jump happens across front_cells cells (LeVeque 2002, ch. 11: a captured
// shock is smeared over a few cells; a smooth compression wave is wider and widens no further
// only once it has broken).
bool ShockDetector::find_steep_front(std::span<const double> a, std::span<const double> q,
                                     ShockSample& sample) const {
  const int n = static_cast<int>(a.size());
  if (n < 3) return false;
  int k = 0;  // face between cells k and k+1 with the largest drop
  double a_top = 0.0;
  for (int i = 0; i + 1 < n; ++i) {
    if (a[i] - a[i + 1] > a[k] - a[k + 1]) k = i;
    a_top = std::max(a_top, a[i + 1]);
  }
  a_top = std::max(a_top, a[0]);
  // A front whose downstream plateau window reaches past the outlet cannot be measured (it
  // is leaving the reach); the tracker then extrapolates along the fitted path.
  if (k + 1 + options_.plateau_cells > n - 1) return false;
  int left = k, right = k + 1;
  for (int i = std::max(0, k - options_.plateau_cells); i <= k; ++i) if (a[i] > a[left]) left = i;
  for (int i = k + 1; i <= std::min(n - 1, k + 1 + options_.plateau_cells); ++i) {
    if (a[i] < a[right]) right = i;
  }
  const double jump = a[left] - a[right];
  if (!(jump > options_.min_relative_jump * a_top) || !(jump > 0.0)) return false;
  double steepest = 0.0;  // largest drop across front_cells faces containing face k
  const int w = options_.front_cells;
  for (int j = std::max(0, k + 1 - w); j <= k && j + w < n + 0; ++j) {
    steepest = std::max(steepest, a[j] - a[std::min(n - 1, j + w)]);
  }
  if (steepest < options_.steep_fraction * jump) return false;
  const double mid = 0.5 * (a[left] + a[right]);
  int j = k;  // a[j] >= mid > a[j+1], searched outwards from the steepest face
  for (int d = 0; d <= options_.plateau_cells; ++d) {
    if (k - d >= 0 && k - d + 1 < n && a[k - d] >= mid && a[k - d + 1] < mid) { j = k - d; break; }
    if (k + d + 1 < n && a[k + d] >= mid && a[k + d + 1] < mid) { j = k + d; break; }
  }
  const double frac = (a[j] - mid) / (a[j] - a[j + 1]);
  sample.position_m = (j + 0.5 + frac) * dx_;
  sample.area_left_m2 = a[left];
  sample.area_right_m2 = a[right];
  sample.rankine_hugoniot_m_s = (q[left] - q[right]) / (a[left] - a[right]);
  return true;
}

void ShockDetector::observe(double t_s, std::span<const double> cell_area_m2,
                            std::span<const double> cell_discharge_m3s,
                            std::span<const double> cell_celerity_m_s) {
  ShockSample s;
  s.time_s = t_s;
  if (!report_.formed) update_breaking_estimate(t_s, cell_area_m2, cell_celerity_m_s);
  if (find_steep_front(cell_area_m2, cell_discharge_m3s, s)) {
    accept_front(s);
  } else {
    lose_front(t_s);
  }
}

// Extrapolates t_b = t + 1 / G, G = max_i (c_i - c_{i+1}) / dx. Exactly, 1/G falls at rate 1
// until breaking; a captured front stops steepening once it is a few cells wide. So an
// estimate is taken only while 1/G still falls at least `steepening_rate_min` times as fast
// as the characteristics say (the computed gradient still follows the exact one).
void ShockDetector::update_breaking_estimate(double t_s, std::span<const double> a,
                                             std::span<const double> c) {
  const int n = static_cast<int>(a.size());
  int k = -1;
  double g = 0.0;
  for (int i = 0; i + 1 < n; ++i) {
    const double gi = (c[i] - c[i + 1]) / dx_;
    if (gi > g) g = gi, k = i;
  }
  const double previous_t = last_gradient_time_s_, previous_inverse = last_inverse_gradient_s_;
  last_gradient_time_s_ = t_s;
  last_inverse_gradient_s_ = k < 0 ? std::numeric_limits<double>::quiet_NaN() : 1.0 / g;
  if (k < 0 || !(t_s > previous_t)) return;
  const double rate = (previous_inverse - last_inverse_gradient_s_) / (t_s - previous_t);
  if (!(rate >= options_.steepening_rate_min)) return;
  const double drop = a[static_cast<std::size_t>(std::max(0, k - options_.plateau_cells))] -
                      a[static_cast<std::size_t>(std::min(n - 1, k + 1 + options_.plateau_cells))];
  if (!(drop > options_.min_relative_jump * *std::max_element(a.begin(), a.end()))) return;
  estimated_break_time_s_ = t_s + last_inverse_gradient_s_;
  estimated_break_position_m_ = (k + 1) * dx_ + 0.5 * (c[k] + c[k + 1]) * last_inverse_gradient_s_;
}

void ShockDetector::accept_front(const ShockSample& s) {
  if (report_.reached_outlet) return;
  ++consecutive_;
  if (report_.formed) {
    report_.path.push_back(s);
    update_speeds();
    return;
  }
  pending_.push_back(s);
  if (consecutive_ < options_.persistence) return;
  report_.formed = true;
  report_.formation_time_s = pending_.front().time_s;
  report_.formation_position_m = pending_.front().position_m;
  if (estimated_break_time_s_ <= report_.formation_time_s) {
    report_.formation_time_s = estimated_break_time_s_;
    report_.formation_position_m = estimated_break_position_m_;
  }
  report_.path = pending_;
  pending_.clear();
  update_speeds();
}

// A formed shock that is no longer seen has left through the outlet when its extrapolated
// path passes the reach end; the arrival time is interpolated along the fitted speed.
void ShockDetector::lose_front(double t_s) {
  consecutive_ = 0;
  pending_.clear();
  if (!report_.formed || report_.reached_outlet || report_.path.empty()) return;
  const ShockSample& last = report_.path.back();
  const double length_m = n_ * dx_;
  const double speed = std::isfinite(report_.speed_m_s) ? report_.speed_m_s
                                                        : last.rankine_hugoniot_m_s;
  if (speed > 0.0 && last.position_m + speed * (t_s - last.time_s) >= length_m) {
    report_.reached_outlet = true;
    report_.outlet_arrival_time_s = last.time_s + (length_m - last.position_m) / speed;
  }
}

void ShockDetector::update_speeds() {
  const auto& path = report_.path;
  double rh = 0.0;
  for (const auto& s : path) rh += s.rankine_hugoniot_m_s;
  report_.rankine_hugoniot_m_s = rh / static_cast<double>(path.size());
  if (path.size() < 2) return;
  double st = 0.0, sx = 0.0, stt = 0.0, stx = 0.0;
  for (const auto& s : path) {
    st += s.time_s, sx += s.position_m, stt += s.time_s * s.time_s, stx += s.time_s * s.position_m;
  }
  const double m = static_cast<double>(path.size());
  const double denom = m * stt - st * st;
  if (denom > 0.0) report_.speed_m_s = (m * stx - st * sx) / denom;  // least squares slope
}

}  // namespace freshet::routing
