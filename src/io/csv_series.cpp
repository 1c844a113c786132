#include "freshet/io/csv_series.hpp"

#include <algorithm>
#include <array>
#include <charconv>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <sstream>

#include "freshet/core/caution.hpp"
#include "freshet/core/error.hpp"
#include "freshet/core/units.hpp"
#include "freshet/io/input_ranges.hpp"
#include "csv_reading.hpp"

namespace freshet::io {

namespace {

struct UnitInfo {
  ColumnUnit unit;
  std::string_view name;
  double to_si;
  std::string_view udunits;  // the unit as UDUNITS text, for the CSV's metadata sidecar
};

// Factors: NIST SP 811 (2008), Appendix B (foot = 0.3048 m and inch = 0.0254 m exactly).
constexpr double kMmPerHourToMs = 1e-3 / units::kSecondsPerHour;
const std::array<UnitInfo, 9> kUnits{{
    {ColumnUnit::time_s, "time_s", 1.0, "s"},
    {ColumnUnit::time_min, "time_min", units::kSecondsPerMinute, "min"},
    {ColumnUnit::time_h, "time_h", units::kSecondsPerHour, "h"},
    {ColumnUnit::discharge_m3s, "discharge_m3s", 1.0, "m3 s-1"},
    {ColumnUnit::discharge_cfs, "discharge_cfs", units::kCubicMetresPerCubicFoot, "ft3 s-1"},
    {ColumnUnit::intensity_mm_per_h, "intensity_mm_per_h", kMmPerHourToMs, "mm h-1"},
    {ColumnUnit::intensity_in_per_h, "intensity_in_per_h",
     units::kMetresPerInch / units::kSecondsPerHour, "in h-1"},
    {ColumnUnit::depth_mm, "depth_mm", 1e-3, "mm"},
    {ColumnUnit::depth_in, "depth_in", units::kMetresPerInch, "in"},
}};

const UnitInfo& info(ColumnUnit unit) { return kUnits[static_cast<std::size_t>(unit)]; }

// Hard limits on a row's time and value, in SI: the series rows of the basin reader's range
// table (src/io/input_ranges.cpp), where every hard limit of the input lives.
const detail::InputRange& range_of_value(SeriesQuantity q) {
  switch (q) {
    case SeriesQuantity::discharge: return detail::range_of(detail::Quantity::series_discharge);
    case SeriesQuantity::rain_intensity:
      return detail::range_of(detail::Quantity::series_rain_intensity);
    case SeriesQuantity::rain_depth: return detail::range_of(detail::Quantity::series_rain_depth);
  }
  return detail::range_of(detail::Quantity::series_discharge);
}
const detail::InputRange& time_range() { return detail::range_of(detail::Quantity::series_time); }

std::string known_names(bool time) {
  std::string out;
  for (const auto& u : kUnits) {
    if (is_time_unit(u.unit) != time) continue;
    out += (out.empty() ? "" : ", ") + std::string(u.name);
  }
  return out;
}

using Field = detail::CsvField;
using Located = detail::LocatedProblems;

// The comma-separated fields of a line. A quoted field is kept (flagged) and refused by
// parse_number: freshet's own format has no text to quote. A quote left open is reported as
// quoted too.
std::vector<Field> split_fields(std::string_view line) {
  std::string error;
  int error_column = 1;
  if (auto fields = detail::split_csv_record(line, ',', error, error_column)) return *fields;
  Field f;
  f.raw = line.substr(static_cast<std::size_t>(error_column - 1));
  f.text = std::string(f.raw);
  f.column = error_column;
  f.quoted = true;
  return {f};
}

std::optional<double> parse_number(const Field& f, int line, Located& problems) {
  if (f.quoted || f.raw.find('"') != std::string_view::npos) {
    problems.add(line, f.column, "quoted fields are not supported: " + std::string(f.raw));
    return std::nullopt;
  }
  double v = 0.0;
  const auto [ptr, ec] = std::from_chars(f.text.data(), f.text.data() + f.text.size(), v);
  if (f.text.empty() || ec != std::errc{} || ptr != f.text.data() + f.text.size()) {
    const std::string shown = f.text.empty() ? "an empty field" : "'" + std::string(f.text) + "'";
    problems.add(line, f.column, shown + " is not a number");
    return std::nullopt;
  }
  if (!std::isfinite(v)) {
    problems.add(line, f.column, "'" + std::string(f.text) + "' is not allowed: values must be "
                                 "finite numbers (no NaN or infinity)");
    return std::nullopt;
  }
  return v;
}

// Whether a value column suits what the reader wants; otherwise what it wants instead.
std::optional<std::string> mismatch(SeriesKind kind, ColumnUnit value) {
  const bool discharge = quantity_of(value) == SeriesQuantity::discharge;
  if (kind == SeriesKind::hydrograph && !discharge) {
    return "is rain, not discharge: a hydrograph needs a discharge column (discharge_m3s or "
           "discharge_cfs)";
  }
  if (kind == SeriesKind::hyetograph && discharge) {
    return "is a discharge, not rain: a hyetograph needs an intensity or depth column "
           "(intensity_mm_per_h, intensity_in_per_h, depth_mm or depth_in)";
  }
  return std::nullopt;
}

// Parses the header row; returns the two units, or nullopt after recording problems.
std::optional<std::pair<ColumnUnit, ColumnUnit>> parse_header(std::string_view line, int line_no,
                                                             SeriesKind kind, Located& problems) {
  const auto fields = split_fields(line);
  if (fields.size() != 2) {
    problems.add(line_no, 1, "header must name exactly 2 columns (time, value), found " +
                                 std::to_string(fields.size()));
    return std::nullopt;
  }
  const auto time = parse_column_unit(fields[0].text);
  const auto value = parse_column_unit(fields[1].text);
  bool ok = true;
  if (!time || !is_time_unit(*time)) {
    problems.add(line_no, fields[0].column, "unknown time column '" + std::string(fields[0].text) +
                                                "'; expected one of " + known_names(true));
    ok = false;
  }
  if (!value || is_time_unit(*value)) {
    problems.add(line_no, fields[1].column,
                 "unknown value column '" + std::string(fields[1].text) + "'; expected one of " +
                     known_names(false));
    ok = false;
  } else if (const auto wanted = mismatch(kind, *value)) {
    problems.add(line_no, fields[1].column,
                 "value column '" + std::string(fields[1].text) + "' " + *wanted);
    ok = false;
  }
  if (!ok) return std::nullopt;
  return std::pair{*time, *value};
}

struct RowParser {
  ColumnUnit time_unit;
  ColumnUnit value_unit;
  Located& problems;
  SeriesTable& table;
  double last_time = 0.0;
  bool has_last = false;

