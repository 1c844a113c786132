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

// One comma-separated field of a line, with its 1-based column.
struct Field {
  std::string_view text;
  int column = 1;
};

std::string_view trim(std::string_view s, int& column) {
  while (!s.empty() && (s.front() == ' ' || s.front() == '\t')) {
    s.remove_prefix(1);
    ++column;
  }
  while (!s.empty() && (s.back() == ' ' || s.back() == '\t')) s.remove_suffix(1);
  return s;
}

std::vector<Field> split_fields(std::string_view line) {
  std::vector<Field> fields;
  std::size_t start = 0;
  while (true) {
    const std::size_t comma = line.find(',', start);
    const std::size_t end = comma == std::string_view::npos ? line.size() : comma;
    int column = static_cast<int>(start) + 1;
    const std::string_view text = trim(line.substr(start, end - start), column);
    fields.push_back({text, column});
    if (comma == std::string_view::npos) return fields;
    start = comma + 1;
  }
}

// Collects located problems for one file; caps the list so a wrong file stays readable.
class Located {
 public:
  explicit Located(std::string file) : file_(std::move(file)) {}
  void add(int line, int column, std::string message) {
    if (problems_.size() == kMaxProblems) message = "further problems not listed";
    if (problems_.size() > kMaxProblems) return;
    Problem p;
    p.file = file_;
    p.line = line;
    p.column = column;
    p.message = std::move(message);
    problems_.push_back(std::move(p));
  }
  [[nodiscard]] bool empty() const { return problems_.empty(); }
  void throw_if_any() const {
    if (!problems_.empty()) throw InputError(problems_);
  }

 private:
  static constexpr std::size_t kMaxProblems = 50;
  std::string file_;
  std::vector<Problem> problems_;
};

std::optional<double> parse_number(const Field& f, int line, Located& problems) {
  if (f.text.find('"') != std::string_view::npos) {
    problems.add(line, f.column, "quoted fields are not supported: " + std::string(f.text));
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

std::string_view strip_line_end(std::string_view line) {
  if (!line.empty() && line.back() == '\r') line.remove_suffix(1);
  return line;
}

bool is_blank(std::string_view line) {
  return line.find_first_not_of(" \t") == std::string_view::npos;
}

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
  if (text.substr(0, 3) == "\xEF\xBB\xBF") text.remove_prefix(3);
  std::optional<RowParser> rows;
  bool header_seen = false;
  int line_no = 0;
  for (std::size_t start = 0; start < text.size();) {
    const std::size_t nl = text.find('\n', start);
    const std::size_t end = nl == std::string_view::npos ? text.size() : nl;
    const std::string_view line = strip_line_end(text.substr(start, end - start));
    start = end + 1;
    ++line_no;
    if (is_blank(line)) continue;
    if (line[line.find_first_not_of(" \t")] == '#') {
      if (!header_seen) table.metadata.push_back(comment_text(line));
      continue;
    }
    if (!header_seen) {
      header_seen = true;
      if (const auto units = parse_header(line, line_no, kind, problems)) {
        table.quantity = quantity_of(units->second);
        rows.emplace(RowParser{units->first, units->second, problems, table});
      }
      continue;
    }
    if (rows) rows->parse(line, line_no);
  }
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
  std::error_code ec;
  if (std::filesystem::is_directory(path, ec)) {  // an ifstream opens a folder as empty
    throw IoError("cannot open input file '" + path.string() + "': it is a folder");
  }
  std::ifstream in(path, std::ios::binary);
  if (!in) throw IoError("cannot open input file '" + path.string() + "'");
  std::ostringstream buffer;
  buffer << in.rdbuf();
  if (in.bad()) throw IoError("cannot read input file '" + path.string() + "'");
  return parse_series_csv(buffer.str(), path.string(), kind);
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
