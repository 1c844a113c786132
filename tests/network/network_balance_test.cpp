// Network volume balance on the demo study and on randomly generated networks:
//   rain + inflow hydrographs = outflow at all outlets + losses + change in storage,
// closed to 1e-9 relative. This is the conservation law the whole network must obey
// (continuity; e.g. Chow, Maidment & Mays 1988, Applied Hydrology, sec. 2.2, the integral
// equation of continuity for a control volume); each element's own ledger is tested in its
// module, this checks that nothing is lost or made where elements hand water on.
#include <cstring>
#include <filesystem>
#include <fstream>
#include <random>

#include <unistd.h>

#include <gtest/gtest.h>

#include "freshet/study/study.hpp"
#include "freshet/network/driver.hpp"
#include "freshet/network/sweep_plan.hpp"
#include "random_basin.hpp"

namespace freshet {
namespace {

class NullSink final : public network::RecordSink {
 public:
  void record(double, std::span<const network::StationSample>) override {}
};

struct Totals {
  double supplied_m3 = 0.0;   // rain + inflow hydrographs
  double leaving_m3 = 0.0;    // outlets
  double lost_m3 = 0.0;       // infiltration and depression storage
  double stored_m3 = 0.0;     // storage change in every element
};

Totals network_totals(const network::Model& model, const network::RunSummary& run) {
  Totals t;
  for (std::size_t i = 0; i < model.links.size(); ++i) {
    const network::VolumeLedger& l = run.balances[i].ledger;
    const network::ElementKind kind = model.links[i].kind;
    if (kind == network::ElementKind::subcatchment) t.supplied_m3 += l.rain_m3;
    if (kind == network::ElementKind::inflow) t.supplied_m3 += l.outflow_m3;
    if (kind == network::ElementKind::outlet) t.leaving_m3 += l.outflow_m3;
    t.lost_m3 += l.loss_m3;
    t.stored_m3 += l.storage_m3 - l.initial_storage_m3;
  }
  return t;
}

double relative_imbalance(const study::Study& study, const std::string& scenario,
                          const std::string& storm) {
  network::Model model = study.build_model(scenario, study.storm(storm));
  NullSink sink;
  const auto& s = study.settings();
  network::ClockOptions clock{0.0, s.duration_s, s.output_interval_s, s.coupling_step_s};
  const network::RunSummary run = network::simulate(model, clock, sink);
  const Totals t = network_totals(model, run);
  EXPECT_GT(t.supplied_m3, 0.0);
  return std::abs(t.supplied_m3 - t.leaving_m3 - t.lost_m3 - t.stored_m3) / t.supplied_m3;
}

TEST(NetworkBalance, DemoStudyClosesForEveryStormAndScenario) {
  const study::Study study =
      study::Study::load(std::filesystem::path(FRESHET_SOURCE_DIR) / "basins/tansy-brook.toml");
  for (const char* scenario : {"", "twin-1500"}) {
    for (const char* storm : {"aep1-30min", "aep1-120min"}) {
      EXPECT_LT(relative_imbalance(study, scenario, storm), 1e-9) << scenario << " " << storm;
    }
  }
}

TEST(NetworkBalance, RandomNetworksClose) {
  // One folder per process: test runs of other build trees on the machine remove their own.
  const auto dir = std::filesystem::temp_directory_path() /
                   ("freshet-random-networks-" + std::to_string(::getpid()));
  std::filesystem::create_directories(dir);
  std::ofstream(dir / "inflow.csv") << "time_min,discharge_m3s\n0,0.2\n30,2.5\n90,0.5\n180,0.2\n";
  for (unsigned seed = 1; seed <= 12; ++seed) {
    std::mt19937 rng(seed);
    const auto file = dir / ("random-" + std::to_string(seed) + ".toml");
    std::ofstream(file) << random_basin(rng);
    const study::Study study = study::Study::load(file);
    EXPECT_LT(relative_imbalance(study, "", "s"), 1e-9) << "seed " << seed;
  }
  std::filesystem::remove_all(dir);
}

// Every sample a run hands its sink, kept as bit patterns (NaN compares equal to itself).
class KeepingSink final : public network::RecordSink {
 public:
  void record(double time_s, std::span<const network::StationSample> samples) override {
    keep(time_s, samples);
  }
  [[nodiscard]] bool observes_every_step() const override { return true; }
  void observe(double time_s, std::span<const network::StationSample> samples) override {
    keep(time_s, samples);
  }
  std::vector<std::uint64_t> bits;
  int most_drowned_cells = 0;  // summed over the reaches that follow a pool's level

