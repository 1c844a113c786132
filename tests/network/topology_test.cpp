#include "freshet/network/topology.hpp"

#include <gmock/gmock.h>
#include <gtest/gtest.h>

namespace freshet::network {
namespace {

using ::testing::HasSubstr;

std::string all_messages(const std::vector<Link>& links) {
  try {
    build_topology(links);
  } catch (const InputError& e) {
    return e.what();
  }
  return "no error";
}

// Topological order: every element comes after all elements draining into it (the defining
// property of a topological sort; Kahn 1962, Commun. ACM 5(11), "Topological sorting of large
// networks").
TEST(BuildTopology, OrdersConfluenceUpstreamFirst) {
  std::vector<Link> links = {
      {"outfall", ElementKind::outlet, "", {}},
      {"lower", ElementKind::reach, "outfall", {}},
      {"west", ElementKind::reach, "confluence", {}},
      {"confluence", ElementKind::junction, "lower", {}},
      {"east-slope", ElementKind::subcatchment, "east", {}},
      {"east", ElementKind::reach, "confluence", {}},
      {"west-inflow", ElementKind::inflow, "west", {}},
  };
  const Topology t = build_topology(links);
  ASSERT_EQ(t.order.size(), links.size());
  std::vector<std::size_t> position(links.size());
  for (std::size_t k = 0; k < t.order.size(); ++k) position[t.order[k]] = k;
  for (std::size_t i = 0; i < links.size(); ++i) {
    for (std::size_t u : t.upstream[i]) EXPECT_LT(position[u], position[i]) << links[i].id;
  }
  EXPECT_EQ(t.upstream[3].size(), 2u);  // the confluence receives west and east
  EXPECT_EQ(t.downstream[0], -1);
}

TEST(BuildTopology, NamesTheElementsOfACycle) {
  std::vector<Link> links = {
      {"src", ElementKind::inflow, "a", {"b.toml", 3, 1}},
      {"a", ElementKind::reach, "b", {"b.toml", 7, 1}},
      {"b", ElementKind::reach, "a", {"b.toml", 12, 1}},
      {"out", ElementKind::outlet, "", {"b.toml", 20, 1}},
  };
  const std::string m = all_messages(links);
  EXPECT_THAT(m, HasSubstr("forms a cycle"));
  EXPECT_THAT(m, HasSubstr("reach 'a'"));
  EXPECT_THAT(m, HasSubstr("reach 'b'"));
  EXPECT_THAT(m, HasSubstr("b.toml:20:1: outlet 'out', receives no water"));
}

TEST(BuildTopology, ReportsUnknownDuplicateAndMissingLinksAllAtOnce) {
  std::vector<Link> links = {
      {"r1", ElementKind::reach, "nowhere", {"d.toml", 4, 1}},
      {"r1", ElementKind::reach, "out", {"d.toml", 9, 1}},
      {"j", ElementKind::junction, "", {"d.toml", 11, 1}},
      {"in", ElementKind::inflow, "in2", {"d.toml", 13, 1}},
      {"in2", ElementKind::inflow, "out", {"d.toml", 14, 1}},
      {"out", ElementKind::outlet, "r1", {"d.toml", 15, 1}},
  };
  const std::string m = all_messages(links);
  EXPECT_THAT(m, HasSubstr("d.toml:4:1: reach 'r1', field 'to' = 'nowhere': no element has this id"));
  EXPECT_THAT(m, HasSubstr("d.toml:9:1: reach 'r1', field 'id' duplicates the id of reach 'r1'"));
  EXPECT_THAT(m, HasSubstr("d.toml:11:1: junction 'j', field 'to' is missing"));
  EXPECT_THAT(m, HasSubstr("inflow 'in', field 'to' = 'in2': cannot drain into inflow 'in2'"));
  EXPECT_THAT(m, HasSubstr("outlet 'out', field 'to' = 'r1': an outlet drains nowhere"));
}

}  // namespace
}  // namespace freshet::network
