#include "exit_codes.hpp"

#include "freshet/core/error.hpp"
#include "freshet/study/study_run.hpp"

namespace freshet::cli {
namespace {

int report_internal(std::ostream& err, const char* what) {
  err << "freshet: internal error: " << what
      << "; please report it with the command line and the input files\n"
         "freshet: CAUTION: runs that had not finished wrote no result; do not rely on any "
         "result of this command until the error is understood\n";
  return kExitInternal;
}

}  // namespace

int report_failure(const std::exception_ptr& failure, std::ostream& err,
                   bool& library_state_unknown) {
  try {
    std::rethrow_exception(failure);
  } catch (const UsageError& e) {
    err << "freshet: " << e.what() << "\n";
    return kExitUsage;
  } catch (const InputError& e) {
    err << "freshet: the input has " << e.problems().size() << " problem(s):\n"
        << e.what() << "\n";
    return kExitBadInput;
  } catch (const NumericalError& e) {
    err << "freshet: numerical failure: " << e.what() << "\n";
    return kExitNumerical;
  } catch (const IoError& e) {
    err << "freshet: " << e.what() << "\n";
    library_state_unknown = true;
    return kExitIo;
  } catch (const study::RunInterrupted&) {
    return kExitOk;  // reported by main() from the signal received
  } catch (const std::exception& e) {
    library_state_unknown = true;
    return report_internal(err, e.what());
  } catch (...) {
    library_state_unknown = true;
    return report_internal(err, "an exception of unknown type");
  }
}

}  // namespace freshet::cli
