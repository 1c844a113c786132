// Plausibility of a run's results by their scale: a unit mix-up that the inputs alone do not
// reveal (an area in m2 typed as ha, a hydrograph in ft3/s labelled m3/s) shows in peaks out
// of scale with the area draining to them. Warnings only; they go into the run's summary
// (console, CSV, JSON). Called by run_study after routing and before any file is renamed
// into place.
#pragma once

#include "freshet/reporting/summary.hpp"
#include "freshet/network/driver.hpp"

namespace freshet::reporting::detail {

// The envelope of the world's record floods, as a unit discharge (m3/s per km2) at a drainage
// area (km2): Creager, Justin & Hinds (1945), Q = 46 C A^(0.894 A^-0.048) ft3/s with A in mi2
// and C = 100 (from memory). Defined from 1 mi2 (2.59 km2); NaN below.
double record_flood_envelope_m3s_per_km2(double area_km2);

// Every station fed only by subcatchments (no inflow hydrograph upstream, whose area is not
// known) and draining at least 1 mi2 warns when its peak per unit area exceeds the envelope.
// `summary.stations` is in model order.
// `reports` are the elements' reports (Element::report()), in model order.
void add_result_scale_warnings(const network::Model& model,
                               const std::vector<network::ElementReport>& reports,
                               RunSummary& summary);

}  // namespace freshet::reporting::detail
