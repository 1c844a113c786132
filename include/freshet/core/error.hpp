// Error types shared by every module.
//
// freshet separates three kinds of failure (see DEVELOPERS.md):
//   * programmer errors   -> FRESHET_ASSERT (always on; aborts with file and line);
//   * bad input           -> InputError, carrying every Problem found, each naming the
//                            file, line, element and field, the value and the rule broken;
//   * numerical failure   -> NumericalError, after a solver has exhausted its retries.
// I/O failures (a path that cannot be written, a full disk) raise IoError.
#pragma once

#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

namespace freshet {

// One thing wrong with the input. Everything but `message` may be empty or zero when unknown.
struct Problem {
  std::string file;     // input file the value came from
  int line = 0;         // 1-based line in `file`, 0 when unknown
  int column = 0;       // 1-based column, 0 when unknown
  std::string element;  // e.g. "reach 'upper-mill'" or "section"
  std::string field;    // e.g. "manning_n"
  std::string message;  // the value and the rule broken, e.g. "= 0: must be > 0"

  // "file:line:column: element, field 'manning_n' = 0: must be > 0"
  [[nodiscard]] std::string to_string() const;
};

// Bad input: carries all problems found, so a user can fix a file in one pass.
class InputError : public std::runtime_error {
 public:
  explicit InputError(std::vector<Problem> problems);
  explicit InputError(Problem problem);
  [[nodiscard]] const std::vector<Problem>& problems() const noexcept { return problems_; }

 private:
  std::vector<Problem> problems_;
};

// A numerical method failed after its bounded retries (for example a Newton iteration that
// would not converge); the message names the element, the time and the limit reached.
class NumericalError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

// Reading or writing a file failed; the message names the path.
class IoError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

// Collects the problems of one element, then throws them all at once.
//
//   ProblemList p("trapezoidal section");
//   p.require_positive("bottom_width_m", b);
//   p.require_non_negative("left_side_slope", z1);
//   p.throw_if_any();
class ProblemList {
 public:
  explicit ProblemList(std::string element = {}) : element_(std::move(element)) {}

  void add(std::string_view field, std::string message);
  void require(bool ok, std::string_view field, double value, std::string_view rule);
  void require_finite(std::string_view field, double value);
  void require_positive(std::string_view field, double value);      // finite and > 0
  void require_non_negative(std::string_view field, double value);  // finite and >= 0
  void append(const std::vector<Problem>& others);

  [[nodiscard]] bool empty() const noexcept { return problems_.empty(); }
  [[nodiscard]] const std::vector<Problem>& problems() const noexcept { return problems_; }
  void throw_if_any() const;

 private:
  std::string element_;
  std::vector<Problem> problems_;
};

// Formats a double for messages: shortest form that round-trips ("0.035", "nan", "-1e-06").
std::string format_value(double value);
// Fixed-point with `decimals` decimals, for reports ("55.31").
std::string format_fixed(double value, int decimals);

[[noreturn]] void assertion_failed(const char* expression, const char* file, int line,
                                   const char* message);

}  // namespace freshet

// Programmer-error check, always on: cheap invariants that protect memory and contracts.
#define FRESHET_ASSERT(condition, message)                                      \
  do {                                                                          \
    if (!(condition)) ::freshet::assertion_failed(#condition, __FILE__, __LINE__, \
                                                  message);                     \
  } while (false)
