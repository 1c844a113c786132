// Breaking and shocks in the run's report, driven in memory: inflow -> reach -> outlet run by
// network::simulate into a RunRecorder, then report_run. No file is read or written.
//
// Sources of the checks (each named again beside its check):
//  - Manning's formula, Q = (1/n) A R^(2/3) S0^(1/2) (SI): Chow (1959), Open-Channel
//    Hydraulics, eq. 5-6; the kinematic celerity c = dQ/dA (Lighthill & Whitham 1955, On
//    kinematic waves I, Proc. R. Soc. A 229).
//  - Breaking of a wave launched by an inflow hydrograph: the characteristic launched at tau
//    travels x = c (t - tau); neighbours first cross at x = c^2 / (dc/dtau),
//    t = tau + c / (dc/dtau), earliest over the inflow (Whitham 1974, Linear and Nonlinear
//    Waves, sec. 2.1-2.2).
#include <gtest/gtest.h>

#include <cmath>
#include <limits>
#include <memory>
#include <string>
#include <vector>

#include "freshet/geometry/section_flux.hpp"
#include "freshet/network/elements.hpp"
#include "freshet/network/simple_elements.hpp"
#include "freshet/reporting/run_recorder.hpp"
#include "freshet/reporting/run_report.hpp"
#include "freshet/routing/make_reach.hpp"

