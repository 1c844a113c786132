#include "freshet/network/structures/culvert_crossing.hpp"

#include <algorithm>
#include <cmath>

#include "freshet/core/error.hpp"

namespace freshet::network::structures {

CulvertCrossing::CulvertCrossing(Culvert culvert, std::optional<RoadOvertopping> road,
                                 std::optional<double> tailwater_stage_m, double top_stage_m,
                                 const std::string& element, int rating_points)
    : culvert_(std::move(culvert)),
      road_(std::move(road)),
      tailwater_m_(tailwater_stage_m),
      name_(element) {
  ProblemList p(element);
  const double invert = culvert_.spec().inlet_invert_stage_m;
  p.require(std::isfinite(top_stage_m) && top_stage_m > invert, "top_stage_m", top_stage_m,
            "must be above the inlet invert stage " + format_value(invert));
  p.require(rating_points >= 16, "rating_points", rating_points, "must be >= 16");
  if (tailwater_m_) p.require_finite("tailwater_stage_m", *tailwater_m_);
  p.throw_if_any();
  build_rating(top_stage_m, rating_points);
}

void CulvertCrossing::build_rating(double top_stage_m, int points) {
  const double invert = culvert_.spec().inlet_invert_stage_m;
  for (int k = 0; k < points; ++k)
    stage_m_.push_back(invert + (top_stage_m - invert) * k / (points - 1.0));
  stage_m_.push_back(invert + culvert_.spec().rise_m);
  if (road_) stage_m_.push_back(road_->lowest_crest_stage_m());
  // The barrels start to flow where the pond rises above a tailwater: a node there keeps the
  // interpolated rating at zero up to it (a pond standing at the tailwater does not flow).
  if (tailwater_m_) stage_m_.push_back(*tailwater_m_);
  std::sort(stage_m_.begin(), stage_m_.end());
  stage_m_.erase(std::remove_if(stage_m_.begin(), stage_m_.end(),
                                [&](double h) { return h < invert || h > top_stage_m; }),
                 stage_m_.end());
  stage_m_.erase(std::unique(stage_m_.begin(), stage_m_.end()), stage_m_.end());
  for (double h : stage_m_) barrel_m3s_.push_back(direct_discharge(h));
  refine_rating();
  // max() removes round-off wiggles of the root finder; the exact relation is monotone.
  for (std::size_t k = 1; k < barrel_m3s_.size(); ++k)
    barrel_m3s_[k] = std::max(barrel_m3s_[k], barrel_m3s_[k - 1]);
}

double CulvertCrossing::direct_discharge(double stage_m) const {
  return culvert_.discharge_for_headwater_m3s(stage_m, tailwater_m_);
}

// Where linear interpolation misses the direct inversion at an interval's midpoint by more
// than kRatingTolerance (relative), the midpoint is added; up to kMaxRefinements passes.
// Kinks in the rating (regime changes, the control switch) get dense nodes this way. A pass
// looks again only at the halves of the intervals the previous pass split: an interval that
// met the tolerance is unchanged, so testing it again would give the same answer (the table
// is the same as testing every interval in every pass, at a fraction of the root solves).
void CulvertCrossing::refine_rating() {
  constexpr double kRatingTolerance = 5e-4;
  constexpr int kMaxRefinements = 8;
  // open[k]: the interval [stage_m_[k], stage_m_[k + 1]] is still to be tested.
  std::vector<char> open(stage_m_.size() > 1 ? stage_m_.size() - 1 : 0, 1);
  for (int pass = 0; pass < kMaxRefinements; ++pass) {
    std::vector<double> h{stage_m_.front()}, q{barrel_m3s_.front()};
    std::vector<char> still_open;
    bool added = false;
    for (std::size_t k = 0; k + 1 < stage_m_.size(); ++k) {
      bool split = false;
      if (open[k]) {
        const double mid = 0.5 * (stage_m_[k] + stage_m_[k + 1]);
        const double q_mid = direct_discharge(mid);
        const double q_lin = 0.5 * (barrel_m3s_[k] + barrel_m3s_[k + 1]);
        split = std::abs(q_lin - q_mid) > kRatingTolerance * q_mid;
        if (split) {
          h.push_back(mid);
          q.push_back(q_mid);
          still_open.push_back(1);
          added = true;
        }
      }
      still_open.push_back(split ? 1 : 0);
      h.push_back(stage_m_[k + 1]);
      q.push_back(barrel_m3s_[k + 1]);
    }
    stage_m_ = std::move(h);
    barrel_m3s_ = std::move(q);
    open = std::move(still_open);
    if (!added) return;
  }
}

double CulvertCrossing::barrel_discharge_m3s(double stage_m) const {
  if (!(stage_m > stage_m_.front())) return 0.0;
  // Above the table the barrels are computed directly: a straight-line extension would
  // overstate their flow, which grows only as the square root of the head there.
  if (stage_m >= stage_m_.back()) return direct_discharge(stage_m);
  const auto it = std::upper_bound(stage_m_.begin(), stage_m_.end(), stage_m);
  const std::size_t k = static_cast<std::size_t>(it - stage_m_.begin()) - 1;
  const double t = (stage_m - stage_m_[k]) / (stage_m_[k + 1] - stage_m_[k]);
  return barrel_m3s_[k] + t * (barrel_m3s_[k + 1] - barrel_m3s_[k]);
}

double CulvertCrossing::overtopping_discharge_m3s(double stage_m) const {
  return road_ ? road_->discharge_m3s(stage_m) : 0.0;
}

double CulvertCrossing::discharge_m3s(double stage_m) const {
  return barrel_discharge_m3s(stage_m) + overtopping_discharge_m3s(stage_m);
}

Headwater CulvertCrossing::barrel_headwater(double stage_m) const {
  return culvert_.headwater(barrel_discharge_m3s(stage_m), tailwater_m_);
}

}  // namespace freshet::network::structures
