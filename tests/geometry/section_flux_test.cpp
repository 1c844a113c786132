#include "freshet/geometry/section_flux.hpp"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>
#include <string>

#include "freshet/verification/problems.hpp"
#include "test_sections.hpp"

namespace freshet::geometry {
namespace {

using testing::log_spaced;

constexpr double kSlope = 0.002;

bool near_a_corner(const CrossSection& s, double h) {
  for (double c : s.breakpoint_depths_m()) {
    if (std::abs(h - c) < 1e-4 * c) return true;
  }
  return false;
}

// Largest |c - dQ/dA| over the sweep, dQ/dA by a centred difference with step 1e-6 A, scaled by
// the mean velocity Q/A (c is of the order of V; it is 0 on a conduit's capacity plateau).
template <FluxLaw Law>
double worst_celerity_error(const Law& law, const CrossSection& s) {
  double worst = 0.0;
  for (double h : log_spaced(1e-5 * s.depth_scale_m(), testing::sweep_top_depth_m(s), 400)) {
    if (near_a_corner(s, h)) continue;  // dQ/dA is one-sided there
    const double a = s.area_m2(h), da = 1e-6 * a;
    const double fd = (law.discharge_m3s(a + da) - law.discharge_m3s(a - da)) / (2.0 * da);
    const double v = law.discharge_m3s(a) / a;
    worst = std::max(worst, std::abs(law.celerity_m_s(a) - fd) / v);
  }
  return worst;
}

struct RelativeErrors {
  double discharge = 0.0, celerity = 0.0;
};

// Largest differences of Q (relative) and c (relative to the mean velocity Q/A, because c
// falls to 0 at a conduit's capacity) between two laws over the areas of the given depths.
template <FluxLaw A, FluxLaw B>
RelativeErrors compare(const A& law, const B& reference, const CrossSection& s,
                       const std::vector<double>& depths) {
  RelativeErrors e;
  for (double h : depths) {
    const double a = s.area_m2(h);
    const double q = reference.discharge_m3s(a), c = reference.celerity_m_s(a);
    e.discharge = std::max(e.discharge, std::abs(law.discharge_m3s(a) - q) / q);
    e.celerity = std::max(e.celerity, std::abs(law.celerity_m_s(a) - c) / (q / a));
  }
  return e;
}

// ---- Celerity is dQ/dA --------------------------------------------------------------------

TEST(SectionFlux, CelerityIsTheDerivativeOfDischargeForEveryShape) {
  // c = dQ/dA, the kinematic wave speed (Lighthill & Whitham 1955, Proc. R. Soc. A 229,
  // 281-316, eq. 8), checked against a centred finite difference of Q at 400 areas.
  for (const SectionSpec& spec : testing::all_specs()) {
    const FlowSection f = make_flow_section(spec, kSlope);
    const std::string name{to_string(f.section->shape())};
    const double fast = visit_flux(f.flux, [&](const auto& law) {
      return worst_celerity_error(law, *f.section);
    });
    const double exact = worst_celerity_error(ManningFlux(f.section, kSlope), *f.section);
    std::printf("%-11s worst |c - dQ/dA| / V: fast law %.1e, exact law %.1e\n", name.c_str(),
                fast, exact);
    EXPECT_LT(fast, 1e-7) << name;
    EXPECT_LT(exact, 1e-7) << name;
  }
}

TEST(SectionFlux, ClosedFormsAgreeWithTheExactLawThroughTheSection) {
  for (const SectionSpec& spec : {SectionSpec{testing::rectangle_spec()},
                                  SectionSpec{testing::trapezoid_spec()},
                                  SectionSpec{testing::triangle_spec()},
                                  SectionSpec{testing::sheet_spec()}}) {
    const FlowSection f = make_flow_section(spec, kSlope);
    const ManningFlux exact(f.section, kSlope);
    const auto e = visit_flux(f.flux, [&](const auto& law) {
      return compare(law, exact, *f.section, log_spaced(1e-6, 50.0, 300));
    });
    EXPECT_LT(e.discharge, 1e-13) << to_string(f.section->shape());
    EXPECT_LT(e.celerity, 1e-13) << to_string(f.section->shape());
  }
}

TEST(RectangularFlux, MatchesManningsFormulaInClosedForm) {
  // Q = (1/n) A (A / (b + 2 A / b))^(2/3) S^(1/2) (Chow 1959, eq. 5-6 with Table 2-1).
  const RectangularFlux law(4.0, 0.03, kSlope);
  for (double a : {0.001, 0.4, 3.0, 17.0, 250.0}) {
    const double p = 4.0 + 2.0 * a / 4.0;
    EXPECT_NEAR(law.discharge_m3s(a),
                a * std::pow(a / p, 2.0 / 3.0) * std::sqrt(kSlope) / 0.03,
                1e-14 * law.discharge_m3s(a));
  }
  EXPECT_EQ(law.discharge_m3s(0.0), 0.0);
  EXPECT_EQ(law.celerity_m_s(0.0), 0.0);
}

TEST(RectangularFlux, WideChannelCelerityIsFiveThirdsOfVelocity) {
  // For a wide channel R ~ h, Q ~ A^(5/3) and c = (5/3) V (Lighthill & Whitham 1955, sec. 2);
  // for a finite width c/V = 5/3 - (4/3) h / P, so the gap shrinks in proportion to h / b.
  const double h = 0.1;
  auto gap = [h](double b) {
    const RectangularFlux law(b, 0.03, kSlope);
    const double a = b * h;
    return 5.0 / 3.0 - law.celerity_m_s(a) / (law.discharge_m3s(a) / a);
  };
  EXPECT_NEAR(gap(1000.0), (4.0 / 3.0) * h / (1000.0 + 2 * h), 1e-12);
  EXPECT_LT(gap(1000.0), 2e-4);
  EXPECT_NEAR(gap(10000.0) / gap(1000.0), 0.1, 1e-4);
}

TEST(PowerLawSections, TriangleAndSheetHaveExactCelerityRatios) {
  // Triangle: R ~ sqrt(A) so Q ~ A^(4/3) and c = (4/3) V; sheet: Q ~ h^(5/3), c = (5/3) V
  // (both analytic, from Manning's law with Chow 1959 Table 2-1 geometry).
  const FlowSection tri = make_flow_section(testing::triangle_spec(), kSlope);
  const FlowSection sheet = make_flow_section(testing::sheet_spec(), kSlope);
  const ManningFlux tri_exact(tri.section, kSlope);
  for (double a : {1e-4, 0.3, 8.0, 120.0}) {
    EXPECT_NEAR(celerity_m_s(tri.flux, a), (4.0 / 3.0) * tri.velocity_m_s(a),
                1e-13 * tri.velocity_m_s(a));
    EXPECT_NEAR(tri_exact.celerity_m_s(a), (4.0 / 3.0) * tri_exact.discharge_m3s(a) / a,
                1e-12 * tri.velocity_m_s(a));
    EXPECT_NEAR(celerity_m_s(sheet.flux, a), (5.0 / 3.0) * sheet.velocity_m_s(a),
                1e-13 * sheet.velocity_m_s(a));
  }
}

// ---- Normal depth and inverses ------------------------------------------------------------

TEST(NormalDepth, ReproducesChowsTrapezoidalExample) {
  // Chow (1959), Open-Channel Hydraulics, Example 6.2 (from memory; the set-up and the
  // published 3.36 ft are in freshet/verification/problems.hpp, shared with `freshet verify`).
  const verification::ChowTrapezoidExample ex;
  const double ft = units::kMetresPerFoot;
  const double q = ex.discharge_m3s();
  const auto y = normal_depth_m(*ex.section(), ex.bed_slope, q);
  ASSERT_TRUE(y.has_value());
  EXPECT_NEAR(*y / ft, ex.normal_depth_ft, 0.005);
  // The closed-form law inverts to the same area.
  TrapezoidalSpec si = ex.spec_ft;
  si.bottom_width_m *= ft;
  const FlowSection f = make_flow_section(si, ex.bed_slope);
  EXPECT_NEAR(f.depth_m(area_for_discharge_m2(f.flux, q)), *y, 1e-12);
}

TEST(NormalDepth, InvertsUniformFlowForEveryShape) {
  for (const SectionSpec& spec : testing::all_specs()) {
    const auto s = make_section(spec);
    const double top = std::min(testing::sweep_top_depth_m(*s), 0.999 * s->capacity_depth_m());
    for (double h : log_spaced(1e-4 * s->depth_scale_m(), top, 40)) {
      const auto y = normal_depth_m(*s, kSlope, s->normal_discharge_m3s(h, kSlope));
      ASSERT_TRUE(y.has_value()) << to_string(s->shape());
      EXPECT_NEAR(*y, h, 1e-10 * h) << to_string(s->shape());
    }
  }
}

TEST(NormalDepth, HasNoSolutionAboveAConduitsCapacity) {
  const CircularSection pipe(testing::circle_spec());
  const double q_max = pipe.normal_discharge_m3s(pipe.capacity_depth_m(), kSlope);
  EXPECT_FALSE(normal_depth_m(pipe, kSlope, 1.001 * q_max).has_value());
  // Between the full-pipe discharge and the peak, the depth on the rising branch is returned.
  const double q_full = pipe.normal_discharge_m3s(1.2, kSlope);
  const auto y = normal_depth_m(pipe, kSlope, q_full);
  ASSERT_TRUE(y.has_value());
  EXPECT_LT(*y, pipe.capacity_depth_m());
  EXPECT_NEAR(pipe.normal_discharge_m3s(*y, kSlope), q_full, 1e-12 * q_full);
}

TEST(SectionFlux, AreaForDischargeInvertsEveryLaw) {
  for (const SectionSpec& spec : testing::all_specs()) {
    const FlowSection f = make_flow_section(spec, kSlope);
    const double top = std::min(testing::sweep_top_depth_m(*f.section),
                                0.999 * f.section->capacity_depth_m());
    for (double h : log_spaced(1e-5 * f.section->depth_scale_m(), top, 100)) {
      const double a = f.section->area_m2(h);
      const double back = area_for_discharge_m2(f.flux, discharge_m3s(f.flux, a));
      EXPECT_NEAR(back, a, 1e-10 * a) << to_string(f.section->shape()) << " h = " << h;
    }
    EXPECT_EQ(area_for_discharge_m2(f.flux, 0.0), 0.0);
  }
}

// ---- Tables -------------------------------------------------------------------------------

TEST(TabulatedFlux, SurveyedTrapezoidMatchesTheClosedForm) {
  // Table error against the exact answer: the survey traces trapezoid_spec() (Chow 1959,
  // Table 2-1), so the tabulated law of the survey must reproduce TrapezoidalFlux.
  const IrregularSection survey(testing::surveyed_trapezoid_spec());
  const TrapezoidalSection exact_section(testing::trapezoid_spec());
  const TabulatedFlux table = TabulatedFlux::from_section(survey, kSlope);
  const TrapezoidalFlux exact(3.0, 1.5, 2.5, 0.035, kSlope);
  // From the shallowest node (1e-6 of the 12 m table top) to just below the top of the
  // survey, where the survey's vertical end walls begin and the shapes part.
  const auto e = compare(table, exact, exact_section, log_spaced(1.2e-5, 3.9999, 2000));
  std::printf("surveyed trapezoid, %zu nodes: max relative error Q %.2e, c %.2e\n",
              table.node_count(), e.discharge, e.celerity);
  // The table is refined to 1e-8 (Q) and 1e-6 (c / V) at interval midpoints (TableOptions).
  EXPECT_LT(e.discharge, 3e-8);
  EXPECT_LT(e.celerity, 1e-5);
}

TEST(TabulatedFlux, NaturalChannelTableMatchesTheExactLaw) {
  const auto s = make_section(testing::natural_spec());
  const TabulatedFlux table = TabulatedFlux::from_section(*s, kSlope);
  const ManningFlux exact(s, kSlope);
  const auto e = compare(table, exact, *s, log_spaced(1e-5, 3 * s->depth_scale_m(), 1500));
  std::printf("natural channel, %zu nodes: max relative error Q %.2e, c %.2e\n",
              table.node_count(), e.discharge, e.celerity);
  EXPECT_LT(e.discharge, 3e-8);
  EXPECT_LT(e.celerity, 1e-5);
  EXPECT_EQ(table.monotone_corrections(), 0);
}

TEST(TabulatedFlux, FlatBenchInsideOneSubsectionIsMadeMonotone) {
  // A flat 19.5 m bench 1 m above a narrow channel, all in one subsection: as the bench floods,
  // P jumps and K = A R^(2/3)/n drops (the case the divided-channel method avoids, Chow 1959,
  // sec. 6-8). The table replaces the drop by its running maximum; with bank stations at the
  // bench edge the conveyance rises throughout and nothing is corrected.
  IrregularSpec spec;
  spec.points = {{0, 3}, {0.5, 1}, {20, 1}, {21, 0}, {22, 0}, {23, 1}, {23.5, 3}};
  spec.left_bank_station_m = 0.0;
  spec.right_bank_station_m = 23.5;
  spec.left_overbank_n = spec.main_channel_n = spec.right_overbank_n = 0.03;
  const auto one = make_section(spec);
  EXPECT_LT(one->conveyance_m3s(1.01), one->conveyance_m3s(1.0));  // the drop is real
  const TabulatedFlux table = TabulatedFlux::from_section(*one, kSlope);
  EXPECT_GT(table.monotone_corrections(), 0);
  double previous = 0.0;
  for (double a : log_spaced(1e-6, 200.0, 5000)) {
    EXPECT_GE(table.discharge_m3s(a), previous);
    EXPECT_GE(table.celerity_m_s(a), 0.0);
    previous = table.discharge_m3s(a);
  }
  spec.left_bank_station_m = 20.0;
  spec.right_bank_station_m = 23.0;
  const auto divided = make_section(spec);
  EXPECT_EQ(TabulatedFlux::from_section(*divided, kSlope).monotone_corrections(), 0);
}

TEST(TableOptions, DefaultsAreValidAndTheToleranceGovernsTheError) {
  ProblemList problems;
  TableOptions{}.validate(problems);
  EXPECT_TRUE(problems.empty());
  // A looser tolerance gives a smaller table whose error grows accordingly (still bounded by
  // a few times the tolerance); the exact reference is the surveyed trapezoid's closed form.
  const IrregularSection survey(testing::surveyed_trapezoid_spec());
  const TrapezoidalSection exact_section(testing::trapezoid_spec());
  const TrapezoidalFlux exact(3.0, 1.5, 2.5, 0.035, kSlope);
  const TableOptions coarse{.nodes_per_decade = 4, .discharge_tolerance = 1e-5,
                            .celerity_tolerance = 1e-3};
  const TabulatedFlux fine_table = TabulatedFlux::from_section(survey, kSlope);
  const TabulatedFlux coarse_table = TabulatedFlux::from_section(survey, kSlope, coarse);
  const auto depths = log_spaced(1.2e-5, 3.9999, 2000);
  const auto e_fine = compare(fine_table, exact, exact_section, depths);
  const auto e_coarse = compare(coarse_table, exact, exact_section, depths);
  EXPECT_LT(coarse_table.node_count(), fine_table.node_count());
  EXPECT_GT(e_coarse.discharge, e_fine.discharge);
  EXPECT_LT(e_coarse.discharge, 3e-5);
  EXPECT_LT(e_coarse.celerity, 1e-2);
}

// ---- Closed conduits ----------------------------------------------------------------------

TEST(CircularFlux, IsCappedAtItsPeakAndStaysMonotone) {
  const FlowSection f = make_flow_section(testing::circle_spec(), kSlope);
  const auto& pipe = static_cast<const CircularSection&>(*f.section);
  const double a_cap = pipe.area_m2(pipe.capacity_depth_m());
  const double q_cap = pipe.normal_discharge_m3s(pipe.capacity_depth_m(), kSlope);
  EXPECT_NEAR(capacity_area_m2(f.flux), a_cap, 1e-12 * a_cap);
  EXPECT_NEAR(max_discharge_m3s(f.flux), q_cap, 1e-12 * q_cap);
  // Q/Q_full at the cap: 1.076 (Chow 1959 / ASCE MOP 37, from memory; see
  // cross_section_test.cpp).
  EXPECT_NEAR(q_cap / pipe.normal_discharge_m3s(1.2, kSlope), 1.076, 0.0005);
  double previous = 0.0;
  for (double a : log_spaced(1e-8, 2.0 * pipe.full_area_m2(), 4000)) {
    const double q = discharge_m3s(f.flux, a);
    EXPECT_GE(q, previous);
    EXPECT_GE(celerity_m_s(f.flux, a), 0.0);
    previous = q;
  }
  const double beyond = 0.5 * (a_cap + pipe.full_area_m2());
  EXPECT_EQ(discharge_m3s(f.flux, beyond), max_discharge_m3s(f.flux));
  EXPECT_EQ(celerity_m_s(f.flux, beyond), 0.0);
  EXPECT_EQ(area_for_discharge_m2(f.flux, 2.0 * q_cap), capacity_area_m2(f.flux));
  // The exact law applies the same cap.
  const ManningFlux exact(f.section, kSlope);
  EXPECT_NEAR(exact.max_discharge_m3s(), q_cap, 1e-14 * q_cap);
  EXPECT_EQ(exact.discharge_m3s(beyond), exact.max_discharge_m3s());
  EXPECT_EQ(exact.celerity_m_s(beyond), 0.0);
}

TEST(CircularFlux, FlagsCapacityAndSurcharge) {
  const FlowSection f = make_flow_section(testing::circle_spec(), kSlope);
  const double a_full = static_cast<const CircularSection&>(*f.section).full_area_m2();
  const double a_cap = capacity_area_m2(f.flux);
  EXPECT_FALSE(f.at_capacity(0.99 * a_cap));
  EXPECT_TRUE(f.at_capacity(a_cap));
  EXPECT_FALSE(f.is_full(a_cap));
  EXPECT_TRUE(f.is_full(a_full));
  const FlowSection open = make_flow_section(testing::trapezoid_spec(), kSlope);
  EXPECT_FALSE(open.at_capacity(1e9));
  EXPECT_FALSE(open.is_full(1e9));
  EXPECT_EQ(max_discharge_m3s(open.flux), kNoDischargeLimit_m3s);
}

TEST(CircularFlux, TableMatchesTheExactLawBelowTheCap) {
  const auto s = make_section(testing::circle_spec());
  const TabulatedFlux table = TabulatedFlux::from_section(*s, kSlope);
  const ManningFlux exact(s, kSlope);
  const auto e = compare(table, exact, *s, log_spaced(1e-6, 0.9999 * s->capacity_depth_m(), 1500));
  std::printf("circular, %zu nodes: max relative error Q %.2e, c %.2e\n", table.node_count(),
              e.discharge, e.celerity);
  EXPECT_LT(e.discharge, 3e-8);
  EXPECT_LT(e.celerity, 1e-5);
}

// ---- Dispatch, factories and bad input ----------------------------------------------------

TEST(MakeSectionFlux, ChoosesTheClosedFormOrTheTable) {
  const auto kind = [](const SectionSpec& spec) {
    return make_flow_section(spec, kSlope).flux.index();
  };
  EXPECT_EQ(kind(testing::rectangle_spec()), 0u);  // RectangularFlux
  EXPECT_EQ(kind(testing::trapezoid_spec()), 1u);  // TrapezoidalFlux
  EXPECT_EQ(kind(testing::triangle_spec()), 2u);   // PowerLawFlux
  EXPECT_EQ(kind(testing::sheet_spec()), 2u);      // PowerLawFlux
  EXPECT_EQ(kind(testing::circle_spec()), 3u);     // TabulatedFlux
  EXPECT_EQ(kind(testing::natural_spec()), 3u);    // TabulatedFlux
  const FlowSection f = make_flow_section(testing::natural_spec(), kSlope);
  const double q = visit_flux(f.flux, [](const auto& law) { return law.discharge_m3s(12.0); });
  EXPECT_EQ(q, discharge_m3s(f.flux, 12.0));
}

TEST(FlowSection, ReportsDepthWidthAndVelocity) {
  // The invented channel of cross_section_test.cpp (Manning closed form, Chow 1959 eq. 5-6):
  // b = 5 m, n = 0.02, S0 = 0.001, A = 6.25 m2 -> y = 1.25 m, V = 1.400175606 m/s.
  const FlowSection f = make_flow_section(RectangularSpec{5.0, 0.02}, 0.001);
  EXPECT_NEAR(f.depth_m(6.25), 1.25, 1e-14);
  EXPECT_NEAR(f.top_width_m(6.25), 5.0, 1e-14);
  EXPECT_NEAR(f.velocity_m_s(6.25), 1.400175606, 1e-9);
  EXPECT_EQ(f.velocity_m_s(0.0), 0.0);
}

std::vector<std::string> flow_section_messages(const SectionSpec& spec, double slope,
                                               TableOptions options = {}) {
  try {
    (void)make_flow_section(spec, slope, options, "reach 'mill-race'");
  } catch (const InputError& e) {
    std::vector<std::string> out;
    for (const auto& p : e.problems()) out.push_back(p.to_string());
    return out;
  }
  return {};
}

TEST(MakeFlowSection, CollectsSectionSlopeAndTableProblemsTogether) {
  EXPECT_EQ(flow_section_messages(CircularSpec{0.0, 0.013}, 0.0),
            (std::vector<std::string>{"reach 'mill-race', field 'diameter_m' = 0: must be > 0",
                                      "reach 'mill-race', field 'bed_slope' = 0: must be > 0"}));
  EXPECT_EQ(flow_section_messages(testing::rectangle_spec(), -0.001),
            (std::vector<std::string>{
                "reach 'mill-race', field 'bed_slope' = -0.001: must be > 0"}));
  EXPECT_EQ(flow_section_messages(testing::rectangle_spec(),
                                  std::numeric_limits<double>::quiet_NaN()),
            (std::vector<std::string>{
                "reach 'mill-race', field 'bed_slope' = nan: must be a finite number"}));
  EXPECT_EQ(flow_section_messages(testing::natural_spec(), kSlope,
                                  TableOptions{.top_depth_m = -1.0, .nodes_per_decade = 2}),
            (std::vector<std::string>{
                "reach 'mill-race', field 'top_depth_m' = -1: must be >= 0",
                "reach 'mill-race', field 'nodes_per_decade' = 2: must be in [4, 10000]"}));
  EXPECT_TRUE(flow_section_messages(testing::natural_spec(), kSlope).empty());
}

TEST(ManningFlux, RejectsABadSlope) {
  const auto s = make_section(testing::trapezoid_spec());
  try {
    ManningFlux law(s, 0.0, "reach 'mill-race'");
    FAIL() << "expected InputError";
  } catch (const InputError& e) {
    EXPECT_STREQ(e.what(), "reach 'mill-race', field 'bed_slope' = 0: must be > 0");
  }
}

// Robustness (no source needed). A surveyed section that the spec checks accept (finite
// stations and elevations, positive n) can still give a table of infinities or NaN: an
// elevation of -1.75e308 makes every area infinite, a width of 2e307 m the conveyance. Such tables once led evaluate() to read outside the table; the builder now
// refuses them, naming the element and the section.
TEST(TabulatedFlux, RefusesSectionsWhoseTableIsNotFinite) {
  const auto what = [](const IrregularSpec& spec) {
    try {
      (void)make_flow_section(spec, kSlope, {}, "reach 'fell'");
    } catch (const InputError& e) {
      return std::string(e.what());
    }
    return std::string("accepted");
  };
  IrregularSpec deep;
  deep.points = {{0, 3}, {1, -1.75e308}, {2, 3}};
  deep.left_bank_station_m = 0.0;
  deep.right_bank_station_m = 2.0;
  deep.left_overbank_n = deep.main_channel_n = deep.right_overbank_n = 0.03;
  EXPECT_NE(what(deep).find("reach 'fell', field 'section' "), std::string::npos) << what(deep);
  // 2e307 m wide: areas near the top are finite, their conveyance A R^(2/3) / n is not.
  IrregularSpec plain = deep;
  plain.points = {{0, 3}, {1e307, 0}, {2e307, 3}};
  plain.right_bank_station_m = 2e307;
  EXPECT_NE(what(plain).find("reach 'fell', field 'section' gives a discharge table whose "
                             "area or discharge is zero or not finite"),
            std::string::npos)
      << what(plain);
  EXPECT_EQ(what(testing::surveyed_trapezoid_spec()), "accepted");
}

// NaN and infinite areas never index outside a table: NaN in gives 0 (dry) or NaN, an infinite
// area in a conduit gives its capacity.
TEST(TabulatedFlux, NanAndInfiniteAreasStayInsideTheTable) {
  const TabulatedFlux pipe = TabulatedFlux::from_section(CircularSection(CircularSpec{1.2, 0.013}), kSlope);
  const double inf = std::numeric_limits<double>::infinity();
  EXPECT_EQ(pipe.discharge_m3s(std::nan("")), 0.0);
  EXPECT_EQ(pipe.area_for_discharge_m2(std::nan("")), 0.0);
  EXPECT_DOUBLE_EQ(pipe.discharge_m3s(inf), pipe.max_discharge_m3s());
  EXPECT_EQ(pipe.celerity_m_s(inf), 0.0);
  const TabulatedFlux survey =
      TabulatedFlux::from_section(IrregularSection(testing::surveyed_trapezoid_spec()), kSlope);
  EXPECT_TRUE(std::isfinite(survey.discharge_m3s(1e-300)));
  EXPECT_TRUE(std::isfinite(survey.celerity_m_s(1e-300)));
  for (double q : {1e-300, 1e300}) EXPECT_TRUE(std::isfinite(survey.area_for_discharge_m2(q))) << q;
}

// ---- Inversions that do not converge (error tiers: a NumericalError, never a NaN) --------
// Robustness, no source needed. Each inversion below once returned NaN without a word for
// these inputs (a depth or area of NaN passed on to stage and velocity output); each now
// throws NumericalError naming the element, the quantity sought and the value it was sought
// for (freshet/core/converged_root.hpp), which the command line turns into exit 3.

// The message of the NumericalError `fn` throws, or a note that it threw none.
template <class Fn>
std::string numerical_error_of(Fn&& fn) {
  try {
    (void)fn();
  } catch (const NumericalError& e) {
    return e.what();
  }
  return "no NumericalError";
}

TEST(FailedInversion, CircularDepthForAnAreaThatIsNotANumber) {
  const CircularSection pipe(testing::circle_spec(), "pipe 'p9'");
  EXPECT_EQ(numerical_error_of([&] { return pipe.depth_from_area_m(std::nan("")); }),
            "pipe 'p9': depth for area (m) did not converge for flow area nan m2 "
            "(0 iterations, last estimate nan)");
  EXPECT_NEAR(pipe.depth_from_area_m(pipe.area_m2(0.3)), 0.3, 1e-12);  // the ordinary path
}

TEST(FailedInversion, IrregularDepthForAnInfiniteOrNanArea) {
  const IrregularSection survey(testing::natural_spec(), "reach 'alder'");
  const double inf = std::numeric_limits<double>::infinity();
  EXPECT_EQ(numerical_error_of([&] { return survey.depth_from_area_m(inf); }),
            "reach 'alder': depth for area (m) did not converge for flow area inf m2 "
            "(0 iterations, last estimate nan)");
  EXPECT_EQ(numerical_error_of([&] { return survey.depth_from_area_m(std::nan("")); }),
            "reach 'alder': depth for area (m) did not converge for flow area nan m2 "
            "(0 iterations, last estimate nan)");
  // Through the flow section the reach reports depths with (as station output does).
  const FlowSection flow = make_flow_section(testing::natural_spec(), kSlope, {}, "reach 'alder'");
  EXPECT_EQ(numerical_error_of([&] { return flow.depth_m(inf); }),
            "reach 'alder': depth for area (m) did not converge for flow area inf m2 "
            "(0 iterations, last estimate nan)");
}

TEST(FailedInversion, ClosedFormLawsAreaForAnInfiniteDischarge) {
  const double inf = std::numeric_limits<double>::infinity();
  const FlowSection rectangle =
      make_flow_section(testing::rectangle_spec(), kSlope, {}, "reach 'upper'");
  EXPECT_EQ(numerical_error_of([&] { return area_for_discharge_m2(rectangle.flux, inf); }),
            "reach 'upper': area for discharge (m2) did not converge for discharge inf m3/s "
            "(0 iterations, last estimate nan)");
  const TrapezoidalFlux trapezoid(3.0, 1.5, 2.5, 0.035, kSlope, "reach 'lower'");
  EXPECT_EQ(numerical_error_of([&] { return trapezoid.area_for_discharge_m2(inf); }),
            "reach 'lower': area for discharge (m2) did not converge for discharge inf m3/s "
            "(0 iterations, last estimate nan)");
  // A finite discharge, however large, still inverts.
  EXPECT_TRUE(std::isfinite(trapezoid.area_for_discharge_m2(1e300)));
}

// A nearly dry section is no failure: a depth of 1e-160 m in a 1.2 m pipe lies far below the
// bracket [0, D], more halvings away than the solver's iteration limit, so the inversion
// tightens the bracket and solves again (root_finding.hpp, tighten_bracket_below). Before,
// such depths came back wrong without a word (1e-96 m for an area of 4.8e-243 m2); the round
// trip h -> A -> h must hold to 1e-12 relative. The same for a surveyed section (its area
// ~ h^2 near the thalweg leaves the normal double range below h ~ 1e-150) and for the area of
// a tiny discharge (the rectangle's Q(A) underflows below A ~ 1e-154).
TEST(FailedInversion, NearlyDrySectionsStillInvert) {
  const CircularSection pipe(testing::circle_spec(), "pipe 'p9'");
  const IrregularSection survey(testing::natural_spec(), "reach 'alder'");
  for (double h : {1e-20, 1e-100, 1e-160, 1e-200}) {
    EXPECT_NEAR(pipe.depth_from_area_m(pipe.area_m2(h)) / h, 1.0, 1e-12) << h;
  }
  for (double h : {1e-20, 1e-100, 1e-140}) {
    EXPECT_NEAR(survey.depth_from_area_m(survey.area_m2(h)) / h, 1.0, 1e-12) << h;
  }
  const RectangularFlux rectangle(4.0, 0.03, kSlope, "reach 'upper'");
  for (double q : {1e-100, 1e-200, 1e-250}) {
    EXPECT_NEAR(rectangle.discharge_m3s(rectangle.area_for_discharge_m2(q)) / q, 1.0, 1e-12) << q;
  }
}

// Normal depth of a tiny discharge: the depth (about 1e-120 m for 1e-200 m3/s) lies more
// halvings below the bracket than the solver's limit. normal_depth_m once answered nullopt
// ("above capacity"), so the exact law gave an infinite area for it; it now tightens the
// bracket and solves again, and a bracketed root that still does not converge is a
// NumericalError. Manning at the returned depth must give back the discharge.
TEST(FailedInversion, NormalDepthOfATinyDischarge) {
  const auto s = make_section(testing::trapezoid_spec(), "reach 'lower'");
  for (double q : {1e-100, 1e-200}) {
    const auto y = normal_depth_m(*s, kSlope, q, "reach 'lower'");
    ASSERT_TRUE(y.has_value()) << q;
    EXPECT_NEAR(s->conveyance_m3s(*y) * std::sqrt(kSlope) / q, 1.0, 1e-12) << q;
  }
  const ManningFlux exact(s, kSlope, "reach 'lower'");
  const double a = exact.area_for_discharge_m2(1e-200);
  EXPECT_NEAR(exact.discharge_m3s(a) / 1e-200, 1.0, 1e-12);
}

}  // namespace
}  // namespace freshet::geometry
