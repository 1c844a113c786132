// The run budget through basin files (docs/basin-file.md, [study] max_cell_steps and
// max_memory_mb): a run beyond it is refused while the file is read, before any element is
// built, with the estimate and the key that lifts the limit; raising the key lifts it. The
// budget's figures are our own criterion (network/run_budget.hpp), not a published value.
#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include <algorithm>
#include <string>

#include "freshet/study/study.hpp"
#include "../io/temp_dir.hpp"

namespace freshet::study {
namespace {

using ::testing::HasSubstr;
using io::testing::TempDir;
using io::testing::write_text;

std::string basin(const std::string& study_extra, int reach_cells, double duration_h) {
  return "[study]\ntitle = \"budget\"\nunits = \"si\"\nduration_h = " +
         std::to_string(duration_h) + "\noutput_interval_min = 5.0\n" + study_extra +
         "\n[[storm]]\nid = \"s1\"\nmethod = \"alternating-block\"\nduration_min = 30\n"
         "step_min = 5\nidf = { a = 1300.0, b = 10.0, c = 0.75 }\n\n"
         "[[subcatchment]]\nid = \"hill\"\nto = \"brook\"\narea = 10.0\n"
         "loss = { method = \"none\" }\n  [[subcatchment.plane]]\n  length = 50.0\n"
         "  slope = 0.05\n  manning_n = 0.2\n  cells = 20\n\n"
         "[[reach]]\nid = \"brook\"\nto = \"out\"\nlength = 500.0\ncells = " +
         std::to_string(reach_cells) +
         "\nslope = 0.004\nmanning_n = 0.03\nsection = { shape = \"rectangular\", "
         "bottom_width = 3.0 }\n\n[[outlet]]\nid = \"out\"\n";
}

std::string load_error(const std::string& text) {
  TempDir dir;
  write_text(dir / "basin.toml", text);
  try {
    (void)Study::load(dir / "basin.toml");
  } catch (const InputError& e) {
    return e.what();
  }
  return "loaded";
}

// "basin.toml:<line>:" for the first line of `text` holding `needle`.
std::string at_line_of(const std::string& text, const std::string& needle) {
  const auto before = text.substr(0, text.find(needle));
  return "basin.toml:" + std::to_string(1 + std::count(before.begin(), before.end(), '\n')) + ":";
}

TEST(RunBudget, MemoryBeyondTheBudgetIsRefusedNamingTheElementAndTheKey) {
  // 20 + 20000 cells x 128 B = 2.4 MB, over a 1 MB budget.
  const std::string text = basin("max_memory_mb = 1\n", 20000, 1.0);
  const std::string what = load_error(text);
  EXPECT_THAT(what, HasSubstr(at_line_of(text, "cells = 20000")));
  EXPECT_THAT(what, HasSubstr(": reach 'brook', field 'cells' = 20000: the network would "
                              "hold at least 20020 cells, an estimated 2 MB (128 B per cell), more than "
                              "the memory budget of 1 MB"));
  EXPECT_THAT(what, HasSubstr("raise max_memory_mb in [study] to lift the limit"));
  EXPECT_EQ(load_error(basin("max_memory_mb = 3\n", 20000, 1.0)), "loaded");
}

TEST(RunBudget, WorkBeyondTheBudgetIsRefusedWithTheEstimate) {
  // 8000 h at 60 s steps = 480 000 coupling steps x (100 020 cells + 3 elements).
  const std::string what = load_error(basin("", 100000, 8000.0));
  EXPECT_THAT(what, HasSubstr("basin.toml:1:1: study, the run would take at least 48011040000 cell "
                              "updates (100020 cells and 3 elements x 480000 coupling steps), "
                              "more than the work budget of 1e+10"));
  EXPECT_THAT(what, HasSubstr("raise max_cell_steps in [study] to lift the limit"));
  EXPECT_EQ(load_error(basin("max_cell_steps = 1e11\n", 100000, 8000.0)), "loaded");
}

TEST(RunBudget, TheDefaultsAcceptAnOrdinaryStudy) {
  EXPECT_EQ(load_error(basin("", 40, 24.0)), "loaded");
}

}  // namespace
}  // namespace freshet::study
