// Hot start in memory: a run split at a coupling step and resumed from its saved state equals
// the unsplit run bit for bit, for every routing scheme, on the demo study and on random
// networks. The reference is the unsplit run itself (a restart must be invisible: the
// deterministic continuation of the same arithmetic, common practice, no source); the
// comparison is of every sample the driver hands the sink after the split (at output times
// and coupling-step ends) and of the complete final state of every element (cells or fronts,
// ledgers, shock and breaking records, pond levels, loss stores), bit for bit.
#include <cstring>
#include <filesystem>
#include <fstream>
#include <map>
#include <random>
#include <sstream>
#include <string>
#include <vector>

#include <unistd.h>

#include <gtest/gtest.h>

#include "freshet/network/driver.hpp"
#include "freshet/study/study.hpp"
#include "random_basin.hpp"

namespace freshet {
namespace {

// Every sample the driver hands over, as it was handed.
class CapturingSink final : public network::RecordSink {
 public:
  struct Entry {
    bool output = false;
    double time_s = 0.0;
    std::vector<network::StationSample> samples;
  };
  void record(double t, std::span<const network::StationSample> s) override {
    entries.push_back({true, t, {s.begin(), s.end()}});
  }
  [[nodiscard]] bool observes_every_step() const override { return true; }
  void observe(double t, std::span<const network::StationSample> s) override {
    entries.push_back({false, t, {s.begin(), s.end()}});
  }
  std::vector<Entry> entries;
};

bool same_bits(const network::StationSample& a, const network::StationSample& b) {
  return std::memcmp(&a, &b, sizeof(network::StationSample)) == 0;
}

// Compares two archives entry by entry, bit for bit; returns the first difference.
std::string first_difference(const StateArchive& a, const StateArchive& b) {
  if (a.entries.size() != b.entries.size()) return "entry counts differ";
  for (auto ia = a.entries.begin(), ib = b.entries.begin(); ia != a.entries.end(); ++ia, ++ib) {
    if (ia->first != ib->first) return "entry " + ia->first + " against " + ib->first;
    const auto* da = std::get_if<std::vector<double>>(&ia->second);
    const auto* db = std::get_if<std::vector<double>>(&ib->second);
    if (da && db) {
      // memcmp only on non-empty arrays: an empty vector's data() may be null.
      if (da->size() != db->size() ||
          (!da->empty() &&
           std::memcmp(da->data(), db->data(), da->size() * sizeof(double)) != 0)) {
        return ia->first;
      }
    } else if (ia->second != ib->second) {
      return ia->first;
    }
  }
  return {};
}

network::ClockOptions clock_of(const study::Study& study) {
  const auto& s = study.settings();
  return {0.0, s.duration_s, s.output_interval_s, s.coupling_step_s};
}

// Runs `study` unsplit, then once more saving its state after each of `splits`, and resumes
// each saved state in a fresh model; every resumed run must equal the unsplit one.
void expect_exact_restarts(const study::Study& study, const std::string& storm,
                           const std::vector<long long>& splits, const std::string& what) {
  const network::ClockOptions clock = clock_of(study);
  network::Model whole = study.build_model("", study.storm(storm));
  CapturingSink whole_sink;
  const network::RunSummary whole_run = network::simulate(whole, clock, whole_sink);
  CapturingSink none;
  const StateArchive end_whole = network::save_run_state(whole, none, clock, 1, 0.0);

  struct Saved {
    double time_s = 0.0;
    StateArchive state;
  };
  std::map<long long, Saved> saved;
  {
    network::Model first = study.build_model("", study.storm(storm));
    CapturingSink first_sink;
    network::HotStart save;
    save.save_after_steps = splits;
    save.save = [&saved](long long step, double t, const StateArchive& state) {
      saved[step] = {t, state};
    };
    network::simulate(first, clock, first_sink, {}, {}, save);
  }
  ASSERT_EQ(saved.size(), splits.size()) << what;

  for (const auto& [split, at] : saved) {
    SCOPED_TRACE(what + ", split after step " + std::to_string(split));
    network::Model second = study.build_model("", study.storm(storm));
    CapturingSink second_sink;
    network::HotStart resume;
    resume.resume = &at.state;
    resume.resume_source = "in memory";
    const network::RunSummary second_run =
        network::simulate(second, clock, second_sink, {}, {}, resume);

    // What the resumed run handed over is exactly the unsplit run's tail.
    std::vector<const CapturingSink::Entry*> tail;
    for (const auto& e : whole_sink.entries) {
      if (e.time_s > at.time_s) tail.push_back(&e);
    }
    ASSERT_EQ(second_sink.entries.size(), tail.size());
    ASSERT_FALSE(tail.empty());
    for (std::size_t k = 0; k < tail.size(); ++k) {
      ASSERT_EQ(second_sink.entries[k].output, tail[k]->output);
      ASSERT_EQ(second_sink.entries[k].time_s, tail[k]->time_s);
      for (std::size_t i = 0; i < tail[k]->samples.size(); ++i) {
        ASSERT_TRUE(same_bits(second_sink.entries[k].samples[i], tail[k]->samples[i]))
            << "element " << whole.elements[i]->id() << " at t = " << tail[k]->time_s << " s";
      }
    }
    // Every element's final state (everything its reports read) is the unsplit run's.
    const StateArchive end_second = network::save_run_state(second, none, clock, 1, 0.0);
    EXPECT_EQ(first_difference(end_whole, end_second), "");
    EXPECT_EQ(end_whole.digest(), end_second.digest());
    EXPECT_EQ(second_run.coupling_steps, whole_run.coupling_steps);
    ASSERT_EQ(second_run.balances.size(), whole_run.balances.size());
    for (std::size_t i = 0; i < whole_run.balances.size(); ++i) {
      EXPECT_EQ(std::memcmp(&second_run.balances[i].ledger, &whole_run.balances[i].ledger,
                            sizeof(VolumeLedger)), 0)
          << whole_run.balances[i].id;
    }
  }
}

const std::vector<std::string> kSchemes = {"explicit-upwind", "implicit-upwind",
                                           "method-of-lines", "muscl-heun",
                                           "characteristics", "muskingum-cunge"};

std::string scheme_lines(const std::string& scheme) {
  const std::string plane = scheme == "muskingum-cunge" ? "muscl-heun" : scheme;
  return "channel_scheme = \"" + scheme + "\"\nwave_choice = \"as-given\"\nplane_scheme = \"" +
         plane + "\"\n";
}

class ScratchFolder {
 public:
  ScratchFolder()
      : path_(std::filesystem::temp_directory_path() /
              ("freshet-hot-start-" + std::to_string(::getpid()))) {
    std::filesystem::create_directories(path_);
  }
  ~ScratchFolder() { std::filesystem::remove_all(path_); }
  [[nodiscard]] const std::filesystem::path& path() const { return path_; }

