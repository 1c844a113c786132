#include "freshet/network/driver.hpp"

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "freshet/network/simple_elements.hpp"

namespace freshet::network {
namespace {

class RecordingSink final : public RecordSink {
 public:
  void record(double time_s, std::span<const StationSample> samples) override {
    times_s.push_back(time_s);
    rows.emplace_back(samples.begin(), samples.end());
  }
  std::vector<double> times_s;
  std::vector<std::vector<StationSample>> rows;
};

Model two_inflows_to_a_confluence() {
  Model m;
  // Triangular hydrographs: volume = base * peak / 2 exactly (plane geometry).
  m.links = {{"west", ElementKind::inflow, "meet", {}},
             {"east", ElementKind::inflow, "meet", {}},
             {"meet", ElementKind::junction, "out", {}},
             {"out", ElementKind::outlet, "", {}}};
  m.elements.push_back(std::make_unique<InflowHydrograph>(
      "west", PiecewiseLinearSeries({0.0, 1000.0, 3000.0}, {0.0, 6.0, 0.0})));
  m.elements.push_back(std::make_unique<InflowHydrograph>(
      "east", PiecewiseLinearSeries({0.0, 500.0, 1500.0}, {0.0, 2.0, 0.0})));
  m.elements.push_back(std::make_unique<PassThrough>("meet", ElementKind::junction));
  m.elements.push_back(std::make_unique<PassThrough>("out", ElementKind::outlet));
  m.finalize();
  return m;
}

TEST(Simulate, ConfluenceAddsHydrographsAndKeepsVolumeExact) {
  Model m = two_inflows_to_a_confluence();
  RecordingSink sink;
  ClockOptions clock{0.0, 3600.0, 300.0, 70.0};  // 70 s does not divide 300 s: 5 x 60 s used
  EXPECT_DOUBLE_EQ(clock.coupling_step_s(), 60.0);
  const RunSummary r = simulate(m, clock, sink);

  ASSERT_EQ(sink.times_s.size(), 13u);
  EXPECT_DOUBLE_EQ(sink.times_s.back(), 3600.0);
  EXPECT_EQ(r.coupling_steps, 60);
  // At t = 900 s: west 5.4, east 1.2 (linear interpolation of the triangles).
  EXPECT_NEAR(sink.rows[3][3].discharge_m3s, 5.4 + 1.2, 1e-12);
  const VolumeLedger outlet = r.balances[3].ledger;
  EXPECT_NEAR(outlet.outflow_m3, 0.5 * 3000.0 * 6.0 + 0.5 * 1500.0 * 2.0, 1e-9);
  EXPECT_LT(r.worst_relative_imbalance, 1e-14);
}

TEST(ClockOptions, RejectsIntervalsThatDoNotFitTheRun) {
  ClockOptions clock{0.0, 1000.0, 300.0, 60.0};
  try {
    clock.validate();
    FAIL();
  } catch (const InputError& e) {
    EXPECT_THAT(e.what(), ::testing::HasSubstr("field 'output_interval' = 300 s: must divide the run "
                                               "length (1000 s) into whole steps"));
  }
  ClockOptions backwards{100.0, 0.0, -5.0, 60.0};
  try {
    backwards.validate();
    FAIL();
  } catch (const InputError& e) {
    EXPECT_EQ(e.problems().size(), 2u);
  }
}

}  // namespace
}  // namespace freshet::network
