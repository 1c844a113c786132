// Shared pieces of the libFuzzer targets (tests/fuzz/README.md, docs/fuzzing.md).
//
// A target feeds one input to a reader and sorts the outcome:
//   * the reader accepts it, or throws one of freshet's documented exceptions (InputError,
//     NumericalError, IoError): expected, the input is simply good or bad;
//   * anything else is a finding: a sanitizer report, a crash, an abort (FRESHET_ASSERT), any
//     other exception (std::bad_alloc, std::out_of_range, ...), or a broken invariant that a
//     target checks on what the reader accepted (report_finding).
#pragma once

#include <cstdio>
#include <cstdlib>
#include <exception>
#include <string>
#include <typeinfo>

#include "freshet/core/error.hpp"

namespace freshet::fuzz {

// Prints what was found and aborts, which libFuzzer reports as a crash and saves the input.
[[noreturn]] inline void report_finding(const std::string& what) {
  std::fprintf(stderr, "\n==freshet fuzz finding== %s\n", what.c_str());
  std::fflush(stderr);
  std::abort();
}

// Every problem of an InputError names at least the file it came from and what is wrong.
inline void check_problems_are_located(const InputError& e, bool needs_file) {
  if (e.problems().empty()) report_finding("InputError with no problem in it");
  for (const Problem& p : e.problems()) {
    if (p.message.empty()) report_finding("InputError problem with an empty message");
    if (needs_file && p.file.empty()) {
      report_finding("InputError problem that names no file: " + p.to_string());
    }
  }
}

// Runs `fn`; the documented exceptions are expected outcomes, anything else is a finding.
template <class Fn>
void expect_documented_outcome(Fn&& fn, bool problems_name_a_file) {
  try {
    fn();
  } catch (const InputError& e) {
    check_problems_are_located(e, problems_name_a_file);
  } catch (const NumericalError&) {
  } catch (const IoError&) {
  } catch (const std::exception& e) {
    report_finding(std::string("undocumented exception ") + typeid(e).name() + ": " + e.what());
  } catch (...) {
    report_finding("undocumented exception of a non-standard type");
  }
}

}  // namespace freshet::fuzz
