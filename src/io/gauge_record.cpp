#include "freshet/io/gauge_record.hpp"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <optional>
#include <vector>

#include "csv_reading.hpp"
#include "freshet/core/error.hpp"
#include "freshet/io/input_ranges.hpp"
#include "freshet/io/iso_time.hpp"

namespace freshet::io {

namespace {

using detail::CsvField;
using detail::LocatedProblems;

bool is_missing_marker(std::string_view text) {
  std::string lower(text);
  for (char& c : lower) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return lower.empty() || lower == "na" || lower == "nan" || lower == "null" || lower == "-";
}

// ';' when the header holds one outside quotes, else ','.
char detect_separator(std::string_view header) {
  bool in_quotes = false;
  for (char c : header) {
    if (c == '"') in_quotes = !in_quotes;
    if (c == ';' && !in_quotes) return ';';
  }
  return ',';
}

struct Reading {
  double time_s = 0.0;            // since the study start
  std::optional<double> value;    // in the column's unit; nullopt: missing
  int line = 0;
  int column = 0;                 // the value's column
};

class GaugeParser {
 public:
  GaugeParser(const GaugeFormat& format, LocatedProblems& problems)
      : format_(format), problems_(problems) {}

  void line(std::string_view text, int line_no) {
    if (detail::is_blank(text) || detail::is_comment(text)) return;
    if (!header_seen_) {
      header_seen_ = true;
      header(text, line_no);
      return;
    }
    if (columns_ok_) row(text, line_no);
  }

  [[nodiscard]] bool header_seen() const { return header_seen_; }
  [[nodiscard]] bool columns_ok() const { return columns_ok_; }
  std::vector<Reading>& readings() { return readings_; }

 private:
  std::optional<std::vector<CsvField>> split(std::string_view text, int line_no) {
    std::string error;
    int column = 1;
    auto fields = detail::split_csv_record(text, separator_, error, column);
    if (!fields) problems_.add(line_no, column, error);
    return fields;
  }

  // The column named `name`, or the default position when `name` is empty.
  std::optional<std::size_t> find_column(const std::vector<CsvField>& fields,
                                         const std::string& name, std::size_t fallback,
                                         std::string_view key, int line_no) {
    if (name.empty()) {
      if (fallback < fields.size()) return fallback;
      problems_.add(line_no, 1, "header has " + std::to_string(fields.size()) +
                                    " column(s); name the " + std::string(key) +
                                    " in the study, or give the file a time and a rain column");
      return std::nullopt;
    }
    for (std::size_t k = 0; k < fields.size(); ++k) {
      if (fields[k].text == name) return k;
    }
    std::string known;
    for (const auto& f : fields) known += (known.empty() ? "'" : ", '") + f.text + "'";
    problems_.add(line_no, 1, std::string(key) + " '" + name + "' is not in the header (" +
                                  known + ")");
    return std::nullopt;
  }

  void header(std::string_view text, int line_no) {
    separator_ = format_.separator != 0 ? format_.separator : detect_separator(text);
    const auto fields = split(text, line_no);
    if (!fields) return;
    const auto t = find_column(*fields, format_.time_column, 0, "time_column", line_no);
    const auto v = find_column(*fields, format_.value_column, 1, "value_column", line_no);
    if (!t || !v) return;
    if (*t == *v) {
      problems_.add(line_no, (*fields)[*t].column, "the time and the value column are the same "
                                                   "column '" + (*fields)[*t].text + "'");
      return;
    }
    time_index_ = *t;
    value_index_ = *v;
    value_name_ = (*fields)[*v].text;
    columns_ok_ = true;
  }

  void row(std::string_view text, int line_no) {
    const auto fields = split(text, line_no);
    if (!fields) return;
    const std::size_t needed = std::max(time_index_, value_index_) + 1;
    if (fields->size() < needed) {
      problems_.add(line_no, 1, "has " + std::to_string(fields->size()) + " field(s); the " +
                                    "header's columns need " + std::to_string(needed) +
                                    " (separator '" + std::string(1, separator_) + "')");
      return;
    }
    const CsvField& tf = (*fields)[time_index_];
    const CsvField& vf = (*fields)[value_index_];
    const auto t = timestamp(tf, line_no);
    const auto v = value(vf, line_no);
    if (!t || !v) return;
    readings_.push_back({*t - format_.origin_epoch_s, *v, line_no, vf.column});
  }

