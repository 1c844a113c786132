#include "freshet/network/structures/stage_storage.hpp"

#include <algorithm>
#include <cmath>

#include "bracketed_solve.hpp"
#include "freshet/core/converged_root.hpp"
#include "freshet/core/error.hpp"

namespace freshet::network::structures {
namespace {

void validate_table(const std::vector<double>& h, const std::vector<double>& s, ProblemList& p) {
  if (h.size() != s.size()) {
    p.add("stage_m", "has " + std::to_string(h.size()) + " values but storage_m3 has " +
                         std::to_string(s.size()) + ": sizes must match");
    return;
  }
  if (h.size() < 2) p.add("stage_m", "has " + std::to_string(h.size()) + " values: needs >= 2");
  for (std::size_t k = 0; k < h.size(); ++k) {
    const std::string at = "[" + std::to_string(k + 1) + "]";
    p.require_finite("stage_m" + at, h[k]);
    p.require_finite("storage_m3" + at, s[k]);
    if (k > 0 && std::isfinite(h[k]) && std::isfinite(h[k - 1]))
      p.require(h[k] > h[k - 1], "stage_m" + at, h[k], "stages must strictly increase");
    if (k > 0 && std::isfinite(s[k]) && std::isfinite(s[k - 1]))
      p.require(s[k] >= s[k - 1], "storage_m3" + at, s[k], "storage must not decrease");
  }
  if (h.size() >= 2 && std::isfinite(s.front()))
    p.require(s.front() == 0.0, "storage_m3[1]", s.front(), "must be 0 (the empty basin)");
  if (h.size() >= 2 && std::isfinite(s.back()) && std::isfinite(s[s.size() - 2]))
    p.require(s.back() > s[s.size() - 2], "storage_m3[" + std::to_string(s.size()) + "]",
              s.back(), "storage must increase over the last interval");
}

// Fritsch-Butland (1984) weighted harmonic mean of the secant slopes: keeps the Hermite
// cubic monotone (Fritsch and Carlson 1980); end slopes are the one-sided secants.
std::vector<double> monotone_slopes(const std::vector<double>& h, const std::vector<double>& s) {
  const std::size_t n = h.size();
  std::vector<double> delta(n - 1), d(n);
  for (std::size_t k = 0; k + 1 < n; ++k) delta[k] = (s[k + 1] - s[k]) / (h[k + 1] - h[k]);
  d.front() = delta.front();
  d.back() = delta.back();
  for (std::size_t k = 1; k + 1 < n; ++k) {
    if (delta[k - 1] * delta[k] <= 0.0) { d[k] = 0.0; continue; }
    const double h0 = h[k] - h[k - 1], h1 = h[k + 1] - h[k];
    const double w1 = 2.0 * h1 + h0, w2 = h1 + 2.0 * h0;
    d[k] = (w1 + w2) / (w1 / delta[k - 1] + w2 / delta[k]);
  }
  return d;
}

// Finite samples can still give a table whose lookups are not finite: stages -1e308 and 1e308
// (their difference overflows), storages 0 and 1e308 a micrometre apart (an infinite surface
// area). The built table is checked at every node and interval midpoint, in both directions.
void validate_lookups(const StageStorage& t, const std::vector<double>& h, ProblemList& p) {
  for (std::size_t k = 0; k < h.size(); ++k) {
    const std::string at = "[" + std::to_string(k + 1) + "]";
    const double mid = k + 1 < h.size() ? h[k] + 0.5 * (h[k + 1] - h[k]) : h[k] + 1.0;
    for (double x : {h[k], mid}) {
      const double s = t.storage_m3(x), a = t.surface_area_m2(x);
      if (std::isfinite(s) && std::isfinite(a) && a >= 0.0 && std::isfinite(t.stage_m(s))) continue;
      p.add("stage_m" + at, "= " + format_value(h[k]) + ": the table gives storage " +
                                format_value(s) + " m3 and surface area " + format_value(a) +
                                " m2 near this stage; stages and storages must be within the "
                                "physical range so that both stay finite");
      return;
    }
  }
}

}  // namespace

StageStorage StageStorage::from_table(std::vector<double> stage_m, std::vector<double> storage_m3,
                                      StorageInterpolation interpolation,
                                      const std::string& element) {
  ProblemList problems(element);
  validate_table(stage_m, storage_m3, problems);
  problems.throw_if_any();
  StageStorage out;
  out.kind_ = Kind::table;
  out.element_ = element;
  out.interpolation_ = interpolation;
  out.bottom_stage_m_ = stage_m.front();
  out.slope_m2_ = monotone_slopes(stage_m, storage_m3);
  if (interpolation == StorageInterpolation::linear) {
    for (std::size_t k = 0; k + 1 < stage_m.size(); ++k)
      out.slope_m2_[k] = (storage_m3[k + 1] - storage_m3[k]) / (stage_m[k + 1] - stage_m[k]);
  }
  const std::vector<double> stages = stage_m;
  out.stage_m_ = std::move(stage_m);
  out.storage_m3_ = std::move(storage_m3);
  validate_lookups(out, stages, problems);
  problems.throw_if_any();
  return out;
}

StageStorage StageStorage::prismatic(double bottom_stage_m, double area_m2,
                                     double area_growth_m2_per_m, const std::string& element) {
  ProblemList problems(element);
  problems.require_finite("bottom_stage_m", bottom_stage_m);
  problems.require_non_negative("surface_area_m2", area_m2);
  problems.require_non_negative("area_growth_m2_per_m", area_growth_m2_per_m);
  if (problems.empty() && area_m2 == 0.0 && area_growth_m2_per_m == 0.0)
    problems.add("surface_area_m2", "= 0 with area_growth_m2_per_m = 0: the basin holds nothing");
  problems.throw_if_any();
  StageStorage out;
  out.kind_ = Kind::prismatic;
  out.bottom_stage_m_ = bottom_stage_m;
  out.area_m2_ = area_m2;
  out.area_growth_m2_per_m_ = area_growth_m2_per_m;
  return out;
}

double StageStorage::storage_m3(double stage_m) const {
  const double x = stage_m - bottom_stage_m_;
  if (!(x > 0.0)) return 0.0;
  if (kind_ == Kind::prismatic) return x * (area_m2_ + 0.5 * area_growth_m2_per_m_ * x);
  return table_storage(stage_m);
}

double StageStorage::surface_area_m2(double stage_m) const {
  const double x = stage_m - bottom_stage_m_;
  if (x < 0.0) return 0.0;
  if (kind_ == Kind::prismatic) return area_m2_ + area_growth_m2_per_m_ * x;
  return table_area(stage_m);
}

double StageStorage::stage_m(double storage_m3) const {
  if (!(storage_m3 > 0.0)) return bottom_stage_m_;
  if (kind_ == Kind::table) return table_stage(storage_m3);
  const double a0 = area_m2_, a = area_growth_m2_per_m_;
  // Stable root of a/2 x^2 + a0 x - S = 0.
  return bottom_stage_m_ + 2.0 * storage_m3 / (a0 + std::sqrt(a0 * a0 + 2.0 * a * storage_m3));
}

std::size_t StageStorage::segment_for_stage(double stage_m) const {
  const auto it = std::upper_bound(stage_m_.begin(), stage_m_.end(), stage_m);
  const auto k = static_cast<std::size_t>(it - stage_m_.begin());
  return std::clamp<std::size_t>(k, 1, stage_m_.size() - 1) - 1;
}

double StageStorage::table_storage(double stage_m) const {
  if (stage_m >= stage_m_.back())
    return storage_m3_.back() + slope_m2_.back() * (stage_m - stage_m_.back());
  const std::size_t k = segment_for_stage(stage_m);
  const double dh = stage_m_[k + 1] - stage_m_[k];
  const double t = (stage_m - stage_m_[k]) / dh;
  if (interpolation_ == StorageInterpolation::linear)
    return storage_m3_[k] + t * (storage_m3_[k + 1] - storage_m3_[k]);
  // Cubic Hermite basis on [h_k, h_k+1].
  const double t2 = t * t, t3 = t2 * t;
  return (2 * t3 - 3 * t2 + 1) * storage_m3_[k] + (t3 - 2 * t2 + t) * dh * slope_m2_[k] +
         (-2 * t3 + 3 * t2) * storage_m3_[k + 1] + (t3 - t2) * dh * slope_m2_[k + 1];
}

double StageStorage::table_area(double stage_m) const {
  if (stage_m >= stage_m_.back()) return slope_m2_.back();
  const std::size_t k = segment_for_stage(stage_m);
  const double dh = stage_m_[k + 1] - stage_m_[k];
  if (interpolation_ == StorageInterpolation::linear) return slope_m2_[k];
  const double t = (stage_m - stage_m_[k]) / dh;
  const double t2 = t * t;
  return (6 * t2 - 6 * t) / dh * storage_m3_[k] + (3 * t2 - 4 * t + 1) * slope_m2_[k] +
         (-6 * t2 + 6 * t) / dh * storage_m3_[k + 1] + (3 * t2 - 2 * t) * slope_m2_[k + 1];
}

double StageStorage::table_stage(double storage_m3) const {
  if (storage_m3 >= storage_m3_.back())
    return stage_m_.back() + (storage_m3 - storage_m3_.back()) / slope_m2_.back();
  // First node whose storage reaches the target: the lowest stage holding it.
  const auto it = std::lower_bound(storage_m3_.begin(), storage_m3_.end(), storage_m3);
  const auto k = static_cast<std::size_t>(it - storage_m3_.begin());
  if (storage_m3_[k] == storage_m3) return stage_m_[k];
  auto g = [&](double h) { return table_storage(h) - storage_m3; };
  const RootResult r = detail::solve_monotone(g, stage_m_[k - 1], stage_m_[k], 1e-15);
  return converged_root(r, element_, "stage for storage (m)",
                        [&] { return "storage " + format_value(storage_m3) + " m3"; });
}

}  // namespace freshet::network::structures
