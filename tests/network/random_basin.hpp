// A random basin file for the whole-network tests (volume balance, hot start): a tree of
// reaches, junctions, culverts and detention basins draining to one outlet, fed by
// subcatchments and inflow hydrographs (an "inflow.csv" beside the file). `study_extra` is
// appended to the [study] table (for example a channel_scheme line). With level_pool, the
// study represents backwater as a level pool and every reach draining into a culvert or a
// basin has its outlet invert at the pool's bottom (the same random draws either way).
#pragma once

#include <random>
#include <sstream>
#include <string>
#include <vector>

namespace freshet {

inline std::string random_basin(std::mt19937& rng, const std::string& study_extra = {},
                                int max_elements = 12, bool level_pool = false) {
  std::uniform_real_distribution<double> u(0.0, 1.0);
  std::ostringstream toml;
  toml << "[study]\ntitle = \"random\"\nunits = \"si\"\nduration_h = 3.0\n"
       << (level_pool ? "backwater = \"level-pool\"\n" : "")
       << "output_interval_min = 10.0\ncoupling_step_s = 60.0\ncell_length = 50.0\n"
       << study_extra
       << "[[storm]]\nid = \"s\"\nmethod = \"alternating-block\"\nduration_min = 45\n"
          "step_min = 5\nidf = { a = 1200.0, b = 10.0, c = 0.75 }\n"
          "[[outlet]]\nid = \"e0\"\n";
  std::vector<std::string> nodes{"e0"};
  std::vector<double> pool_bottom_m{0.0};  // 0 where the node is not a pool
  std::vector<int> fed(1, 0);
  const int count = 4 + static_cast<int>(u(rng) * (max_elements - 4));
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
      if (level_pool && pool_bottom_m[to_index] > 0.0) {
        toml << "outlet_invert = " << pool_bottom_m[to_index] << "\n";
      }
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
    pool_bottom_m.push_back(pick < 0.75 ? 0.0 : pick < 0.88 ? 10.0 : 20.0);
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

}  // namespace freshet
