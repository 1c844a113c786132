// io's TOML reading: the keys of one TOML table (of a basin file) with full error context.
// What the tables mean, and the network built from them, is the study module's
// (src/study/basin/).
//
// Every value read is checked (type, finiteness, range where asked) and every problem is
// appended to a shared list with file, line, column, element and field, so a whole file is
// checked in one pass. Keys never read are reported by finish() as unknown: a misspelt key is
// an error, not a silently ignored value. Values that are valid but implausible are warnings,
// kept in a second list (set_warnings; nested tables share it).
//
//   FieldReader r(table, "basins/demo.toml", "reach 'upper-mill'", problems);
//   double n = r.positive("manning_n");
//   auto cells = r.optional_integer("cells");
//   r.finish();
#pragma once

#include <optional>
#include <set>
#include <string>
#include <vector>

#include <toml++/toml.h>

#include "freshet/core/error.hpp"

namespace freshet::io {

class FieldReader {
 public:
  // `override`, when given, holds values that replace the table's own key by key (a
  // scenario's changes to an element); both keep their positions in the file.
  FieldReader(const toml::table& table, std::string file, std::string element,
              std::vector<Problem>& problems, const toml::table* override = nullptr);

  // Numbers (TOML integers are accepted where a float is expected). A missing or invalid
  // required value is reported and NaN returned, so reading can continue.
  double number(std::string_view key);
  double positive(std::string_view key);
  double non_negative(std::string_view key);
  std::optional<double> optional_number(std::string_view key);
  std::optional<double> optional_positive(std::string_view key);
  std::optional<double> optional_non_negative(std::string_view key);
  std::optional<long long> optional_integer(std::string_view key, long long min_value);
  long long integer(std::string_view key, long long min_value);
  std::string text(std::string_view key);
  std::optional<std::string> optional_text(std::string_view key);
  std::string choice(std::string_view key, const std::vector<std::string>& allowed,
                     std::optional<std::string> fallback = std::nullopt);
  std::optional<bool> optional_flag(std::string_view key);
  std::vector<double> numbers(std::string_view key);  // array of numbers, required
  const toml::table* optional_table(std::string_view key);
  const toml::array* optional_array(std::string_view key);
  const toml::node* optional_node(std::string_view key);

  void report(std::string_view key, std::string message);  // problem located at `key`
  // Problem located at item `index` (0-based) of the array `key`, named "key[index + 1]".
  void report_item(std::string_view key, std::size_t index, std::string message);
  void report_here(std::string message);                   // problem located at the table
  // A warning located at `key` (which may name an item, "stages[2]"); dropped when the reader
  // keeps no warnings.
  void warn(std::string_view key, std::string message);
  void set_warnings(std::vector<Problem>* warnings) { warnings_ = warnings; }
  // A reader of a table nested in this one, labelled "<element> <what>", sharing this reader's
  // file, problems and warnings.
  [[nodiscard]] FieldReader nested(const toml::table& table, std::string_view what) const;
  void finish();  // reports every key that was never read
  // Marks every key as read: for a table whose reading stopped early (an unknown method, an
  // error thrown while building), whose remaining keys cannot be judged.
  void consume_all();

  [[nodiscard]] bool has(std::string_view key) const { return find(key) != nullptr; }
  [[nodiscard]] const std::string& file() const { return file_; }
  [[nodiscard]] std::vector<Problem>& problems() const { return problems_; }
  [[nodiscard]] const std::string& element() const { return element_; }
  [[nodiscard]] int line() const { return static_cast<int>(table_.source().begin.line); }
  [[nodiscard]] int column() const { return static_cast<int>(table_.source().begin.column); }

 private:
  const toml::node* take(std::string_view key);
  [[nodiscard]] const toml::node* find(std::string_view key) const;
  double checked(std::string_view key, const toml::node& node);
  Problem make(const toml::node* node, std::string_view key, std::string message) const;

  const toml::table& table_;
  const toml::table* override_;
  std::string file_;
  std::string element_;
  std::vector<Problem>& problems_;
  std::vector<Problem>* warnings_ = nullptr;
  std::set<std::string, std::less<>> read_;
};

// True for ids that are safe as file and folder names: letters, digits, '.', '_', '-', not
// "." or "..".
bool is_safe_id(std::string_view id);

// For range-for over an optional array: `for (auto& n : items_of(arr))`. (Never write
// `arr ? *arr : toml::array{}`: that copies the array, and toml++ copies lose positions.)
const toml::array& items_of(const toml::array* array);

}  // namespace freshet::io
