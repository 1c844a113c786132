// Builds a network::Model from the element tables of a basin file, with a scenario's
// changes laid over them. Every problem is appended to `problems` with file, line,
// element and field; the model is complete only when no problem was added.
#pragma once

#include <filesystem>
#include <functional>
#include <map>
#include <memory>
#include <mutex>
#include <string>
#include <vector>

#include <toml++/toml.h>

#include "freshet/io/toml_fields.hpp"
#include "freshet/hydrology/hyetograph.hpp"
#include "freshet/hydrology/loss_model.hpp"
#include "freshet/study/study.hpp"
#include "freshet/network/driver.hpp"
#include "freshet/network/run_budget.hpp"
#include "freshet/network/structures/culvert_crossing.hpp"
#include "freshet/io/input_units.hpp"

namespace freshet::study::detail {

using io::FieldReader;
using io::is_safe_id;
using io::items_of;
// The input-ranges table and the file's units (freshet/io/input_ranges.hpp, input_units.hpp).
using namespace io::detail;  // NOLINT(google-build-using-namespace): a private header

// Culvert crossings already built, shared by the runs of one study: a crossing's rating table
// costs far more than routing a storm, and it depends only on the crossing's own fields,
// which are fixed within a scenario. Keys are "<scenario>/<element id>". Thread-safe.
class CrossingCache {
 public:
  using Crossing = std::shared_ptr<const network::structures::CulvertCrossing>;
  Crossing get_or_build(const std::string& key, const std::function<Crossing()>& build);

 private:
  std::mutex mutex_;
  std::map<std::string, Crossing> built_;
};

// The element arrays of a basin file, in the order they are read.
inline constexpr std::string_view kElementArrays[] = {
    "inflow", "subcatchment", "reach", "junction", "culvert", "detention", "outlet"};

class NetworkReader {
 public:
  // `changes`, when given, is a scenario's [scenario.change] table: element id -> values
  // that replace that element's keys.
  // `cache` (optional) shares culvert crossings between runs; `cache_scope` names the
  // scenario whose tables are being read. `warnings` (optional) receives the values outside
  // their plausible ranges (input_ranges.hpp).
  NetworkReader(const toml::table& root, const toml::table* changes, std::string file,
               std::filesystem::path base_dir, const StudySettings& settings,
               const StormDefinition& storm, std::vector<Problem>& problems,
               CrossingCache* cache = nullptr, std::string cache_scope = {},
               std::vector<Problem>* warnings = nullptr);

  // Reads every element; returns the model (finalized) when no problem was found, and an
  // empty model otherwise (the problems are in the list).
  network::Model build();
  // Chooses each reach's scheme from its id and the scheme the file gives it (before build()).
  void set_reach_scheme(const ReachSchemeFn* fn) { reach_scheme_ = fn; }
  // The stations of the model, in model order (valid after build()).
  [[nodiscard]] const std::vector<StationDescription>& stations() const { return stations_; }

 private:
  using Reader = FieldReader;
  // Reads the common keys (id, to, name) and runs `read` for one element table; `read`
  // returns the element, or nullptr when its fields had problems.
  template <class ReadFn>
  void element(const toml::table& table, network::ElementKind kind, ReadFn&& read);
  void read_array(std::string_view key, network::ElementKind kind);

  std::unique_ptr<network::Element> read_inflow(Reader& r, const std::string& id);
  std::unique_ptr<network::Element> read_subcatchment(Reader& r, const std::string& id);
  std::unique_ptr<network::Element> read_reach(Reader& r, const std::string& id);
  std::unique_ptr<network::Element> read_culvert(Reader& r, const std::string& id);
  std::unique_ptr<network::Element> read_detention(Reader& r, const std::string& id);

  bool admit_cells(Reader& r, int cells);
  void check_work();

  // True while the element being read has no problem: library objects are built only from
  // values that passed the reader's checks, so one mistake is reported once.
  [[nodiscard]] bool clean() const { return problems_.size() == element_start_; }

  const toml::table& root_;
  const toml::table* changes_;
  CrossingCache* cache_;
  std::string cache_scope_;
  std::string file_;
  std::filesystem::path base_dir_;
  const StudySettings& settings_;
  InputUnits units_;
  const StormDefinition& storm_;  // its rain, or a subcatchment's own (a gauge storm)
  std::vector<Problem>& problems_;
  std::vector<Problem>* warnings_;
  const ReachSchemeFn* reach_scheme_ = nullptr;
  network::Model model_;
  std::vector<StationDescription> stations_;
  bool complete_ = true;
  network::RunSize size_;  // counted as elements are read, for the run budget
  bool over_memory_budget_ = false;
  std::size_t element_start_ = 0;
};

// Reads a subcatchment's `loss` table (docs/basin-file.md): the pervious method and the
// optional impervious share. Returns nullptr when the table has problems (all reported to
// `l`, under the file's own keys and units). `element` names the owner in library errors.
std::unique_ptr<hydrology::LossModel> read_loss(FieldReader& l, const InputUnits& u,
                                                const std::string& element);

// Converts an InputError raised by a library constructor (or the problems a library reports
// without throwing) into located problems.
void relocate(const InputError& e, const FieldReader& at, std::vector<Problem>& problems);
void relocate(const std::vector<Problem>& found, const FieldReader& at,
              std::vector<Problem>& problems);
// Reports a file named by the table at `at` that cannot be read (IoError), at its `file` key.
void report_file_error(FieldReader& at, const IoError& e);

}  // namespace freshet::study::detail