 private:
  std::filesystem::path path_;
};

// The demo study with every reach and plane on one scheme.
std::filesystem::path demo_with_scheme(const std::filesystem::path& dir, const std::string& scheme) {
  const std::filesystem::path source(FRESHET_SOURCE_DIR);
  std::filesystem::create_directories(dir / "basins");
  std::filesystem::copy(source / "hydrographs", dir / "hydrographs",
                        std::filesystem::copy_options::recursive |
                            std::filesystem::copy_options::skip_existing);
  std::ifstream in(source / "basins/tansy-brook.toml");
  std::ostringstream out;
  for (std::string line; std::getline(in, line);) {
    if (line.rfind("channel_scheme", 0) == 0 || line.rfind("plane_scheme", 0) == 0) continue;
    if (line.rfind("duration_h", 0) == 0) {  // 3 h of the 6 h: the storm and its peak
      out << "duration_h = 3.0\n";
      continue;
    }
    if (line.rfind("wave_choice", 0) == 0) {
      out << scheme_lines(scheme);
      continue;
    }
    out << line << '\n';
  }
  const auto file = dir / "basins" / ("tansy-brook-" + scheme + ".toml");
  std::ofstream(file) << out.str();
  return file;
}

TEST(HotStart, DemoStudyRestartsExactlyWithEveryScheme) {
  ScratchFolder dir;
  for (const std::string& scheme : kSchemes) {
    const study::Study study = study::Study::load(demo_with_scheme(dir.path(), scheme));
    // 3 h, 5-min outputs of 5 coupling steps of 60 s: after the first step, inside an output
    // interval, at an output time, in the storm's recession.
    expect_exact_restarts(study, "aep1-30min", {1, 23, 25, 151}, "demo, " + scheme);
  }
}

TEST(HotStart, RandomNetworksRestartExactlyWithEveryScheme) {
  ScratchFolder dir;
  std::ofstream(dir.path() / "inflow.csv")
      << "time_min,discharge_m3s\n0,0.2\n30,2.5\n90,0.5\n180,0.2\n";
  for (unsigned seed = 1; seed <= 2; ++seed) {
    for (const std::string& scheme : kSchemes) {
      std::mt19937 rng(seed);
      const auto file = dir.path() / ("random-" + std::to_string(seed) + "-" + scheme + ".toml");
      std::ofstream(file) << random_basin(rng, scheme_lines(scheme));
      const study::Study study = study::Study::load(file);
      // 3 h of 60-s coupling steps: a split drawn from the seed, and one in the rising limb.
      std::uniform_int_distribution<long long> step(2, 178);
      std::mt19937 pick(seed * 7919u);
      expect_exact_restarts(study, "s", {37, step(pick)},
                            "seed " + std::to_string(seed) + ", " + scheme);
    }
  }
}

// A state from another network, another storm's clock or a step outside the run is refused
// with a message naming the source and the mismatch; nothing is half-restored silently.
TEST(HotStart, StateFromAnotherRunIsRefused) {
  ScratchFolder dir;
  std::ofstream(dir.path() / "inflow.csv")
      << "time_min,discharge_m3s\n0,0.2\n30,2.5\n90,0.5\n180,0.2\n";
  std::vector<study::Study> studies;
  for (unsigned seed : {4u, 5u}) {
    std::mt19937 rng(seed);
    const auto file = dir.path() / ("other-" + std::to_string(seed) + ".toml");
    std::ofstream(file) << random_basin(rng);
    studies.push_back(study::Study::load(file));
  }
  const network::ClockOptions clock = clock_of(studies[0]);
  StateArchive saved;
  {
    network::Model model = studies[0].build_model("", studies[0].storm("s"));
    CapturingSink sink;
    network::HotStart save;
    save.save_after_steps = {40};
    save.save = [&](long long, double, const StateArchive& state) { saved = state; };
    network::simulate(model, clock, sink, {}, {}, save);
  }
  auto refusal = [&](const study::Study& study, const network::ClockOptions& c,
                     const StateArchive& state) -> std::string {
    network::Model model = study.build_model("", study.storm("s"));
    CapturingSink sink;
    network::HotStart resume;
    resume.resume = &state;
    resume.resume_source = "runs/hot.h5";
    try {
      network::simulate(model, c, sink, {}, {}, resume);
    } catch (const InputError& e) {
      return e.what();
    }
    return "accepted";
  };
  // Another network.
  const std::string other = refusal(studies[1], clock, saved);
  EXPECT_NE(other.find("runs/hot.h5"), std::string::npos) << other;
  EXPECT_NE(other.find("state entry 'elements/"), std::string::npos) << other;
  // Another clock (a longer storm run).
  network::ClockOptions longer = clock;
  longer.end_s += 3600.0;
  const std::string clock_msg = refusal(studies[0], longer, saved);
  EXPECT_NE(clock_msg.find("runs/hot.h5"), std::string::npos) << clock_msg;
  EXPECT_NE(clock_msg.find("run/end_s"), std::string::npos) << clock_msg;
  EXPECT_NE(clock_msg.find("another clock"), std::string::npos) << clock_msg;
  // A cell array of another length.
  StateArchive cut = saved;
  for (auto& [path, value] : cut.entries) {
    if (path.ends_with("/reach/area_m2")) {
      std::get<std::vector<double>>(value).pop_back();
      break;
    }
  }
  const std::string cells = refusal(studies[0], clock, cut);
  EXPECT_NE(cells.find("values where this run needs"), std::string::npos) << cells;
  // A step at the very end leaves nothing to resume.
  StateArchive last = saved;
  std::get<std::vector<std::int64_t>>(last.entries.at("run/step")).front() = 180;
  const std::string step_msg = refusal(studies[0], clock, last);
  EXPECT_NE(step_msg.find("run/step"), std::string::npos) << step_msg;
  // The untouched state is accepted.
  EXPECT_EQ(refusal(studies[0], clock, saved), "accepted");
}

}  // namespace
}  // namespace freshet
