#include "freshet/core/volume_ledger.hpp"

#include <cmath>
#include <limits>

namespace freshet {

double VolumeLedger::relative_balance_error() const noexcept {
  const double error = std::abs(balance_error_m3());
  double scale = supplied_m3();
  if (!(scale > 0.0)) scale = initial_storage_m3;
  if (!(scale > 0.0)) return error == 0.0 ? 0.0 : std::numeric_limits<double>::infinity();
  return error / scale;
}

}  // namespace freshet
