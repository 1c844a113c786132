// The state archive: what a StateWriter writes a StateReader reads back bit for bit (NaN,
// infinities and signed zeros included, IEEE 754-2008 sec. 3.4: a binary64 value is its bit
// pattern), records round-trip column by column, the digest is SHA-256 (FIPS 180-4) of the
// entries and changes with any bit, and the reader refuses a missing, mistyped or mis-sized
// entry with the source and the entry's path in the message.
#include <cmath>
#include <cstring>
#include <limits>

#include <gtest/gtest.h>

#include "freshet/core/error.hpp"
#include "freshet/core/state_archive.hpp"

namespace freshet {
namespace {

struct Row {
  double x = 0.0;
  int index = 0;
  bool alive = false;
  std::uint32_t generation = 0;
};

struct Thing {
  double time_s = 0.0;
  long steps = 0;
  std::vector<double> cells{1.0, 2.0, 3.0};
  std::vector<Row> rows;
  std::string label;
  void visit(StateVisitor& v) {
    StateGroup g(v, "thing");
    v.value("time_s", time_s);
    v.value("steps", steps);
    v.fixed_doubles("cells", cells);
    v.records("rows", rows, &Row::x, &Row::index, &Row::alive, &Row::generation);
    v.text("label", label);
  }
};

bool same_bits(double a, double b) { return std::memcmp(&a, &b, sizeof a) == 0; }

TEST(StateArchive, RoundTripsBitForBit) {
  Thing a;
  a.time_s = std::numeric_limits<double>::quiet_NaN();
  a.steps = 1234567890123L;
  a.cells = {-0.0, std::numeric_limits<double>::infinity(), 0.1 + 0.2};
  a.rows = {{1.5, -1, true, 4000000000u}, {-2.25, 7, false, 0u}};
  a.label = "mill-race";
  StateArchive archive;
  StateWriter w(archive);
  a.visit(w);
  EXPECT_TRUE(archive.entries.count("thing/rows/c0"));
  EXPECT_TRUE(archive.entries.count("thing/rows/count"));

  Thing b;
  StateReader r(archive, "hot.h5");
  b.visit(r);
  r.require_all_read();
  EXPECT_TRUE(same_bits(b.time_s, a.time_s));
  EXPECT_EQ(b.steps, a.steps);
  for (std::size_t i = 0; i < 3; ++i) EXPECT_TRUE(same_bits(b.cells[i], a.cells[i]));
  ASSERT_EQ(b.rows.size(), 2u);
  EXPECT_EQ(b.rows[0].index, -1);
  EXPECT_TRUE(b.rows[0].alive);
  EXPECT_EQ(b.rows[0].generation, 4000000000u);
  EXPECT_EQ(b.rows[1].x, -2.25);
  EXPECT_EQ(b.label, "mill-race");
}

TEST(StateArchive, DigestIsSha256OfTheEntriesAndSeesEveryBit) {
  StateArchive empty;
  // FIPS 180-4 / NIST example: SHA-256 of the empty message.
  EXPECT_EQ(empty.digest(), "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855");
  Thing a;
  StateArchive archive;
  StateWriter w(archive);
  a.visit(w);
  const std::string before = archive.digest();
  auto& cells = std::get<std::vector<double>>(archive.entries.at("thing/cells"));
  cells[1] = std::nextafter(cells[1], 10.0);  // the last bit of one value
  EXPECT_NE(archive.digest(), before);
}

std::string refusal(const StateArchive& archive) {
  Thing t;
  StateReader r(archive, "runs/hot.h5");
  try {
    t.visit(r);
    r.require_all_read();
  } catch (const InputError& e) {
    return e.what();
  }
  return "accepted";
}

TEST(StateArchive, ReaderRefusesWhatThisObjectCannotTake) {
  Thing a;
  StateArchive good;
  StateWriter w(good);
  a.visit(w);
  EXPECT_EQ(refusal(good), "accepted");

  StateArchive missing = good;
  missing.entries.erase("thing/steps");
  EXPECT_NE(refusal(missing).find("runs/hot.h5: state entry 'thing/steps', is missing"),
            std::string::npos)
      << refusal(missing);

  StateArchive sized = good;
  std::get<std::vector<double>>(sized.entries.at("thing/cells")).push_back(4.0);
  EXPECT_NE(refusal(sized).find("'thing/cells', has 4 values where this run needs 3"),
            std::string::npos)
      << refusal(sized);

  StateArchive kind = good;
  kind.entries.at("thing/time_s") = std::string("noon");
  EXPECT_NE(refusal(kind).find("'thing/time_s', is not an array of numbers"), std::string::npos)
      << refusal(kind);

  StateArchive extra = good;
  extra.entries["thing/other"] = std::vector<double>{1.0};
  EXPECT_NE(refusal(extra).find("'thing/other', is not part of this run's network"),
            std::string::npos)
      << refusal(extra);

  StateArchive count = good;
  std::get<std::vector<std::int64_t>>(count.entries.at("thing/rows/count")).front() = -3;
  EXPECT_NE(refusal(count).find("'thing/rows/count', = -3: not a row count"), std::string::npos)
      << refusal(count);
}

}  // namespace
}  // namespace freshet
