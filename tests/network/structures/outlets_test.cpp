#include "freshet/network/structures/outlets.hpp"

#include <cmath>
#include <gtest/gtest.h>
#include <numbers>

#include "freshet/core/units.hpp"

namespace freshet::network::structures {
namespace {

constexpr double kG = units::kGravity_m_s2;

// Reference: broad-crested weir with critical depth on the crest, q = sqrt(g yc^3),
// yc = 2H/3, so C_w = (2/3)^1.5 sqrt(g) (Henderson 1966, Open Channel Flow, ch. 6).
TEST(Weir, BroadCrestedCoefficientAndFormula) {
  EXPECT_NEAR(kBroadCrestedTheoreticalCoefficientSi, std::pow(2.0 / 3.0, 1.5) * std::sqrt(kG),
              1e-4);
  const RectangularWeir w{.crest_stage_m = 103.2, .length_m = 6.0, .coefficient_si = 1.70};
  EXPECT_NEAR(w.discharge_m3s(103.7), 1.70 * 6.0 * std::pow(0.5, 1.5), 1e-12);
  EXPECT_EQ(w.discharge_m3s(103.2), 0.0);
  EXPECT_EQ(w.discharge_m3s(100.0), 0.0);
}

// Reference: triangular sharp-crested weir Q = (8/15) C_d sqrt(2g) tan(theta/2) H^2.5
// (Chow 1959, Open-Channel Hydraulics; Bos 1989). With C_d = 0.58 and 90 degrees the
// familiar SI constant is about 1.37-1.38 (from memory).
TEST(Weir, VNotchFormula) {
  const VNotchWeir v{.vertex_stage_m = 10.0, .notch_angle_deg = 90.0, .discharge_coefficient = 0.58};
  const double h = 0.3;
  EXPECT_NEAR(v.discharge_m3s(10.0 + h), 8.0 / 15.0 * 0.58 * std::sqrt(2.0 * kG) * std::pow(h, 2.5),
              1e-12);
  EXPECT_NEAR(v.discharge_m3s(11.0) , 1.37, 0.01);
}

// Reference: large rectangular orifice Q = (2/3) C_d b sqrt(2g) (H1^1.5 - H2^1.5) and its
// partly-full limit, the sharp-crested weir (2/3) C_d b sqrt(2g) H^1.5 (Chow 1959; any
// hydraulics text). Expanding for large head gives Q / (C_d A sqrt(2g H)) = 1 - (a/H)^2/24
// + O((a/H)^4), a = half the opening height, H = head over the centre (derived here).
TEST(Orifice, RectangularWeirBelowCrownLargeOrificeAbove) {
  const Orifice o{.invert_stage_m = 100.0, .shape = OrificeShape::rectangular,
                  .width_m = 0.8, .height_m = 0.4, .discharge_coefficient = 0.61};
  const double k = 0.61 * std::sqrt(2.0 * kG);
  EXPECT_NEAR(o.discharge_m3s(100.25), 2.0 / 3.0 * k * 0.8 * std::pow(0.25, 1.5), 1e-12);
  EXPECT_NEAR(o.discharge_m3s(101.0),
              2.0 / 3.0 * k * 0.8 * (std::pow(1.0, 1.5) - std::pow(0.6, 1.5)), 1e-12);
  const double head = 2.0;  // over the centre: a / H = 0.1
  const double small = 0.61 * o.area_m2() * std::sqrt(2.0 * kG * head);
  EXPECT_NEAR(o.discharge_m3s(100.2 + head) / small, 1.0 - 0.01 / 24.0, 2e-6);
}

// Reference (derived here from the same integral): for a circular opening of radius r
// under head H over its centre, Q / (C_d A sqrt(2g H)) = 1 - (r/H)^2/32 + O((r/H)^4).
TEST(Orifice, CircularTendsToSmallOrificeFormula) {
  const Orifice o{.invert_stage_m = 50.0, .shape = OrificeShape::circular, .diameter_m = 0.3};
  for (double head : {1.5, 3.0}) {
    const double eps = 0.15 / head;
    const double small = o.discharge_coefficient * o.area_m2() * std::sqrt(2.0 * kG * head);
    EXPECT_NEAR(o.discharge_m3s(50.15 + head) / small, 1.0 - eps * eps / 32.0, 1e-6) << head;
  }
}

// Cross-check of the Gauss rule against an independent midpoint rule on the defining
// integral Q = C_d sqrt(2g) * int w(z) sqrt(h - z) dz, partly full and just submerged,
// and continuity / monotonicity through the crown.
TEST(Orifice, CircularMatchesDirectQuadratureAndIsMonotone) {
  const Orifice o{.invert_stage_m = 0.0, .shape = OrificeShape::circular, .diameter_m = 1.0};
  auto direct = [&](double h) {
    const int n = 400000;
    double sum = 0.0;
    const double top = std::min(h, 1.0);
    for (int i = 0; i < n; ++i) {
      const double z = (i + 0.5) * top / n;
      sum += 2.0 * std::sqrt(z * (1.0 - z)) * std::sqrt(h - z) * top / n;
    }
    return o.discharge_coefficient * std::sqrt(2.0 * kG) * sum;
  };
  for (double h : {0.2, 0.5, 0.99, 1.0, 1.05, 2.0})
    EXPECT_NEAR(o.discharge_m3s(h), direct(h), 2e-5 * direct(h)) << h;
  double previous = 0.0;
  for (double h = 0.0; h < 3.0; h += 0.002) {
    const double q = o.discharge_m3s(h);
    EXPECT_GE(q, previous) << h;
    EXPECT_LT(q - previous, 0.02) << h;  // no jump at the crown (h = 1)
    previous = q;
  }
}

TEST(Riser, SumsItsOutletsAndReportsAllProblems) {
  const Orifice low{.invert_stage_m = 100.0, .shape = OrificeShape::circular, .diameter_m = 0.3};
  const RectangularWeir top{.crest_stage_m = 102.0, .length_m = 4.0};
  const Riser riser({low, top}, "basin 'north-lea' riser");
  EXPECT_NEAR(riser.discharge_m3s(102.3), low.discharge_m3s(102.3) + top.discharge_m3s(102.3),
              1e-12);
  try {
    Riser bad({Orifice{.diameter_m = -1.0}, RectangularWeir{.length_m = 0.0}}, "riser 'r'");
    FAIL();
  } catch (const InputError& e) {
    const std::string m = e.what();
    EXPECT_NE(m.find("outlet 1 diameter_m"), std::string::npos) << m;
    EXPECT_NE(m.find("outlet 2 length_m"), std::string::npos) << m;
  }
}

// Reference: for a road crest z = z0 + |x|/m (a symmetric sag), the overtopping integral
// C_r * int (h - z)^1.5 dx = C_r * 0.8 m H^2.5 (closed form, derived here); for a level
// crest of length L it is C_r L H^1.5 (FHWA HDS-5 2012 roadway overtopping weir).
TEST(RoadOvertopping, SagProfileAndLevelCrest) {
  const double m = 200.0;  // 1 m rise over 200 m each side
  const RoadOvertopping sag({-400.0, 0.0, 400.0}, {102.0, 100.0, 102.0}, 1.70, "road 'A'");
  for (double head : {0.1, 0.5, 1.5})
    EXPECT_NEAR(sag.discharge_m3s(100.0 + head), 1.70 * 0.8 * m * std::pow(head, 2.5),
                1e-10 * (1.0 + m)) << head;
  EXPECT_NEAR(sag.overtopped_length_m(100.5), 2.0 * m * 0.5, 1e-9);
  const RoadOvertopping level({0.0, 30.0, 90.0}, {100.0, 100.0, 100.0}, 1.70, "road 'B'");
  EXPECT_NEAR(level.discharge_m3s(100.4), 1.70 * 90.0 * std::pow(0.4, 1.5), 1e-10);
  EXPECT_EQ(level.discharge_m3s(99.0), 0.0);
  EXPECT_THROW(RoadOvertopping({0.0, 0.0}, {1.0, 1.0}, 1.7, "road"), InputError);
}

// Reference: Villemonte (1947) Q_s/Q = (1 - (H2/H1)^n)^0.385.
TEST(RoadOvertopping, VillemonteSubmergence) {
  EXPECT_EQ(villemonte_factor(1.0, 0.0, 1.5), 1.0);
  EXPECT_NEAR(villemonte_factor(1.0, 0.5, 1.5), std::pow(1.0 - std::pow(0.5, 1.5), 0.385), 1e-15);
  const RoadOvertopping free({0.0, 50.0}, {100.0, 100.0}, 1.70, "road");
  const RoadOvertopping drowned({0.0, 50.0}, {100.0, 100.0}, 1.70, "road", 100.3);
  EXPECT_NEAR(drowned.discharge_m3s(100.6) / free.discharge_m3s(100.6),
              villemonte_factor(0.6, 0.3, 1.5), 1e-12);
}

}  // namespace
}  // namespace freshet::network::structures
