#include "freshet/routing/shock.hpp"

namespace freshet::routing {

ShockDetector::ShockDetector(const ShockDetectionOptions& options, double cell_width_m,
                             int cell_count)
    : options_(options), dx_(cell_width_m), n_(cell_count) {}

void visit_state(StateVisitor& v, std::string_view name, BreakingPrediction& p) {
  StateGroup g(v, name);
  v.value("breaks", p.breaks);
  v.value("time_s", p.time_s);
  v.value("position_m", p.position_m);
  v.value("origin", p.origin);
  v.value("nearest_position_m", p.nearest_position_m);
  v.value("nearest_time_s", p.nearest_time_s);
}

namespace {
void visit_samples(StateVisitor& v, std::string_view name, std::vector<ShockSample>& samples) {
  v.records(name, samples, &ShockSample::time_s, &ShockSample::position_m,
            &ShockSample::area_left_m2, &ShockSample::area_right_m2,
            &ShockSample::rankine_hugoniot_m_s);
}
}  // namespace

void visit_state(StateVisitor& v, std::string_view name, std::vector<ShockReport>& reports) {
  StateGroup g(v, name);
  v.records("reports", reports, &ShockReport::formed, &ShockReport::formation_time_s,
            &ShockReport::formation_position_m, &ShockReport::speed_m_s,
            &ShockReport::rankine_hugoniot_m_s, &ShockReport::reached_outlet,
            &ShockReport::outlet_arrival_time_s, &ShockReport::ended, &ShockReport::end_time_s,
            &ShockReport::merged);
  for (std::size_t i = 0; i < reports.size(); ++i) {
    visit_samples(v, "path" + std::to_string(i), reports[i].path);
  }
}

void ShockDetector::visit_state(StateVisitor& v) {
  StateGroup g(v, "shock_detector");
  visit_samples(v, "pending", pending_);
  routing::visit_state(v, "shocks", reports_);
  v.records("tracks", tracks_, &Track::report, &Track::misses);
  v.value("earliest_birth_s", earliest_birth_s_);
  v.value("earliest_birth_position_m", earliest_birth_position_m_);
  v.value("predicted_resolvable", predicted_resolvable_);
  v.value("estimated_break_time_s", estimated_break_time_s_);
  v.value("estimated_break_position_m", estimated_break_position_m_);
  v.value("last_gradient_time_s", last_gradient_time_s_);
  v.value("last_inverse_gradient_s", last_inverse_gradient_s_);
}

void ShockDetector::reset() {
  estimated_break_time_s_ = estimated_break_position_m_ = std::numeric_limits<double>::quiet_NaN();
  last_gradient_time_s_ = last_inverse_gradient_s_ = std::numeric_limits<double>::quiet_NaN();
  pending_.clear();
  reports_.clear();
  tracks_.clear();
}

// The steepest downstream drop in area, its plateau states within plateau_cells either side,
// and how much of the jump happens across front_cells cells (LeVeque 2002, ch. 11: a captured
// shock is smeared over a few cells; a smooth compression wave is wider and widens no further
// only once it has broken).
bool ShockDetector::find_steep_front(std::span<const double> a, std::span<const double> q,
                                     ShockSample& sample) const {
  const DischargeAt q_at = [q](std::size_t i) { return q[i]; };
  return find_front(a, q_at, {0, static_cast<int>(a.size()) - 2}, {}, sample) == FrontTest::kSteep;
}

// The test above with the steepest drop searched only over faces in `search` outside every
// `excluded` range (the plateau states may lie anywhere).
ShockDetector::FrontTest ShockDetector::find_front(std::span<const double> a,
                                                  const DischargeAt& q, FaceRange search,
                                                  const std::vector<FaceRange>& excluded,
                                                  ShockSample& sample) const {
  const int n = static_cast<int>(a.size());
  if (n < 3) return FrontTest::kNone;
  auto allowed = [&](int i) {
    return std::none_of(excluded.begin(), excluded.end(),
                        [i](const FaceRange& r) { return i >= r.first && i <= r.last; });
  };
  int k = -1;  // face between cells k and k+1 with the largest drop
  for (int i = std::max(0, search.first); i <= std::min(n - 2, search.last); ++i) {
    if (allowed(i) && (k < 0 || a[i] - a[i + 1] > a[k] - a[k + 1])) k = i;
  }
  if (k < 0 || !(a[k] > a[k + 1])) return FrontTest::kNone;
  const double a_top = *std::max_element(a.begin(), a.end());
  // A front whose downstream plateau window reaches past the outlet cannot be measured (it
  // is leaving the reach); the tracker then extrapolates along the fitted path.
  if (k + 1 + options_.plateau_cells > n - 1) return FrontTest::kNone;
  int left = k, right = k + 1;
  for (int i = std::max(0, k - options_.plateau_cells); i <= k; ++i) if (a[i] > a[left]) left = i;
  for (int i = k + 1; i <= std::min(n - 1, k + 1 + options_.plateau_cells); ++i) {
    if (a[i] < a[right]) right = i;
  }
  const double jump = a[left] - a[right];
  if (!(jump > options_.min_relative_jump * a_top) || !(jump > 0.0)) return FrontTest::kNone;
  double steepest = 0.0;  // largest drop across front_cells faces containing face k
  const int w = options_.front_cells;
  for (int j = std::max(0, k + 1 - w); j <= k && j + w < n + 0; ++j) {
    steepest = std::max(steepest, a[j] - a[std::min(n - 1, j + w)]);
  }
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
  sample.rankine_hugoniot_m_s = (q(static_cast<std::size_t>(left)) - q(static_cast<std::size_t>(right))) /
                                (a[left] - a[right]);
  return steepest < options_.steep_fraction * jump ? FrontTest::kNotSteep : FrontTest::kSteep;
}

void ShockDetector::observe(double t_s, std::span<const double> cell_area_m2,
                            const CellFlux& cell_flux) {
  const DischargeAt q = [&cell_flux](std::size_t i) {
    double discharge_m3s = 0.0, celerity_m_s = 0.0;
    cell_flux(i, discharge_m3s, celerity_m_s);
    return discharge_m3s;
  };
  follow_tracks(t_s, cell_area_m2, q);
  update_breaking_estimate(t_s, cell_area_m2, cell_flux);
  look_for_new_front(t_s, cell_area_m2, q);
}

double ShockDetector::predicted_position_m(const ShockReport& r, double t_s) const {
  const ShockSample& last = r.path.back();
  const double speed = std::isfinite(r.speed_m_s) ? r.speed_m_s : last.rankine_hugoniot_m_s;
  return last.position_m + speed * (t_s - last.time_s);
}

ShockDetector::FaceRange ShockDetector::faces_near(double position_m, int radius_cells) const {
  const double cell = std::clamp(position_m / dx_, -1.0e6, 1.0e6);
  const int centre = static_cast<int>(std::floor(cell));
  return {centre - radius_cells, centre + radius_cells};
}

// Faces claimed by tracked shocks (their latest sample or extrapolated position): the
// search window plus one front width, so a new candidate's plateaus stay off them.
std::vector<ShockDetector::FaceRange> ShockDetector::tracked_faces(double t_s) const {
  std::vector<FaceRange> out;
  for (const Track& tr : tracks_) {
    const double position_m = predicted_position_m(reports_[tr.report], t_s);
    out.push_back(faces_near(position_m, options_.plateau_cells + options_.front_cells));
  }
  return out;
}

void ShockDetector::follow_tracks(double t_s, std::span<const double> a, const DischargeAt& q) {
  std::vector<Track> still;
  for (Track& tr : tracks_) {
    if (follow(tr, t_s, a, q)) still.push_back(tr);
  }
  tracks_ = std::move(still);
  merge_tracks(t_s);
}

// One tracked shock at time t: found near its extrapolated position (sample appended), or
// leaving (the front's downstream plateau passes the outlet: extrapolated until it reaches
// the reach end), or missed. Returns false once it has left the view.
bool ShockDetector::follow(Track& tr, double t_s, std::span<const double> a,
                           const DischargeAt& q) {
  ShockReport& r = reports_[tr.report];
  const double predicted_m = predicted_position_m(r, t_s);
  ShockSample s;
  s.time_s = t_s;
  const FrontTest test = find_front(a, q, faces_near(predicted_m, options_.plateau_cells), {}, s);
  const bool near = std::abs(s.position_m - predicted_m) <= options_.plateau_cells * dx_;
  // Steep or not: a formed shock is kept while its jump is there (a captured front widens
  // where the local Courant number is low, but a kinematic shock does not spread out again).
  if (test != FrontTest::kNone && near) {
    tr.misses = 0;
    r.path.push_back(s);
    update_speeds(r);
    return true;
  }
  const double length_m = n_ * dx_;
  const ShockSample& last = r.path.back();
  const double speed = std::isfinite(r.speed_m_s) ? r.speed_m_s : last.rankine_hugoniot_m_s;
  if (speed > 0.0 && predicted_m >= length_m) {
    r.reached_outlet = true;
    r.outlet_arrival_time_s = last.time_s + (length_m - last.position_m) / speed;
    return false;
  }
  if (predicted_m >= length_m - (options_.plateau_cells + 1) * dx_) return true;  // leaving
  if (++tr.misses < options_.persistence) return true;
  r.ended = true;
  r.end_time_s = last.time_s;
  return false;
}

// Two tracked shocks seen at the same front: the later one has overtaken the earlier one,
// which ends there (its duplicate sample removed); the merged front keeps the later shock.
void ShockDetector::merge_tracks(double t_s) {
  const double near_m = options_.plateau_cells * dx_;
  auto seen_now = [&](const Track& tr) { return reports_[tr.report].path.back().time_s == t_s; };
  for (std::size_t i = 0; i < tracks_.size(); ++i) {
    for (std::size_t j = i + 1; j < tracks_.size(); ++j) {
      ShockReport& early = reports_[std::min(tracks_[i].report, tracks_[j].report)];
      const ShockReport& late = reports_[std::max(tracks_[i].report, tracks_[j].report)];
      if (!seen_now(tracks_[i]) || !seen_now(tracks_[j]) ||
          std::abs(early.path.back().position_m - late.path.back().position_m) > near_m) {
        continue;
      }
      early.path.pop_back();
      update_speeds(early);
      early.ended = true;
      early.end_time_s = early.path.back().time_s;
      const std::size_t gone = std::min(tracks_[i].report, tracks_[j].report);
      std::erase_if(tracks_, [gone](const Track& tr) { return tr.report == gone; });
      return merge_tracks(t_s);
    }
  }
}

// The steepest front away from every tracked shock extends the candidate when it lies where
// the candidate's last sample, moved at its Rankine-Hugoniot speed, would be (within
// plateau_cells cells); otherwise it starts a new candidate.
void ShockDetector::look_for_new_front(double t_s, std::span<const double> a,
                                       const DischargeAt& q) {
  ShockSample s;
  s.time_s = t_s;
  // Once the characteristics say the first shock exists (t >= a finite earliest birth) where
  // this grid can show it, a front smeared wider than front_cells (the rest of the rising
  // limb right behind it) is that shock; otherwise only a steep front is.
  const bool predicted = reports_.empty() && predicted_resolvable_ &&
                         std::isfinite(earliest_birth_s_) && t_s >= earliest_birth_s_;
  const FrontTest test =
      t_s < earliest_birth_s_ ? FrontTest::kNone : find_front(a, q, {0, n_ - 2}, tracked_faces(t_s), s);
  // A shock cannot lie upstream of the first crossing of the characteristics.
  const bool where_predicted = s.position_m >= earliest_birth_position_m_ - options_.front_cells * dx_;
  if (test == FrontTest::kNone || (test == FrontTest::kNotSteep && !(predicted && where_predicted))) {
    pending_.clear();
    return;
  }
  if (!pending_.empty()) {
    const ShockSample& last = pending_.back();
    const double expected_m = last.position_m + last.rankine_hugoniot_m_s * (t_s - last.time_s);
    if (std::abs(s.position_m - expected_m) > options_.plateau_cells * dx_) pending_.clear();
  }
  pending_.push_back(s);
  if (static_cast<int>(pending_.size()) >= options_.persistence) form_shock();
}

void ShockDetector::form_shock() {
  ShockReport r;
  r.formed = true;
  r.formation_time_s = pending_.front().time_s;
  r.formation_position_m = pending_.front().position_m;
  if (estimated_break_time_s_ <= r.formation_time_s && estimated_break_time_s_ >= earliest_birth_s_) {
    r.formation_time_s = estimated_break_time_s_;
    r.formation_position_m = estimated_break_position_m_;
  }
  estimated_break_time_s_ = estimated_break_position_m_ = std::numeric_limits<double>::quiet_NaN();
  r.path = std::move(pending_);
  pending_.clear();
  update_speeds(r);
  reports_.push_back(std::move(r));
  tracks_.push_back({reports_.size() - 1, 0});
}

// Extrapolates t_b = t + 1 / G, G = max_i (c_i - c_{i+1}) / dx. Exactly, 1/G falls at rate 1
// until breaking; a captured front stops steepening once it is a few cells wide. So an
// estimate is taken only while 1/G still falls at least `steepening_rate_min` times as fast
// as the characteristics say (the computed gradient still follows the exact one).
void ShockDetector::update_breaking_estimate(double t_s, std::span<const double> a,
                                             const CellFlux& cell_flux) {
  const int n = static_cast<int>(a.size());
  const std::vector<FaceRange> excluded = tracked_faces(t_s);
  auto celerity = [&cell_flux](int i) {
    double discharge_m3s = 0.0, celerity_m_s = 0.0;
    cell_flux(static_cast<std::size_t>(i), discharge_m3s, celerity_m_s);
    return celerity_m_s;
  };
  int k = -1;
  double g = 0.0, c_k = 0.0, c_k1 = 0.0;  // c either side of the steepest face k
  double c_here = celerity(0);
  for (int i = 0; i + 1 < n; ++i) {
    const double c_next = celerity(i + 1);
    const bool skip = std::any_of(excluded.begin(), excluded.end(),
                                  [i](const FaceRange& r) { return i >= r.first && i <= r.last; });
    const double gi = skip ? 0.0 : (c_here - c_next) / dx_;
    if (gi > g) g = gi, k = i, c_k = c_here, c_k1 = c_next;
    c_here = c_next;
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
  estimated_break_position_m_ = (k + 1) * dx_ + 0.5 * (c_k + c_k1) * last_inverse_gradient_s_;
}

void ShockDetector::update_speeds(ShockReport& report) {
  const auto& path = report.path;
  if (path.empty()) return;
  double rh = 0.0;
  for (const auto& s : path) rh += s.rankine_hugoniot_m_s;
  report.rankine_hugoniot_m_s = rh / static_cast<double>(path.size());
  report.speed_m_s = std::numeric_limits<double>::quiet_NaN();
  if (path.size() < 2) return;
  double st = 0.0, sx = 0.0, stt = 0.0, stx = 0.0;
  for (const auto& s : path) {
    st += s.time_s, sx += s.position_m, stt += s.time_s * s.time_s, stx += s.time_s * s.position_m;
  }
  const double m = static_cast<double>(path.size());
  const double denom = m * stt - st * st;
  if (denom > 0.0) report.speed_m_s = (m * stx - st * sx) / denom;  // least squares slope
}

}  // namespace freshet::routing
