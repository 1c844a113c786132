// Backwater from a pond into the reach that feeds it, as a level pool over the drowned length
// (network/backwater.hpp), against volumes worked by hand from the reach's geometry.
//
// The hand volumes: a channel of section area A(y) on bed slope S0 under a horizontal water
// surface standing Y0 above the outlet invert holds, with x upstream from the outlet,
//   V = integral_0^Ld A(Y0 - S0 x) dx = (G(Y0) - G(Y1)) / S0,  G(Y) = integral_0^Y A(y) dy,
// Ld = min(L, Y0 / S0), Y1 = max(0, Y0 - S0 L) (substitute y = Y0 - S0 x). With the areas of
// Chow 1959, Open-Channel Hydraulics, table 2-1:
//   rectangle, width b:                 A = b y,            G = b Y^2 / 2;
//   trapezoid, width b, sides z1, z2:   A = b y + z y^2, z = (z1 + z2) / 2,  G = b Y^2/2 + z Y^3/3.
#include "freshet/network/backwater.hpp"

#include <cmath>

#include <gtest/gtest.h>

#include "freshet/geometry/section_flux.hpp"
#include "freshet/network/driver.hpp"
#include "freshet/network/elements.hpp"
#include "freshet/network/simple_elements.hpp"
#include "freshet/routing/make_reach.hpp"

