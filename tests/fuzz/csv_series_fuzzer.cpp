// libFuzzer target: a CSV time series (hydrograph or hyetograph) parsed as the basin reader
// does it (io::parse_series_csv, the body of read_series_csv), then turned into what the run
// uses: a hydrograph series, or rain (a hyetograph of depth blocks, or intensities linear
// between rows). A table the parser accepts must also survive the writer:
// format_series_csv, read back, gives the same times and values (within the 4-ulp search of
// the writer's unit conversion).
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "freshet/core/time_series.hpp"
#include "freshet/hydrology/hyetograph.hpp"
#include "freshet/io/csv_series.hpp"
#include "fuzz_support.hpp"

namespace {

using freshet::fuzz::report_finding;
using freshet::io::SeriesQuantity;
using freshet::io::SeriesTable;

void use_as_hydrograph(const SeriesTable& t) {
  const freshet::PiecewiseLinearSeries q(t.times_s, t.values_si, "series 'fuzz'");
  const double volume_m3 = q.integral(q.start_s(), q.end_s());
  if (std::isnan(volume_m3) || std::isnan(q.mean(q.start_s(), q.end_s()))) {
    report_finding("accepted hydrograph with a NaN volume or mean");
  }
  (void)q.value_at(0.5 * (q.start_s() + q.end_s()));
}

// Rain: a depth table is a hyetograph of blocks (row k's depth fell since row k - 1); an
// intensity table is linear between its instants, like a hydrograph. (The basin reader's
// series storm, built from either, is exercised by the study target through its rain.csv.)
void use_as_rain(const SeriesTable& t) {
  if (t.quantity == SeriesQuantity::rain_intensity) {
    use_as_hydrograph(t);
    return;
  }
  const std::vector<double> depth_m(t.values_si.begin() + (t.values_si.empty() ? 0 : 1),
                                    t.values_si.end());
  const auto rain = freshet::hydrology::Hyetograph::from_depths(t.times_s, depth_m, "storm 'fuzz'");
  const double total_m = rain.total_depth_m();
  const double half_m = rain.cumulative_depth_m(0.5 * (rain.start_s() + rain.end_s()));
  if (!(total_m >= 0.0) || !(half_m >= 0.0) || !(half_m <= total_m)) {
    report_finding("accepted hyetograph with total depth " + freshet::format_value(total_m) +
                   " m and half-time depth " + freshet::format_value(half_m) + " m");
  }
  (void)rain.peak_intensity_m_s();
}

bool close(double a, double b) {
  return a == b || std::fabs(a - b) <= 1e-15 * std::fmax(std::fabs(a), std::fabs(b));
}

void round_trip(const SeriesTable& t) {
  const std::string text = freshet::io::format_series_csv(t, {});
  SeriesTable back;
  try {
    back = freshet::io::parse_series_csv(text, "written.csv");
  } catch (const freshet::InputError& e) {
    report_finding(std::string("the writer's CSV of an accepted table does not read back: ") +
                   e.what());
  }
  if (back.quantity != t.quantity || back.times_s.size() != t.times_s.size()) {
    report_finding("round trip changed the quantity or the row count");
  }
  for (std::size_t k = 0; k < t.times_s.size(); ++k) {
    if (!close(back.times_s[k], t.times_s[k]) || !close(back.values_si[k], t.values_si[k])) {
      report_finding("round trip changed row " + std::to_string(k + 1) + ": " +
                     freshet::format_value(t.times_s[k]) + "," +
                     freshet::format_value(t.values_si[k]) + " -> " +
                     freshet::format_value(back.times_s[k]) + "," +
                     freshet::format_value(back.values_si[k]));
    }
  }
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  const std::string_view text(reinterpret_cast<const char*>(data), size);
  SeriesTable t;
  bool parsed = false;
  // The parser's problems name the file; the series built afterwards are library objects
  // whose problems the basin reader relocates to the file (src/study/basin/study.cpp).
  freshet::fuzz::expect_documented_outcome(
      [&] {
        t = freshet::io::parse_series_csv(text, "fuzz.csv");
        parsed = true;
      },
      /*problems_name_a_file=*/true);
  if (!parsed) return 0;
  if (t.times_s.size() != t.values_si.size()) report_finding("columns differ in length");
  freshet::fuzz::expect_documented_outcome(
      [&t] {
        round_trip(t);
        if (t.quantity == SeriesQuantity::discharge) {
          use_as_hydrograph(t);
        } else {
          use_as_rain(t);
        }
      },
      /*problems_name_a_file=*/false);
  return 0;
}
