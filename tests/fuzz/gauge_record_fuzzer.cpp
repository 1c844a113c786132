// libFuzzer target: a rain-gauge record as it comes (io::parse_gauge_csv, the body of
// read_gauge_csv), read under reading options chosen by the input's first byte (separator
// stated or detected, depth or intensity, the missing-value rule, columns by position or by
// name), then turned into rain as the study does (src/study/basin/gauge_storm.cpp): a
// hyetograph of depth blocks, and a weighted mix of it with itself. What the reader accepts
// must keep its promises: times strictly increasing and finite, values finite and >= 0, no
// gap left, and the mix holding the record's depth.
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "freshet/hydrology/areal_rain.hpp"
#include "freshet/hydrology/hyetograph.hpp"
#include "freshet/io/gauge_record.hpp"
#include "fuzz_support.hpp"

namespace {

using freshet::fuzz::report_finding;
using freshet::io::ColumnUnit;
using freshet::io::GaugeFormat;
using freshet::io::MissingRule;
using freshet::io::SeriesQuantity;
using freshet::io::SeriesTable;

GaugeFormat format_from(std::uint8_t b) {
  GaugeFormat f;
  f.separator = (b & 3u) == 1u ? ',' : (b & 3u) == 2u ? ';' : '\0';
  f.value_unit = (b & 4u) != 0u ? ColumnUnit::intensity_mm_per_h : ColumnUnit::depth_mm;
  f.missing = static_cast<MissingRule>((b >> 3u) % 3u);
  if ((b & 32u) != 0u) {  // columns by name, as the seeds' headers write them
    f.time_column = "time";
    f.value_column = "rain";
  }
  f.default_offset_min = (b & 64u) != 0u ? 60 : 0;
  f.origin_epoch_s = (b & 128u) != 0u ? 1778716800.0 : 0.0;  // 2026-05-14T00:00:00Z
  return f;
}

void check_accepted(const SeriesTable& t) {
  if (t.times_s.size() != t.values_si.size() || t.times_s.size() < 2) {
    report_finding("accepted record with " + std::to_string(t.times_s.size()) + " times and " +
                   std::to_string(t.values_si.size()) + " values");
  }
  for (std::size_t k = 0; k < t.times_s.size(); ++k) {
    if (!std::isfinite(t.times_s[k]) || (k > 0 && !(t.times_s[k] > t.times_s[k - 1]))) {
      report_finding("accepted record whose time " + std::to_string(k + 1) +
                     " is not finite or does not increase");
    }
    if (!std::isfinite(t.values_si[k]) || t.values_si[k] < 0.0) {
      report_finding("accepted record with value " + freshet::format_value(t.values_si[k]));
    }
  }
}

void use_as_rain(const SeriesTable& t) {
  std::vector<double> depth_m;
  for (std::size_t k = 1; k < t.times_s.size(); ++k) {
    depth_m.push_back(t.quantity == SeriesQuantity::rain_depth
                          ? t.values_si[k]
                          : 0.5 * (t.values_si[k] + t.values_si[k - 1]) *
                                (t.times_s[k] - t.times_s[k - 1]));
  }
  const auto rain = freshet::hydrology::Hyetograph::from_depths(t.times_s, depth_m, "gauge 'fuzz'");
  const auto mix = freshet::hydrology::mix_hyetographs({{0.25, &rain}, {0.75, &rain}}, "mix");
  const double total = rain.total_depth_m();
  if (!(std::fabs(mix.total_depth_m() - total) <= 1e-12 * total + 1e-300)) {
    report_finding("a 0.25/0.75 mix of a record with itself holds " +
                   freshet::format_value(mix.total_depth_m()) + " m, not " +
                   freshet::format_value(total) + " m");
  }
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  if (size == 0) return 0;
  const GaugeFormat format = format_from(data[0]);
  const std::string_view text(reinterpret_cast<const char*>(data) + 1, size - 1);
  SeriesTable t;
  bool parsed = false;
  freshet::fuzz::expect_documented_outcome(
      [&] {
        t = freshet::io::parse_gauge_csv(text, "fuzz.csv", format);
        parsed = true;
      },
      /*problems_name_a_file=*/true);
  if (!parsed) return 0;
  check_accepted(t);
  freshet::fuzz::expect_documented_outcome([&t] { use_as_rain(t); },
                                           /*problems_name_a_file=*/false);
  return 0;
}