namespace freshet::network {
namespace {

constexpr double kInvert = 100.0;  // outlet invert of the reach, m
constexpr double kSlope = 0.002;

double rectangle_wedge_m3(double b, double y0, double length_m) {
  const double y1 = std::max(0.0, y0 - kSlope * length_m);
  return b * (y0 * y0 - y1 * y1) / (2.0 * kSlope);
}

double trapezoid_wedge_m3(double b, double z, double y0, double length_m) {
  const auto g = [&](double y) { return b * y * y / 2.0 + z * y * y * y / 3.0; };
  return (g(y0) - g(std::max(0.0, y0 - kSlope * length_m))) / kSlope;
}

TEST(ReachWedge, RectangleAndTrapezoidAgainstTheClosedForm) {
  const auto rect = geometry::make_section(geometry::RectangularSpec{.bottom_width_m = 4.0,
                                                                     .manning_n = 0.03});
  const ReachWedge r(rect, kInvert, kSlope, 1000.0);
  EXPECT_EQ(r.volume_m3(kInvert - 0.1), 0.0);
  // 1.2 m at the outlet drowns 600 m of the 1000 m: V = 4 x 1.2^2 / (2 x 0.002) = 1440 m3.
  EXPECT_NEAR(r.volume_m3(kInvert + 1.2), 1440.0, 1e-9);
  EXPECT_NEAR(r.volume_m3(kInvert + 1.2), rectangle_wedge_m3(4.0, 1.2, 1000.0), 1e-9);
  // 3.5 m drowns the whole reach (a prism on a wedge): 4 (3.5^2 - 1.5^2) / 0.004 = 10000 m3.
  EXPECT_NEAR(r.volume_m3(kInvert + 3.5), 10000.0, 1e-8);

  const auto trap = geometry::make_section(geometry::TrapezoidalSpec{
      .bottom_width_m = 3.0, .left_side_slope = 1.5, .right_side_slope = 2.5, .manning_n = 0.035});
  const ReachWedge t(trap, kInvert, kSlope, 1000.0);
  for (double y0 : {0.4, 1.2, 2.0, 3.5}) {
    const double hand = trapezoid_wedge_m3(3.0, 2.0, y0, 1000.0);
    EXPECT_NEAR(t.volume_m3(kInvert + y0), hand, 1e-12 * hand) << "Y0 = " << y0;
  }
  // 1.2 m: (1.5 x 1.44 + 2 x 1.728 / 3) / 0.002 = 1656 m3.
  EXPECT_NEAR(t.volume_m3(kInvert + 1.2), 1656.0, 1e-9);
}

// inflow -> reach (rectangular, 4 m wide, S0 = 0.002, 3000 m, invert 100 m at the outlet) ->
// detention pond (2000 m2 with vertical sides from 100 m, a 3 m weir at `crest_m`) -> outlet.
Model pond_below_a_reach(PiecewiseLinearSeries inflow, double crest_m, routing::SchemeKind scheme) {
  Model m;
  m.links = {{"up", ElementKind::inflow, "brook", {}},
             {"brook", ElementKind::reach, "pond", {}},
             {"pond", ElementKind::detention, "out", {}},
             {"out", ElementKind::outlet, "", {}}};
  m.elements.push_back(std::make_unique<InflowHydrograph>("up", std::move(inflow)));
  geometry::FlowSection section = geometry::make_flow_section(
      geometry::RectangularSpec{.bottom_width_m = 4.0, .manning_n = 0.03}, kSlope);
  routing::RoutingOptions options;
  options.scheme = scheme;
  auto reach = routing::make_reach({"brook", 3000.0, 150}, section, options);
  m.elements.push_back(
      std::make_unique<ReachElement>("brook", std::move(section), std::move(reach), kInvert));
  std::vector<structures::Outlet> outlets{structures::RectangularWeir{crest_m, 3.0}};
  m.elements.push_back(std::make_unique<PoolElement>(
      "pond", std::make_unique<structures::Riser>(std::move(outlets), "pond"),
      structures::StageStorage::prismatic(kInvert, 2000.0, 0.0, "pond"),
      structures::LevelPoolOptions{}, crest_m));
  m.elements.push_back(std::make_unique<PassThrough>("out", ElementKind::outlet));
  m.finalize();
  EXPECT_TRUE(represent_backwater(m).empty());
  return m;
}

class Rows final : public RecordSink {
 public:
  void record(double t, std::span<const StationSample> s) override {
    times_s.push_back(t);
    rows.emplace_back(s.begin(), s.end());
  }
  std::vector<double> times_s;
  std::vector<std::vector<StationSample>> rows;
};

// A pond held at 101.2 m (weir crest, nothing flowing) over a dry reach: 600 m of the reach
// lie below the level, so the pond holds its own 2000 m2 x 1.2 m plus the wedge of 1440 m3
// worked above, the 30 cells whose centres lie within 600 m of the outlet are drowned, and the
// reach's station reports the pond's level.
TEST(Backwater, PondHeldAtAFixedLevelHoldsTheReachsWedge) {
  const double level = kInvert + 1.2;
  Model m = pond_below_a_reach(PiecewiseLinearSeries::constant(0.0), level,
                               routing::SchemeKind::kExplicitUpwind);
  Rows sink;
  simulate(m, {0.0, 3600.0, 600.0, 60.0}, sink);
  const auto& pond = static_cast<const PoolElement&>(*m.elements[2]);
  const auto& brook = static_cast<const ReachElement&>(*m.elements[1]);
  EXPECT_NEAR(pond.stage_m(), level, 1e-12);
  EXPECT_NEAR(pond.storage_m3(), 2000.0 * 1.2 + 1440.0, 1e-9);
  EXPECT_EQ(brook.drowned_cells(), 30);
  for (const auto& row : sink.rows) {
    EXPECT_NEAR(row[1].stage_m, level, 1e-12);
    EXPECT_NEAR(row[1].depth_m, 1.2, 1e-12);
  }
  const std::vector<CellSample> cells = brook.cell_samples();
  // The last cell's centre lies 10 m above the outlet: 1.2 - 0.002 x 10 m of water.
  EXPECT_NEAR(cells.back().depth_m, 1.2 - kSlope * 10.0, 1e-12);
  EXPECT_EQ(cells[119].depth_m, 0.0);  // 610 m above the outlet: above the level, dry
}

// A storm through the reach into a pond that starts full to its crest (500 m drowned) and
// rises: the drowned length grows and shrinks again, and every cubic metre is accounted for.
// The inflow is a triangle, 32400 m3 (base x peak / 2); the pond's storage is checked against
// the hand relation 2000 (h - 100) + wedge(h) at the end.
void storm_balance(routing::SchemeKind scheme) {
  const double crest = kInvert + 1.0;
  Model m = pond_below_a_reach(PiecewiseLinearSeries({0.0, 1800.0, 5400.0}, {0.0, 12.0, 0.0}),
                               crest, scheme);
  Rows sink;
  const RunSummary r = simulate(m, {0.0, 6.0 * 3600.0, 600.0, 60.0}, sink);
  const auto& pond = static_cast<const PoolElement&>(*m.elements[2]);
  const auto& brook = static_cast<const ReachElement&>(*m.elements[1]);
  const BackwaterFacts facts = brook.report().reach().backwater;
  EXPECT_TRUE(facts.represented);
  EXPECT_GT(facts.most_drowned_cells, 25);             // 500 m at the start: 25 cells
  EXPECT_LT(brook.drowned_cells(), facts.most_drowned_cells);  // and cells emerged again

  const double h = pond.stage_m();
  const double pond_by_hand = 2000.0 * (h - kInvert) + rectangle_wedge_m3(4.0, h - kInvert, 3000.0);
  EXPECT_NEAR(pond.storage_m3(), pond_by_hand, 1e-9 * pond_by_hand);

  const double inflow_m3 = 0.5 * 5400.0 * 12.0;
  const double initial_m3 = 2000.0 * 1.0 + rectangle_wedge_m3(4.0, 1.0, 3000.0);  // 3000 m3
  const double out_m3 = r.balances[3].ledger.outflow_m3;
  const double held_m3 = pond.storage_m3() + brook.ledger().storage_m3;
  EXPECT_NEAR(inflow_m3 + initial_m3 - out_m3 - held_m3, 0.0, 1e-11 * inflow_m3);
  EXPECT_LT(r.worst_relative_imbalance, 1e-13);
  EXPECT_LT(r.network_relative_imbalance, 1e-13);
  // Stations within the drowned length report the pond's level; the drowned length is set
  // at each step's start, so the pond can rise above a free outlet for one step at most.
  int at_pond_level = 0;
  for (const auto& row : sink.rows) {
    if (std::abs(row[1].stage_m - row[2].stage_m) < 1e-12) ++at_pond_level;
    EXPECT_GT(row[1].stage_m, row[2].stage_m - 0.02);
  }
  EXPECT_GT(at_pond_level, 20);
}

TEST(Backwater, StormVolumeBalanceToRoundOffKinematic) {
  storm_balance(routing::SchemeKind::kExplicitUpwind);
}
TEST(Backwater, StormVolumeBalanceToRoundOffMuskingumCunge) {
  storm_balance(routing::SchemeKind::kMuskingumCunge);
}

}  // namespace
}  // namespace freshet::network
