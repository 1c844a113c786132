// A routed hydrograph resampled for export to a downstream model: a station's discharge kept
// at every coupling step (RunRecorder::keep_series), brought to a regular interval keeping the
// routed total volume exactly (series_resample.hpp). Every resampling method keeps the volume;
// they differ in shape, and the one whose peak comes closest to the routed peak is chosen. An
// exported peak further than 2 % from the routed one is pointed out (our criterion, no source:
// a coarse interval can cut or, with a volume correction, raise a sharp peak).
//
//   recorder.keep_series(i);  ... the run ...
//   ExportedHydrograph h = export_hydrograph(recorder, i, 300.0, 72, routed_peak_m3s);
//   // h.series: 73 samples 5 min apart; h.method: how the volume was kept; h.peak_note
#pragma once

#include <cstddef>
#include <string>

#include "freshet/core/time_series.hpp"
#include "freshet/reporting/run_recorder.hpp"

namespace freshet::reporting {

struct ExportedHydrograph {
  PiecewiseLinearSeries series;
  std::string method;     // how the routed volume was kept, in words (for the file's header)
  std::string peak_note;  // empty unless the exported peak misses the routed one by > 2 %
};

// Station i's kept series over [0, n_intervals dt_s]. Throws InputError when no method can
// form the series at this interval (the scaled samples refused: choose another interval),
// NumericalError when none could be formed at all (a non-finite peak or volume).
ExportedHydrograph export_hydrograph(const RunRecorder& recorder, std::size_t i, double dt_s,
                                     std::size_t n_intervals, double routed_peak_m3s);

}  // namespace freshet::reporting
