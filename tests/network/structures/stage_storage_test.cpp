#include "freshet/network/structures/stage_storage.hpp"

#include <cmath>
#include <string>
#include <vector>
#include <gtest/gtest.h>

#include "freshet/core/error.hpp"

namespace freshet::network::structures {
namespace {

// Reference: geometry of a prismatic basin, S = integral of A(h) dh with
// A = A0 + a (h - h0): S = A0 x + a x^2 / 2 (closed form, any calculus text).
TEST(StageStorage, PrismaticMatchesClosedFormAndInverts) {
  const double a0 = 1200.0, growth = 350.0, h0 = 101.5;
  const auto basin = StageStorage::prismatic(h0, a0, growth, "basin 'north-lea'");
  for (double x : {0.0, 0.01, 0.5, 1.7, 4.0}) {
    const double s = a0 * x + 0.5 * growth * x * x;
    EXPECT_NEAR(basin.storage_m3(h0 + x), s, 1e-12 * (1.0 + s));
    EXPECT_NEAR(basin.surface_area_m2(h0 + x), a0 + growth * x, 1e-12 * a0);
    EXPECT_NEAR(basin.stage_m(s), h0 + x, 1e-12 * h0);
  }
  EXPECT_EQ(basin.storage_m3(h0 - 1.0), 0.0);  // never negative below the bottom
}

// Reference: Fritsch and Carlson (1980), SIAM J. Numer. Anal. 17(2), 238-246: with
// Fritsch-Butland slopes the Hermite interpolant of monotone data is monotone and passes
// through the data. The table has a flat stretch (a berm) which must stay flat.
TEST(StageStorage, MonotoneCubicTableIsMonotoneAndInterpolates) {
  const std::vector<double> h{10.0, 10.5, 11.0, 11.2, 12.0, 13.0};
  const std::vector<double> s{0.0, 50.0, 400.0, 400.0, 2000.0, 6000.0};
  const auto table = StageStorage::from_table(h, s, StorageInterpolation::monotone_cubic, "pond");
  for (std::size_t k = 0; k < h.size(); ++k) EXPECT_NEAR(table.storage_m3(h[k]), s[k], 1e-9);
  double previous = -1.0;
  for (double stage = 9.9; stage < 13.5; stage += 0.001) {
    const double v = table.storage_m3(stage);
    EXPECT_GE(v, previous - 1e-9) << stage;
    EXPECT_GE(table.surface_area_m2(stage), -1e-9) << stage;
    previous = v;
  }
  EXPECT_NEAR(table.storage_m3(11.1), 400.0, 1e-9);  // flat stretch stays flat
  EXPECT_NEAR(table.stage_m(400.0), 11.0, 1e-12);    // lowest stage holding it
  for (double v : {1.0, 49.0, 123.0, 999.0, 5000.0, 8000.0})
    EXPECT_NEAR(table.storage_m3(table.stage_m(v)), v, 1e-9 * v) << v;
}

// Reference: linear interpolation reproduces linear data exactly.
TEST(StageStorage, LinearTableReproducesVerticalWalls) {
  const auto table = StageStorage::from_table({0.0, 1.0, 3.0}, {0.0, 500.0, 1500.0},
                                              StorageInterpolation::linear, "tank");
  EXPECT_NEAR(table.storage_m3(2.2), 1100.0, 1e-9);
  EXPECT_NEAR(table.storage_m3(4.0), 2000.0, 1e-9);  // continues with the last area
  EXPECT_NEAR(table.stage_m(1750.0), 3.5, 1e-12);
}

TEST(StageStorage, ReportsEveryTableProblemAtOnce) {
  try {
    (void)StageStorage::from_table({1.0, 0.5, NAN}, {5.0, 4.0, 6.0},
                                   StorageInterpolation::linear, "basin 'x'");
    FAIL() << "expected InputError";
  } catch (const InputError& e) {
    const std::string m = e.what();
    EXPECT_NE(m.find("stages must strictly increase"), std::string::npos) << m;
    EXPECT_NE(m.find("storage must not decrease"), std::string::npos) << m;
    EXPECT_NE(m.find("stage_m[3]"), std::string::npos) << m;
    EXPECT_NE(m.find("must be 0 (the empty basin)"), std::string::npos) << m;
    EXPECT_NE(m.find("basin 'x'"), std::string::npos) << m;
    EXPECT_GE(e.problems().size(), 4u);
  }
  EXPECT_THROW((void)StageStorage::prismatic(0.0, 0.0, 0.0, "b"), InputError);
  EXPECT_THROW((void)StageStorage::prismatic(0.0, -1.0, 0.0, "b"), InputError);
}

// Robustness (no source needed): finite samples whose table would not be. Stages -1e308 and
// 1e308 differ by more than a double holds; storages 0 and 1e308 a micrometre apart give an
// infinite surface area. Both were once accepted and their lookups returned inf or NaN.
TEST(StageStorage, RefusesTablesWhoseLookupsAreNotFinite) {
  const auto what = [](std::vector<double> h, std::vector<double> v, StorageInterpolation i) {
    try {
      (void)StageStorage::from_table(std::move(h), std::move(v), i, "basin 'mere'");
    } catch (const InputError& e) {
      return std::string(e.what());
    }
    return std::string("accepted");
  };
  for (auto interp : {StorageInterpolation::linear, StorageInterpolation::monotone_cubic}) {
    EXPECT_NE(what({-1e308, 1e308}, {0.0, 1.0}, interp)
                  .find("basin 'mere', field 'stage_m[1]' = -1e+308: the table gives storage"),
              std::string::npos);
    EXPECT_NE(what({0.0, 1e-6}, {0.0, 1e308}, interp).find("field 'stage_m[1]' = 0: the table"),
              std::string::npos);
    // The same shapes within range are accepted.
    EXPECT_EQ(what({-1e3, 1e3}, {0.0, 1.0}, interp), "accepted");
    EXPECT_EQ(what({0.0, 1e-6}, {0.0, 1e3}, interp), "accepted");
  }
}

}  // namespace
}  // namespace freshet::network::structures
