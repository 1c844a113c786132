// Every registered verification case (the cases `freshet verify` prints) within its tolerance
// of its published value; the source of each is named in its registration and set-up
// (src/verification/cases.cpp, include/freshet/verification/problems.hpp). Then the registry's
// rules: ids unique and findable, tolerances applied as stated, NaN never passing, a thrown
// exception turned into a failed result, and the self-test factor turning a pass into a fail.
#include "freshet/verification/verification_case.hpp"

#include <gtest/gtest.h>

#include <cctype>
#include <cmath>
#include <set>
#include <stdexcept>
#include <string>

namespace freshet::verification {
namespace {

class EveryCase : public ::testing::TestWithParam<const VerificationCase*> {};

TEST_P(EveryCase, MatchesItsPublishedValue) {
  const VerificationCase& c = *GetParam();
  const CaseResult r = run_case(c, 1.0);
  EXPECT_TRUE(r.error.empty()) << c.id << ": " << r.error;
  EXPECT_TRUE(r.passed) << c.id << ": freshet " << r.freshet << " " << c.unit << ", published "
                        << r.published << " (" << c.source << ")";
  EXPECT_FALSE(c.source.empty()) << c.id;
}

std::vector<const VerificationCase*> all_cases() {
  std::vector<const VerificationCase*> out;
  for (const VerificationCase& c : verification_cases()) out.push_back(&c);
  return out;
}

INSTANTIATE_TEST_SUITE_P(Registered, EveryCase, ::testing::ValuesIn(all_cases()),
                         [](const auto& param_info) {
                           std::string name(param_info.param->id);
                           for (char& ch : name) {
                             if (!std::isalnum(static_cast<unsigned char>(ch))) ch = '_';
                           }
                           return name;
                         });

TEST(Registry, IdsAreUniqueAndFound) {
  std::set<std::string_view> ids;
  for (const VerificationCase& c : verification_cases()) {
    EXPECT_TRUE(ids.insert(c.id).second) << "id twice: " << c.id;
    EXPECT_EQ(find_case(c.id), &c);
  }
  EXPECT_GE(ids.size(), 10u);
  EXPECT_EQ(find_case("no-such-case"), nullptr);
}

CaseValues three_and_a_bit() { return {3.0, 3.01}; }
CaseValues throws() { throw std::runtime_error("no bracket"); }

TEST(Registry, ToleranceIsAbsoluteOrRelativeAsStated) {
  const VerificationCase absolute{"a", "core", "q", "m", 0.02, ToleranceKind::absolute, "s",
                                  three_and_a_bit};
  const VerificationCase relative{"r", "core", "q", "m", 0.001, ToleranceKind::relative, "s",
                                  three_and_a_bit};
  EXPECT_TRUE(within_tolerance(absolute, 3.0, 3.01));
  EXPECT_FALSE(within_tolerance(absolute, 3.0, 3.03));
  EXPECT_FALSE(within_tolerance(relative, 3.0, 3.01));  // 0.33 % > 0.1 %
  EXPECT_TRUE(within_tolerance(relative, 3.0, 3.002));
  EXPECT_FALSE(within_tolerance(absolute, 3.0, std::nan("")));
  EXPECT_FALSE(within_tolerance(absolute, std::nan(""), 3.0));
}

TEST(Registry, AThrownExceptionIsAFailedResultWithItsMessage) {
  const VerificationCase c{"t", "core", "q", "m", 1.0, ToleranceKind::absolute, "s", throws};
  const CaseResult r = run_case(c, 1.0);
  EXPECT_FALSE(r.passed);
  EXPECT_EQ(r.error, "no bracket");
  EXPECT_TRUE(std::isnan(r.freshet));
}

TEST(Registry, TheSelfTestFactorMakesAPassingCaseFail) {
  const VerificationCase c{"a", "core", "q", "m", 0.02, ToleranceKind::absolute, "s",
                           three_and_a_bit};
  EXPECT_TRUE(run_case(c, 1.0).passed);
  const CaseResult perturbed = run_case(c, 1.1);
  EXPECT_FALSE(perturbed.passed);
  EXPECT_DOUBLE_EQ(perturbed.published, 3.3);
}

}  // namespace
}  // namespace freshet::verification
