// Stage-storage relation of a detention basin or of the ponding area upstream of a road
// culvert: storage S (m3) as a function of water-surface stage h (m, any datum), its
// derivative the surface area A(h) = dS/dh (m2), and the inverse h(S).
//
// Two forms:
//   * a table (stage_m, storage_m3) interpolated either linearly or by a monotone cubic
//     Hermite interpolant (Fritsch and Carlson 1980, SIAM J. Numer. Anal. 17(2), with the
//     Fritsch and Butland 1984 weighted-harmonic-mean slopes), so storage never decreases
//     between samples; above the last sample the relation continues with the last surface
//     area (vertical walls), below the first sample storage is zero;
//   * a prismatic basin whose surface area is constant or grows linearly with stage:
//     A(h) = A0 + a (h - h0), S(h) = A0 (h - h0) + a (h - h0)^2 / 2.
//
//   auto basin = StageStorage::prismatic(101.5, 1200.0, 0.0, "basin 'north-lea'");
//   double s = basin.storage_m3(102.0);   // 600 m3
//   double h = basin.stage_m(600.0);      // 102.0 m
#pragma once

#include <string>
#include <vector>

namespace freshet::network::structures {

enum class StorageInterpolation { linear, monotone_cubic };

class StageStorage {
 public:
  // Throws InputError naming `element` (all problems at once) unless: at least two samples,
  // sizes equal, every value finite, stages strictly increasing, storages non-decreasing,
  // first storage 0 (the empty basin), storage increasing over the last interval, and
  // storage, surface area and the inverse stage finite at every node and interval midpoint.
  static StageStorage from_table(std::vector<double> stage_m, std::vector<double> storage_m3,
                                 StorageInterpolation interpolation, const std::string& element);

  // Throws InputError unless bottom_stage_m is finite, area_m2 >= 0, area_growth >= 0 and
  // at least one of them > 0.
  static StageStorage prismatic(double bottom_stage_m, double area_m2,
                                double area_growth_m2_per_m, const std::string& element);

  [[nodiscard]] double bottom_stage_m() const noexcept { return bottom_stage_m_; }
  // The highest tabulated stage (above it the table continues with its last surface area);
  // the bottom stage for a prismatic basin, which has no top.
  [[nodiscard]] double top_stage_m() const noexcept {
    return stage_m_.empty() ? bottom_stage_m_ : stage_m_.back();
  }
  // 0 at or below the bottom stage; non-decreasing and continuous.
  [[nodiscard]] double storage_m3(double stage_m) const;
  // dS/dh (one-sided from above at table nodes); 0 below the bottom stage.
  [[nodiscard]] double surface_area_m2(double stage_m) const;
  // Inverse of storage_m3 for storage >= 0: the lowest stage holding that storage.
  [[nodiscard]] double stage_m(double storage_m3) const;

 private:
  enum class Kind { table, prismatic };
  StageStorage() = default;
  [[nodiscard]] double table_storage(double stage_m) const;
  [[nodiscard]] double table_area(double stage_m) const;
  [[nodiscard]] double table_stage(double storage_m3) const;
  [[nodiscard]] std::size_t segment_for_stage(double stage_m) const;

  Kind kind_ = Kind::prismatic;
  StorageInterpolation interpolation_ = StorageInterpolation::linear;
  double bottom_stage_m_ = 0.0;
  double area_m2_ = 0.0;               // prismatic A0
  double area_growth_m2_per_m_ = 0.0;  // prismatic a
  std::vector<double> stage_m_;        // table nodes
  std::vector<double> storage_m3_;
  std::vector<double> slope_m2_;       // dS/dh at the nodes (Hermite slopes)
  std::string element_;                // named when the stage for a storage is not found
};

}  // namespace freshet::network::structures
