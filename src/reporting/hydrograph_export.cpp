#include "freshet/reporting/hydrograph_export.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <optional>

#include "freshet/core/error.hpp"
#include "freshet/reporting/series_resample.hpp"

namespace freshet::reporting {

namespace {

// Exported peaks further than this from the routed peak are pointed out (our criterion, no
// source: a coarse interval can cut or, with a volume correction, raise a sharp peak).
constexpr double kExportPeakTolerance = 0.02;

}  // namespace

ExportedHydrograph export_hydrograph(const RunRecorder& recorder, std::size_t i, double dt_s,
                                     std::size_t n_intervals, double routed_peak_m3s) {
  const std::string& id = recorder.stations()[i].id;
  const PiecewiseLinearSeries q = recorder.series(i, "station '" + id + "'");
  const PiecewiseLinearSeries volume = recorder.volume_series(i, "station '" + id + "'");
  // Every form keeps the routed total volume exactly (series_resample.hpp); they differ in
  // shape. The one whose peak comes closest to the routed peak is written: at a short
  // interval that is usually the local correction (base flow untouched, peak kept), at a
  // coarse one the scaled samples (the sampled shape, one factor).
  struct Attempt {
    ResampleMethod method;
    const char* label;
  };
  const Attempt attempts[] = {
      {ResampleMethod::local_correction,
       "routed volume kept: each sample corrected by the volume its two intervals miss"},
      {ResampleMethod::interval_volumes, "routed volume kept in every interval"},
      {ResampleMethod::scaled_samples, "routed volume kept by scaling the samples"}};
  std::optional<PiecewiseLinearSeries> r;
  std::string method;
  double best_miss = std::numeric_limits<double>::infinity();
  bool scaled_refused = false;
  for (const Attempt& a : attempts) {
    std::optional<PiecewiseLinearSeries> candidate =
        try_resample_preserving_volume(q, 0.0, dt_s, n_intervals, a.method, &volume);
    if (!candidate) {
      scaled_refused = a.method == ResampleMethod::scaled_samples;
      continue;
    }
    const auto values = candidate->values();
    const double miss =
        std::abs(*std::max_element(values.begin(), values.end()) - routed_peak_m3s);
    if (miss < best_miss) {
      best_miss = miss;
      r = std::move(candidate);
      method = a.label;
    }
  }
  if (!r && scaled_refused) {
    throw InputError(resample_refusal(dt_s, ResampleMethod::scaled_samples));
  }
  if (!r) {
    throw NumericalError("hydrograph export of station '" + id +
                         "': no resampled series could be formed (non-finite peak or volume)");
  }
  std::string note;
  const double exported_peak_m3s = *std::max_element(r->values().begin(), r->values().end());
  const double change = exported_peak_m3s / routed_peak_m3s - 1.0;
  if (routed_peak_m3s > 0.0 && std::abs(change) > kExportPeakTolerance) {
    note = "the exported peak " + format_fixed(exported_peak_m3s, 3) + " m3/s is " +
           format_fixed(100.0 * std::abs(change), 1) + " % " + (change < 0.0 ? "below" : "above") +
           " the routed peak " + format_fixed(routed_peak_m3s, 3) + " m3/s at this " +
           format_value(dt_s / 60.0) + "-min interval; a shorter export interval keeps it closer";
  }
  return {std::move(*r), std::move(method), std::move(note)};
}

}  // namespace freshet::reporting