  std::optional<double> timestamp(const CsvField& f, int line_no) {
    std::string why;
    const auto t = parse_iso_date_time(f.text, format_.default_offset_min, &why);
    if (!t) {
      problems_.add(line_no, f.column, "timestamp '" + f.text + "': " + why);
      return std::nullopt;
    }
    if (last_line_ != 0 && !(*t > last_epoch_s_)) {
      problems_.add(line_no, f.column,
                    "timestamp '" + f.text + "' " +
                        (*t == last_epoch_s_ ? "repeats" : "is earlier than") +
                        " the one at line " + std::to_string(last_line_) + " ('" + last_text_ +
                        "'): readings must be in increasing time order");
    }
    last_epoch_s_ = *t;
    last_line_ = line_no;
    last_text_ = f.text;
    return t;
  }

  // The value in the column's unit; an engaged empty optional for a missing value.
  std::optional<std::optional<double>> value(const CsvField& f, int line_no) {
    if (is_missing_marker(f.text)) {
      if (format_.missing == MissingRule::refuse) {
        problems_.add(line_no, f.column,
                      "missing value ('" + f.text + "') in column '" + value_name_ + "'" +
                          "; the storm's rule is missing = \"refuse\" (choose \"zero\" or "
                          "\"linear\" to fill gaps)");
        return std::nullopt;
      }
      return std::optional<double>{};
    }
    std::string text = f.text;
    if (separator_ == ';' && std::count(text.begin(), text.end(), ',') == 1 &&
        text.find('.') == std::string::npos) {
      std::replace(text.begin(), text.end(), ',', '.');  // decimal comma
    }
    const auto v = detail::parse_finite(text);
    const std::string name(to_string(format_.value_unit));
    if (!v) {
      problems_.add(line_no, f.column, "'" + f.text + "' is not a number (" + name + ")");
      return std::nullopt;
    }
    if (*v < 0.0) {
      problems_.add(line_no, f.column, name + " = " + format_value(*v) + ": must be >= 0");
      return std::nullopt;
    }
    const SeriesQuantity q = quantity_of(format_.value_unit);
    const auto& limit = detail::range_of(q == SeriesQuantity::rain_depth
                                             ? detail::Quantity::series_rain_depth
                                         : q == SeriesQuantity::rain_intensity
                                             ? detail::Quantity::series_rain_intensity
                                             : detail::Quantity::series_discharge);
    const double factor = to_si_factor(format_.value_unit);
    if (*v * factor > limit.hard_max) {
      problems_.add(line_no, f.column, name + " = " + format_value(*v) +
                                           ": above the hard limit of " +
                                           format_value(limit.hard_max / factor) + " (" +
                                           std::string(limit.hard_rule) + ")");
      return std::nullopt;
    }
    return std::optional<double>{*v};
  }

