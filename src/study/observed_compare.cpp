#include "observed_compare.hpp"

#include <cmath>
#include <limits>

#include "freshet/io/csv_table.hpp"
#include "freshet/reporting/fit_statistics.hpp"

namespace freshet::study::detail {

namespace {

std::string percent(double ratio) {
  if (!std::isfinite(ratio)) return "not defined";
  return (ratio > 0.0 ? "+" : "") + format_fixed(100.0 * ratio, 1) + " %";
}

std::string figure(double v, int decimals) {
  return std::isfinite(v) ? format_fixed(v, decimals) : "not defined";
}

}  // namespace

reporting::ObservedFit pair_observed(const ObservedSeries& observed,
                                     const PiecewiseLinearSeries& routed, double duration_s) {
  reporting::ObservedFit fit;
  fit.station_id = observed.station_id;
  fit.source = observed.file;
  const auto times = observed.flow.times_s();
  const auto values = observed.flow.values();
  for (std::size_t k = 0; k < times.size(); ++k) {
    if (times[k] < 0.0 || times[k] > duration_s) continue;
    fit.times_s.push_back(times[k]);
    fit.observed_m3s.push_back(values[k]);
    fit.routed_m3s.push_back(routed.value_at(times[k]));
  }
  if (fit.times_s.size() >= 2) {
    fit.fit = reporting::fit_statistics(fit.times_s, fit.routed_m3s, fit.observed_m3s);
  } else {
    const double nan = std::numeric_limits<double>::quiet_NaN();
    fit.fit = {fit.times_s.size(), nan, nan, nan, nan, nan, nan, nan, nan, nan, nan, nan};
  }
  return fit;
}

std::string fit_note(const reporting::ObservedFit& o) {
  const reporting::FitStatistics& f = o.fit;
  if (f.pairs < 2) {
    return "observed hydrograph (" + o.source + "): " + std::to_string(f.pairs) +
           " reading(s) within the run, too few to compare";
  }
  const double timing_min = f.peak_timing_error_s / 60.0;
  return "routed against observed (" + o.source + ", " + std::to_string(f.pairs) +
         " readings): Nash-Sutcliffe efficiency " + figure(f.nse, 3) + ", Kling-Gupta efficiency " +
         figure(f.kge, 3) + ", peak error " + (f.peak_error_m3s > 0.0 ? "+" : "") +
         figure(f.peak_error_m3s, 3) + " m3/s (" + percent(f.peak_error_relative) +
         "), peak timing error " + (timing_min > 0.0 ? "+" : "") + figure(timing_min, 0) +
         " min, volume error " + percent(f.volume_error_relative);
}

void write_observed_csv(const std::filesystem::path& path, const reporting::ObservedFit& o,
                        const std::string& time_origin_iso, const std::string& source,
                        io::Overwrite overwrite, io::OutputSet* set) {
  std::string text = "time_s,observed_discharge_m3s,routed_discharge_m3s\n";
  for (std::size_t k = 0; k < o.times_s.size(); ++k) {
    text += io::csv_number(o.times_s[k]) + "," + io::csv_number(o.observed_m3s[k]) + "," +
            io::csv_number(o.routed_m3s[k]) + "\n";
  }
  io::CsvDescription d;
  d.title = "freshet routed against observed: station " + o.station_id;
  d.source = source;
  d.time_origin_iso = time_origin_iso;
  d.notes = {fit_note(o),
             "paired at the observed readings within the run; the routed discharge is linear "
             "between coupling steps",
             "Nash & Sutcliffe (1970) efficiency; Kling-Gupta efficiency of Gupta et al. (2009), "
             "J. Hydrol. 377, eq. 9; volume error from trapezoidal integrals over the readings"};
  const std::string t_unit = "s since " + time_origin_iso;
  d.columns = {{"time_s", t_unit, "time of the observed reading", "double"},
               {"observed_discharge_m3s", "m3 s-1", "observed discharge", "double"},
               {"routed_discharge_m3s", "m3 s-1", "routed discharge at that time", "double"}};
  io::write_csv_with_metadata(path, text, d, overwrite, set);
}

}  // namespace freshet::study::detail
