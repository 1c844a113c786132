// The verification cases: the library behind `freshet verify` (docs/verification.md) and
// tests/verification.
//
// Each case runs the library on one published problem and compares one quantity with the
// published value: a number from a handbook, a manual or a textbook worked example, or a
// published closed-form solution evaluated exactly for the case's own parameters. Values are
// in the unit they were published in (ft, in, cm, h, ...), stated by `unit`. The problems
// themselves are written once, in problems.hpp, which the module tests build on too.
//
//   for (const VerificationCase& c : verification_cases()) {
//     CaseResult r = run_case(c, 1.0);
//     std::cout << c.id << (r.passed ? " pass" : " FAIL") << "\n";
//   }
#pragma once

#include <span>
#include <string>
#include <string_view>

namespace freshet::verification {

enum class ToleranceKind { absolute, relative };

// What a case computes: the published value and freshet's value, both in the case's unit.
struct CaseValues {
  double published = 0.0;
  double freshet = 0.0;
};

struct VerificationCase {
  std::string_view id;        // stable, used by FRESHET_VERIFY_PERTURB and in reports
  std::string_view module;    // geometry, routing, hydrology, network
  std::string_view quantity;  // what is compared, e.g. "normal depth"
  std::string_view unit;      // unit of both values, e.g. "ft"; "-" when dimensionless
  double tolerance = 0.0;     // allowed |freshet - published| (absolute, in `unit`) or
  ToleranceKind tolerance_kind = ToleranceKind::absolute;  // |...| / |published| (relative)
  std::string_view source;    // author, year, title, example / table / equation
  CaseValues (*compute)() = nullptr;
};

// The registered cases, in report order (grouped by module).
std::span<const VerificationCase> verification_cases();

// The case with this id, or nullptr.
const VerificationCase* find_case(std::string_view id);

struct CaseResult {
  const VerificationCase* verification_case = nullptr;
  double published = 0.0;  // after the self-test factor
  double freshet = 0.0;
  bool passed = false;
  std::string error;       // message when the computation threw (the case then fails)
  double elapsed_s = 0.0;  // wall time of the computation
};

// Runs one case. `published_factor` multiplies the published value (1 normally; the
// FRESHET_VERIFY_PERTURB self-test uses 1.1). Exceptions become a failed result.
CaseResult run_case(const VerificationCase& verification_case, double published_factor);

// Whether `freshet` is within the case's tolerance of `published` (false for NaN).
bool within_tolerance(const VerificationCase& verification_case, double published,
                      double freshet);

}  // namespace freshet::verification