  void parse(std::string_view line, int line_no) {
    const auto fields = split_fields(line);
    if (fields.size() != 2) {
      problems.add(line_no, 1, "expected 2 columns, found " + std::to_string(fields.size()));
      return;
    }
    const auto t = parse_number(fields[0], line_no, problems);
    const auto v = parse_number(fields[1], line_no, problems);
    if (t) check_time(*t, fields[0].column, line_no);
    if (v) check_value(*v, fields[1].column, line_no);
    if (t && v) {
      table.times_s.push_back(*t * info(time_unit).to_si);
      table.values_si.push_back(*v * info(value_unit).to_si);
    }
  }

  void check_time(double t, int column, int line_no) {
    const double t_s = t * info(time_unit).to_si;
    const detail::InputRange& range = time_range();
    if (t_s > range.hard_max || t_s < range.hard_min) {
      problems.add(line_no, column, std::string(to_string(time_unit)) + " = " + format_value(t) +
                                        ": " + std::string(range.hard_rule));
    }
    if (has_last && !(t > last_time)) {
      problems.add(line_no, column, "time " + format_value(t) +
                                        " does not increase (previous row: " +
                                        format_value(last_time) + ")");
    }
    last_time = t;
    has_last = true;
  }

  void check_value(double v, int column, int line_no) {
    const std::string name(to_string(value_unit));
    if (v < 0.0) problems.add(line_no, column, name + " = " + format_value(v) + ": must be >= 0");
    const detail::InputRange& limit = range_of_value(quantity_of(value_unit));
    if (v * info(value_unit).to_si > limit.hard_max) {
      problems.add(line_no, column, name + " = " + format_value(v) + ": above the hard limit of " +
                                        format_value(limit.hard_max / info(value_unit).to_si) +
                                        " (" + std::string(limit.hard_rule) + ")");
    }
    const bool first_row = table.values_si.empty() && table.times_s.empty();
    if (quantity_of(value_unit) == SeriesQuantity::rain_depth && first_row && v != 0.0) {
      problems.add(line_no, column, name + " = " + format_value(v) +
                                        ": the first row marks the start of the first interval "
                                        "and must have depth 0");
    }
  }
};

std::string comment_text(std::string_view line) {
  line.remove_prefix(line.find('#') + 1);
  if (!line.empty() && line.front() == ' ') line.remove_prefix(1);
  return std::string(line);
}

}  // namespace

std::string_view to_string(ColumnUnit unit) { return info(unit).name; }

std::optional<ColumnUnit> parse_column_unit(std::string_view name) {
  for (const auto& u : kUnits) {
    if (u.name == name) return u.unit;
  }
  return std::nullopt;
}

double to_si_factor(ColumnUnit unit) { return info(unit).to_si; }

bool is_time_unit(ColumnUnit unit) {
  return unit == ColumnUnit::time_s || unit == ColumnUnit::time_min || unit == ColumnUnit::time_h;
}

SeriesQuantity quantity_of(ColumnUnit value_unit) {
  switch (value_unit) {
    case ColumnUnit::discharge_m3s:
    case ColumnUnit::discharge_cfs: return SeriesQuantity::discharge;
    case ColumnUnit::intensity_mm_per_h:
    case ColumnUnit::intensity_in_per_h: return SeriesQuantity::rain_intensity;
    case ColumnUnit::depth_mm:
    case ColumnUnit::depth_in: return SeriesQuantity::rain_depth;
    default: break;
  }
  FRESHET_ASSERT(false, "quantity_of called with a time unit");
  return SeriesQuantity::discharge;
}

SeriesTable parse_series_csv(std::string_view text, const std::string& file_name,
                             SeriesKind kind) {
  Located problems(file_name);
  SeriesTable table;
  std::optional<RowParser> rows;
  bool header_seen = false;
  const int line_count = detail::for_each_line(text, [&](std::string_view line, int line_no) {
    if (detail::is_blank(line)) return;
    if (detail::is_comment(line)) {
      if (!header_seen) table.metadata.push_back(comment_text(line));
      return;
    }
    if (!header_seen) {
      header_seen = true;
      if (const auto units = parse_header(line, line_no, kind, problems)) {
        table.quantity = quantity_of(units->second);
        rows.emplace(RowParser{units->first, units->second, problems, table});
      }
      return;
    }
    if (rows) rows->parse(line, line_no);
  });
  const int line_no = line_count;
  if (!header_seen) {  // an empty file is reported at its line 1
    problems.add(std::max(line_no, 1), 0, "no header row (e.g. 'time_s,discharge_m3s') found");
  }
  if (header_seen && rows && table.times_s.empty() && problems.empty()) {
    problems.add(line_no, 0, "no data rows after the header");
  }
  problems.throw_if_any();
  return table;
}

SeriesTable read_series_csv(const std::filesystem::path& path, SeriesKind kind) {
  return parse_series_csv(detail::read_input_text(path), path.string(), kind);
}

PiecewiseLinearSeries read_hydrograph_csv(const std::filesystem::path& path) {
  SeriesTable table = read_series_csv(path, SeriesKind::hydrograph);
  FRESHET_ASSERT(table.quantity == SeriesQuantity::discharge, "the header check admits discharge");
  return PiecewiseLinearSeries(std::move(table.times_s), std::move(table.values_si),
                               "hydrograph '" + path.string() + "'");
}

SeriesTable read_hyetograph_csv(const std::filesystem::path& path) {
  SeriesTable table = read_series_csv(path, SeriesKind::hyetograph);
  FRESHET_ASSERT(table.quantity != SeriesQuantity::discharge, "the header check admits rain");
  return table;
}

namespace {

std::string shortest(double v) {
  char buf[64];
  const auto [end, ec] = std::to_chars(buf, buf + sizeof buf, v);
  FRESHET_ASSERT(ec == std::errc{}, "to_chars failed for a double");
  return std::string(buf, end);
}

// Decimal text for v_si in a unit with the given factor, chosen so that reading it back
// (text -> double -> times factor) gives v_si bitwise whenever such a double exists nearby.
std::string decimal_in_unit(double v_si, double factor) {
  if (factor == 1.0) return shortest(v_si);
  const double x = v_si / factor;
  double down = x, up = x;
  for (int step = 0; step < 4; ++step) {
    if (down * factor == v_si) return shortest(down);
    if (up * factor == v_si) return shortest(up);
    down = std::nextafter(down, -INFINITY);
    up = std::nextafter(up, INFINITY);
  }
  return shortest(x);
}

ColumnUnit default_value_unit(SeriesQuantity q) {
  switch (q) {
    case SeriesQuantity::discharge: return ColumnUnit::discharge_m3s;
    case SeriesQuantity::rain_intensity: return ColumnUnit::intensity_mm_per_h;
    case SeriesQuantity::rain_depth: return ColumnUnit::depth_mm;
  }
  return ColumnUnit::discharge_m3s;
}

}  // namespace

std::string format_series_csv(const SeriesTable& table, const CsvWriteOptions& options) {
  FRESHET_ASSERT(table.times_s.size() == table.values_si.size(), "series columns differ in size");
  FRESHET_ASSERT(is_time_unit(options.time_unit), "time_unit must be a time column");
  const ColumnUnit value_unit = options.value_unit.value_or(default_value_unit(table.quantity));
  FRESHET_ASSERT(!is_time_unit(value_unit) && quantity_of(value_unit) == table.quantity,
                 "value_unit does not match the table's quantity");
  std::string out = std::string(to_string(options.time_unit)) + "," +
                    std::string(to_string(value_unit)) + "\n";
  const double time_factor = to_si_factor(options.time_unit);
  const double value_factor = to_si_factor(value_unit);
  for (std::size_t k = 0; k < table.times_s.size(); ++k) {
    out += decimal_in_unit(table.times_s[k], time_factor) + "," +
           decimal_in_unit(table.values_si[k], value_factor) + "\n";
  }
  return out;
}

CsvDescription describe_series_csv(const SeriesTable& table, const CsvWriteOptions& options) {
  const ColumnUnit value_unit = options.value_unit.value_or(default_value_unit(table.quantity));
  const bool flow = table.quantity == SeriesQuantity::discharge;
  CsvDescription d;
  d.title = options.title.empty() ? std::string(flow ? "freshet hydrograph" : "freshet hyetograph")
                                  : options.title;
  d.source = options.source;
  d.time_origin_iso = options.time_origin_iso;
  if (!options.time_base.empty()) d.notes.push_back("time base: " + options.time_base);
  for (const auto& line : table.metadata) {
    if (line != kCautionText) d.notes.push_back(line);  // the caution has its own member
  }
  std::string time_unit(info(options.time_unit).udunits);
  if (!options.time_origin_iso.empty()) time_unit += " since " + options.time_origin_iso;
  const char* value_description = "";
  switch (table.quantity) {
    case SeriesQuantity::discharge: value_description = "discharge at the stated time"; break;
    case SeriesQuantity::rain_intensity:
      value_description = "rain intensity at the stated time";
      break;
    case SeriesQuantity::rain_depth:
      value_description = "rain depth that fell from the previous row's time to this row's time";
      break;
  }
  d.columns = {{std::string(to_string(options.time_unit)), time_unit, "time", "double"},
               {std::string(to_string(value_unit)), std::string(info(value_unit).udunits),
                value_description, "double"}};
  return d;
}

void write_series_csv(const std::filesystem::path& path, const SeriesTable& table,
                      const CsvWriteOptions& options) {
  write_csv_with_metadata(path, format_series_csv(table, options),
                          describe_series_csv(table, options), options.overwrite, options.set);
}

}  // namespace freshet::io
