#include "csv_reading.hpp"

#include <charconv>
#include <cmath>
#include <fstream>
#include <sstream>

namespace freshet::io::detail {

namespace {

bool is_space(char c) { return c == ' ' || c == '\t'; }

// Trims spaces and tabs; `column` moves past the leading ones.
std::string_view trim(std::string_view s, int& column) {
  while (!s.empty() && is_space(s.front())) {
    s.remove_prefix(1);
    ++column;
  }
  while (!s.empty() && is_space(s.back())) s.remove_suffix(1);
  return s;
}

}  // namespace

std::optional<std::vector<CsvField>> split_csv_record(std::string_view line, char separator,
                                                      std::string& error, int& error_column) {
  std::vector<CsvField> fields;
  std::size_t pos = 0;
  while (true) {
    std::size_t start = pos;
    while (start < line.size() && is_space(line[start])) ++start;
    CsvField f;
    f.column = static_cast<int>(start) + 1;
    std::size_t end = 0;  // one past the field's last character (before trailing spaces)
    if (start < line.size() && line[start] == '"') {
      f.quoted = true;
      std::size_t k = start + 1;
      bool closed = false;
      while (k < line.size()) {
        if (line[k] == '"') {
          if (k + 1 < line.size() && line[k + 1] == '"') {
            f.text += '"';
            k += 2;
            continue;
          }
          closed = true;
          ++k;
          break;
        }
        f.text += line[k++];
      }
      if (!closed) {
        error = "quoted field is not closed on its line (a line break inside quotes is not "
                "supported)";
        error_column = f.column;
        return std::nullopt;
      }
      end = k;
      while (k < line.size() && is_space(line[k])) ++k;
      if (k < line.size() && line[k] != separator) {
        error = "text after the closing quote of a quoted field (write \"\" for a quote "
                "inside one)";
        error_column = static_cast<int>(k) + 1;
        return std::nullopt;
      }
      pos = k;
    } else {
      const std::size_t sep = line.find(separator, start);
      pos = sep == std::string_view::npos ? line.size() : sep;
      int column = static_cast<int>(start) + 1;
      const std::string_view text = trim(line.substr(start, pos - start), column);
      f.text = std::string(text);
      end = start + text.size();
    }
    f.raw = line.substr(start, end - start);
    fields.push_back(std::move(f));
    if (pos >= line.size()) return fields;
    ++pos;  // past the separator
  }
}

int for_each_line(std::string_view text,
                  const std::function<void(std::string_view line, int line_no)>& each) {
  if (text.substr(0, 3) == "\xEF\xBB\xBF") text.remove_prefix(3);
  int line_no = 0;
  for (std::size_t start = 0; start < text.size();) {
    const std::size_t nl = text.find('\n', start);
    const std::size_t end = nl == std::string_view::npos ? text.size() : nl;
    std::string_view line = text.substr(start, end - start);
    if (!line.empty() && line.back() == '\r') line.remove_suffix(1);
    start = end + 1;
    each(line, ++line_no);
  }
  return line_no;
}

bool is_blank(std::string_view line) {
  return line.find_first_not_of(" \t") == std::string_view::npos;
}

bool is_comment(std::string_view line) {
  const std::size_t k = line.find_first_not_of(" \t");
  return k != std::string_view::npos && line[k] == '#';
}

std::optional<double> parse_finite(std::string_view text) {
  double v = 0.0;
  const auto [ptr, ec] = std::from_chars(text.data(), text.data() + text.size(), v);
  if (text.empty() || ec != std::errc{} || ptr != text.data() + text.size() || !std::isfinite(v)) {
    return std::nullopt;
  }
  return v;
}

std::string read_input_text(const std::filesystem::path& path) {
  std::error_code ec;
  if (std::filesystem::is_directory(path, ec)) {
    throw IoError("cannot open input file '" + path.string() + "': it is a folder");
  }
  std::ifstream in(path, std::ios::binary);
  if (!in) throw IoError("cannot open input file '" + path.string() + "'");
  std::ostringstream buffer;
  buffer << in.rdbuf();
  if (in.bad()) throw IoError("cannot read input file '" + path.string() + "'");
  return buffer.str();
}

void LocatedProblems::add(int line, int column, std::string message) {
  if (problems_.size() == kMaxProblems) message = "further problems not listed";
  if (problems_.size() > kMaxProblems) return;
  Problem p;
  p.file = file_;
  p.line = line;
  p.column = column;
  p.message = std::move(message);
  problems_.push_back(std::move(p));
}

void LocatedProblems::throw_if_any() const {
  if (!problems_.empty()) throw InputError(problems_);
}

}  // namespace freshet::io::detail
