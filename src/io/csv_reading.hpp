// io's private CSV reading pieces, shared by every CSV reader of the module (freshet's own
// series format, csv_series.cpp; gauge records as they come, gauge_record.cpp): the lines of
// a text (UTF-8 byte-order mark and CRLF accepted), RFC 4180 fields of one line with their
// 1-based columns, finite numbers, and located problems collected per file.
#pragma once

#include <filesystem>
#include <functional>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "freshet/core/error.hpp"

namespace freshet::io::detail {

// One field of a record. `text` is the field's value (outside spaces and tabs trimmed; a
// quoted field's quotes removed and its "" read as "); `raw` is the field as written,
// trimmed; `column` is where `raw` starts (1-based).
struct CsvField {
  std::string text;
  std::string_view raw;
  int column = 1;
  bool quoted = false;
};

// The fields of one line split at `separator` (RFC 4180, 2005, sec. 2: a field in double
// quotes may hold the separator and "" for a quote). A quote inside an unquoted field is kept
// as text. Returns nullopt and sets `error`/`error_column` for a quoted field that is not
// closed on its line (freshet reads records line by line: a quoted line break is refused) or
// that is followed by other text before the separator.
std::optional<std::vector<CsvField>> split_csv_record(std::string_view line, char separator,
                                                      std::string& error, int& error_column);

// Calls `each(line, line_no)` for every line of `text` (1-based numbers), after removing a
// UTF-8 byte-order mark at the start and a '\r' at each line's end. Returns the line count.
int for_each_line(std::string_view text,
                  const std::function<void(std::string_view line, int line_no)>& each);

bool is_blank(std::string_view line);
// Whether the first non-blank character of the line is '#'.
bool is_comment(std::string_view line);

// A finite decimal number (std::from_chars, locale independent) filling the whole text, or
// nullopt.
std::optional<double> parse_finite(std::string_view text);

// The whole content of an input file; IoError naming the path when it cannot be read or is a
// folder (an ifstream opens a folder as an empty file).
std::string read_input_text(const std::filesystem::path& path);

// Collects located problems for one file; caps the list so a wrong file stays readable.
class LocatedProblems {
 public:
  explicit LocatedProblems(std::string file) : file_(std::move(file)) {}
  void add(int line, int column, std::string message);
  [[nodiscard]] bool empty() const { return problems_.empty(); }
  [[nodiscard]] const std::string& file() const { return file_; }
  void throw_if_any() const;

 private:
  static constexpr std::size_t kMaxProblems = 50;
  std::string file_;
  std::vector<Problem> problems_;
};

}  // namespace freshet::io::detail