 private:
  void put(double x) {
    std::uint64_t b = 0;
    std::memcpy(&b, &x, sizeof b);
    bits.push_back(b);
  }
  void keep(double time_s, std::span<const network::StationSample> samples) {
    put(time_s);
    for (const network::StationSample& s : samples) {
      for (double x : {s.discharge_m3s, s.stage_m, s.depth_m, s.velocity_m_s, s.rain_m_s,
                       s.excess_m_s, s.outflow_volume_m3}) {
        put(x);
      }
    }
  }
};

KeepingSink route_with_threads(const study::Study& study, int threads) {
  network::Model model = study.build_model("", study.storm("s"));
  KeepingSink sink;
  const auto& s = study.settings();
  network::ClockOptions clock{0.0, s.duration_s, s.output_interval_s, s.coupling_step_s};
  (void)network::simulate(model, clock, sink, {}, network::SweepOptions{threads});
  for (const auto& e : model.elements) {
    if (e->kind() != network::ElementKind::reach) continue;
    sink.most_drowned_cells += e->report().reach().backwater.most_drowned_cells;
  }
  return sink;
}

// Routes random networks of up to 40 elements on 1, 2 and 3 threads and requires the same
// samples bit for bit; returns the drowned cells of the serial runs.
int expect_threads_give_serial_bits(const char* name, bool level_pool) {
  const auto dir = std::filesystem::temp_directory_path() /
                   (std::string(name) + "-" + std::to_string(::getpid()));
  std::filesystem::create_directories(dir);
  std::ofstream(dir / "inflow.csv") << "time_min,discharge_m3s\n0,0.2\n30,2.5\n90,0.5\n180,0.2\n";
  int drowned = 0;
  for (unsigned seed = 1; seed <= 3; ++seed) {
    std::mt19937 rng(seed);
    const auto file = dir / ("random-" + std::to_string(seed) + ".toml");
    std::ofstream(file) << random_basin(rng, {}, 40, level_pool);
    const study::Study study = study::Study::load(file);
    const KeepingSink serial = route_with_threads(study, 1);
    EXPECT_FALSE(serial.bits.empty());
    drowned += serial.most_drowned_cells;
    for (int threads : {2, 3}) {
      const KeepingSink parallel = route_with_threads(study, threads);
      EXPECT_TRUE(parallel.bits == serial.bits) << "seed " << seed << ", " << threads << " threads";
      EXPECT_EQ(parallel.most_drowned_cells, serial.most_drowned_cells) << "seed " << seed;
    }
  }
  std::filesystem::remove_all(dir);
  return drowned;
}

// The check for parallel routing: one run on 2 or 3 threads hands its sink exactly
// the samples of the serial sweep (the reference), bit for bit, at every coupling step, on
// random networks of reaches, culverts, detention basins, junctions, subcatchments and
// inflow hydrographs (each element's arithmetic does not depend on which thread runs it).
TEST(NetworkBalance, ThreadsGiveTheSerialResultsBitForBit) {
  (void)expect_threads_give_serial_bits("freshet-threaded-networks", false);
}

// The same with level-pool backwater: the driver couples each drowned reach with its pool
// between sweeps, on its own thread, so the threads see the same drowned lengths. The random
// networks must drown some reach for the check to mean anything.
TEST(NetworkBalance, ThreadsGiveTheSerialResultsUnderLevelPoolBackwater) {
  EXPECT_GT(expect_threads_give_serial_bits("freshet-threaded-backwater", true), 0);
}

// The cut of a network between threads: every element in exactly one lane or the trunk, each
// lane closed upstream (whole subtrees) and in topological order, the trunk in topological
// order, and lanes that share the work (a binary tree of 255 equal elements on 2 threads:
// each lane within a quarter of a thread's share of the other).
TEST(SweepPlan, CutsWholeSubtreesInTopologicalOrder) {
  std::vector<network::Link> links;
  for (int i = 0; i < 255; ++i) {
    network::Link l;
    l.id = "e" + std::to_string(i);
    l.kind = i == 0 ? network::ElementKind::outlet
             : i < 127 ? network::ElementKind::reach
                       : network::ElementKind::inflow;  // the leaves are sources
    if (i > 0) l.to = "e" + std::to_string((i - 1) / 2);
    links.push_back(l);
  }
  const network::Topology topology = network::build_topology(links);
  for (int threads : {1, 2, 3, 4}) {
    const network::SweepPlan plan =
        network::plan_sweep(topology, std::vector<double>(links.size(), 1.0), threads);
    ASSERT_EQ(plan.lanes.size(), static_cast<std::size_t>(threads));
    std::vector<std::size_t> position(links.size()), lane_of(links.size(), 99);
    for (std::size_t k = 0; k < topology.order.size(); ++k) position[topology.order[k]] = k;
    std::size_t seen = plan.trunk.size();
    for (std::size_t k = 0; k < plan.lanes.size(); ++k) {
      seen += plan.lanes[k].size();
      for (std::size_t j = 0; j < plan.lanes[k].size(); ++j) {
        lane_of[plan.lanes[k][j]] = k;
        if (j > 0) {
          EXPECT_LT(position[plan.lanes[k][j - 1]], position[plan.lanes[k][j]]);
        }
      }
    }
    EXPECT_EQ(seen, links.size());
    for (std::size_t k = 0; k < plan.lanes.size(); ++k) {
      for (std::size_t i : plan.lanes[k]) {
        for (std::size_t u : topology.upstream[i]) EXPECT_EQ(lane_of[u], k) << threads;
      }
    }
    for (std::size_t j = 1; j < plan.trunk.size(); ++j) {
      EXPECT_LT(position[plan.trunk[j - 1]], position[plan.trunk[j]]);
    }
    if (threads == 1) {
      EXPECT_TRUE(plan.trunk.empty());
    }
    if (threads == 2) {
      const double a = static_cast<double>(plan.lanes[0].size());
      const double b = static_cast<double>(plan.lanes[1].size());
      EXPECT_LE(std::abs(a - b), 0.25 * 255.0 / 2.0) << a << " " << b;
    }
  }
}

}  // namespace
}  // namespace freshet
