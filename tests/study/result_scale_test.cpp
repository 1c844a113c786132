// Plausibility of a run's results by their scale (src/reporting/result_scale.cpp): a peak per unit
// area above the envelope of the world's record floods, q = 46 C A^(0.894 A^-0.048 - 1)
// ft3/s per mi2 with C = 100 (Creager, Justin & Hinds 1945, Engineering for Dams; from
// memory), is a warning in the run's summary.
#include <gtest/gtest.h>

#include <algorithm>
#include <string>

#include "freshet/study/study_run.hpp"
#include "../io/temp_dir.hpp"

namespace freshet::study {
namespace {

using io::testing::TempDir;
using io::testing::write_text;

// 300 ha of pavement (3 km2, 1.16 mi2) on 30 m planes under a 30-min alternating-block storm
// with i = a / (t + 10)^0.75 (mm/h, t in min). The envelope at 1.16 mi2 is
// 4600 x 1.16^(0.894 x 1.16^-0.048 - 1) = 4524 ft3/s per mi2 = 49.5 m3/s per km2 (by hand).
// Pavement answers in minutes, so the peak runoff is near the peak 5-min intensity
// a / 15^0.75: for a = 2300, 302 mm/h = 84 m3/s per km2, above the envelope; for a = 600,
// 79 mm/h = 22 m3/s per km2, below it.
bool envelope_warning(double idf_a) {
  TempDir dir;
  write_text(dir / "b.toml",
             "[study]\ntitle = \"scale\"\nunits = \"si\"\nduration_h = 1.5\n"
             "output_interval_min = 5.0\n"
             "[[storm]]\nid = \"s1\"\nmethod = \"alternating-block\"\nduration_min = 30\n"
             "step_min = 5\nidf = { a = " + std::to_string(idf_a) + ", b = 10.0, c = 0.75 }\n"
             "[[subcatchment]]\nid = \"paved\"\nto = \"out\"\narea = 300.0\n"
             "loss = { method = \"none\" }\n"
             "[[subcatchment.plane]]\nlength = 30.0\nslope = 0.02\nmanning_n = 0.011\n"
             "cells = 20\n"
             "[[outlet]]\nid = \"out\"\n");
  RunRequest req;
  req.storm_id = "s1";
  req.out_dir = dir / "out";
  req.source = "freshet test";
  const RunOutcome r = run_study(Study::load(dir / "b.toml"), req);
  return std::any_of(r.summary.warnings.begin(), r.summary.warnings.end(), [](const auto& w) {
    return w.element == "out" &&
           w.message.find("exceeds the envelope of the world's record floods") !=
               std::string::npos &&
           w.message.find("Creager, Justin & Hinds 1945") != std::string::npos;
  });
}

TEST(ResultScale, APeakAboveTheRecordFloodEnvelopeIsAWarning) {
  EXPECT_TRUE(envelope_warning(2300.0));
  EXPECT_FALSE(envelope_warning(600.0));
}

}  // namespace
}  // namespace freshet::study
