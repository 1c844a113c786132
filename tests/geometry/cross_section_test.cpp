#include "freshet/geometry/cross_section.hpp"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <numbers>

#include "freshet/verification/problems.hpp"
#include "test_sections.hpp"

namespace freshet::geometry {
namespace {

using testing::log_spaced;

// ---- Shape formulas (Chow 1959, Open-Channel Hydraulics, Table 2-1) -------------------------

TEST(TrapezoidalSection, MatchesTheTableOfGeometricElements) {
  // Chow (1959) Table 2-1, trapezoid: A = (b + z y) y, P = b + 2 y sqrt(1 + z^2), T = b + 2 z y,
  // here with unequal sides z1 = 1.5, z2 = 2.5 (each side contributes its own term).
  const TrapezoidalSection s(testing::trapezoid_spec());
  const double y = 1.7;
  EXPECT_DOUBLE_EQ(s.area_m2(y), 3.0 * y + 0.5 * (1.5 + 2.5) * y * y);
  EXPECT_DOUBLE_EQ(s.wetted_perimeter_m(y),
                   3.0 + y * std::sqrt(1.0 + 1.5 * 1.5) + y * std::sqrt(1.0 + 2.5 * 2.5));
  EXPECT_DOUBLE_EQ(s.top_width_m(y), 3.0 + 4.0 * y);
  EXPECT_DOUBLE_EQ(s.hydraulic_radius_m(y), s.area_m2(y) / s.wetted_perimeter_m(y));
  EXPECT_NEAR(s.conveyance_m3s(y),
              s.area_m2(y) * std::pow(s.hydraulic_radius_m(y), 2.0 / 3.0) / 0.035, 1e-12);
}

TEST(RectangularSection, UniformFlowMatchesManningOnInventedData) {
  // Closed form on invented data: Chow (1959) Table 2-1 (rectangle A = b y, P = b + 2 y) and
  // eq. 5-6 in SI form V = R^(2/3) S0^(1/2) / n. b = 5 m, n = 0.02, S0 = 0.001, y = 1.25 m:
  // A = 6.25 m2, R = 6.25 / 7.5 = 0.8333333 m, V = 1.400175606 m/s, Q = 8.751097536 m3/s
  // (evaluated separately in double precision and written to 10 digits, hence 1e-9).
  const RectangularSection s({.bottom_width_m = 5.0, .manning_n = 0.02});
  EXPECT_NEAR(s.area_m2(1.25), 6.25, 1e-12);
  EXPECT_NEAR(s.hydraulic_radius_m(1.25), 0.8333333333, 1e-9);
  const double q = s.normal_discharge_m3s(1.25, 0.001);
  EXPECT_NEAR(q / s.area_m2(1.25), 1.400175606, 1e-9);
  EXPECT_NEAR(q, 8.751097536, 1e-9);
}

TEST(TriangularSection, IsTheTrapezoidWithoutBottom) {
  // Chow (1959) Table 2-1, triangle: A = z y^2, P = 2 y sqrt(1 + z^2), T = 2 z y (z1 = z2 = 2).
  const TriangularSection s({.left_side_slope = 2.0, .right_side_slope = 2.0, .manning_n = 0.02});
  EXPECT_DOUBLE_EQ(s.area_m2(0.8), 2.0 * 0.64);
  EXPECT_DOUBLE_EQ(s.wetted_perimeter_m(0.8), 2.0 * 0.8 * std::sqrt(5.0));
  EXPECT_DOUBLE_EQ(s.top_width_m(0.8), 3.2);
  EXPECT_EQ(s.shape(), SectionShape::triangular);
}

TEST(SheetSection, IsPerUnitWidthWithRadiusEqualToDepth) {
  const SheetSection s(testing::sheet_spec());
  EXPECT_DOUBLE_EQ(s.area_m2(0.02), 0.02);
  EXPECT_DOUBLE_EQ(s.hydraulic_radius_m(0.02), 0.02);
  EXPECT_NEAR(s.conveyance_m3s(0.02), std::pow(0.02, 5.0 / 3.0) / 0.15, 1e-15);
}

TEST(CircularSection, MatchesTheTableOfGeometricElements) {
  // Chow (1959) Table 2-1, circle: A = (theta - sin theta) D^2 / 8, P = theta D / 2,
  // T = 2 sqrt(y (D - y)). Half full: A = pi D^2 / 8, P = pi D / 2, T = D.
  const CircularSection s(testing::circle_spec());
  const double d = 1.2;
  EXPECT_NEAR(s.area_m2(d / 2), std::numbers::pi * d * d / 8, 1e-14);
  EXPECT_NEAR(s.wetted_perimeter_m(d / 2), std::numbers::pi * d / 2, 1e-14);
  EXPECT_NEAR(s.top_width_m(d / 2), d, 1e-14);
  EXPECT_NEAR(s.area_m2(d), std::numbers::pi * d * d / 4, 1e-14);
  const double theta = 2.0 * std::acos(1.0 - 2.0 * 0.3 / d);  // the textbook form, y = 0.3
  EXPECT_NEAR(s.area_m2(0.3), (theta - std::sin(theta)) * d * d / 8, 1e-14);
  EXPECT_NEAR(s.wetted_perimeter_m(0.3), theta * d / 2, 1e-14);
}

TEST(CircularSection, HalfFullConveysHalfTheFullDischarge) {
  // Analytic: half full, R = D/4 as when full, and A is half, so K(D/2) = K(D) / 2.
  const CircularSection s(testing::circle_spec());
  EXPECT_NEAR(s.conveyance_m3s(0.6) / s.conveyance_m3s(1.2), 0.5, 1e-14);
}

TEST(CircularSection, PartFullMaximaMatchTheHandbookValues) {
  // Part-full circular pipe, constant n: Q is greatest at y/D = 0.938 with Q/Q_full = 1.076,
  // V is greatest at y/D = 0.81 with V/V_full = 1.14. Chow (1959) Open-Channel Hydraulics,
  // Fig. 6-? (hydraulic elements of a circular section) and ASCE/WPCF (1969) MOP 37, "Design
  // and Construction of Sanitary and Storm Sewers", hydraulic-elements chart (from memory).
  // The pipe and the two Q ratios: freshet/verification/problems.hpp, shared with
  // `freshet verify` (which checks capacity_depth_m() and the flux law's cap against them).
  const verification::PartFullPipeExample ex;
  const CircularSection s(ex.spec);
  const double d = s.diameter_m(), k_full = s.conveyance_m3s(d);
  const double r_full = s.hydraulic_radius_m(d);
  double best_q = 0.0, y_best_q = 0.0, best_v = 0.0, y_best_v = 0.0;
  for (int i = 1; i < 100000; ++i) {
    const double y = d * i / 100000.0;
    if (s.conveyance_m3s(y) > best_q) best_q = s.conveyance_m3s(y), y_best_q = y / d;
    const double v = std::pow(s.hydraulic_radius_m(y) / r_full, 2.0 / 3.0);
    if (v > best_v) best_v = v, y_best_v = y / d;
  }
  EXPECT_NEAR(y_best_q, ex.capacity_depth_ratio, 0.0005);
  EXPECT_NEAR(best_q / k_full, ex.capacity_discharge_ratio, 0.0005);
  EXPECT_NEAR(y_best_v, 0.81, 0.005);
  EXPECT_NEAR(best_v, 1.14, 0.005);
  // The analytic capacity depth (root of dK/dh = 0) agrees with the scan.
  EXPECT_NEAR(s.capacity_depth_m() / d, y_best_q, 2e-5);
  EXPECT_NEAR(s.conveyance_slope_m2s(s.capacity_depth_m()), 0.0, 1e-10);
}

TEST(CircularSection, FullFlagAndClampsAboveTheCrown) {
  const CircularSection s(testing::circle_spec());
  EXPECT_FALSE(s.is_full(0.99 * s.full_area_m2()));
  EXPECT_TRUE(s.is_full(s.full_area_m2()));
  EXPECT_TRUE(s.is_full(1.5 * s.full_area_m2()));
  EXPECT_DOUBLE_EQ(s.depth_from_area_m(2.0 * s.full_area_m2()), 1.2);
  EXPECT_EQ(s.full_depth_m(), 1.2);
  const TrapezoidalSection open(testing::trapezoid_spec());
  EXPECT_FALSE(open.is_full(1e6));
  EXPECT_FALSE(open.full_depth_m().has_value());
}

// ---- Depth from area ----------------------------------------------------------------------

TEST(CrossSection, DepthFromAreaRoundTripsForEveryShape) {
  for (const SectionSpec& spec : testing::all_specs()) {
    const auto s = make_section(spec);
    const double top = testing::sweep_top_depth_m(*s);
    double worst = 0.0;
    for (double h : log_spaced(1e-6 * s->depth_scale_m(), top, 600)) {
      const double a = s->area_m2(h);
      const double a_back = s->area_m2(s->depth_from_area_m(a));
      worst = std::max(worst, std::abs(a_back - a) / a);
    }
    EXPECT_LE(worst, 1e-12) << to_string(s->shape());
    EXPECT_EQ(s->depth_from_area_m(0.0), 0.0);
    EXPECT_EQ(s->depth_from_area_m(-1.0), 0.0);
  }
}

TEST(CrossSection, DepthFromAreaRecoversTheDepthOfOpenSections) {
  for (const SectionSpec& spec : testing::all_specs()) {
    const auto s = make_section(spec);
    if (s->full_depth_m()) continue;  // near a crown, depth is ill-conditioned in area
    for (double h : log_spaced(1e-5 * s->depth_scale_m(), 5.0 * s->depth_scale_m(), 100)) {
      EXPECT_NEAR(s->depth_from_area_m(s->area_m2(h)), h, 1e-12 * h) << to_string(s->shape());
    }
  }
}

// ---- Irregular sections -------------------------------------------------------------------

TEST(IrregularSection, ASurveyedTrapezoidIsTheTrapezoid) {
  // The survey traces the trapezoid exactly, so every element must agree (Chow 1959,
  // Table 2-1) up to the top of the survey.
  const IrregularSection surveyed(testing::surveyed_trapezoid_spec());
  const TrapezoidalSection exact(testing::trapezoid_spec());
  for (double h : log_spaced(1e-6, 4.0, 200)) {
    EXPECT_NEAR(surveyed.area_m2(h), exact.area_m2(h), 1e-12 * exact.area_m2(h));
    EXPECT_NEAR(surveyed.wetted_perimeter_m(h), exact.wetted_perimeter_m(h), 1e-12 * 20);
    EXPECT_NEAR(surveyed.top_width_m(h), exact.top_width_m(h), 1e-12 * 20);
    EXPECT_NEAR(surveyed.conveyance_m3s(h), exact.conveyance_m3s(h),
                1e-12 * exact.conveyance_m3s(h));
    EXPECT_NEAR(surveyed.conveyance_slope_m2s(h), exact.conveyance_slope_m2s(h),
                1e-11 * exact.conveyance_slope_m2s(h));
  }
}

TEST(IrregularSection, SumsConveyanceBySubsectionWithoutTheDividingLines) {
  // Divided-channel method (Chow 1959, sec. 6-8): a 10 m wide, 2 m deep main channel between
  // 20 m flat overbanks. At depth 3 m, each overbank has A = 20 x 1 m2 and P = 20 + 1 m (its
  // bed and the 1 m of end wall above the survey); the main channel has A = 10 x 3 m2 and
  // P = 10 + 2 + 2 m (the vertical dividing lines above the banks are not wetted perimeter).
  IrregularSpec spec;
  spec.points = {{0, 2}, {20, 2}, {20, 0}, {30, 0}, {30, 2}, {50, 2}};
  spec.left_bank_station_m = 20.0;
  spec.right_bank_station_m = 30.0;
  spec.left_overbank_n = 0.05;
  spec.main_channel_n = 0.03;
  spec.right_overbank_n = 0.07;
  const IrregularSection s(spec);
  const auto k = [](double a, double p, double n) { return a * std::cbrt(a * a / (p * p)) / n; };
  EXPECT_NEAR(s.subsection_conveyance_m3s(0, 3.0), k(20, 21, 0.05), 1e-12);
  EXPECT_NEAR(s.subsection_conveyance_m3s(1, 3.0), k(30, 14, 0.03), 1e-12);
  EXPECT_NEAR(s.subsection_conveyance_m3s(2, 3.0), k(20, 21, 0.07), 1e-12);
  EXPECT_NEAR(s.conveyance_m3s(3.0), k(20, 21, 0.05) + k(30, 14, 0.03) + k(20, 21, 0.07), 1e-12);
  EXPECT_NEAR(s.area_m2(3.0), 70.0, 1e-12);
  EXPECT_NEAR(s.wetted_perimeter_m(3.0), 21 + 14 + 21, 1e-12);
  EXPECT_NEAR(s.top_width_m(3.0), 50.0, 1e-12);
  // Below the banks only the main channel is wet.
  EXPECT_EQ(s.subsection_conveyance_m3s(0, 1.0), 0.0);
  EXPECT_NEAR(s.conveyance_m3s(1.0), k(10, 12, 0.03), 1e-12);
}

TEST(IrregularSection, BankStationsInsideASegmentSplitIt) {
  // The same main channel with banks at 22 and 28 m, inside the flat bottom: the bed between
  // 20 and 22 m belongs to the left overbank. At depth 1 m: left A = 2 x 1, P = 1 + 2.
  IrregularSpec spec;
  spec.points = {{0, 2}, {20, 2}, {20, 0}, {30, 0}, {30, 2}, {50, 2}};
  spec.left_bank_station_m = 22.0;
  spec.right_bank_station_m = 28.0;
  spec.left_overbank_n = spec.main_channel_n = spec.right_overbank_n = 0.03;
  const IrregularSection s(spec);
  const auto k = [](double a, double p) { return a * std::cbrt(a * a / (p * p)) / 0.03; };
  EXPECT_NEAR(s.subsection_conveyance_m3s(0, 1.0), k(2.0, 3.0), 1e-12);
  EXPECT_NEAR(s.subsection_conveyance_m3s(1, 1.0), k(6.0, 6.0), 1e-12);
  EXPECT_NEAR(s.area_m2(1.0), 10.0, 1e-12);
}

TEST(IrregularSection, ConveyanceSlopeIsOneSidedAtAVertex) {
  // At the bank elevation (depth 2 m) the vertical banks of the main channel are just
  // submerged: from below its wetted perimeter still grows (dP/dh = 2), from above it does not
  // (the sloping overbanks start at zero area), so dK/dh jumps up. Checked against one-sided
  // finite differences.
  IrregularSpec spec;
  spec.points = {{0, 3}, {20, 2}, {20, 0}, {30, 0}, {30, 2}, {50, 3}};
  spec.left_bank_station_m = 20.0;
  spec.right_bank_station_m = 30.0;
  spec.left_overbank_n = spec.main_channel_n = spec.right_overbank_n = 0.03;
  const IrregularSection s(spec);
  const double eps = 1e-7;
  const double fd_below = (s.conveyance_m3s(2.0) - s.conveyance_m3s(2.0 - eps)) / eps;
  const double fd_above = (s.conveyance_m3s(2.0 + eps) - s.conveyance_m3s(2.0)) / eps;
  EXPECT_NEAR(s.conveyance_slope_m2s(2.0), fd_below, 1e-5 * fd_below);
  EXPECT_NEAR(s.conveyance_slope_above_m2s(2.0), fd_above, 1e-5 * fd_above);
  EXPECT_EQ(s.breakpoint_depths_m(), (std::vector<double>{2.0, 3.0}));
}

// ---- Bad input ----------------------------------------------------------------------------

std::vector<std::string> messages_of(const SectionSpec& spec) {
  try {
    (void)make_section(spec, "reach 'mill-race'");
  } catch (const InputError& e) {
    std::vector<std::string> out;
    for (const auto& p : e.problems()) out.push_back(p.to_string());
    return out;
  }
  return {};
}

TEST(SectionValidation, RejectsNonPositiveWidthDiameterAndN) {
  EXPECT_EQ(messages_of(RectangularSpec{.bottom_width_m = 0.0, .manning_n = -0.01}),
            (std::vector<std::string>{
                "reach 'mill-race', field 'bottom_width_m' = 0: must be > 0",
                "reach 'mill-race', field 'manning_n' = -0.01: must be > 0"}));
  EXPECT_EQ(messages_of(CircularSpec{.diameter_m = -0.6, .manning_n = 0.0}),
            (std::vector<std::string>{"reach 'mill-race', field 'diameter_m' = -0.6: must be > 0",
                                      "reach 'mill-race', field 'manning_n' = 0: must be > 0"}));
  EXPECT_EQ(messages_of(SheetSpec{.manning_n = 0.0}),
            (std::vector<std::string>{"reach 'mill-race', field 'manning_n' = 0: must be > 0"}));
}

TEST(SectionValidation, RejectsNegativeSideSlopes) {
  EXPECT_EQ(messages_of(TrapezoidalSpec{3.0, -1.0, 2.0, 0.03}),
            (std::vector<std::string>{
                "reach 'mill-race', field 'left_side_slope' = -1: must be >= 0"}));
  EXPECT_EQ(messages_of(TriangularSpec{2.0, -0.5, 0.03}),
            (std::vector<std::string>{
                "reach 'mill-race', field 'right_side_slope' = -0.5: must be >= 0"}));
  EXPECT_EQ(messages_of(TriangularSpec{0.0, 0.0, 0.03}),
            (std::vector<std::string>{"reach 'mill-race', field 'left_side_slope' = 0: at least "
                                      "one side slope must be > 0"}));
}

TEST(SectionValidation, RejectsNaNAnywhere) {
  const double nan = std::numeric_limits<double>::quiet_NaN();
  EXPECT_EQ(messages_of(TrapezoidalSpec{nan, 2.0, 2.0, nan}),
            (std::vector<std::string>{
                "reach 'mill-race', field 'bottom_width_m' = nan: must be a finite number",
                "reach 'mill-race', field 'manning_n' = nan: must be a finite number"}));
  IrregularSpec s = testing::natural_spec();
  s.points[4].elevation_m = nan;
  s.right_bank_station_m = nan;
  EXPECT_EQ(messages_of(s), (std::vector<std::string>{
                                "reach 'mill-race', field 'points[4].elevation_m' = nan: must be "
                                "a finite number",
                                "reach 'mill-race', field 'right_bank_station_m' = nan: must be "
                                "a finite number"}));
}

TEST(SectionValidation, RejectsSurveysOutOfOrderOrTooShort) {
  IrregularSpec s = testing::natural_spec();
  s.points[3].station_m = 19.0;  // after 20
  EXPECT_EQ(messages_of(s), (std::vector<std::string>{
                                "reach 'mill-race', field 'points[3].station_m' = 19: stations "
                                "must not decrease (previous station 20)"}));
  IrregularSpec short_survey = testing::natural_spec();
  short_survey.points = {{0, 2}, {10, 0}};
  short_survey.left_bank_station_m = 0.0;
  short_survey.right_bank_station_m = 10.0;
  EXPECT_EQ(messages_of(short_survey),
            (std::vector<std::string>{
                "reach 'mill-race', field 'points' has 2 points: needs at least 3"}));
}

TEST(SectionValidation, RejectsBankStationsOutsideTheSurvey) {
  IrregularSpec s = testing::natural_spec();
  s.left_bank_station_m = -5.0;
  s.right_bank_station_m = 75.0;
  s.main_channel_n = -0.035;
  EXPECT_EQ(messages_of(s),
            (std::vector<std::string>{
                "reach 'mill-race', field 'left_bank_station_m' = -5: must lie within the survey "
                "stations [0, 70]",
                "reach 'mill-race', field 'right_bank_station_m' = 75: must lie within the "
                "survey stations [0, 70]",
                "reach 'mill-race', field 'main_channel_n' = -0.035: must be > 0"}));
  IrregularSpec swapped = testing::natural_spec();
  std::swap(swapped.left_bank_station_m, swapped.right_bank_station_m);
  EXPECT_EQ(messages_of(swapped),
            (std::vector<std::string>{"reach 'mill-race', field 'right_bank_station_m' = 24: "
                                      "must not be less than left_bank_station_m = 36"}));
}

TEST(SectionValidation, ValidSpecsRaiseNothing) {
  for (const SectionSpec& spec : testing::all_specs()) EXPECT_TRUE(messages_of(spec).empty());
}

// ---- Names and units ----------------------------------------------------------------------

TEST(SectionShape, NamesRoundTrip) {
  for (auto shape : {SectionShape::rectangular, SectionShape::trapezoidal,
                     SectionShape::triangular, SectionShape::circular, SectionShape::irregular,
                     SectionShape::sheet}) {
    EXPECT_EQ(parse_section_shape(to_string(shape)), shape);
  }
  EXPECT_FALSE(parse_section_shape("Circular").has_value());
}

TEST(UsCustomary, TheSameChannelInFeetAndMetresConveysTheSame) {
  // 1 ft = 0.3048 m exactly (international yard and pound agreement, 1959).
  const double ft = 0.3048;
  IrregularSpec survey_ft;
  survey_ft.points = {{0, 110}, {30, 104}, {42, 100}, {50, 101}, {80, 109}};
  survey_ft.left_bank_station_m = 30;  // field names say metres; the values here are feet
  survey_ft.right_bank_station_m = 50;
  survey_ft.left_overbank_n = 0.07;
  survey_ft.main_channel_n = 0.04;
  survey_ft.right_overbank_n = 0.06;
  IrregularSpec survey_m = survey_ft;
  for (auto& p : survey_m.points) p = {p.station_m * ft, p.elevation_m * ft};
  survey_m.left_bank_station_m = 30 * ft;
  survey_m.right_bank_station_m = 50 * ft;

  const std::vector<std::pair<SectionSpec, SectionSpec>> pairs = {
      {TrapezoidalSpec{20.0, 2.0, 3.0, 0.025}, TrapezoidalSpec{20.0 * ft, 2.0, 3.0, 0.025}},
      {RectangularSpec{12.0, 0.015}, RectangularSpec{12.0 * ft, 0.015}},
      {TriangularSpec{4.0, 4.0, 0.016}, TriangularSpec{4.0, 4.0, 0.016}},
      {CircularSpec{3.0, 0.013}, CircularSpec{3.0 * ft, 0.013}},
      {survey_ft, survey_m},
      {SheetSpec{0.2}, SheetSpec{0.2}}};
  for (const auto& [in_feet, in_metres] : pairs) {
    const auto from_feet = make_section(section_spec_to_si(in_feet, units::System::us_customary));
    const auto si = make_section(section_spec_to_si(in_metres, units::System::si));
    for (double depth_ft : {0.01, 0.4, 2.1, 5.5}) {
      const double h = std::min(depth_ft * ft, 0.99 * si->full_depth_m().value_or(1e9));
      const double q_feet = from_feet->normal_discharge_m3s(h, 0.003);
      const double q_si = si->normal_discharge_m3s(h, 0.003);
      EXPECT_NEAR(q_feet, q_si, 1e-9 * q_si) << to_string(si->shape()) << " h = " << h;
    }
  }
}

TEST(UsCustomary, AgreesWithTheCustomaryFormWithK1486) {
  // US customary Manning: Q = (1.486 / n) A R^(2/3) S^(1/2) in ft and cfs (Chow 1959, eq. 5-7;
  // 1.486 is the rounded (1/0.3048)^(1/3)), so the two agree to the rounding, 6e-5.
  const auto s = make_section(section_spec_to_si(TrapezoidalSpec{20.0, 2.0, 2.0, 0.025},
                                                 units::System::us_customary));
  const double y_ft = 3.36, a_ft2 = (20 + 2 * y_ft) * y_ft;
  const double r_ft = a_ft2 / (20 + 2 * y_ft * std::sqrt(5.0));
  const double q_cfs = 1.486 / 0.025 * a_ft2 * std::pow(r_ft, 2.0 / 3.0) * std::sqrt(0.0016);
  const double q_m3s = s->normal_discharge_m3s(y_ft * 0.3048, 0.0016);
  EXPECT_NEAR(q_m3s / units::kCubicMetresPerCubicFoot, q_cfs, 1e-4 * q_cfs);
}

}  // namespace
}  // namespace freshet::geometry
