// The command line's failure-to-exit-code mapping (src/cli/exit_codes.hpp), driven with each
// kind of exception, including ones freshet never means to throw (the catch-all of main()).
// Reference: the exit-code table of docs/user-guide.md; 70 is EX_SOFTWARE of BSD sysexits.h
// ("an internal software error has been detected").
#include "exit_codes.hpp"

#include <filesystem>
#include <gtest/gtest.h>
#include <new>
#include <sstream>
#include <stdexcept>
#include <string>

#include "freshet/core/error.hpp"
#include "freshet/study/study_run.hpp"

namespace freshet::cli {
namespace {

struct Reported {
  int code = -1;
  std::string message;
  bool library_state_unknown = false;
};

template <class E>
Reported report(const E& exception) {
  Reported r;
  std::ostringstream err;
  r.code = report_failure(std::make_exception_ptr(exception), err, r.library_state_unknown);
  r.message = err.str();
  return r;
}

TEST(ExitCodes, FreshetErrorsKeepTheirCodes) {
  EXPECT_EQ(report(UsageError("two runs of this command would both write 'x'")).code, 1);
  const Reported input = report(InputError(Problem{"a.toml", 3, 1, "reach 'r1'", "slope", "= -1"}));
  EXPECT_EQ(input.code, 2);
  EXPECT_NE(input.message.find("the input has 1 problem(s):\na.toml:3:1: reach 'r1'"),
            std::string::npos)
      << input.message;
  const Reported numerical = report(NumericalError("culvert 'c': critical depth (m) ..."));
  EXPECT_EQ(numerical.code, 3);
  EXPECT_EQ(numerical.message, "freshet: numerical failure: culvert 'c': critical depth (m) ...\n");
  const Reported io = report(IoError("cannot write 'out/a.nc'"));
  EXPECT_EQ(io.code, 4);
  EXPECT_TRUE(io.library_state_unknown);
  EXPECT_EQ(report(study::RunInterrupted("stopped")).code, 0);
}

// Failures freshet does not expect end with 70, the message, a request to report it and the
// caution about results, instead of std::terminate.
TEST(ExitCodes, AnythingElseIsAnInternalErrorWithItsMessage) {
  for (const Reported& r :
       {report(std::out_of_range("vector::at")), report(std::bad_alloc()),
        report(std::filesystem::filesystem_error(
            "cannot stat", std::filesystem::path("x"),
            std::make_error_code(std::errc::permission_denied)))}) {
    EXPECT_EQ(r.code, 70);
    EXPECT_EQ(r.message.rfind("freshet: internal error: ", 0), 0u) << r.message;
    EXPECT_NE(r.message.find("; please report it"), std::string::npos) << r.message;
    EXPECT_NE(r.message.find("CAUTION: runs that had not finished wrote no result"),
              std::string::npos)
        << r.message;
    EXPECT_TRUE(r.library_state_unknown);
  }
  EXPECT_NE(report(std::out_of_range("vector::at")).message.find("internal error: vector::at;"),
            std::string::npos);
  const Reported unknown = report(42);
  EXPECT_EQ(unknown.code, 70);
  EXPECT_NE(unknown.message.find("internal error: an exception of unknown type;"),
            std::string::npos)
      << unknown.message;
}

}  // namespace
}  // namespace freshet::cli
