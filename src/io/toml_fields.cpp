#include "freshet/io/toml_fields.hpp"

#include <cmath>
#include <limits>

namespace freshet::io {

namespace {
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
}

FieldReader::FieldReader(const toml::table& table, std::string file, std::string element,
                         std::vector<Problem>& problems, const toml::table* override)
    : table_(table),
      override_(override),
      file_(std::move(file)),
      element_(std::move(element)),
      problems_(problems) {}

const toml::array& items_of(const toml::array* array) {
  static const toml::array kEmpty;
  return array ? *array : kEmpty;
}

bool is_safe_id(std::string_view id) {
  if (id.empty() || id == "." || id == "..") return false;
  for (char c : id) {
    const bool ok = (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') ||
                    c == '.' || c == '_' || c == '-';
    if (!ok) return false;
  }
  return true;
}

const toml::node* FieldReader::find(std::string_view key) const {
  if (override_) {
    if (const toml::node* n = override_->get(key)) return n;
  }
  return table_.get(key);
}

Problem FieldReader::make(const toml::node* node, std::string_view key,
                          std::string message) const {
  toml::source_position where = (node ? node->source() : table_.source()).begin;
  if (where.line == 0) {
    // Tables made by [[a.b]] headers carry no position of their own: use their first value.
    for (const auto& [k, value] : table_) {
      const auto& p = value.source().begin;
      if (p.line > 0 && (where.line == 0 || p.line < where.line)) where = p;
    }
  }
  return Problem{file_, static_cast<int>(where.line), static_cast<int>(where.column), element_,
                 std::string(key), std::move(message)};
}

void FieldReader::report(std::string_view key, std::string message) {
  problems_.push_back(make(find(key), key, std::move(message)));
}

void FieldReader::report_item(std::string_view key, std::size_t index, std::string message) {
  const toml::node* node = find(key);
  const toml::array* arr = node ? node->as_array() : nullptr;
  const toml::node* item = arr && index < arr->size() ? arr->get(index) : nullptr;
  problems_.push_back(make(item ? item : node,
                           std::string(key) + "[" + std::to_string(index + 1) + "]",
                           std::move(message)));
}

void FieldReader::report_here(std::string message) {
  problems_.push_back(make(nullptr, "", std::move(message)));
}

void FieldReader::warn(std::string_view key, std::string message) {
  if (!warnings_) return;
  const std::string_view base = key.substr(0, key.find('['));
  const toml::node* node = find(base);
  if (node && base.size() != key.size()) {
    // "key[k]": the item's own position when there is one.
    const std::size_t k = std::stoul(std::string(key.substr(base.size() + 1))) - 1;
    if (const toml::array* arr = node->as_array(); arr && k < arr->size()) node = arr->get(k);
  }
  warnings_->push_back(make(node, key, std::move(message)));
}

FieldReader FieldReader::nested(const toml::table& table, std::string_view what) const {
  FieldReader child(table, file_, element_ + " " + std::string(what), problems_);
  child.warnings_ = warnings_;
  return child;
}

const toml::node* FieldReader::take(std::string_view key) {
  read_.emplace(key);
  return find(key);
}

double FieldReader::checked(std::string_view key, const toml::node& node) {
  double v = kNaN;
  if (auto f = node.value_exact<double>()) {
    v = *f;
  } else if (auto i = node.value_exact<int64_t>()) {
    v = static_cast<double>(*i);
  } else {
    problems_.push_back(make(&node, key, "must be a number"));
    return kNaN;
  }
  if (!std::isfinite(v)) {
    problems_.push_back(make(&node, key, "= " + format_value(v) + ": must be a finite number"));
    return kNaN;
  }
  return v;
}

std::optional<double> FieldReader::optional_number(std::string_view key) {
  const toml::node* node = take(key);
  if (!node) return std::nullopt;
  return checked(key, *node);
}

double FieldReader::number(std::string_view key) {
  if (auto v = optional_number(key)) return *v;
  report_here("is missing required field '" + std::string(key) + "'");
  return kNaN;
}

std::optional<double> FieldReader::optional_positive(std::string_view key) {
  auto v = optional_number(key);
  if (v && std::isfinite(*v) && !(*v > 0.0)) {
    report(key, "= " + format_value(*v) + ": must be > 0");
    return kNaN;
  }
  return v;
}

std::optional<double> FieldReader::optional_non_negative(std::string_view key) {
  auto v = optional_number(key);
  if (v && std::isfinite(*v) && *v < 0.0) {
    report(key, "= " + format_value(*v) + ": must be >= 0");
    return kNaN;
  }
  return v;
}

double FieldReader::positive(std::string_view key) {
  if (find(key) == nullptr) return number(key);
  return *optional_positive(key);
}

double FieldReader::non_negative(std::string_view key) {
  if (find(key) == nullptr) return number(key);
  return *optional_non_negative(key);
}

std::optional<long long> FieldReader::optional_integer(std::string_view key, long long min_value) {
  const toml::node* node = take(key);
  if (!node) return std::nullopt;
  auto i = node->value_exact<int64_t>();
  if (!i) {
    problems_.push_back(make(node, key, "must be a whole number"));
    return std::nullopt;
  }
  if (*i < min_value) {
    problems_.push_back(make(node, key, "= " + std::to_string(*i) + ": must be >= " +
                                            std::to_string(min_value)));
    return std::nullopt;
  }
  return static_cast<long long>(*i);
}

long long FieldReader::integer(std::string_view key, long long min_value) {
  if (find(key) == nullptr) {
    read_.emplace(key);
    report_here("is missing required field '" + std::string(key) + "'");
    return min_value;
  }
  return optional_integer(key, min_value).value_or(min_value);
}

std::optional<std::string> FieldReader::optional_text(std::string_view key) {
  const toml::node* node = take(key);
  if (!node) return std::nullopt;
  auto s = node->value_exact<std::string>();
  if (!s) {
    problems_.push_back(make(node, key, "must be a string"));
    return std::string{};
  }
  return *s;
}

std::string FieldReader::text(std::string_view key) {
  if (auto s = optional_text(key)) return *s;
  report_here("is missing required field '" + std::string(key) + "'");
  return {};
}

std::string FieldReader::choice(std::string_view key, const std::vector<std::string>& allowed,
                                std::optional<std::string> fallback) {
  auto s = fallback ? optional_text(key).value_or(*fallback) : text(key);
  for (const auto& a : allowed) {
    if (s == a) return s;
  }
  if (!s.empty() || find(key)) {
    std::string list;
    for (const auto& a : allowed) list += (list.empty() ? "'" : ", '") + a + "'";
    report(key, "= '" + s + "': must be one of " + list);
  }
  return {};
}

std::optional<bool> FieldReader::optional_flag(std::string_view key) {
  const toml::node* node = take(key);
  if (!node) return std::nullopt;
  auto b = node->value_exact<bool>();
  if (!b) problems_.push_back(make(node, key, "must be true or false"));
  return b;
}

std::vector<double> FieldReader::numbers(std::string_view key) {
  const toml::node* node = take(key);
  std::vector<double> out;
  if (!node) {
    report_here("is missing required field '" + std::string(key) + "'");
    return out;
  }
  const toml::array* arr = node->as_array();
  if (!arr) {
    problems_.push_back(make(node, key, "must be an array of numbers"));
    return out;
  }
  for (std::size_t k = 0; k < arr->size(); ++k) {
    out.push_back(checked(std::string(key) + "[" + std::to_string(k + 1) + "]", *arr->get(k)));
  }
  return out;
}

const toml::node* FieldReader::optional_node(std::string_view key) { return take(key); }

const toml::table* FieldReader::optional_table(std::string_view key) {
  const toml::node* node = take(key);
  if (!node) return nullptr;
  if (!node->is_table()) problems_.push_back(make(node, key, "must be a table"));
  return node->as_table();
}

const toml::array* FieldReader::optional_array(std::string_view key) {
  const toml::node* node = take(key);
  if (!node) return nullptr;
  if (!node->is_array()) problems_.push_back(make(node, key, "must be an array"));
  return node->as_array();
}

void FieldReader::consume_all() {
  for (const toml::table* t : {&table_, override_}) {
    if (!t) continue;
    for (const auto& [key, node] : *t) read_.emplace(key.str());
  }
}

void FieldReader::finish() {
  for (const toml::table* t : {&table_, override_}) {
    if (!t) continue;
    for (const auto& [key, node] : *t) {
      if (!read_.contains(key.str()) && (t == override_ || find(key.str()) == &node)) {
        problems_.push_back(make(&node, key.str(), "is not a known field here (check the "
                                                   "spelling; see docs/basin-file.md)"));
      }
    }
  }
}

}  // namespace freshet::io
