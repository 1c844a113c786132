// A road culvert crossing: culvert barrels plus flow over the road, as one outlet of the
// ponding area upstream of the embankment. The barrel rating (headwater stage -> barrel
// discharge, HDS-5 inlet/outlet control, inverted by safeguarded root finding) is built
// once, on construction, as a monotone table, so level-pool routing never inverts the
// culvert equations inside its own iteration. Road overtopping is evaluated exactly.
//
//   CulvertCrossing xing(Culvert(spec, "crossing 'miller-lane'"),
//                        RoadOvertopping({0, 40, 80}, {103.1, 102.9, 103.2}, 1.70, "road"),
//                        std::nullopt, /*top_stage_m=*/106.0, "crossing 'miller-lane'");
//   double q = xing.discharge_m3s(103.0);   // barrels + road
#pragma once

#include <optional>
#include <span>
#include <string>
#include <vector>

#include "freshet/network/structures/culvert.hpp"
#include "freshet/network/structures/outlets.hpp"

namespace freshet::network::structures {

class CulvertCrossing {
 public:
  // top_stage_m: highest stage tabulated (above it the barrels are computed directly, more
  // slowly, and beyond_rating() reports it). rating_points >= 16 uniform stages from the
  // inlet invert to top_stage_m, plus the barrel crown and the lowest road crest; intervals
  // are then halved where linear interpolation misses the direct inversion at the midpoint
  // by more than 5e-4 relative (at most 8 passes).
  // Throws InputError naming `element` for a bad top stage, point count or tailwater.
  CulvertCrossing(Culvert culvert, std::optional<RoadOvertopping> road,
                  std::optional<double> tailwater_stage_m, double top_stage_m,
                  const std::string& element, int rating_points = 400);

  [[nodiscard]] double discharge_m3s(double stage_m) const;         // barrels + road
  [[nodiscard]] double barrel_discharge_m3s(double stage_m) const;  // from the rating table
  [[nodiscard]] double overtopping_discharge_m3s(double stage_m) const;  // exact
  // Direct HDS-5 evaluation at the barrel discharge the rating gives for this stage.
  [[nodiscard]] Headwater barrel_headwater(double stage_m) const;
  [[nodiscard]] bool beyond_rating(double stage_m) const { return stage_m > stage_m_.back(); }

  [[nodiscard]] const Culvert& culvert() const noexcept { return culvert_; }
  [[nodiscard]] const std::optional<RoadOvertopping>& road() const noexcept { return road_; }
  [[nodiscard]] std::optional<double> tailwater_stage_m() const noexcept { return tailwater_m_; }
  [[nodiscard]] const std::string& name() const noexcept { return name_; }
  [[nodiscard]] std::span<const double> rating_stage_m() const { return stage_m_; }
  [[nodiscard]] std::span<const double> rating_barrel_m3s() const { return barrel_m3s_; }

 private:
  void build_rating(double top_stage_m, int points);
  void refine_rating();
  [[nodiscard]] double direct_discharge(double stage_m) const;

  Culvert culvert_;
  std::optional<RoadOvertopping> road_;
  std::optional<double> tailwater_m_;
  std::string name_;
  std::vector<double> stage_m_;
  std::vector<double> barrel_m3s_;
};

}  // namespace freshet::network::structures
