// The shock-detection study (issue 15, item 3; docs/shock-detection.md): flood fronts of
// different steepness on every section type, cell length and coupling step, routed by each
// grid scheme with its shock detector on, and by the characteristics scheme, whose fronts are
// the reference: for a piecewise-linear flux the entropy solution is exactly a set of fronts
// (Dafermos 1972; Holden & Risebro 2015, Front Tracking for Hyperbolic Conservation Laws,
// 2nd ed., sec. 2.1-2.2), so a shock of the reference is a single front carrying a jump in
// discharge, while a smooth compression is a staircase of node-sized steps.
//
// Each case is one ramp of inflow, base -> peak over a rise time chosen so that the
// characteristics launched at the inlet first cross at a given fraction of the reach length
// (x_b = min over tau c^2 / (dc/dtau); Whitham 1974, Linear and Nonlinear Waves, sec. 2.8),
// from 0.05 L (breaks near the inlet) to 4 L (never breaks inside the reach).
//
// Findings, per grid scheme and case:
//   * a reported shock is TRUE when, at one of its path samples, the reference has a front
//     with a jump of at least kReferenceFrontShare of the peak within the match distance
//     (below) of the reported position; otherwise it is a FALSE POSITIVE, sized by the
//     largest discharge jump on its path;
//   * a reference shock whose jump reaches kSignificantShare of the peak inside the reach is
//     MISSED when no reported shock is true, and the miss is UNRESOLVABLE when the reach's
//     shock_resolution() says this grid and coupling step cannot show it (the report says
//     so), UNEXPLAINED otherwise.
#pragma once

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>
#include <string>
#include <vector>

#include "freshet/geometry/cross_section.hpp"
#include "freshet/geometry/section_flux.hpp"
#include "freshet/routing/kinematic_reach.hpp"
#include "freshet/routing/schemes/characteristics.hpp"
#include "freshet/routing/shock.hpp"
#include "routing_test_support.hpp"

