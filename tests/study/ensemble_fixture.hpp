// The basin of the ensemble tests (invented) and a scratch folder holding it, with the steady
// inflow it names; load_error() gives the message of a file that does not load.
#pragma once

#include <filesystem>
#include <string>

#include "../io/temp_dir.hpp"
#include "freshet/core/error.hpp"
#include "freshet/study/study.hpp"

namespace freshet::study::testing {

inline const std::string kBasin = R"toml([study]
title = "ensemble fixture (invented)"
units = "si"
duration_h = 3.0
output_interval_min = 5.0

[[storm]]
id = "s1"
method = "alternating-block"
duration_min = 30
step_min = 5
idf = { a = 1300.0, b = 10.0, c = 0.75 }

[[inflow]]
id = "steady"
to = "r1"
file = "steady.csv"

[[subcatchment]]
id = "hill"
to = "r2"
area = 20.0
loss = { method = "curve-number", curve_number = 70 }
  [[subcatchment.plane]]
  length = 80.0
  slope = 0.05
  manning_n = 0.24
  [[subcatchment.plane]]
  length = 40.0
  slope = 0.02
  manning_n = 0.15

[[reach]]
id = "r1"
to = "r2"
length = 2000.0
slope = 0.002
manning_n = 0.03
section = { shape = "rectangular", bottom_width = 4.0 }
cells = 40

[[reach]]
id = "r2"
to = "out"
length = 500.0
slope = 0.002
manning_n = 0.03
section = { shape = "rectangular", bottom_width = 4.0 }
cells = 10

[[outlet]]
id = "out"

[[scenario]]
id = "steeper-hill"
[scenario.change.hill]
loss = { method = "curve-number", curve_number = 80 }
)toml";

struct Fixture {
  io::testing::TempDir dir;
  std::filesystem::path basin;
  explicit Fixture(const std::string& text) : basin(dir / "basin.toml") {
    io::testing::write_text(basin, text);
    io::testing::write_text(dir / "steady.csv", "time_min,discharge_m3s\n0,5.0\n180,5.0\n");
  }
  [[nodiscard]] std::string load_error() const {
    try {
      (void)Study::load(basin);
    } catch (const InputError& e) {
      return e.what();
    }
    return {};
  }
};

}  // namespace freshet::study::testing
