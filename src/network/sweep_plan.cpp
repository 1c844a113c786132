#include "freshet/network/sweep_plan.hpp"

#include <algorithm>
#include <queue>
#include <utility>

#include "freshet/core/error.hpp"

namespace freshet::network {

namespace {

constexpr std::size_t kNoLane = static_cast<std::size_t>(-1);

// The weight of every element's subtree (the element and everything draining into it).
std::vector<double> subtree_weights(const Topology& topology, const std::vector<double>& weights) {
  std::vector<double> subtree(weights.size(), 0.0);
  for (std::size_t i : topology.order) {
    subtree[i] = std::max(1.0, weights[i]);
    for (std::size_t u : topology.upstream[i]) subtree[i] += subtree[u];
  }
  return subtree;
}

// Splits every subtree heavier than `limit` at its root (the root joins the trunk, the
// subtrees draining into it become pieces), heaviest first, ties to the lower index.
std::vector<std::size_t> cut_pieces(const Topology& topology, const std::vector<double>& subtree,
                                    double limit, std::vector<char>& in_trunk) {
  using Entry = std::pair<double, std::size_t>;
  const auto lighter = [](const Entry& a, const Entry& b) {
    return a.first < b.first || (a.first == b.first && a.second > b.second);
  };
  std::priority_queue<Entry, std::vector<Entry>, decltype(lighter)> heavy(lighter);
  std::vector<std::size_t> pieces;
  const auto add = [&](std::size_t i) {
    if (subtree[i] > limit) {
      heavy.emplace(subtree[i], i);
    } else {
      pieces.push_back(i);
    }
  };
  for (std::size_t i : topology.order) {
    if (topology.downstream[i] < 0) add(i);
  }
  while (!heavy.empty()) {
    const std::size_t root = heavy.top().second;
    heavy.pop();
    in_trunk[root] = 1;
    for (std::size_t u : topology.upstream[root]) add(u);
  }
  return pieces;
}

}  // namespace

SweepPlan plan_sweep(const Topology& topology, const std::vector<double>& weights, int threads) {
  FRESHET_ASSERT(threads >= 1, "plan_sweep needs at least one thread");
  FRESHET_ASSERT(weights.size() == topology.order.size(), "plan_sweep needs one weight per element");
  SweepPlan plan;
  const auto lanes = static_cast<std::size_t>(threads);
  plan.lanes.resize(lanes);
  if (lanes == 1) {
    plan.lanes[0] = topology.order;
    return plan;
  }
  const std::size_t n = topology.order.size();
  const std::vector<double> subtree = subtree_weights(topology, weights);
  double total = 0.0;
  for (std::size_t i = 0; i < n; ++i) {
    if (topology.downstream[i] < 0) total += subtree[i];
  }
  std::vector<char> in_trunk(n, 0);
  std::vector<std::size_t> pieces =
      cut_pieces(topology, subtree, total / (4.0 * static_cast<double>(lanes)), in_trunk);
  std::sort(pieces.begin(), pieces.end(), [&](std::size_t a, std::size_t b) {
    return subtree[a] > subtree[b] || (subtree[a] == subtree[b] && a < b);
  });
  // Heaviest piece first to the lightest lane.
  std::vector<double> load(lanes, 0.0);
  std::vector<std::size_t> lane_of(n, kNoLane);
  for (std::size_t p : pieces) {
    const auto k = static_cast<std::size_t>(std::min_element(load.begin(), load.end()) - load.begin());
    load[k] += subtree[p];
    lane_of[p] = k;
  }
  // Every other element of a piece follows its downstream element (downstream first here).
  for (auto it = topology.order.rbegin(); it != topology.order.rend(); ++it) {
    const std::size_t i = *it;
    if (in_trunk[i] || lane_of[i] != kNoLane) continue;
    lane_of[i] = lane_of[static_cast<std::size_t>(topology.downstream[i])];
  }
  for (std::size_t i : topology.order) {
    (in_trunk[i] ? plan.trunk : plan.lanes[lane_of[i]]).push_back(i);
  }
  return plan;
}

}  // namespace freshet::network
