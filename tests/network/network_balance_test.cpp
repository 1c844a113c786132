// Network volume balance on the demo study and on randomly generated networks:
//   rain + inflow hydrographs = outflow at all outlets + losses + change in storage,
// closed to 1e-9 relative. This is the conservation law the whole network must obey
// (continuity; e.g. Chow, Maidment & Mays 1988, Applied Hydrology, sec. 2.2, the integral
// equation of continuity for a control volume); each element's own ledger is tested in its
// module, this checks that nothing is lost or made where elements hand water on.
#include <filesystem>
#include <fstream>
#include <random>
#include <sstream>

#include <unistd.h>

#include <gtest/gtest.h>

#include "freshet/study/study.hpp"
#include "freshet/network/driver.hpp"

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

// A random tree of reaches, junctions, culverts and detention basins draining to one outlet,
// fed by subcatchments and inflow hydrographs.
std::string random_basin(std::mt19937& rng) {
  std::uniform_real_distribution<double> u(0.0, 1.0);
  std::ostringstream toml;
  toml << "[study]\ntitle = \"random\"\nunits = \"si\"\nduration_h = 3.0\n"
          "output_interval_min = 10.0\ncoupling_step_s = 60.0\ncell_length = 50.0\n"
          "[[storm]]\nid = \"s\"\nmethod = \"alternating-block\"\nduration_min = 45\n"
          "step_min = 5\nidf = { a = 1200.0, b = 10.0, c = 0.75 }\n"
          "[[outlet]]\nid = \"e0\"\n";
  std::vector<std::string> nodes{"e0"};
  std::vector<int> fed(1, 0);
  const int count = 4 + static_cast<int>(u(rng) * 8);
  for (int k = 1; k <= count; ++k) {
    const std::string id = "e" + std::to_string(k);
    const auto to_index = static_cast<std::size_t>(u(rng) * static_cast<double>(nodes.size()));
    const std::string to = nodes[to_index];
    ++fed[to_index];
    const double pick = u(rng);
    if (pick < 0.6) {
      toml << "[[reach]]\nid = \"" << id << "\"\nto = \"" << to << "\"\nlength = "
           << 200.0 + 800.0 * u(rng) << "\nslope = " << 0.002 + 0.01 * u(rng)
           << "\nmanning_n = 0.035\nsection = { shape = \"trapezoidal\", bottom_width = "
           << 1.0 + 3.0 * u(rng) << ", left_side_slope = 2.0, right_side_slope = 1.5 }\n";
    } else if (pick < 0.75) {
      toml << "[[junction]]\nid = \"" << id << "\"\nto = \"" << to << "\"\n";
    } else if (pick < 0.88) {
      toml << "[[culvert]]\nid = \"" << id << "\"\nto = \"" << to << "\"\n"
           << "barrel = { shape = \"circular\", diameter = " << 0.6 + 0.9 * u(rng)
           << ", length = 15.0, inlet_invert = 10.0, outlet_invert = 9.9, manning_n = 0.012, "
              "inlet = \"concrete-square-edge-headwall\" }\n"
           << "ponding = { bottom = 10.0, area = " << 500.0 + 3000.0 * u(rng)
           << ", area_growth = 400.0 }\n"
           << "road = { offsets = [0.0, 30.0, 60.0], levels = [13.5, 12.8, 13.6] }\n";
    } else {
      toml << "[[detention]]\nid = \"" << id << "\"\nto = \"" << to << "\"\n"
           << "storage = { bottom = 20.0, area = " << 800.0 + 2000.0 * u(rng) << " }\n"
           << "[[detention.outlet]]\ntype = \"orifice\"\ninvert = 20.0\ndiameter = 0.3\n"
           << "[[detention.outlet]]\ntype = \"weir\"\ncrest = 21.5\nlength = 3.0\n";
    }
    nodes.push_back(id);
    fed.push_back(0);
  }
  // Every element that receives nothing gets a subcatchment (or an inflow hydrograph).
  for (std::size_t i = 0; i < nodes.size(); ++i) {
    if (fed[i] > 0 && u(rng) < 0.7) continue;
    const std::string id = "w" + std::to_string(i);
    if (u(rng) < 0.25) {
      toml << "[[inflow]]\nid = \"" << id << "\"\nto = \"" << nodes[i]
           << "\"\nfile = \"inflow.csv\"\n";
      continue;
    }
    toml << "[[subcatchment]]\nid = \"" << id << "\"\nto = \"" << nodes[i] << "\"\narea = "
         << 5.0 + 40.0 * u(rng) << "\nloss = { method = \"curve-number\", curve_number = "
         << 60.0 + 35.0 * u(rng) << " }\n[[subcatchment.plane]]\nlength = "
         << 40.0 + 80.0 * u(rng) << "\nslope = 0.03\nmanning_n = 0.2\ncells = 20\n";
  }
  return toml.str();
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

}  // namespace
}  // namespace freshet