namespace freshet::routing::testing {

// A reference front at least this share of the peak discharge is a shock (a staircase step
// of a smooth compression carries about m x front_node_spacing = 0.2 % at most).
inline constexpr double kReferenceFrontShare = 0.01;
// Misses are counted for reference shocks whose jump reaches this share of the peak, and
// the goal concerns false positives of this size or more.
inline constexpr double kSignificantShare = 0.10;

struct StudySection {
  std::string name;
  geometry::SectionFlux flux;
  double base_m3s, peak_m3s, length_m;
  // Ramps set by the peak's travel time instead of the breaking distance: the compound
  // section's celerity rises steeply once the floodplains convey, so x_b there is a few
  // metres for any rise through bank-full, while the jump it gathers stays small.
  bool rise_by_travel = false;
};

inline std::vector<StudySection> study_sections() {
  using namespace geometry;
  std::vector<StudySection> s;
  s.push_back({"wide channel (power law)", wide_manning(20.0, 0.035, 0.002), 5.0, 50.0, 10000.0});
  s.push_back({"rectangular 50 m", RectangularFlux(50.0, 0.035, 0.001), 20.0, 500.0, 20000.0});
  s.push_back({"trapezoidal 5 m, 2:1", TrapezoidalFlux(5.0, 2.0, 2.0, 0.03, 0.001), 2.0, 60.0,
               10000.0});
  s.push_back({"triangular 3:1", make_triangular_flux(3.0, 3.0, 0.03, 0.005), 0.5, 10.0, 5000.0});
  s.push_back({"overland sheet", make_sheet_flux(0.15, 0.01), 1e-5, 2e-4, 150.0});
  {
    const auto pipe = make_section(CircularSpec{1.5, 0.013});
    const TabulatedFlux law = TabulatedFlux::from_section(*pipe, 0.005);
    const double q_max = law.max_discharge_m3s();
    s.push_back({"circular pipe 1.5 m, part-full", law, 0.05 * q_max, 0.97 * q_max, 3000.0});
  }
  {
    IrregularSpec spec;  // a 12 m main channel 2 m deep between 60 m floodplains
    spec.points = {{0, 3.5}, {5, 2.5}, {60, 2.2}, {62, 0.2}, {66, 0.0}, {70, 0.0}, {74, 0.2},
                   {76, 2.2}, {131, 2.5}, {136, 3.5}};
    spec.left_bank_station_m = 60.0;
    spec.right_bank_station_m = 76.0;
    spec.left_overbank_n = 0.06;
    spec.main_channel_n = 0.032;
    spec.right_overbank_n = 0.07;
    const auto section = make_section(spec);
    s.push_back({"compound (surveyed)", TabulatedFlux::from_section(*section, 0.001), 3.0, 120.0,
                 15000.0, true});
  }
  return s;
}

struct StudyCase {
  std::size_t section = 0;
  double breaking_fraction = 0.0;  // x_b / L of the ramp's characteristics
  double rise_s = 0.0;
  int cells = 0;
  double coupling_s = 0.0;
};

// A reach's findings for one case.
struct GridFindings {
  int reported = 0;
  int true_found = 0;
  int false_positives = 0;
  double largest_false_share = 0.0;  // largest jump of a false positive / peak
  bool missed = false;
  bool unresolvable = false;  // the reach said it cannot resolve the predicted shock
};

struct ReferenceFront {
  double position_m, jump_m3s;
};

// The reference at every coupling time: fronts carrying at least kReferenceFrontShare of the peak.
struct Reference {
  std::vector<double> time_s;
  std::vector<std::vector<ReferenceFront>> fronts;
  double largest_jump_m3s = 0.0;
};

template <geometry::FluxLaw F>
Reference reference_fronts(const F& law, const StudySection& sec, const StudyCase& c,
                           const PiecewiseLinearSeries& inflow, double end_s) {
  RoutingOptions opt;
  opt.scheme = SchemeKind::kCharacteristics;
  detail::ReachState<F> state({law}, sec.length_m / c.cells, static_cast<std::size_t>(c.cells));
  for (double& a : state.area_m2) a = law.area_for_discharge_m2(sec.base_m3s);
  state.generation = 1;
  schemes::Characteristics scheme(opt, state.n());
  Reference ref;
  std::vector<double> edge, area;
  for (double t = 0.0; t < end_s - 1e-9; t += c.coupling_s) {
    (void)scheme.advance(state, t, t + c.coupling_s, inflow, LateralInflow::none());
    scheme.tracker().profile(edge, area);
    std::vector<ReferenceFront> here;
    for (std::size_t k = 1; k < area.size(); ++k) {
      const double x = edge[k];
      if (!(x > 0.0 && x < sec.length_m)) continue;
      const double jump = law.discharge_m3s(area[k - 1]) - law.discharge_m3s(area[k]);
      if (jump >= kReferenceFrontShare * sec.peak_m3s) {
        here.push_back({x, jump});
        ref.largest_jump_m3s = std::max(ref.largest_jump_m3s, jump);
      }
    }
    ref.time_s.push_back(t + c.coupling_s);
    ref.fronts.push_back(std::move(here));
  }
  return ref;
}

// Rise time giving a first crossing at breaking_fraction x L (x_b is proportional to the
// rise time of a linear ramp).
// Rise time giving a first crossing at `fraction` x L (x_b is proportional to the rise time
// of a linear ramp), or `fraction` x 5 times the peak's travel time L / c(peak).
template <geometry::FluxLaw F>
double rise_for(const F& law, const StudySection& sec, double fraction) {
  if (sec.rise_by_travel) {
    return 5.0 * fraction * sec.length_m / law.celerity_m_s(law.area_for_discharge_m2(sec.peak_m3s));
  }
  const double probe_s = 1000.0;
  const PiecewiseLinearSeries probe({0.0, probe_s}, {sec.base_m3s, sec.peak_m3s});
  const BreakingPrediction b = predict_breaking_from_inflow(law, probe, -probe_s, 2.0 * probe_s);
  return probe_s * fraction * sec.length_m / b.position_m;
}

// Where the ramp's characteristics first cross, as a fraction of the reach length.
template <geometry::FluxLaw F>
double breaking_fraction(const F& law, const StudySection& sec, const StudyCase& c) {
  const PiecewiseLinearSeries inflow({0.0, c.rise_s}, {sec.base_m3s, sec.peak_m3s});
  const BreakingPrediction b = predict_breaking_from_inflow(law, inflow, -0.5 * c.rise_s, 1.5 * c.rise_s);
  return b.breaks ? b.position_m / sec.length_m : std::numeric_limits<double>::infinity();
}

template <geometry::FluxLaw F>
GridFindings grid_findings(const F& law, const StudySection& sec, const StudyCase& c,
                           SchemeKind scheme, const PiecewiseLinearSeries& inflow, double end_s,
                           const Reference& ref) {
  RoutingOptions opt;
  opt.scheme = scheme;
  KinematicReach<F> reach({"study", sec.length_m, c.cells}, law, opt);
  reach.set_uniform_discharge(sec.base_m3s);
  for (double t = 0.0; t < end_s - 1e-9; t += c.coupling_s) {
    (void)reach.advance(t, t + c.coupling_s, inflow, LateralInflow::none());
  }
  const ShockDetectionOptions shock = resolved_shock_options(opt);
  const double dx = sec.length_m / c.cells;
  const double match_m = std::max(shock.plateau_cells * dx, 0.03 * sec.length_m);
  GridFindings g;
  for (const ShockReport& r : reach.shock_reports()) {
    if (!r.formed) continue;
    ++g.reported;
    bool matched = false;
    double jump = 0.0;
    for (const ShockSample& s : r.path) {
      jump = std::max(jump, law.discharge_m3s(s.area_left_m2) - law.discharge_m3s(s.area_right_m2));
      const auto it = std::find_if(ref.time_s.begin(), ref.time_s.end(),
                                   [&](double t) { return std::abs(t - s.time_s) < 1e-6; });
      if (it == ref.time_s.end()) continue;
      for (const ReferenceFront& f : ref.fronts[static_cast<std::size_t>(it - ref.time_s.begin())]) {
        matched = matched || std::abs(f.position_m - s.position_m) <= match_m;
      }
    }
    if (matched) {
      ++g.true_found;
    } else {
      ++g.false_positives;
      g.largest_false_share = std::max(g.largest_false_share, jump / sec.peak_m3s);
    }
  }
  g.missed = ref.largest_jump_m3s >= kSignificantShare * sec.peak_m3s && g.true_found == 0;
  g.unresolvable = !reach.breaking_outlook().resolvable;
  return g;
}

// The 210 cases (every coupling step), or those at the given coupling steps only.
inline std::vector<StudyCase> study_cases(std::vector<double> couplings = {10.0, 60.0, 300.0}) {
  std::vector<StudyCase> cases;
  const std::vector<StudySection> sections = study_sections();
  for (std::size_t s = 0; s < sections.size(); ++s) {
    for (double fraction : {0.05, 0.3, 0.7, 1.5, 4.0}) {
      for (int cells : {40, 160}) {
        for (double coupling : couplings) {
          StudyCase c;
          c.section = s;
          c.cells = cells;
          c.coupling_s = coupling;
          geometry::visit_flux(sections[s].flux, [&](const auto& law) {
            c.rise_s = rise_for(law, sections[s], fraction);
            c.breaking_fraction = breaking_fraction(law, sections[s], c);
          });
          cases.push_back(c);
        }
      }
    }
  }
  return cases;
}

}  // namespace freshet::routing::testing
