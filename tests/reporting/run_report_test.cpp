// The run's summaries and warnings, driven in memory: a network built in the test is run by
// network::simulate into a RunRecorder (the recording sink), and report_run reads what it
// found. No file is read or written.
//
// Sources of the checks (each named again beside its check):
//  - Manning's formula, Q = (1/n) A R^(2/3) S0^(1/2) (SI): Chow (1959), Open-Channel
//    Hydraulics, eq. 5-6. A kinematic reach at its outlet is at normal depth for its discharge.
//  - Kinematic-wave applicability: Ponce, Li & Simons (1978), Applicability of kinematic and
//    diffusion models, J. Hydraul. Div. ASCE 104(HY3); in the time-of-rise form of Ponce
//    (1989), Engineering Hydrology: Principles and Practices: the kinematic wave applies when
//    t_r S0 u0 / d0 >= 85, a diffusion wave when t_r S0 (g/d0)^(1/2) >= 15.
//  - A part-full circular conduit under Manning's law carries most at y/D = 0.938, 1.076
//    times its full discharge Q_full = (1/n) (pi D^2/4) (D/4)^(2/3) S0^(1/2) (Chow 1959,
//    hydraulic elements of a circular section; ASCE/WPCF 1969, MOP 37; from memory, and
//    reproduced by the geometry module's own check).
//  - Volume and centroid of a triangular hydrograph: area base x height / 2 and centroid at
//    (t0 + tp + tb) / 3 (plane geometry, centroid of a triangle).
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <memory>
#include <numbers>
#include <optional>
#include <string>
#include <vector>

#include "freshet/geometry/section_flux.hpp"
#include "freshet/network/elements.hpp"
#include "freshet/network/simple_elements.hpp"
#include "freshet/network/structures/outlets.hpp"
#include "freshet/network/structures/stage_storage.hpp"
#include "freshet/reporting/run_recorder.hpp"
#include "freshet/reporting/run_report.hpp"
#include "freshet/routing/make_reach.hpp"

