// The shock-detection study (shock_detection_study.hpp; docs/shock-detection.md): every grid
// scheme's shock findings against the characteristic solution on 210 flood fronts (7
// section types x 5 ramps x 2 cell lengths x 3 coupling steps). The goal asserted (issue 15,
// item 3): no false positive with a jump of 10 % of the peak or more, and every missed shock
// of 10 % of the peak or more is one the reach says its grid cannot resolve
// (BreakingOutlook::resolvable false). The test prints the table published in
// docs/shock-detection.md.
//
// The suite runs the 70 fronts at the 60 s coupling step (a few seconds of CPU); with
// FRESHET_FULL_SHOCK_STUDY set in the environment it runs all 210 (about 45 s of CPU), as
// for the published table:
//   FRESHET_FULL_SHOCK_STUDY=1 ./build/routing_tests --gtest_filter='ShockDetectionStudy.*'
#include "shock_detection_study.hpp"

#include <gtest/gtest.h>

#include <cstdio>
#include <cstdlib>
#include <map>

namespace freshet::routing {
namespace {

using namespace testing;

struct Totals {
  int cases = 0, reference = 0, reported = 0, true_found = 0, false_positives = 0,
      large_false = 0, missed = 0, unresolvable = 0;
  void add(const GridFindings& g, bool reference_shock) {
    ++cases;
    reference += reference_shock ? 1 : 0;
    reported += g.reported;
    true_found += g.true_found;
    false_positives += g.false_positives;
    large_false += g.largest_false_share >= kSignificantShare ? 1 : 0;
    missed += g.missed ? 1 : 0;
    unresolvable += g.missed && g.unresolvable ? 1 : 0;
  }
};

void print_row(const std::string& section, SchemeKind k, const Totals& t) {
  std::printf("| %s | %s | %d | %d | %d | %d | %d | %d | %d |\n", section.c_str(),
              std::string(to_string(k)).c_str(), t.cases, t.reference, t.true_found,
              t.false_positives, t.large_false, t.missed, t.unresolvable);
}

TEST(ShockDetectionStudy, NoFalsePositiveOfTenPercentAndNoUnexplainedMiss) {
  const std::vector<StudySection> sections = study_sections();
  const bool full = std::getenv("FRESHET_FULL_SHOCK_STUDY") != nullptr;
  const std::vector<StudyCase> cases =
      full ? study_cases() : study_cases(std::vector<double>{60.0});
  std::printf("%zu fronts (%s)\n", cases.size(),
              full ? "full study" : "60 s coupling; FRESHET_FULL_SHOCK_STUDY=1 for all 210");
  std::map<std::pair<std::size_t, SchemeKind>, Totals> by_section;
  std::map<SchemeKind, Totals> totals;
  for (const StudyCase& c : cases) {
    const StudySection& sec = sections[c.section];
    geometry::visit_flux(sec.flux, [&](const auto& law) {
      const PiecewiseLinearSeries inflow({0.0, c.rise_s}, {sec.base_m3s, sec.peak_m3s});
      const double slow_s = sec.length_m / law.celerity_m_s(law.area_for_discharge_m2(sec.base_m3s));
      // Until the foot of the ramp, the first to steepen, has left the reach, and the ramp's
      // upper part has followed it in (or two travel times of its rise, for slow ramps).
      const double end_s =
          c.coupling_s * std::ceil((std::min(c.rise_s, 2.0 * slow_s) + 1.2 * slow_s) / c.coupling_s);
      const Reference ref = reference_fronts(law, sec, c, inflow, end_s);
      const bool big = ref.largest_jump_m3s >= kSignificantShare * sec.peak_m3s;
      for (SchemeKind k : kGridSchemes) {
        const GridFindings g = grid_findings(law, sec, c, k, inflow, end_s, ref);
        by_section[{c.section, k}].add(g, big);
        totals[k].add(g, big);
        EXPECT_LT(g.largest_false_share, kSignificantShare)
            << to_string(k) << ", " << sec.name << ", x_b/L " << c.breaking_fraction << ", "
            << c.cells << " cells, " << c.coupling_s << " s: a false shock";
        EXPECT_FALSE(g.missed && !g.unresolvable)
            << to_string(k) << ", " << sec.name << ", x_b/L " << c.breaking_fraction << ", "
            << c.cells << " cells, " << c.coupling_s << " s: a shock of "
            << 100.0 * ref.largest_jump_m3s / sec.peak_m3s
            << " % of the peak missed on a grid said to resolve it";
      }
    });
  }
  std::printf("| section | scheme | cases | reference shocks >= 10 %% | found | false positives "
              "| of which >= 10 %% | missed >= 10 %% | of which stated unresolvable |\n"
              "|---|---|---|---|---|---|---|---|---|\n");
  for (const auto& [key, t] : by_section) print_row(sections[key.first].name, key.second, t);
  for (const auto& [k, t] : totals) print_row("**all**", k, t);
  EXPECT_GE(cases.size(), 50u);
}

}  // namespace
}  // namespace freshet::routing
