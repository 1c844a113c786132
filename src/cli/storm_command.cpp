// `freshet storm`: builds a design storm with the hydrology module and prints it as an
// aligned table (block start, end, intensity, block depth, cumulative depth, total) or exports
// it as a freshet CSV hyetograph (rain depth per interval, docs/outputs.md).
//
// Methods: alternating-block and chicago from an IDF formula i = a / (t + b)^c (i in mm/h,
// t and b in minutes), and nrcs-24h (NRCS Types I, IA, II, III scaled to a 24-hour depth).
// Every bad or missing option is reported at once, naming the option (InputError, exit 2).
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <iostream>
#include <limits>
#include <memory>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "commands.hpp"
#include "freshet/core/caution.hpp"
#include "freshet/core/error.hpp"
#include "freshet/core/units.hpp"
#include "freshet/hydrology/design_storm.hpp"
#include "freshet/hydrology/hyetograph.hpp"
#include "freshet/hydrology/idf_curve.hpp"
#include "freshet/hydrology/nrcs_distribution.hpp"
#include "freshet/io/csv_series.hpp"
#include "freshet_version.hpp"

namespace freshet::cli {
namespace {

constexpr double kNoValue = std::numeric_limits<double>::quiet_NaN();
constexpr const char* kElement = "freshet storm";

enum class StormMethod { alternating_block, chicago, nrcs_24h };

struct StormArgs {
  std::string method;
  double idf_a = kNoValue, idf_b_min = kNoValue, idf_c = kNoValue;
  double duration_min = kNoValue, step_min = kNoValue, peak_ratio = kNoValue;
  std::string type;
  double depth_mm = kNoValue, depth_in = kNoValue;
  std::string units = "si";
  std::string out;
  bool overwrite = false;
};

bool given(double value) { return !std::isnan(value); }

std::optional<StormMethod> parse_method(const std::string& text) {
  if (text == "alternating-block") return StormMethod::alternating_block;
  if (text == "chicago") return StormMethod::chicago;
  if (text == "nrcs-24h") return StormMethod::nrcs_24h;
  return std::nullopt;
}

void require_given(ProblemList& p, const char* option, double value, const std::string& method) {
  if (!given(value)) p.add(option, std::string("is required with --method ") + method);
}

void reject_given(ProblemList& p, const char* option, bool is_given, const std::string& why) {
  if (is_given) p.add(option, "does not apply: " + why);
}

// Checks of the IDF methods' options (alternating-block, chicago).
void check_idf_options(const StormArgs& a, StormMethod method, ProblemList& p) {
  const std::pair<const char*, double> required[] = {
      {"--idf-a", a.idf_a}, {"--idf-b", a.idf_b_min}, {"--idf-c", a.idf_c},
      {"--duration-min", a.duration_min}, {"--step-min", a.step_min}};
  for (const auto& [option, value] : required) require_given(p, option, value, a.method);
  if (given(a.idf_a)) p.require_positive("--idf-a", a.idf_a);
  if (given(a.idf_b_min)) p.require_non_negative("--idf-b", a.idf_b_min);
  if (given(a.idf_c)) {
    p.require(std::isfinite(a.idf_c) && a.idf_c > 0.0 && a.idf_c <= 1.0, "--idf-c", a.idf_c,
              "must be in (0, 1] (depth must not fall with duration)");
  }
  if (given(a.duration_min)) p.require_positive("--duration-min", a.duration_min);
  if (given(a.step_min)) p.require_positive("--step-min", a.step_min);
  if (given(a.duration_min) && given(a.step_min) && a.step_min > 0.0) {
    p.require(a.step_min <= a.duration_min, "--step-min", a.step_min,
              "must not exceed --duration-min = " + format_value(a.duration_min));
    const double blocks = a.duration_min / a.step_min;
    if (method == StormMethod::alternating_block && std::isfinite(blocks)) {
      p.require(std::abs(blocks - std::round(blocks)) <= 1e-9 * blocks, "--step-min", a.step_min,
                "must divide --duration-min = " + format_value(a.duration_min) +
                    " into whole blocks (alternating block method)");
    }
  }
  if (given(a.peak_ratio)) {
    p.require(a.peak_ratio >= 0.0 && a.peak_ratio <= 1.0, "--peak-ratio", a.peak_ratio,
              "must be in [0, 1]");
  }
  const std::string why = "used with --method nrcs-24h only";
  reject_given(p, "--type", !a.type.empty(), why);
  reject_given(p, "--depth-mm", given(a.depth_mm), why + " (an IDF storm holds the IDF depth)");
  reject_given(p, "--depth-in", given(a.depth_in), why + " (an IDF storm holds the IDF depth)");
}

void check_nrcs_options(const StormArgs& a, ProblemList& p) {
  if (a.type.empty()) {
    p.add("--type", "is required with --method nrcs-24h (I, IA, II or III)");
  } else if (!hydrology::parse_nrcs_rain_type(a.type)) {
    p.add("--type", "= '" + a.type + "': must be one of I, IA, II, III");
  }
  if (given(a.depth_mm) == given(a.depth_in)) {
    p.add("--depth-mm", "give exactly one of --depth-mm and --depth-in with --method nrcs-24h");
  }
  if (given(a.depth_mm)) p.require_non_negative("--depth-mm", a.depth_mm);
  if (given(a.depth_in)) p.require_non_negative("--depth-in", a.depth_in);
  require_given(p, "--step-min", a.step_min, a.method);
  if (given(a.step_min)) {
    p.require(std::isfinite(a.step_min) && a.step_min > 0.0 && a.step_min <= 1440.0,
              "--step-min", a.step_min, "must be in (0, 1440] min");
  }
  const std::string why = "the NRCS storm lasts 24 h and is scaled to its depth";
  const std::pair<const char*, double> unused[] = {
      {"--idf-a", a.idf_a}, {"--idf-b", a.idf_b_min}, {"--idf-c", a.idf_c},
      {"--duration-min", a.duration_min}, {"--peak-ratio", a.peak_ratio}};
  for (const auto& [option, value] : unused) reject_given(p, option, given(value), why);
}

// Validates every option (all problems at once) and returns the method.
StormMethod check_options(const StormArgs& a) {
  ProblemList p(kElement);
  const std::optional<StormMethod> method = parse_method(a.method);
  if (a.method.empty()) {
    p.add("--method", "is required: alternating-block, chicago or nrcs-24h");
  } else if (!method) {
    p.add("--method", "= '" + a.method + "': must be alternating-block, chicago or nrcs-24h");
  }
  if (!units::parse_system(a.units)) p.add("--units", "= '" + a.units + "': must be si or us");
  if (method == StormMethod::nrcs_24h) check_nrcs_options(a, p);
  if (method && method != StormMethod::nrcs_24h) check_idf_options(a, *method, p);
  p.throw_if_any();
  return *method;
}

hydrology::Hyetograph build_storm(const StormArgs& a, StormMethod method) {
  constexpr double kMin = units::kSecondsPerMinute;
  if (method == StormMethod::nrcs_24h) {
    const double depth_m = given(a.depth_mm) ? a.depth_mm * 1e-3 : a.depth_in * units::kMetresPerInch;
    return hydrology::nrcs_24h_storm(*hydrology::parse_nrcs_rain_type(a.type), depth_m,
                                     a.step_min * kMin, "NRCS 24-hour storm");
  }
  const auto idf = hydrology::IdfCurve::from_formula(
      {.a = a.idf_a, .b_min = a.idf_b_min, .c = a.idf_c}, "IDF formula (--idf-a, --idf-b, --idf-c)");
  const hydrology::DesignStormOptions options{
      .duration_s = a.duration_min * kMin,
      .step_s = a.step_min * kMin,
      .peak_ratio = given(a.peak_ratio) ? a.peak_ratio : 0.5};
  return method == StormMethod::chicago
             ? hydrology::chicago_storm(idf, options, "Chicago storm")
             : hydrology::alternating_block_storm(idf, options, "alternating block storm");
}

// One line describing the storm, for the console and the CSV metadata.
std::string describe(const StormArgs& a, StormMethod method) {
  if (method == StormMethod::nrcs_24h) {
    const std::string depth = given(a.depth_mm) ? format_value(a.depth_mm) + " mm"
                                                : format_value(a.depth_in) + " in";
    return "NRCS 24-hour Type " + a.type + " storm of " + depth + ", blocks of " +
           format_value(a.step_min) + " min";
  }
  return std::string(method == StormMethod::chicago ? "Chicago" : "alternating block") +
         " storm from the IDF formula i = " + format_value(a.idf_a) + " / (t + " +
         format_value(a.idf_b_min) + ")^" + format_value(a.idf_c) +
         " (i mm/h, t min), duration " + format_value(a.duration_min) + " min, blocks of " +
         format_value(a.step_min) + " min, peak at " +
         format_value(given(a.peak_ratio) ? a.peak_ratio : 0.5) + " of the duration";
}

struct PrintUnits {
  double depth_factor_m;  // metres per printed depth unit
  const char* depth;      // "mm" / "in"
  const char* intensity;  // "mm/h" / "in/h"
  const char* intensity_column;  // "intensity_mm_per_h" / "intensity_in_per_h"
  int decimals;
};

PrintUnits print_units(const std::string& system) {
  if (system == "us") return {units::kMetresPerInch, "in", "in/h", "intensity_in_per_h", 4};
  return {1e-3, "mm", "mm/h", "intensity_mm_per_h", 3};
}

std::string fixed(double value, int decimals) {
  char buf[48];
  std::snprintf(buf, sizeof buf, "%.*f", decimals, value);
  return buf;
}

std::string pad_left(const std::string& text, std::size_t width) {
  return text.size() >= width ? text : std::string(width - text.size(), ' ') + text;
}

void print_table(const hydrology::Hyetograph& storm, const PrintUnits& u) {
  const std::vector<std::string> head{"start_min", "end_min", u.intensity_column,
                                      std::string("depth_") + u.depth,
                                      std::string("cumulative_") + u.depth};
  std::vector<std::vector<std::string>> rows{head};
  const auto t = storm.boundary_times_s();
  double cumulative_m = 0.0;
  for (std::size_t k = 0; k < storm.block_count(); ++k) {
    cumulative_m += storm.block_depths_m()[k];
    rows.push_back({fixed(t[k] / 60.0, 2), fixed(t[k + 1] / 60.0, 2),
                    fixed(storm.intensities_m_s()[k] * 3600.0 / u.depth_factor_m, u.decimals),
                    fixed(storm.block_depths_m()[k] / u.depth_factor_m, u.decimals),
                    fixed(cumulative_m / u.depth_factor_m, u.decimals)});
  }
  std::vector<std::size_t> width(head.size(), 0);
  for (const auto& row : rows) {
    for (std::size_t k = 0; k < row.size(); ++k) width[k] = std::max(width[k], row[k].size());
  }
  for (const auto& row : rows) {
    for (std::size_t k = 0; k < row.size(); ++k) {
      std::cout << (k ? "  " : "") << pad_left(row[k], width[k]);
    }
    std::cout << "\n";
  }
}

void print_totals(const hydrology::Hyetograph& storm, const PrintUnits& u) {
  std::cout << "total depth: " << fixed(storm.total_depth_m() / u.depth_factor_m, u.decimals)
            << " " << u.depth << " over " << fixed(storm.duration_s() / 60.0, 2) << " min in "
            << storm.block_count() << " blocks; peak intensity "
            << fixed(storm.peak_intensity_m_s() * 3600.0 / u.depth_factor_m, u.decimals) << " "
            << u.intensity << "\n";
}

void write_csv(const hydrology::Hyetograph& storm, const StormArgs& a, const std::string& what) {
  io::SeriesTable table;
  table.quantity = io::SeriesQuantity::rain_depth;
  const auto t = storm.boundary_times_s();
  table.times_s.assign(t.begin(), t.end());
  table.values_si.push_back(0.0);
  for (double d : storm.block_depths_m()) table.values_si.push_back(d);
  table.metadata.push_back("design storm: " + what);
  io::CsvWriteOptions options;
  options.time_unit = io::ColumnUnit::time_min;
  options.value_unit = a.units == "us" ? io::ColumnUnit::depth_in : io::ColumnUnit::depth_mm;
  options.title = "freshet hyetograph (design storm)";
  options.time_base = "storm start";
  options.source = std::string("freshet ") + FRESHET_VERSION;
  options.overwrite = a.overwrite ? io::Overwrite::yes : io::Overwrite::no;
  io::write_series_csv(a.out, table, options);
}

int run_storm(const StormArgs& a) {
  const StormMethod method = check_options(a);
  const hydrology::Hyetograph storm = build_storm(a, method);
  const PrintUnits u = print_units(a.units);
  const std::string what = describe(a, method);
  if (!a.out.empty()) write_csv(storm, a, what);
  std::cout << "freshet storm: " << what << "\n";
  if (a.out.empty()) {
    std::cout << "\n";
    print_table(storm, u);
    std::cout << "\n";
  } else {
    std::cout << "wrote " << storm.block_count() << " blocks to " << a.out << "\n";
  }
  print_totals(storm, u);
  std::cout << "\n" << kCautionText << "\n";
  return kExitOk;
}

}  // namespace

void add_storm_command(CLI::App& app, const GlobalOptions& /*global*/, Action& action) {
  auto* cmd = app.add_subcommand(
      "storm", "Build a design storm (hyetograph) and print it as a table or export it as CSV");
  auto a = std::make_shared<StormArgs>();
  cmd->add_option("--method", a->method, "alternating-block | chicago | nrcs-24h");
  cmd->add_option("--idf-a", a->idf_a,
                  "IDF formula i = a / (t + b)^c: a, in (mm/h) min^c (i in mm/h, t in min)");
  cmd->add_option("--idf-b", a->idf_b_min, "IDF formula: b, in minutes (>= 0)");
  cmd->add_option("--idf-c", a->idf_c, "IDF formula: exponent c, in (0, 1]");
  cmd->add_option("--duration-min", a->duration_min, "Storm duration (min), IDF methods");
  cmd->add_option("--step-min", a->step_min, "Block length (min)");
  cmd->add_option("--peak-ratio", a->peak_ratio,
                  "Time of peak / duration, in [0, 1] (IDF methods; default 0.5, centred)");
  cmd->add_option("--type", a->type, "NRCS 24-hour distribution: I | IA | II | III");
  cmd->add_option("--depth-mm", a->depth_mm, "NRCS: 24-hour rain depth (mm)");
  cmd->add_option("--depth-in", a->depth_in, "NRCS: 24-hour rain depth (in)");
  cmd->add_option("--units", a->units, "Printed and exported units: si (mm, mm/h) | us (in, in/h)");
  cmd->add_option("--out", a->out, "Write the storm to this CSV file (rain depth per interval)")
      ->check(kNonEmptyPath);
  cmd->add_flag("--overwrite", a->overwrite, "Replace an existing --out file");
  cmd->footer(
      "Examples:\n"
      "  freshet storm --method chicago --idf-a 2000 --idf-b 10 --idf-c 0.8 \\\n"
      "      --duration-min 120 --step-min 10 --peak-ratio 0.4\n"
      "  freshet storm --method alternating-block --idf-a 2000 --idf-b 10 --idf-c 0.8 \\\n"
      "      --duration-min 60 --step-min 5 --out storm-t10.csv\n"
      "  freshet storm --method nrcs-24h --type II --depth-in 5 --step-min 15 --units us\n");
  cmd->callback([&action, a] { action = [a] { return run_storm(*a); }; });
}

}  // namespace freshet::cli