namespace freshet::reporting {
namespace {

using network::ElementKind;

constexpr double kGravity_m_s2 = 9.80665;

// inflow -> reach -> outlet, the reach 1 km long in 40 cells.
struct Network {
  network::Model model;
  std::vector<StationDescription> stations;
};

Network inflow_reach_outlet(PiecewiseLinearSeries inflow_m3s, const geometry::SectionSpec& section,
                            double slope, double length_m = 1000.0) {
  Network n;
  n.model.links = {{"in", ElementKind::inflow, "ch", {}},
                   {"ch", ElementKind::reach, "out", {}},
                   {"out", ElementKind::outlet, "", {}}};
  n.model.elements.push_back(
      std::make_unique<network::InflowHydrograph>("in", std::move(inflow_m3s)));
  geometry::FlowSection flow = geometry::make_flow_section(section, slope);
  auto reach = routing::make_reach({"ch", length_m, 40}, flow.flux);
  n.model.elements.push_back(
      std::make_unique<network::ReachElement>("ch", std::move(flow), std::move(reach), 100.0));
  n.model.elements.push_back(std::make_unique<network::PassThrough>("out", ElementKind::outlet));
  n.model.finalize();
  n.stations = {{"in", ElementKind::inflow, "inflow", "ch", false},
                {"ch", ElementKind::reach, "channel", "out", true},
                {"out", ElementKind::outlet, "outlet", "", false}};
  return n;
}

// Runs the network in memory and reports it.
RunReport run(Network& n, const network::ClockOptions& clock, RunRecorder** kept = nullptr) {
  static std::unique_ptr<RunRecorder> recorder;  // kept for the caller's further questions
  recorder = std::make_unique<RunRecorder>(n.model, n.stations);
  const network::RunSummary numerics = network::simulate(n.model, clock, *recorder);
  if (kept) *kept = recorder.get();
  return report_run(n.model, numerics, *recorder, {"in memory", "freshet test", clock, "2000-01-01T00:00:00Z"});
}

std::vector<std::string> warnings_of(const RunReport& r, const std::string& element) {
  std::vector<std::string> out;
  for (const auto& w : r.summary.warnings) {
    if (w.element == element) out.push_back(w.message);
  }
  return out;
}

bool any_contains(const std::vector<std::string>& lines, const std::string& text) {
  return std::any_of(lines.begin(), lines.end(),
                     [&](const std::string& l) { return l.find(text) != std::string::npos; });
}

// Normal depth of a rectangular channel by bisection on Manning's formula (Chow 1959,
// eq. 5-6): Q = (1/n) b d (b d / (b + 2 d))^(2/3) S0^(1/2).
double rectangular_normal_depth_m(double q_m3s, double b_m, double n, double slope) {
  const auto manning = [&](double d) {
    return std::sqrt(slope) / n * b_m * d * std::pow(b_m * d / (b_m + 2.0 * d), 2.0 / 3.0);
  };
  double lo = 0.0, hi = 100.0;
  for (int k = 0; k < 200; ++k) {
    const double mid = 0.5 * (lo + hi);
    (manning(mid) < q_m3s ? lo : hi) = mid;
  }
  return 0.5 * (lo + hi);
}

// A triangular hydrograph through a junction keeps its volume and centroid (plane geometry:
// volume = base x peak / 2, centroid at (0 + tp + tb) / 3); the junction's total inflow is
// the triangle itself, and a junction, storing nothing, has no attenuation row.
TEST(RunReport, StationSummariesOfATriangleMatchItsGeometry) {
  Network n;
  n.model.links = {{"in", ElementKind::inflow, "meet", {}},
                   {"meet", ElementKind::junction, "out", {}},
                   {"out", ElementKind::outlet, "", {}}};
  n.model.elements.push_back(std::make_unique<network::InflowHydrograph>(
      "in", PiecewiseLinearSeries({0.0, 1800.0, 5400.0}, {0.0, 6.0, 0.0})));
  n.model.elements.push_back(std::make_unique<network::PassThrough>("meet", ElementKind::junction));
  n.model.elements.push_back(std::make_unique<network::PassThrough>("out", ElementKind::outlet));
  n.model.finalize();
  n.stations = {{"in", ElementKind::inflow, "in", "meet", false},
                {"meet", ElementKind::junction, "meet", "out", false},
                {"out", ElementKind::outlet, "out", "", false}};
  RunRecorder* recorder = nullptr;
  const RunReport r = run(n, {0.0, 7200.0, 300.0, 60.0}, &recorder);
  ASSERT_EQ(r.summary.stations.size(), 3u);
  EXPECT_NEAR(recorder->inflow(1).peak_discharge_m3s(), 6.0, 1e-12);
  EXPECT_EQ(recorder->inflow(1).peak_time_s(), 1800.0);
  const StationSummary& out = r.summary.stations[2];
  EXPECT_NEAR(out.runoff_volume_m3, 0.5 * 5400.0 * 6.0, 1e-9 * 16200.0);
  EXPECT_NEAR(out.peak_discharge_m3s, 6.0, 1e-12);
  EXPECT_EQ(out.peak_time_s, 1800.0);
  EXPECT_NEAR(out.centroid_time_s, (1800.0 + 5400.0) / 3.0, 1e-9 * 5400.0);
  EXPECT_TRUE(r.summary.attenuation.empty());
  EXPECT_TRUE(r.summary.warnings.empty());
  EXPECT_TRUE(r.notes.empty());
  EXPECT_TRUE(r.reach_numerics.empty());
  ASSERT_EQ(r.peaks.size(), 3u);
  EXPECT_EQ(r.peaks[1].kind, ElementKind::junction);
}

// Ponce's numbers at the reach outlet: u0 and d0 are the normal-flow values at the routed
// peak (Manning, Chow 1959 eq. 5-6), t_r is the rise of the outlet hydrograph. A slow rise on
// a steep channel passes the kinematic criterion t_r S0 u0/d0 >= 85 (Ponce 1989) and raises no
// warning; a quick rise on a flat one fails both criteria and is warned about with both
// numbers.
TEST(RunReport, PonceNumbersFollowTheOutletStateAndTheirPublishedThresholds) {
  const geometry::RectangularSpec channel{4.0, 0.035};
  struct Case {
    double slope, rise_s;
    bool kinematic_ok;
  };
  for (const Case& c : {Case{0.01, 5400.0, true}, Case{0.0002, 900.0, false}}) {
    Network n = inflow_reach_outlet(
        PiecewiseLinearSeries({0.0, c.rise_s, 3.0 * c.rise_s}, {0.5, 8.0, 0.5}), channel,
        c.slope);
    RunRecorder* recorder = nullptr;
    const RunReport r = run(n, {0.0, 5.0 * c.rise_s, 300.0, 60.0}, &recorder);
    ASSERT_EQ(r.summary.wave_numbers.size(), 1u);
    const WaveNumberRecord& w = r.summary.wave_numbers.front();
    const double q_peak = r.summary.stations[1].peak_discharge_m3s;
    const double d0 = rectangular_normal_depth_m(q_peak, 4.0, 0.035, c.slope);
    const double u0 = q_peak / (4.0 * d0);
    const double t_r = recorder->rise_duration_s(1);
    EXPECT_NEAR(w.time_of_rise_s, t_r, 1e-9 * t_r);
    // 1e-6: the tabulated flux inverts Q(A) to that order; the bisection is exact to 1e-12.
    EXPECT_NEAR(w.kinematic_number, t_r * c.slope * u0 / d0, 1e-6 * w.kinematic_number);
    EXPECT_NEAR(w.diffusion_number, t_r * c.slope * std::sqrt(kGravity_m_s2 / d0),
                1e-6 * w.diffusion_number);
    EXPECT_EQ(w.kinematic_number >= 85.0, c.kinematic_ok) << "slope " << c.slope;
    const auto warned = warnings_of(r, "ch");
    EXPECT_EQ(any_contains(warned, "< 85 (Ponce, Li & Simons 1978; Ponce 1989)"), !c.kinematic_ok);
    if (!c.kinematic_ok) {
      EXPECT_LT(w.diffusion_number, 15.0);
      EXPECT_TRUE(any_contains(warned, "even a diffusion wave is doubtful"));
    }
  }
}

// A pipe whose inflow stays below 1.076 Q_full never reaches capacity; one held at 1.15 Q_full
// does, and the run warns that surcharge is not represented and reports the volume held above
// the full pipe (part-full maximum at y/D = 0.938, 1.076 Q_full: Chow 1959, from memory).
TEST(RunReport, APipeAboveItsPartFullMaximumIsWarnedAbout) {
  const double d_m = 0.9, n_manning = 0.013, slope = 0.005;
  const double q_full = 1.0 / n_manning * (std::numbers::pi * d_m * d_m / 4.0) *
                        std::pow(d_m / 4.0, 2.0 / 3.0) * std::sqrt(slope);
  for (const double ratio : {1.0, 1.15}) {
    const double q = ratio * q_full;
    Network n = inflow_reach_outlet(
        PiecewiseLinearSeries({0.0, 600.0, 6000.0, 6600.0}, {0.0, q, q, 0.0}),
        geometry::CircularSpec{d_m, n_manning}, slope, 500.0);
    const RunReport r = run(n, {0.0, 10800.0, 300.0, 60.0});
    const auto warned = warnings_of(r, "ch");
    const bool capacity = any_contains(warned, "conduit reached its part-full capacity");
    EXPECT_EQ(capacity, ratio > 1.076) << "ratio " << ratio;
    const bool held = any_contains(warned, "above its full volume of");
    EXPECT_EQ(held, ratio > 1.076) << "ratio " << ratio;
    bool noted = false;
    for (const auto& [id, note] : r.notes) {
      noted = noted || (id == "ch" && note.find("conduit at capacity") != std::string::npos);
    }
    EXPECT_EQ(noted, ratio > 1.076);
    // The outlet never passes more than the part-full maximum (to the table's 1e-6).
    EXPECT_LE(r.summary.stations[1].peak_discharge_m3s, 1.076 * q_full * (1.0 + 1e-3));
  }
}

// A hydrograph still rising when the run ends is pointed out (common practice, no source: a
// peak at the last sample may not be the peak).
TEST(RunReport, ARunEndingOnTheRiseIsPointedOut) {
  Network n = inflow_reach_outlet(PiecewiseLinearSeries({0.0, 7200.0}, {0.5, 6.0}),
                                  geometry::RectangularSpec{4.0, 0.035}, 0.005);
  const RunReport r = run(n, {0.0, 3600.0, 300.0, 60.0});
  EXPECT_TRUE(any_contains(warnings_of(r, "out"), "still at its highest when the run ends"));
  EXPECT_TRUE(any_contains(warnings_of(r, "ch"), "lengthen duration_h"));
}

// A rise shorter than two coupling steps is under-resolved (our criterion, no source: two
// steps are the fewest that show a rise and a peak); with a step of a tenth of the rise it is
// not pointed out.
TEST(RunReport, ACouplingStepLongerThanHalfTheRiseIsPointedOut) {
  for (const double step_s : {600.0, 60.0}) {
    Network n = inflow_reach_outlet(
        PiecewiseLinearSeries({0.0, 600.0, 1200.0, 1800.0}, {0.5, 0.5, 8.0, 0.5}),
        geometry::RectangularSpec{4.0, 0.035}, 0.01, 200.0);
    const RunReport r = run(n, {0.0, 7200.0, 600.0, step_s});
    const bool warned = any_contains(warnings_of(r, "ch"), "less than two coupling steps");
    EXPECT_EQ(warned, step_s == 600.0) << "coupling step " << step_s << " s";
  }
}

// The start of the rising limb (rise_duration_s: from the last sample within 5 % of the rise
// to the peak) from samples handed straight to the recorder. A linear rise q = 1 + t/300 m3/s
// to 21 m3/s: the threshold 1 + 0.05 x 20 = 2 m3/s is crossed at t = 300 s (closed form of
// the line), so the rise lasts 6000 - 300 = 5700 s, with 100 samples on the rise or 2000.
TEST(RunRecorder, RiseStartOfALinearRiseIsWhereItCrossesFivePercent) {
  for (const double step_s : {60.0, 3.0}) {
    Network n = inflow_reach_outlet(PiecewiseLinearSeries::constant(1.0),
                                    geometry::RectangularSpec{4.0, 0.035}, 0.005);
    RunRecorder recorder(n.model, n.stations);
    std::vector<network::StationSample> samples(3);
    const auto steps = static_cast<long>(9000.0 / step_s);
    for (long k = 0; k <= steps; ++k) {
      const double t = static_cast<double>(k) * step_s;
      samples[1].discharge_m3s = t <= 6000.0 ? 1.0 + t / 300.0 : 21.0 - (t - 6000.0) / 300.0;
      recorder.observe(t, samples);
    }
    EXPECT_DOUBLE_EQ(recorder.rise_duration_s(1), 5700.0) << "step " << step_s << " s";
  }
}

// Two waves, the second the higher, with a recession between them that stays above the
// threshold of the final peak: the rise starts on the first wave. Checked against the
// definition applied to the whole series kept in the test, and by hand: q rises from 1 to 10
// over 0-900 s (q = 1 + t/100), falls to 3 at 1500 s, rises to 21 at 3300 s, then falls;
// the threshold 1 + 0.05 x 20 = 2 is last met at t = 100 s.
TEST(RunRecorder, RiseStartLooksBackOverAnEarlierWave) {
  Network n = inflow_reach_outlet(PiecewiseLinearSeries::constant(1.0),
                                  geometry::RectangularSpec{4.0, 0.035}, 0.005);
  RunRecorder recorder(n.model, n.stations);
  const auto q = [](double t) {
    if (t <= 900.0) return 1.0 + t / 100.0;
    if (t <= 1500.0) return 10.0 - (t - 900.0) * 7.0 / 600.0;
    if (t <= 3300.0) return 3.0 + (t - 1500.0) / 100.0;
    return 21.0 - (t - 3300.0) / 300.0;
  };
  std::vector<network::StationSample> samples(3);
  std::vector<double> times, values;
  for (double t = 0.0; t <= 9000.0; t += 20.0) {
    samples[1].discharge_m3s = q(t);
    times.push_back(t);
    values.push_back(q(t));
    recorder.observe(t, samples);
  }
  const auto peak = std::max_element(values.begin(), values.end()) - values.begin();
  const double threshold = values.front() + 0.05 * (values[static_cast<std::size_t>(peak)] - values.front());
  double start_s = times.front();
  for (std::ptrdiff_t k = 0; k <= peak; ++k) {
    if (values[static_cast<std::size_t>(k)] <= threshold) start_s = times[static_cast<std::size_t>(k)];
  }
  EXPECT_DOUBLE_EQ(start_s, 100.0);
  EXPECT_DOUBLE_EQ(recorder.rise_duration_s(1), 3300.0 - start_s);
}

// A reach draining into a pond: inflow -> reach (outlet invert given or not) -> detention
// basin (prismatic, bottom at 99 m, one circular orifice at its floor) -> outlet.
Network reach_into_pond(std::optional<double> reach_invert_m, double orifice_diameter_m) {
  Network n;
  n.model.links = {{"in", ElementKind::inflow, "ch", {}},
                   {"ch", ElementKind::reach, "pond", {}},
                   {"pond", ElementKind::detention, "out", {}},
                   {"out", ElementKind::outlet, "", {}}};
  n.model.elements.push_back(std::make_unique<network::InflowHydrograph>(
      "in", PiecewiseLinearSeries({0.0, 1800.0, 5400.0}, {0.2, 6.0, 0.2})));
  geometry::FlowSection flow =
      geometry::make_flow_section(geometry::RectangularSpec{4.0, 0.035}, 0.002);
  auto reach = routing::make_reach({"ch", 1000.0, 40}, flow.flux);
  n.model.elements.push_back(std::make_unique<network::ReachElement>(
      "ch", std::move(flow), std::move(reach), reach_invert_m));
  network::structures::Orifice orifice;
  orifice.invert_stage_m = 99.0;
  orifice.diameter_m = orifice_diameter_m;
  auto riser = std::make_unique<network::structures::Riser>(
      std::vector<network::structures::Outlet>{orifice}, "detention 'pond'");
  network::structures::LevelPoolOptions options;
  options.max_substep_s = 10.0;
  n.model.elements.push_back(std::make_unique<network::PoolElement>(
      "pond", std::move(riser),
      network::structures::StageStorage::prismatic(99.0, 3000.0, 0.0, "detention 'pond'"),
      options, 99.0));
  n.model.elements.push_back(std::make_unique<network::PassThrough>("out", ElementKind::outlet));
  n.model.finalize();
  n.stations = {{"in", ElementKind::inflow, "inflow", "ch", false},
                {"ch", ElementKind::reach, "channel", "pond", reach_invert_m.has_value()},
                {"pond", ElementKind::detention, "pond", "out", true},
                {"out", ElementKind::outlet, "outlet", "", false}};
  return n;
}

// A pond standing above the water at the outlet of the reach feeding it backs water up the
// reach, which the kinematic wave cannot carry (common practice, no source: hydrostatics). A
// small orifice makes the pond rise metres above the reach's outlet invert: the warning gives
// the largest rise, no more than the pond's peak stage above the reach's outlet invert. A
// large orifice below a high reach keeps the pond lower: no warning. Without an outlet invert
// the check cannot be made, and the run says so.
TEST(RunReport, APondStandingAboveTheReachFeedingItIsPointedOut) {
  {
    Network n = reach_into_pond(100.0, 0.3);
    const RunReport r = run(n, {0.0, 14400.0, 300.0, 60.0});
    const auto warned = warnings_of(r, "ch");
    ASSERT_TRUE(any_contains(warned, "the pond at 'pond' stood up to ")) << r.summary.warnings.size();
    double peak_pond_m = 0.0;
    for (const auto& [id, note] : r.notes) {
      if (id == "pond") peak_pond_m = std::stod(note.substr(note.find("peak stage ") + 11));
    }
    ASSERT_GT(peak_pond_m, 100.5);
    for (const auto& w : warned) {
      const auto at = w.find("stood up to ");
      if (at == std::string::npos) continue;
      const double excess_m = std::stod(w.substr(at + 12));
      EXPECT_GT(excess_m, 0.0);
      EXPECT_LE(excess_m, peak_pond_m - 100.0 + 0.005);  // the reach's water is above its invert
    }
  }
  {
    Network n = reach_into_pond(120.0, 1.5);
    const RunReport r = run(n, {0.0, 14400.0, 300.0, 60.0});
    EXPECT_FALSE(any_contains(warnings_of(r, "ch"), "stood up to"));
  }
  {
    Network n = reach_into_pond(std::nullopt, 0.3);
    const RunReport r = run(n, {0.0, 14400.0, 300.0, 60.0});
    EXPECT_TRUE(any_contains(warnings_of(r, "ch"), "has no outlet_invert, so backwater from "
                                                   "the pond could not be checked"));
  }
}

}  // namespace
}  // namespace freshet::reporting
