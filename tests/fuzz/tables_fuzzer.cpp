// libFuzzer target: the tables freshet builds from basin-file numbers, fed straight to the
// library constructors that validate them:
//   irregular  surveyed section -> geometry::make_flow_section (tabulated flux Q(A))
//   circular   part-full pipe   -> geometry::make_flow_section (tabulated flux with a cap)
//   storage    stage-storage    -> network::structures::StageStorage::from_table
//   culvert    barrels + road   -> network::structures::CulvertCrossing (its rating table)
// The input is a small text, one key and its numbers per line, the first word naming the table:
//
//   irregular
//   offsets 0 6 14 16.5 18 21 23 31 40
//   levels 61.8 60.6 60.1 59.1 58.5 58.6 59.4 60 61.5
//   channel 14 23
//   n 0.05 0.04 0.06
//   slope 0.012
//   probe 0.001 0.3 0.9        (fractions of the table's range, where lookups are checked)
//
// Keys left out take the demo study's values (basins/tansy-brook.toml), so a mutation of one
// number is tried against an otherwise sound table. For speed, flux tables are built coarser
// than the reader builds them (kFuzzTable; `irregular fine` / `circular fine` on the first line
// asks for the reader's defaults) and culvert ratings start from 16 stages, not 400 (`points`);
// the table code, its refinement and its lookups are the same. A constructor's InputError or
// NumericalError is an expected outcome; for a table that is accepted, every lookup inside
// the table's own range must be finite and non-negative, and discharge must not fall as area
// rises (the documented contracts of TabulatedFlux and StageStorage): a break is a finding.
#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <map>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "freshet/geometry/cross_section.hpp"
#include "freshet/geometry/section_flux.hpp"
#include "freshet/network/structures/culvert.hpp"
#include "freshet/network/structures/culvert_crossing.hpp"
#include "freshet/network/structures/outlets.hpp"
#include "freshet/network/structures/stage_storage.hpp"
#include "fuzz_support.hpp"

namespace {

using freshet::format_value;
using freshet::fuzz::report_finding;
namespace geometry = freshet::geometry;
namespace structures = freshet::network::structures;

constexpr std::size_t kMaxValuesPerKey = 64;

// Tables about 20 times cheaper to build than the defaults (tolerances 1e-8 / 1e-6).
geometry::TableOptions table_options(const std::string& variant) {
  if (variant == "fine") return {};
  geometry::TableOptions coarse;
  coarse.nodes_per_decade = 8;
  coarse.discharge_tolerance = 1e-4;
  coarse.celerity_tolerance = 1e-3;
  coarse.max_nodes = 256;
  return coarse;
}

// ---- the input text ------------------------------------------------------------------------

struct Input {
  std::string table;                                   // first word of the text
  std::string variant;                                 // second word of the first line
  std::map<std::string, std::vector<double>, std::less<>> numbers;
  std::map<std::string, std::string, std::less<>> words;  // first non-number after a key

