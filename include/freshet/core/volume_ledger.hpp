// The volume ledger every element keeps: what entered, what left, what was lost and what is
// stored, since the element's last reset. Numerical schemes update it with exactly the fluxes
// they apply, so for every element
//   inflow + lateral + rain - loss - outflow - (storage - initial storage) = 0
// to round-off, and the driver and the reports read one type for reaches, subcatchments,
// ponds and junctions alike.
//
//   VolumeLedger l;  l.inflow_m3 = 100.0;  l.outflow_m3 = 60.0;  l.storage_m3 = 40.0;
//   l.balance_error_m3();   // 0
#pragma once

namespace freshet {

struct VolumeLedger {
  double inflow_m3 = 0.0;           // in at the upstream end of a reach, or into a pool
  double lateral_m3 = 0.0;          // along a reach (runoff, lateral inflow)
  double rain_m3 = 0.0;             // on a subcatchment
  double loss_m3 = 0.0;             // infiltration and depression storage
  double outflow_m3 = 0.0;          // out at the downstream end
  double initial_storage_m3 = 0.0;  // storage when the ledger was (re)started
  double storage_m3 = 0.0;          // storage now

  [[nodiscard]] double supplied_m3() const noexcept { return inflow_m3 + lateral_m3 + rain_m3; }
  [[nodiscard]] double balance_error_m3() const noexcept {
    return supplied_m3() - loss_m3 - outflow_m3 - (storage_m3 - initial_storage_m3);
  }
  // |balance error| / supplied volume; relative to the initial storage when nothing was
  // supplied; 0 when nothing was supplied or stored and nothing is missing.
  [[nodiscard]] double relative_balance_error() const noexcept;
};

}  // namespace freshet
