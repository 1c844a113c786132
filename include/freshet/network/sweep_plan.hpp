// How one coupling step's sweep is shared between threads: the network is cut into whole
// subtrees (lanes), each advanced upstream first by one thread, and a trunk of the elements
// below the cuts, advanced upstream first by the driver's thread once every lane is done.
//
// Within a coupling step an element reads only the outflows of the elements that drain into
// it, so two subtrees that do not contain one another are independent: every element does
// exactly the same arithmetic on exactly the same inputs whichever thread advances it, and
// the results are bit-identical to the serial sweep. Level-pool backwater (backwater.hpp)
// couples a reach with the pool it drains into, but only between sweeps: the driver's thread
// calls couple_backwater() before each sweep, while no lane runs, and during the sweep the
// drowned reach reads only its own cells and the pool only the reach's outflow (the pool
// is downstream of the reach, so it is in the reach's lane or in the trunk).
//
//   const SweepPlan plan = plan_sweep(model.topology, weights, 2);
//   // plan.lanes[0], plan.lanes[1]: subtrees, upstream first; plan.trunk: the rest, upstream first
#pragma once

#include <cstddef>
#include <vector>

#include "freshet/network/topology.hpp"

namespace freshet::network {

struct SweepPlan {
  // One list per thread (lanes.size() == threads, some possibly empty). Each lane holds whole
  // subtrees: every element draining into a lane element is in the same lane.
  std::vector<std::vector<std::size_t>> lanes;
  // Everything else, in topological order; every element draining into a trunk element is in
  // the trunk or in a lane.
  std::vector<std::size_t> trunk;
};

// Cuts the network for `threads` threads (threads >= 1). weights[i] is element i's cost per
// coupling step in any unit (cells, say; at least 1 is assumed). Subtrees heavier than a
// quarter of a thread's share are split at their root (which joins the trunk) until none is;
// the subtrees are then dealt to the lightest lane, heaviest first (ties to the lower index).
// The plan depends only on the topology, the weights and `threads`. With one thread, lane 0
// is the whole topological order and the trunk is empty.
[[nodiscard]] SweepPlan plan_sweep(const Topology& topology, const std::vector<double>& weights,
                                   int threads);

}  // namespace freshet::network
