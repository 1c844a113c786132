#include "freshet/core/state_archive.hpp"

#include <cstring>

#include "freshet/core/error.hpp"
#include "freshet/core/sha256.hpp"

namespace freshet {

namespace {

template <class T>
void append_bytes(std::string& out, const T& x) {
  char bytes[sizeof(T)];
  std::memcpy(bytes, &x, sizeof(T));
  out.append(bytes, sizeof(T));
}

}  // namespace

std::string StateArchive::digest() const {
  std::string bytes;
  for (const auto& [path, value] : entries) {
    append_bytes(bytes, static_cast<std::uint64_t>(path.size()));
    bytes += path;
    append_bytes(bytes, static_cast<std::uint8_t>(value.index()));
    std::visit(
        [&bytes](const auto& v) {
          append_bytes(bytes, static_cast<std::uint64_t>(v.size()));
          using V = std::decay_t<decltype(v)>;
          if constexpr (std::is_same_v<V, std::string>) {
            bytes += v;
          } else {
            for (const auto& x : v) append_bytes(bytes, x);
          }
        },
        value);
  }
  return sha256_hex(bytes);
}

void StateVisitor::enter(std::string_view group) { groups_.emplace_back(group); }

void StateVisitor::leave() {
  FRESHET_ASSERT(!groups_.empty(), "leave() without enter()");
  groups_.pop_back();
}

std::string StateVisitor::path(std::string_view name) const {
  std::string p;
  for (const std::string& g : groups_) p += g + "/";
  return p + std::string(name);
}

void StateVisitor::value(std::string_view name, double& x) {
  std::vector<double> v{x};
  doubles(name, v);
  expect_length(name, v.size(), 1);
  x = v.front();
}

void StateVisitor::fixed_doubles(std::string_view name, std::span<double> values) {
  std::vector<double> v(values.begin(), values.end());
  doubles(name, v);
  expect_length(name, v.size(), values.size());
  std::copy(v.begin(), v.end(), values.begin());
}

void StateVisitor::expect_length(std::string_view name, std::size_t found, std::size_t wanted) {
  if (found == wanted || saving()) return;
  refuse_entry(name, "has " + std::to_string(found) + " values where this run needs " +
                         std::to_string(wanted));
}

std::size_t StateVisitor::checked_count(std::int64_t count) {
  // 2^31 rows of anything is far beyond any state this program keeps.
  if (count < 0 || count > (std::int64_t{1} << 31)) {
    refuse_entry("count", "= " + std::to_string(count) + ": not a row count");
  }
  return static_cast<std::size_t>(count);
}

// ---- StateWriter ---------------------------------------------------------------------------

void StateWriter::put(std::string_view name, StateArchive::Value value) {
  const auto [it, inserted] = archive_.entries.emplace(path(name), std::move(value));
  FRESHET_ASSERT(inserted, "a state entry is written twice");
  (void)it;
}

void StateWriter::doubles(std::string_view name, std::vector<double>& values) {
  put(name, values);
}

void StateWriter::integers(std::string_view name, std::vector<std::int64_t>& values) {
  put(name, values);
}

void StateWriter::text(std::string_view name, std::string& value) { put(name, value); }

void StateWriter::refuse_entry(std::string_view name, const std::string& message) const {
  // Writing never refuses; a count out of range here is a programmer error.
  assertion_failed("writing state", __FILE__, __LINE__, (path(name) + " " + message).c_str());
}

// ---- StateReader ---------------------------------------------------------------------------

template <class T>
const T& StateReader::get(std::string_view name, std::string_view kind) {
  const std::string p = path(name);
  const auto it = archive_.entries.find(p);
  if (it == archive_.entries.end()) refuse_entry(name, "is missing (this run needs it)");
  const T* v = std::get_if<T>(&it->second);
  if (v == nullptr) refuse_entry(name, "is not " + std::string(kind));
  read_[p] = true;
  return *v;
}

void StateReader::doubles(std::string_view name, std::vector<double>& values) {
  values = get<std::vector<double>>(name, "an array of numbers");
}

void StateReader::integers(std::string_view name, std::vector<std::int64_t>& values) {
  values = get<std::vector<std::int64_t>>(name, "an array of integers");
}

void StateReader::text(std::string_view name, std::string& value) {
  value = get<std::string>(name, "a text");
}

void StateReader::refuse_entry(std::string_view name, const std::string& message) const {
  Problem p;
  p.file = source_;
  p.element = "state entry '" + path(name) + "'";
  p.message = message + " (the state file does not match this study's network)";
  throw InputError(std::move(p));
}

void StateReader::require_all_read() const {
  for (const auto& [p, value] : archive_.entries) {
    if (read_.count(p) != 0) continue;
    Problem problem;
    problem.file = source_;
    problem.element = "state entry '" + p + "'";
    problem.message = "is not part of this run's network (the state file was saved from "
                      "another network)";
    throw InputError(std::move(problem));
  }
}

void visit_state(StateVisitor& v, std::string_view name, VolumeLedger& l) {
  StateGroup g(v, name);
  v.value("inflow_m3", l.inflow_m3);
  v.value("lateral_m3", l.lateral_m3);
  v.value("rain_m3", l.rain_m3);
  v.value("loss_m3", l.loss_m3);
  v.value("outflow_m3", l.outflow_m3);
  v.value("initial_storage_m3", l.initial_storage_m3);
  v.value("storage_m3", l.storage_m3);
}

}  // namespace freshet