  [[nodiscard]] std::vector<double> list(std::string_view key, std::vector<double> fallback) const {
    const auto it = numbers.find(key);
    return it == numbers.end() ? fallback : it->second;
  }
  [[nodiscard]] double one(std::string_view key, double fallback, std::size_t index = 0) const {
    const auto it = numbers.find(key);
    if (it == numbers.end()) return fallback;
    return index < it->second.size() ? it->second[index] : std::nan("");
  }
  [[nodiscard]] std::optional<double> maybe(std::string_view key) const {
    const auto it = numbers.find(key);
    if (it == numbers.end()) return std::nullopt;
    return it->second.empty() ? std::nan("") : it->second.front();
  }
  [[nodiscard]] std::string word(std::string_view key, std::string fallback) const {
    const auto it = words.find(key);
    return it == words.end() ? fallback : it->second;
  }
};

std::vector<std::string_view> split_words(std::string_view line) {
  std::vector<std::string_view> out;
  std::size_t i = 0;
  while (i < line.size()) {
    while (i < line.size() && (line[i] == ' ' || line[i] == '\t' || line[i] == ',')) ++i;
    const std::size_t start = i;
    while (i < line.size() && line[i] != ' ' && line[i] != '\t' && line[i] != ',') ++i;
    if (i > start) out.push_back(line.substr(start, i - start));
  }
  return out;
}

std::optional<double> to_number(std::string_view word) {
  double v = 0.0;
  const auto [end, ec] = std::from_chars(word.data(), word.data() + word.size(), v);
  if (ec != std::errc{} || end != word.data() + word.size()) return std::nullopt;
  return v;
}

Input parse(std::string_view text) {
  Input in;
  bool first = true;
  while (!text.empty()) {
    const std::size_t eol = text.find('\n');
    const std::string_view line = text.substr(0, eol);
    text = eol == std::string_view::npos ? std::string_view{} : text.substr(eol + 1);
    const auto words = split_words(line);
    if (words.empty()) continue;
    if (first) {
      in.table = std::string(words[0]);
      if (words.size() > 1) in.variant = std::string(words[1]);
      first = false;
      continue;
    }
    auto& values = in.numbers[std::string(words[0])];
    for (std::size_t k = 1; k < words.size(); ++k) {
      if (auto v = to_number(words[k])) {
        if (values.size() < kMaxValuesPerKey) values.push_back(*v);
      } else if (!in.words.count(words[0])) {
        in.words.emplace(std::string(words[0]), std::string(words[k]));
      }
    }
  }
  return in;
}

// ---- checks on accepted tables -------------------------------------------------------------

void require_value(bool ok, const std::string& what, double at, double value) {
  if (!ok) report_finding(what + " at " + format_value(at) + " = " + format_value(value));
}

bool finite_non_negative(double v) { return std::isfinite(v) && v >= 0.0; }

// Probe points: input fractions of [low, high] plus a fixed sweep.
std::vector<double> probes(const Input& in, double low, double high, bool geometric) {
  std::vector<double> out;
  for (double f : in.list("probe", {})) {
    if (f >= 0.0 && f <= 1.0) out.push_back(low + f * (high - low));
  }
  for (int k = 0; k <= 12; ++k) {
    out.push_back(geometric ? high * std::pow(10.0, -k) : low + (high - low) * k / 12.0);
  }
  std::sort(out.begin(), out.end());
  return out;
}

void check_flow_section(const geometry::FlowSection& s, const Input& in) {
  const double top_depth_m = 3.0 * s.section->depth_scale_m();  // TableOptions' automatic top
  const double top_area_m2 = s.section->area_m2(top_depth_m);
  if (!finite_non_negative(top_area_m2)) return;  // nothing tabulated to hold to
  double previous_q = 0.0;
  for (double a : probes(in, 0.0, top_area_m2, true)) {
    const double q = geometry::discharge_m3s(s.flux, a);
    require_value(finite_non_negative(q), "discharge of an accepted section", a, q);
    require_value(q >= previous_q * (1.0 - 1e-12), "discharge falls as area rises", a, q);
    previous_q = q;
    const double c = geometry::celerity_m_s(s.flux, a);
    require_value(finite_non_negative(c), "celerity of an accepted section", a, c);
    const double back = geometry::area_for_discharge_m2(s.flux, q);
    require_value(finite_non_negative(back), "area for the discharge at area", a, back);
    const double h = s.depth_m(a);
    require_value(finite_non_negative(h), "depth of an accepted section", a, h);
  }
}

void check_storage(const structures::StageStorage& s, const std::vector<double>& stages,
                   const Input& in) {
  std::vector<double> at = probes(in, stages.front(), stages.back(), false);
  for (std::size_t k = 0; k < stages.size(); ++k) {
    at.push_back(stages[k]);
    if (k > 0) at.push_back(0.5 * stages[k - 1] + 0.5 * stages[k]);
  }
  for (double h : at) {
    const double v = s.storage_m3(h);
    require_value(finite_non_negative(v), "storage of an accepted table", h, v);
    const double area = s.surface_area_m2(h);
    require_value(finite_non_negative(area), "surface area of an accepted table", h, area);
    const double back = s.stage_m(v);
    require_value(std::isfinite(back), "stage for the storage at stage", h, back);
  }
}

void check_crossing(const structures::CulvertCrossing& x, const Input& in) {
  const auto stages = x.rating_stage_m();
  std::vector<double> at = probes(in, stages.front(), stages.back(), false);
  for (std::size_t k = 1; k < stages.size(); ++k) at.push_back(0.5 * (stages[k - 1] + stages[k]));
  for (double h : at) {
    const double q = x.discharge_m3s(h);
    require_value(finite_non_negative(q), "discharge of an accepted crossing", h, q);
  }
}

// ---- the tables ----------------------------------------------------------------------------

void irregular(const Input& in) {
  const auto st = in.list("offsets", {0.0, 6.0, 14.0, 16.5, 18.0, 21.0, 23.0, 31.0, 40.0});
  const auto el = in.list("levels", {61.8, 60.6, 60.1, 59.1, 58.5, 58.6, 59.4, 60.0, 61.5});
  geometry::IrregularSpec spec;
  for (std::size_t k = 0; k < std::min(st.size(), el.size()); ++k) {
    spec.points.push_back({st[k], el[k]});
  }
  spec.left_bank_station_m = in.one("channel", 14.0, 0);
  spec.right_bank_station_m = in.one("channel", 23.0, 1);
  spec.left_overbank_n = in.one("n", 0.05, 0);
  spec.main_channel_n = in.one("n", 0.04, 1);
  spec.right_overbank_n = in.one("n", 0.06, 2);
  check_flow_section(geometry::make_flow_section(spec, in.one("slope", 0.012),
                                                 table_options(in.variant), "fuzz"), in);
}

void circular(const Input& in) {
  const geometry::CircularSpec spec{in.one("diameter", 1.2), in.one("n", 0.013)};
  check_flow_section(geometry::make_flow_section(spec, in.one("slope", 0.006),
                                                 table_options(in.variant), "fuzz"), in);
}

void storage(const Input& in) {
  const auto stages = in.list("stages", {52.0, 52.5, 53.0, 53.5, 54.0, 54.5, 55.0, 55.5, 56.0, 57.0});
  const auto volumes = in.list(
      "storages", {0.0, 150.0, 900.0, 2600.0, 5600.0, 10200.0, 16800.0, 25500.0, 36000.0, 62000.0});
  const auto interpolation = in.variant == "linear" ? structures::StorageInterpolation::linear
                                                    : structures::StorageInterpolation::monotone_cubic;
  const auto s = structures::StageStorage::from_table(stages, volumes, interpolation, "fuzz");
  check_storage(s, stages, in);
}

// A whole number from the text, or `invalid` when it is not one an int can hold.
int whole(double v, int invalid) {
  return std::isfinite(v) && std::fabs(v) < 1e6 ? static_cast<int>(v) : invalid;
}

void culvert(const Input& in) {
  structures::CulvertSpec spec;
  spec.shape = in.variant == "box" ? structures::BarrelShape::box
                                   : structures::BarrelShape::circular;
  spec.rise_m = in.one("rise", 1.2);
  spec.span_m = in.one("span", spec.shape == structures::BarrelShape::box ? 3.0 : 0.0);
  spec.barrel_count = whole(in.one("count", 1.0), 0);
  spec.length_m = in.one("length", 18.0);
  spec.inlet_invert_stage_m = in.one("inverts", 52.0, 0);
  spec.outlet_invert_stage_m = in.one("inverts", 51.85, 1);
  spec.manning_n = in.one("n", 0.012);
  const std::string inlet = in.word("inlet", spec.shape == structures::BarrelShape::box
                                                 ? "box-wingwall-30-to-75-deg"
                                                 : "concrete-square-edge-headwall");
  const auto type = structures::parse_inlet_type(inlet);
  if (!type || structures::inlet_coefficients(*type).shape != spec.shape) return;  // io's check
  spec.inlet = *type;
  spec.entrance_loss = in.maybe("entrance_loss");
  const std::optional<double> tailwater = in.maybe("tailwater");
  std::optional<structures::RoadOvertopping> road;
  if (in.word("road", "yes") != "none") {
    road.emplace(in.list("road_offsets", {0.0, 40.0, 80.0, 120.0, 160.0, 200.0}),
                 in.list("road_levels", {55.8, 55.3, 55.05, 55.1, 55.4, 55.9}),
                 in.one("road_coefficient", structures::kRoadOvertoppingCoefficientSi), "fuzz road",
                 tailwater);
  }
  const int points = whole(in.one("points", 16.0), 0);
  if (points > 2000) return;  // the reader always asks for 400
  const structures::CulvertCrossing crossing(structures::Culvert(spec, "fuzz"), road, tailwater,
                                             in.one("top", 58.0), "fuzz", points);
  check_crossing(crossing, in);
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  const Input in = parse(std::string_view(reinterpret_cast<const char*>(data), size));
  freshet::fuzz::expect_documented_outcome(
      [&in] {
        if (in.table == "irregular") irregular(in);
        if (in.table == "circular") circular(in);
        if (in.table == "storage") storage(in);
        if (in.table == "culvert") culvert(in);
      },
      /*problems_name_a_file=*/false);
  return 0;
}
