#include "freshet/network/topology.hpp"

#include <map>
#include <queue>

namespace freshet::network {

std::string_view to_string(ElementKind kind) {
  switch (kind) {
    case ElementKind::subcatchment: return "subcatchment";
    case ElementKind::inflow: return "inflow";
    case ElementKind::reach: return "reach";
    case ElementKind::junction: return "junction";
    case ElementKind::culvert: return "culvert";
    case ElementKind::detention: return "detention";
    case ElementKind::outlet: return "outlet";
  }
  return "element";
}

namespace {

std::string label(const Link& l) { return std::string(to_string(l.kind)) + " '" + l.id + "'"; }

void report(std::vector<Problem>& out, const Link& l, std::string field, std::string message) {
  out.push_back(Problem{l.where.file, l.where.line, l.where.column, label(l), std::move(field),
                        std::move(message)});
}

// Resolves `to` ids into indices, reporting duplicates, unknown ids and misplaced links.
std::vector<std::ptrdiff_t> resolve_links(const std::vector<Link>& links,
                                          std::vector<Problem>& problems) {
  std::map<std::string, std::size_t, std::less<>> index;
  for (std::size_t i = 0; i < links.size(); ++i) {
    const Link& l = links[i];
    if (l.id.empty()) report(problems, l, "id", "is empty: every element needs an id");
    auto [it, fresh] = index.emplace(l.id, i);
    if (!fresh && !l.id.empty()) {
      const Link& first = links[it->second];
      report(problems, l, "id", "duplicates the id of " + label(first) + " defined at line " +
                                    std::to_string(first.where.line));
    }
  }
  std::vector<std::ptrdiff_t> down(links.size(), -1);
  for (std::size_t i = 0; i < links.size(); ++i) {
    const Link& l = links[i];
    if (l.kind == ElementKind::outlet) {
      if (!l.to.empty()) report(problems, l, "to", "= '" + l.to + "': an outlet drains nowhere");
      continue;
    }
    if (l.to.empty()) {
      report(problems, l, "to", "is missing: name the element this one drains to");
      continue;
    }
    auto it = index.find(l.to);
    if (it == index.end()) {
      report(problems, l, "to", "= '" + l.to + "': no element has this id");
    } else if (is_source(links[it->second].kind)) {
      report(problems, l, "to", "= '" + l.to + "': cannot drain into " + label(links[it->second]));
    } else if (it->second == i) {
      report(problems, l, "to", "= '" + l.to + "': an element cannot drain into itself");
    } else {
      down[i] = static_cast<std::ptrdiff_t>(it->second);
    }
  }
  return down;
}

}  // namespace

Topology build_topology(const std::vector<Link>& links) {
  std::vector<Problem> problems;
  Topology t;
  t.downstream = resolve_links(links, problems);
  t.upstream.assign(links.size(), {});
  for (std::size_t i = 0; i < links.size(); ++i) {
    if (t.downstream[i] >= 0) t.upstream[static_cast<std::size_t>(t.downstream[i])].push_back(i);
  }
  for (std::size_t i = 0; i < links.size(); ++i) {
    if (!is_source(links[i].kind) && t.upstream[i].empty()) {
      report(problems, links[i], "", "receives no water: no subcatchment, inflow or other element "
                                     "drains to it");
    }
  }
  // Kahn's algorithm; whatever is left unordered lies on or below a cycle.
  std::vector<std::size_t> pending(links.size());
  std::queue<std::size_t> ready;
  for (std::size_t i = 0; i < links.size(); ++i) {
    pending[i] = t.upstream[i].size();
    if (pending[i] == 0) ready.push(i);
  }
  while (!ready.empty()) {
    const std::size_t i = ready.front();
    ready.pop();
    t.order.push_back(i);
    if (t.downstream[i] >= 0 && --pending[static_cast<std::size_t>(t.downstream[i])] == 0) {
      ready.push(static_cast<std::size_t>(t.downstream[i]));
    }
  }
  if (t.order.size() != links.size()) {
    std::string members;
    const Link* first = nullptr;
    for (std::size_t i = 0; i < links.size(); ++i) {
      if (pending[i] == 0) continue;
      members += (members.empty() ? "" : ", ") + label(links[i]);
      if (!first) first = &links[i];
    }
    FRESHET_ASSERT(first != nullptr, "an unordered element lies on or below a cycle");
    problems.push_back(Problem{first->where.file, first->where.line, first->where.column,
                               "network", "to",
                               "forms a cycle (water would flow in a loop) through: " + members});
  }
  if (!problems.empty()) throw InputError(std::move(problems));
  return t;
}

}  // namespace freshet::network
