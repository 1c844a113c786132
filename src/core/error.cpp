#include "freshet/core/error.hpp"

#include <charconv>
#include <cmath>
#include <cstdio>
#include <cstdlib>

namespace freshet {

std::string Problem::to_string() const {
  std::string out;
  if (!file.empty()) {
    out += file;
    if (line > 0) out += ":" + std::to_string(line);
    if (line > 0 && column > 0) out += ":" + std::to_string(column);
    out += ": ";
  }
  if (!element.empty()) out += element + ", ";
  if (!field.empty()) out += "field '" + field + "' ";
  out += message;
  return out;
}

namespace {
std::string join(const std::vector<Problem>& problems) {
  std::string out;
  for (const auto& p : problems) {
    if (!out.empty()) out += '\n';
    out += p.to_string();
  }
  return out;
}
}  // namespace

InputError::InputError(std::vector<Problem> problems)
    : std::runtime_error(join(problems)), problems_(std::move(problems)) {}

InputError::InputError(Problem problem) : InputError(std::vector<Problem>{std::move(problem)}) {}

void ProblemList::add(std::string_view field, std::string message) {
  Problem p;
  p.element = element_;
  p.field = std::string(field);
  p.message = std::move(message);
  problems_.push_back(std::move(p));
}

void ProblemList::require(bool ok, std::string_view field, double value, std::string_view rule) {
  if (!ok) add(field, "= " + format_value(value) + ": " + std::string(rule));
}

void ProblemList::require_finite(std::string_view field, double value) {
  require(std::isfinite(value), field, value, "must be a finite number");
}

void ProblemList::require_positive(std::string_view field, double value) {
  if (!std::isfinite(value)) return require_finite(field, value);
  require(value > 0.0, field, value, "must be > 0");
}

void ProblemList::require_non_negative(std::string_view field, double value) {
  if (!std::isfinite(value)) return require_finite(field, value);
  require(value >= 0.0, field, value, "must be >= 0");
}

void ProblemList::append(const std::vector<Problem>& others) {
  problems_.insert(problems_.end(), others.begin(), others.end());
}

void ProblemList::throw_if_any() const {
  if (!problems_.empty()) throw InputError(problems_);
}

std::string format_value(double value) {
  if (std::isnan(value)) return "nan";
  if (std::isinf(value)) return value > 0 ? "inf" : "-inf";
  char buf[64];
  auto [end, ec] = std::to_chars(buf, buf + sizeof buf, value);
  if (ec != std::errc{}) return "?";
  return std::string(buf, end);
}

std::string format_fixed(double value, int decimals) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*f", decimals, value);
  std::string text = buf;
  // A negative value that rounds to zero prints as "-0.00": write it as "0.00".
  if (text.front() == '-' && text.find_first_not_of("-0.") == std::string::npos) text.erase(0, 1);
  return text;
}

void assertion_failed(const char* expression, const char* file, int line, const char* message) {
  std::fprintf(stderr, "freshet internal error: %s:%d: assertion '%s' failed: %s\n", file, line,
               expression, message);
  std::abort();
}

}  // namespace freshet
