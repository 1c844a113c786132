// The saved state of a run, as named arrays, and the one visitor every stateful object uses to
// write itself into it and to read itself back (hot start; docs/state-files.md).
//
// A StateArchive is a flat, ordered map from a path ("elements/mill-race/reach/area_m2") to
// an array of doubles, an array of 64-bit integers or a text. An object that has state visits
// it with a StateVisitor: the same function saves (StateWriter) and restores (StateReader), so
// what is written and what is read cannot drift apart. Doubles are kept bit for bit (NaN and
// infinities included), so a run resumed from an archive continues exactly as the run that
// wrote it. The archive knows nothing of files: io writes it to HDF5 and reads it back.
//
//   StateArchive archive;
//   StateWriter w(archive);
//   { StateGroup g(w, "reach"); w.value("time_s", time_s); w.doubles("area_m2", areas); }
//   StateReader r(archive, "hot.h5");              // names the file in its messages
//   { StateGroup g(r, "reach"); r.value("time_s", time_s); r.fixed_doubles("area_m2", areas); }
#pragma once

#include <concepts>
#include <cstdint>
#include <deque>
#include <map>
#include <span>
#include <string>
#include <string_view>
#include <type_traits>
#include <variant>
#include <vector>

#include "freshet/core/volume_ledger.hpp"

namespace freshet {

struct StateArchive {
  using Value = std::variant<std::vector<double>, std::vector<std::int64_t>, std::string>;
  std::map<std::string, Value> entries;  // path -> value; paths use '/' between groups

  // SHA-256 (hex) of every entry: path, kind, length and the bytes of its values, in path
  // order. Any change to a value or a name changes it.
  [[nodiscard]] std::string digest() const;
};

class StateVisitor {
 public:
  virtual ~StateVisitor() = default;
  [[nodiscard]] virtual bool saving() const noexcept = 0;
  // Arrays of any length: written as they are, read back resized to what was saved.
  virtual void doubles(std::string_view name, std::vector<double>& values) = 0;
  virtual void integers(std::string_view name, std::vector<std::int64_t>& values) = 0;
  virtual void text(std::string_view name, std::string& value) = 0;
  // Groups nest names: enter("reach") makes "x" into "reach/x" until leave().
  void enter(std::string_view group);
  void leave();

  // One number.
  void value(std::string_view name, double& x);
  template <class I>
    requires(std::integral<I> || std::is_enum_v<I>)
  void value(std::string_view name, I& x) {
    std::vector<std::int64_t> v{static_cast<std::int64_t>(x)};
    integers(name, v);
    expect_length(name, v.size(), 1);
    x = static_cast<I>(v.front());
  }
  // An array whose length the object fixes (a reach's cells): reading a different length is
  // refused.
  void fixed_doubles(std::string_view name, std::span<double> values);
  // A deque of doubles-only records goes through records() as a vector.
  // Rows of a record type, one column per member (double, integral, bool or enum members):
  //   v.records("fronts", fronts_, &Front::x0_m, &Front::prev, &Front::alive);
  template <class T, class... M>
  void records(std::string_view name, std::vector<T>& rows, M T::*... members) {
    enter(name);
    std::vector<std::int64_t> count{static_cast<std::int64_t>(rows.size())};
    integers("count", count);
    expect_length("count", count.size(), 1);
    if (!saving()) rows.assign(checked_count(count.front()), T{});
    int column = 0;
    (record_column(column++, rows, members), ...);
    leave();
  }
  template <class T, class... M>
  void records(std::string_view name, std::deque<T>& rows, M T::*... members) {
    std::vector<T> v(rows.begin(), rows.end());
    records(name, v, members...);
    rows.assign(v.begin(), v.end());
  }

  // The current group path with `name` appended ("elements/mill-race/area_m2").
  [[nodiscard]] std::string path(std::string_view name) const;

 protected:
  // Refuses (when reading) an entry whose length is not the one the object needs.
  void expect_length(std::string_view name, std::size_t found, std::size_t wanted);
  std::size_t checked_count(std::int64_t count);
  // Throws InputError naming the source, the entry `name` (in the current group) and why.
  [[noreturn]] virtual void refuse_entry(std::string_view name, const std::string& message) const = 0;

 private:
  template <class T, class V>
  void record_column(int column, std::vector<T>& rows, V T::*member) {
    const std::string name = "c" + std::to_string(column);
    if constexpr (std::is_floating_point_v<V>) {
      std::vector<double> col(rows.size());
      for (std::size_t i = 0; i < rows.size(); ++i) col[i] = static_cast<double>(rows[i].*member);
      doubles(name, col);
      expect_length(name, col.size(), rows.size());
      for (std::size_t i = 0; i < rows.size(); ++i) rows[i].*member = static_cast<V>(col[i]);
    } else {
      static_assert(std::is_integral_v<V> || std::is_enum_v<V>, "record columns are numbers");
      std::vector<std::int64_t> col(rows.size());
      for (std::size_t i = 0; i < rows.size(); ++i) {
        col[i] = static_cast<std::int64_t>(rows[i].*member);
      }
      integers(name, col);
      expect_length(name, col.size(), rows.size());
      for (std::size_t i = 0; i < rows.size(); ++i) rows[i].*member = static_cast<V>(col[i]);
    }
  }

  std::vector<std::string> groups_;
};

// Enters a group for its lifetime.
class StateGroup {
 public:
  StateGroup(StateVisitor& v, std::string_view name) : v_(v) { v_.enter(name); }
  ~StateGroup() { v_.leave(); }
  StateGroup(const StateGroup&) = delete;
  StateGroup& operator=(const StateGroup&) = delete;

 private:
  StateVisitor& v_;
};

class StateWriter final : public StateVisitor {
 public:
  explicit StateWriter(StateArchive& archive) : archive_(archive) {}
  [[nodiscard]] bool saving() const noexcept override { return true; }
  void doubles(std::string_view name, std::vector<double>& values) override;
  void integers(std::string_view name, std::vector<std::int64_t>& values) override;
  void text(std::string_view name, std::string& value) override;

 protected:
  [[noreturn]] void refuse_entry(std::string_view name, const std::string& message) const override;

 private:
  void put(std::string_view name, StateArchive::Value value);
  StateArchive& archive_;
};

// Reads an archive back. A missing entry, an entry of another kind or of the wrong length
// throws InputError naming `source` (the state file), the entry's path and what was expected.
class StateReader final : public StateVisitor {
 public:
  StateReader(const StateArchive& archive, std::string source)
      : archive_(archive), source_(std::move(source)) {}
  [[nodiscard]] bool saving() const noexcept override { return false; }
  void doubles(std::string_view name, std::vector<double>& values) override;
  void integers(std::string_view name, std::vector<std::int64_t>& values) override;
  void text(std::string_view name, std::string& value) override;
  // Throws unless every entry of the archive was read (an archive from another network).
  void require_all_read() const;

 protected:
  [[noreturn]] void refuse_entry(std::string_view name, const std::string& message) const override;

 private:
  template <class T>
  const T& get(std::string_view name, std::string_view kind);
  const StateArchive& archive_;
  std::string source_;
  std::map<std::string, bool> read_;
};

// The ledger's seven volumes, as one group.
void visit_state(StateVisitor& v, std::string_view name, VolumeLedger& ledger);

}  // namespace freshet
