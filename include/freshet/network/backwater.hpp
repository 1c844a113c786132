// Backwater from a pond or a culvert's headwater pool into the reach that feeds it, as a level
// pool over the reach's drowned length.
//
// When the pool's level h stands above the reach's computed water surface at the reach's
// downstream end, the lower part of the reach is drowned: its water surface is taken flat at
// h (level pool), and the water below h there is part of the pool's storage. Three pieces:
//
//  * ReachWedge: the reach's own volume below a level, from its section and bed slope. With
//    x measured upstream from the outlet (bed z0 + S0 x) and G(Y) = integral_0^Y A(y) dy,
//        W(h) = integral_0^min(L, (h - z0)/S0) A(h - z0 - S0 x) dx
//             = (G(h - z0) - G(max(0, h - z0 - S0 L))) / S0,
//    the prism-and-wedge volume of a sloping channel under a horizontal surface (the
//    substitution y = h - z0 - S0 x; section areas as in Chow 1959, Open-Channel Hydraulics,
//    table 2-1). The pool's stage-storage relation is augmented by W(h).
//  * The reach (ReachElement) routes normally above the drowned length. Its cells from the
//    outlet upstream whose computed water surface lies below h are drowned: their water is
//    handed to the pool when they drown and taken back from it when they emerge, so volumes
//    move between the two ledgers exactly.
//  * couple_backwater(): called by the driver at the start of every coupling step (the
//    pool's level at the end of the last step decides the drowned length for this one).
//
//   represent_backwater(model);    // after the model is built, before simulate()
//
// Units: metres, m2, m3. The approximation and its limits: docs/cautions.md.
#pragma once

#include <cstddef>
#include <memory>
#include <string>
#include <vector>

#include "freshet/geometry/cross_section.hpp"

namespace freshet::network {

struct Model;

class ReachWedge {
 public:
  ReachWedge(std::shared_ptr<const geometry::CrossSection> section, double outlet_invert_m,
             double bed_slope, double length_m);
  // W(h) above; 0 at or below the outlet invert. A closed conduit holds at most its full
  // area at any level.
  [[nodiscard]] double volume_m3(double stage_m) const;
  // Bed elevation at a distance upstream from the outlet.
  [[nodiscard]] double bed_m(double upstream_of_outlet_m) const {
    return outlet_invert_m_ + bed_slope_ * upstream_of_outlet_m;
  }
  [[nodiscard]] double length_m() const noexcept { return length_m_; }

 private:
  // G(Y) = integral_0^Y A(y) dy by composite 3-point Gauss-Legendre (exact for the
  // polynomial areas of rectangles, trapezoids and triangles).
  [[nodiscard]] double area_integral_m3_per_m(double depth_m) const;
  std::shared_ptr<const geometry::CrossSection> section_;
  double outlet_invert_m_;
  double bed_slope_;
  double length_m_;
  double full_depth_m_;  // infinity for open sections
};

// A reach (links index) whose outflow enters a pool (links index) that can back water into it.
struct BackwaterLink {
  std::size_t reach = 0;
  std::size_t pool = 0;
};

// Links every reach with an outlet invert that drains into a culvert's pool or a detention
// basin: the pool's storage gains the reach's wedge and the reach follows the pool's level.
// Returns the ids of the reaches that drain into a pool but have no outlet invert (their
// backwater cannot be placed; the run report says so).
std::vector<std::string> represent_backwater(Model& model);

// The driver's step: each linked reach sets its drowned cells from its pool's level, and the
// water of the cells that drowned or emerged moves between reach and pool.
void couple_backwater(Model& model, double time_s);

}  // namespace freshet::network
