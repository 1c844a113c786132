// The basin network as a directed graph: every element names the one element its water goes
// to (`to`), outlets name none. Water from several elements may go to one element (a
// confluence). The graph must be acyclic and every path must end at an outlet; it is routed
// in topological order (upstream before downstream), which is exact for the kinematic wave
// because no element reads a downstream state.
//
//   std::vector<Link> links = {{"north-slope", ElementKind::subcatchment, "upper-reach", {}},
//                              {"upper-reach", ElementKind::reach, "outfall", {}},
//                              {"outfall", ElementKind::outlet, "", {}}};
//   Topology t = build_topology(links);   // t.order = {0, 1, 2}
#pragma once

#include <string>
#include <string_view>
#include <vector>

#include "freshet/core/error.hpp"

namespace freshet::network {

enum class ElementKind { subcatchment, inflow, reach, junction, culvert, detention, outlet };

std::string_view to_string(ElementKind kind);

// True for elements that create water (and need nothing upstream).
constexpr bool is_source(ElementKind k) {
  return k == ElementKind::subcatchment || k == ElementKind::inflow;
}

// Where an element sits in the input, for error messages.
struct SourceRef {
  std::string file;
  int line = 0;
  int column = 0;
};

struct Link {
  std::string id;
  ElementKind kind = ElementKind::junction;
  std::string to;  // downstream element id; empty for outlets
  SourceRef where;
};

struct Topology {
  std::vector<std::size_t> order;                  // indices into links, upstream first
  std::vector<std::vector<std::size_t>> upstream;  // per element: elements draining into it
  std::vector<std::ptrdiff_t> downstream;          // per element: index of `to`, -1 for outlets
};

// Validates the graph and orders it. Throws InputError listing every problem: duplicate or
// empty ids, unknown `to`, an outlet with a `to`, a non-outlet without one, cycles (naming
// their elements), elements with no inflow source, and elements draining to a source.
Topology build_topology(const std::vector<Link>& links);

}  // namespace freshet::network