namespace freshet::reporting {
namespace {

using network::ElementKind;

constexpr double kWidth_m = 50.0, kManningN = 0.035, kSlope = 0.001;

// Manning's formula for the rectangle (Chow 1959, eq. 5-6), its inverse by bisection and
// c = dQ/dA by a central difference (relative step 1e-6): the test's own closed form.
double manning_q(double a) {
  const double p = kWidth_m + 2.0 * a / kWidth_m;
  return std::sqrt(kSlope) / kManningN * a * std::pow(a / p, 2.0 / 3.0);
}
double manning_area(double q) {
  double lo = 0.0, hi = 1e5;
  for (int k = 0; k < 200; ++k) {
    const double mid = 0.5 * (lo + hi);
    (manning_q(mid) < q ? lo : hi) = mid;
  }
  return 0.5 * (lo + hi);
}
double celerity_of_q(double q) {
  const double a = manning_area(q), h = 1e-6 * a;
  return (manning_q(a + h) - manning_q(a - h)) / (2.0 * h);
}

// Whitham (1974), sec. 2.1-2.2: the first crossing over launch times on [a, b].
struct Crossing {
  double time_s = std::numeric_limits<double>::infinity();
  double chainage_m = 0.0;
};
Crossing first_crossing(const PiecewiseLinearSeries& inflow, double a, double b, double step_s) {
  Crossing best;
  for (double tau = a; tau <= b; tau += step_s) {
    const double h = 1e-2;
    const double c = celerity_of_q(inflow.value_at(tau));
    const double dc = (celerity_of_q(inflow.value_at(tau + h)) -
                       celerity_of_q(inflow.value_at(tau - h))) / (2.0 * h);
    if (!(dc > 0.0)) continue;
    if (tau + c / dc < best.time_s) best = {tau + c / dc, c * c / dc};
  }
  return best;
}

struct Network {
  network::Model model;
  std::vector<StationDescription> stations;
};

Network inflow_reach_outlet(const PiecewiseLinearSeries& inflow, double length_m, int cells,
                            routing::SchemeKind scheme) {
  Network n;
  n.model.links = {{"in", ElementKind::inflow, "ch", {}},
                   {"ch", ElementKind::reach, "out", {}},
                   {"out", ElementKind::outlet, "", {}}};
  n.model.elements.push_back(std::make_unique<network::InflowHydrograph>("in", inflow));
  geometry::FlowSection flow =
      geometry::make_flow_section(geometry::RectangularSpec{kWidth_m, kManningN}, kSlope);
  routing::RoutingOptions options;
  options.scheme = scheme;
  auto reach = routing::make_reach({"ch", length_m, cells}, flow.flux, options);
  n.model.elements.push_back(
      std::make_unique<network::ReachElement>("ch", std::move(flow), std::move(reach), 100.0));
  n.model.elements.push_back(std::make_unique<network::PassThrough>("out", ElementKind::outlet));
  n.model.finalize();
  n.stations = {{"in", ElementKind::inflow, "inflow", "ch", false},
                {"ch", ElementKind::reach, "channel", "out", true},
                {"out", ElementKind::outlet, "outlet", "", false}};
  return n;
}

RunReport run(Network& n, double end_s) {
  const network::ClockOptions clock{0.0, end_s, 600.0, 60.0};
  RunRecorder recorder(n.model, n.stations);
  const network::RunSummary numerics = network::simulate(n.model, clock, recorder);
  return report_run(n.model, numerics, recorder, {"in memory", "freshet test", clock, "2000-01-01T00:00:00Z"});
}

const BreakingRecord* breaking_of(const RunReport& r, const std::string& element) {
  for (const BreakingRecord& b : r.summary.breaking) {
    if (b.element == element) return &b;
  }
  return nullptr;
}

bool warned(const RunReport& r, const std::string& element, const std::string& text) {
  for (const auto& w : r.summary.warnings) {
    if (w.element == element && w.message.find(text) != std::string::npos) return true;
  }
  return false;
}

// The P1 rise (20 -> 500 m3/s over 3 h) on the 50 m Manning channel, handed to the reach in
// 60 s coupling steps: the report's breaking time and chainage within 1 % of Whitham's
// closed form (1.24 km, 19.3 min; the first crossing is at the start of the rise, where c is
// concave in tau).
const PiecewiseLinearSeries kRise({0.0, 10800.0, 21600.0}, {20.0, 500.0, 20.0});

TEST(BreakingReport, ReportedBreakingOfALinearRiseMatchesTheClosedForm) {
  const Crossing exact = first_crossing(kRise, 1e-2, 10799.0, 1.0);  // Whitham (1974)
  Network n = inflow_reach_outlet(kRise, 5000.0, 100, routing::SchemeKind::kMusclHeun);
  const RunReport r = run(n, 7200.0);
  const BreakingRecord* b = breaking_of(r, "ch");
  ASSERT_NE(b, nullptr);
  EXPECT_TRUE(b->breaks) << b->message;
  EXPECT_NEAR(b->time_s, exact.time_s, 0.01 * exact.time_s);
  EXPECT_NEAR(b->chainage_m, exact.chainage_m, 0.01 * exact.chainage_m);
  EXPECT_EQ(b->length_m, 5000.0);
  EXPECT_NE(b->message.find("the wave breaks at t = "), std::string::npos) << b->message;
}

// The same rise on a reach shorter than the breaking chainage: the report says plainly that
// the wave does not break within it (Whitham 1974: no crossing before x_b).
TEST(BreakingReport, AReachShorterThanTheBreakingChainageSaysTheWaveDoesNotBreak) {
  const Crossing exact = first_crossing(kRise, 1e-2, 10799.0, 1.0);
  Network n = inflow_reach_outlet(kRise, 0.8 * exact.chainage_m, 20,
                                  routing::SchemeKind::kExplicitUpwind);
  const RunReport r = run(n, 7200.0);
  const BreakingRecord* b = breaking_of(r, "ch");
  ASSERT_NE(b, nullptr);
  EXPECT_FALSE(b->breaks);
  EXPECT_TRUE(std::isnan(b->time_s));
  EXPECT_NE(b->message.find("does not break within the reach"), std::string::npos) << b->message;
  EXPECT_TRUE(r.summary.shocks.empty());
}

// A reach ending 50 m below the breaking chainage, in 40 m cells: the shock forms within the
// four cells over which MUSCL-Heun smears a front, so this grid cannot show it before it
// leaves, and the report says so instead of staying silent.
TEST(BreakingReport, ABreakingTooNearTheOutletForTheGridIsPointedOut) {
  const Crossing exact = first_crossing(kRise, 1e-2, 10799.0, 1.0);
  const double length = std::round(exact.chainage_m + 50.0);
  Network n = inflow_reach_outlet(kRise, length, static_cast<int>(length / 40.0),
                                  routing::SchemeKind::kMusclHeun);
  const RunReport r = run(n, 7200.0);
  const BreakingRecord* b = breaking_of(r, "ch");
  ASSERT_NE(b, nullptr);
  ASSERT_TRUE(b->breaks);
  EXPECT_TRUE(warned(r, "ch", "this grid cannot resolve the shock before it leaves"));
}

}  // namespace
}  // namespace freshet::reporting