  const GaugeFormat& format_;
  LocatedProblems& problems_;
  char separator_ = ',';
  bool header_seen_ = false;
  bool columns_ok_ = false;
  std::size_t time_index_ = 0, value_index_ = 1;
  std::string value_name_;
  double last_epoch_s_ = 0.0;
  int last_line_ = 0;
  std::string last_text_;
  std::vector<Reading> readings_;
};

// The rate a reading stands for, for linear filling: an intensity as it is; a depth per
// second of its interval (row k's depth fell since row k - 1).
double rate_of(const std::vector<Reading>& r, std::size_t k, bool depth) {
  return depth ? *r[k].value / (r[k].time_s - r[k - 1].time_s) : *r[k].value;
}

// Fills the gaps by the rule (refuse left none); lists each filled line in `notes`.
void fill_gaps(std::vector<Reading>& r, const GaugeFormat& format, LocatedProblems& problems,
               std::vector<std::string>& notes) {
  const bool depth = quantity_of(format.value_unit) == SeriesQuantity::rain_depth;
  if (depth && !r.empty() && !r.front().value) r.front().value = 0.0;  // the start marker
  for (std::size_t k = 0; k < r.size(); ++k) {
    if (r[k].value) continue;
    double filled = 0.0;
    if (format.missing == MissingRule::linear) {
      const std::size_t first_usable = depth ? 1 : 0;
      std::size_t before = k, after = k;
      while (before > first_usable && !r[before - 1].value) --before;
      while (after + 1 < r.size() && !r[after + 1].value) ++after;
      if (before == first_usable || before == 0 || after + 1 == r.size()) {
        problems.add(r[k].line, r[k].column,
                     "missing value at the " + std::string(after + 1 == r.size() ? "end" : "start") +
                         " of the record: the linear rule needs a reading on both sides (choose "
                         "missing = \"zero\", or trim the record)");
        continue;
      }
      const std::size_t a = before - 1, b = after + 1;
      const double ra = rate_of(r, a, depth), rb = rate_of(r, b, depth);
      const double w = (r[k].time_s - r[a].time_s) / (r[b].time_s - r[a].time_s);
      const double rate = ra + w * (rb - ra);
      filled = depth ? rate * (r[k].time_s - r[k - 1].time_s) : rate;
    }
    notes.push_back("line " + std::to_string(r[k].line) + ": missing value filled (" +
                    std::string(to_string(format.missing)) + ") with " +
                    format_value(filled) + " " + std::string(to_string(format.value_unit)));
    r[k].value = filled;
  }
}

}  // namespace

std::string_view to_string(MissingRule rule) {
  switch (rule) {
    case MissingRule::refuse: return "refuse";
    case MissingRule::zero: return "zero";
    case MissingRule::linear: return "linear";
  }
  return "refuse";
}

std::optional<MissingRule> parse_missing_rule(std::string_view text) {
  for (MissingRule r : {MissingRule::refuse, MissingRule::zero, MissingRule::linear}) {
    if (to_string(r) == text) return r;
  }
  return std::nullopt;
}

SeriesTable parse_gauge_csv(std::string_view text, const std::string& file_name,
                            const GaugeFormat& format) {
  FRESHET_ASSERT(!is_time_unit(format.value_unit), "a record's value column is not a time");
  LocatedProblems problems(file_name);
  GaugeParser parser(format, problems);
  const int lines = detail::for_each_line(
      text, [&parser](std::string_view line, int line_no) { parser.line(line, line_no); });
  if (!parser.header_seen()) {
    problems.add(std::max(lines, 1), 0, "no header row found (a gauge record starts with a "
                                        "row naming its columns)");
  }
  std::vector<Reading>& r = parser.readings();
  if (parser.columns_ok() && problems.empty() && r.size() < 2) {
    problems.add(std::max(lines, 1), 0, "needs at least 2 readings, found " +
                                            std::to_string(r.size()));
  }
  problems.throw_if_any();
  SeriesTable table;
  table.quantity = quantity_of(format.value_unit);
  const bool depth = table.quantity == SeriesQuantity::rain_depth;
  if (depth && r.front().value && *r.front().value != 0.0) {
    problems.add(r.front().line, r.front().column,
                 std::string(to_string(format.value_unit)) + " = " +
                     format_value(*r.front().value) +
                     ": the first reading marks the start of the record and must be 0 (its "
                     "depth fell over an interval the record does not show; add a row with 0 "
                     "before it)");
  }
  fill_gaps(r, format, problems, table.metadata);
  problems.throw_if_any();
  const double factor = to_si_factor(format.value_unit);
  for (const Reading& k : r) {
    table.times_s.push_back(k.time_s);
    table.values_si.push_back(*k.value * factor);
  }
  return table;
}

SeriesTable read_gauge_csv(const std::filesystem::path& path, const GaugeFormat& format) {
  return parse_gauge_csv(detail::read_input_text(path), path.string(), format);
}

}  // namespace freshet::io
