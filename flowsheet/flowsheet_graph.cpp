#include "flowsheet/flowsheet_graph.hpp"

#include <boost/graph/adjacency_list.hpp>
#include <boost/graph/strong_components.hpp>

#include <algorithm>
#include <functional>
#include <numeric>
#include <queue>
#include <set>
#include <string>

#include "flowsheet/case.hpp"
#include "flowsheet/yaml_reader.hpp"

namespace unchain {

FlowsheetGraph::FlowsheetGraph(std::size_t block_count, std::vector<StreamEdge> edges)
    : block_count_(block_count), edges_(std::move(edges)) {
  // Sorting by stream index makes every search below deterministic.
  std::sort(edges_.begin(), edges_.end(), [](const StreamEdge& a, const StreamEdge& b) { return a.stream < b.stream; });
}

std::vector<std::vector<std::size_t>> FlowsheetGraph::components_in_order() const {
  using Graph = boost::adjacency_list<boost::vecS, boost::vecS, boost::directedS>;
  Graph graph(block_count_);
  for (const auto& e : edges_) boost::add_edge(e.from, e.to, graph);
  std::vector<std::size_t> component_of(block_count_, 0);
  const std::size_t count = block_count_ == 0
                                ? 0
                                : static_cast<std::size_t>(boost::strong_components(
                                      graph, boost::make_iterator_property_map(component_of.begin(),
                                                                               boost::get(boost::vertex_index, graph))));

  std::vector<std::vector<std::size_t>> members(count);
  for (std::size_t b = 0; b < block_count_; ++b) members[component_of[b]].push_back(b);  // ascending by block

  // Topological order of the condensed graph (Kahn). Tarjan's numbering is
  // already a reverse topological order, but ties between independent
  // components would then follow the depth-first search, not the file.
  std::vector<std::set<std::size_t>> successors(count);
  std::vector<std::size_t> in_degree(count, 0);
  for (const auto& e : edges_) {
    const std::size_t a = component_of[e.from], b = component_of[e.to];
    if (a != b && successors[a].insert(b).second) ++in_degree[b];
  }
  auto first_block = [&](std::size_t comp) { return members[comp].front(); };
  auto later = [&](std::size_t x, std::size_t y) { return first_block(x) > first_block(y); };
  std::priority_queue<std::size_t, std::vector<std::size_t>, decltype(later)> ready(later);
  for (std::size_t k = 0; k < count; ++k)
    if (in_degree[k] == 0) ready.push(k);
  std::vector<std::vector<std::size_t>> ordered;
  ordered.reserve(count);
  while (!ready.empty()) {
    const std::size_t k = ready.top();
    ready.pop();
    ordered.push_back(members[k]);
    for (std::size_t next : successors[k])
      if (--in_degree[next] == 0) ready.push(next);
  }
  return ordered;
}

std::vector<std::size_t> FlowsheetGraph::internal_streams(const std::vector<std::size_t>& blocks) const {
  std::vector<std::size_t> out;
  auto inside = [&](std::size_t b) { return std::find(blocks.begin(), blocks.end(), b) != blocks.end(); };
  for (const auto& e : edges_)
    if (inside(e.from) && inside(e.to)) out.push_back(e.stream);
  return out;
}

std::optional<std::vector<std::size_t>> FlowsheetGraph::order_without(const std::vector<std::size_t>& blocks,
                                                                      const std::vector<std::size_t>& removed) const {
  // Local numbering of the blocks keeps this cheap for the exhaustive search.
  std::vector<std::size_t> local(block_count_, block_count_);
  for (std::size_t i = 0; i < blocks.size(); ++i) local[blocks[i]] = i;
  std::vector<std::vector<std::size_t>> successors(blocks.size());
  std::vector<std::size_t> in_degree(blocks.size(), 0);
  for (const auto& e : edges_) {
    if (local[e.from] == block_count_ || local[e.to] == block_count_) continue;
    if (std::find(removed.begin(), removed.end(), e.stream) != removed.end()) continue;
    successors[local[e.from]].push_back(local[e.to]);
    ++in_degree[local[e.to]];
  }
  auto later = [&](std::size_t x, std::size_t y) { return blocks[x] > blocks[y]; };
  std::priority_queue<std::size_t, std::vector<std::size_t>, decltype(later)> ready(later);
  for (std::size_t i = 0; i < blocks.size(); ++i)
    if (in_degree[i] == 0) ready.push(i);
  std::vector<std::size_t> order;
  while (!ready.empty()) {
    const std::size_t i = ready.top();
    ready.pop();
    order.push_back(blocks[i]);
    for (std::size_t next : successors[i])
      if (--in_degree[next] == 0) ready.push(next);
  }
  if (order.size() != blocks.size()) return std::nullopt;
  return order;
}

bool FlowsheetGraph::has_cycle(const std::vector<std::size_t>& blocks, const std::vector<std::size_t>& removed) const {
  return !order_without(blocks, removed).has_value();
}

std::vector<std::size_t> FlowsheetGraph::greedy_tears(const std::vector<std::size_t>& blocks) const {
  // Every back edge of a depth-first search closes a cycle, and removing
  // all of them leaves a DAG. The set is valid but may be larger than
  // needed, so each tear is then dropped again if the rest still suffice.
  std::vector<int> state(block_count_, 0);  // 0 unseen, 1 on the stack, 2 done
  auto inside = [&](std::size_t b) { return std::find(blocks.begin(), blocks.end(), b) != blocks.end(); };
  std::vector<std::size_t> tears;
  std::function<void(std::size_t)> visit = [&](std::size_t b) {
    state[b] = 1;
    for (const auto& e : edges_) {
      if (e.from != b || !inside(e.to)) continue;
      if (state[e.to] == 1) tears.push_back(e.stream);
      else if (state[e.to] == 0) visit(e.to);
    }
    state[b] = 2;
  };
  for (std::size_t b : blocks)
    if (state[b] == 0) visit(b);
  std::sort(tears.begin(), tears.end());
  for (std::size_t i = 0; i < tears.size();) {
    std::vector<std::size_t> fewer = tears;
    fewer.erase(fewer.begin() + static_cast<std::ptrdiff_t>(i));
    if (!has_cycle(blocks, fewer)) tears = std::move(fewer);
    else ++i;
  }
  return tears;
}

std::vector<std::size_t> FlowsheetGraph::fewest_tears(const std::vector<std::size_t>& blocks) const {
  const std::vector<std::size_t> candidates = internal_streams(blocks);
  if (!has_cycle(blocks, {})) return {};
  if (candidates.size() > max_exhaustive_tear_candidates) return greedy_tears(blocks);
  const std::size_t n = candidates.size();
  // Subsets of size k in lexicographic order of stream index.
  for (std::size_t k = 1; k <= n; ++k) {
    std::vector<std::size_t> pick(k);
    std::iota(pick.begin(), pick.end(), 0);
    while (true) {
      std::vector<std::size_t> removed;
      removed.reserve(k);
      for (std::size_t p : pick) removed.push_back(candidates[p]);
      if (!has_cycle(blocks, removed)) return removed;
      // Next combination.
      std::size_t i = k;
      while (i > 0 && pick[i - 1] == n - k + (i - 1)) --i;
      if (i == 0) break;
      ++pick[i - 1];
      for (std::size_t j = i; j < k; ++j) pick[j] = pick[j - 1] + 1;
    }
  }
  return candidates;  // unreachable: removing every internal stream leaves no cycle
}

FlowsheetGraph graph_of(const Case& c) {
  std::vector<StreamEdge> edges;
  for (std::size_t s = 0; s < c.streams.size(); ++s) {
    const StreamInfo& info = c.streams[s];
    if (info.source && info.destination) edges.push_back({s, *info.source, *info.destination});
  }
  return FlowsheetGraph(c.blocks.size(), std::move(edges));
}

namespace {

std::string join_names(const std::vector<std::string>& names) {
  std::string out;
  for (const auto& n : names) out += (out.empty() ? "" : ", ") + n;
  return out;
}

std::vector<std::string> block_names(const Case& c, const std::vector<std::size_t>& blocks) {
  std::vector<std::string> out;
  for (std::size_t b : blocks) out.push_back("'" + c.blocks[b].name + "'");
  return out;
}

std::vector<std::string> stream_names(const Case& c, const std::vector<std::size_t>& streams) {
  std::vector<std::string> out;
  for (std::size_t s : streams) out.push_back("'" + c.streams[s].name + "'");
  return out;
}

bool is_loop(const FlowsheetGraph& graph, const std::vector<std::size_t>& blocks) {
  return !graph.internal_streams(blocks).empty();
}

// Checks the user's tear streams and returns them by index.
std::vector<std::size_t> user_tears(const Case& c, const FlowsheetGraph& graph,
                                    const std::vector<std::vector<std::size_t>>& components) {
  DiagnosticList diagnostics;
  const auto& names = c.solver.tear_streams;
  auto where = [&](std::size_t i) {
    return i < c.solver.tear_stream_locations.size() ? c.solver.tear_stream_locations[i]
                                                     : SourceLocation{c.file, 0, 0};
  };
  std::vector<std::string> all_names;
  for (const auto& s : c.streams) all_names.push_back(s.name);
  std::vector<std::size_t> component_of(c.blocks.size(), 0);
  for (std::size_t k = 0; k < components.size(); ++k)
    for (std::size_t b : components[k]) component_of[b] = k;

  std::vector<std::size_t> tears;
  for (std::size_t i = 0; i < names.size(); ++i) {
    const auto index = c.stream_index(names[i]);
    if (!index) {
      const std::string suggestion = closest_match(names[i], all_names);
      diagnostics.error(where(i), "'solver.tear_streams': unknown stream '" + names[i] + "'" +
                                      (suggestion.empty() ? std::string() : " (did you mean '" + suggestion + "'?)"));
      continue;
    }
    const StreamInfo& info = c.streams[*index];
    if (!info.source || !info.destination) {
      diagnostics.error(where(i), "'solver.tear_streams': stream '" + names[i] + "' is a " +
                                      (info.source ? "product" : "feed") +
                                      " (expected a stream between two blocks of a recycle loop)");
      continue;
    }
    const std::size_t k = component_of[*info.source];
    if (k != component_of[*info.destination] || !is_loop(graph, components[k])) {
      diagnostics.error(where(i), "'solver.tear_streams': stream '" + names[i] +
                                      "' is not part of a recycle loop (expected a stream inside a loop)");
      continue;
    }
    if (std::find(tears.begin(), tears.end(), *index) != tears.end()) {
      diagnostics.error(where(i), "'solver.tear_streams': stream '" + names[i] + "' named twice");
      continue;
    }
    tears.push_back(*index);
  }
  diagnostics.throw_if_errors();

  for (const auto& blocks : components) {
    if (!is_loop(graph, blocks)) continue;
    if (!graph.has_cycle(blocks, tears)) continue;
    // Suggest what would complete the set: the fewest extra internal
    // streams, found on the graph with the user's tears already cut.
    std::vector<StreamEdge> remaining;
    for (const auto& e : graph.edges())
      if (std::find(tears.begin(), tears.end(), e.stream) == tears.end()) remaining.push_back(e);
    const std::vector<std::size_t> extra = FlowsheetGraph(graph.block_count(), remaining).fewest_tears(blocks);
    std::vector<std::size_t> named_here;
    for (std::size_t s : graph.internal_streams(blocks))
      if (std::find(tears.begin(), tears.end(), s) != tears.end()) named_here.push_back(s);
    diagnostics.error(where(0), "'solver.tear_streams': the tear streams " +
                                    (named_here.empty() ? std::string("named") : join_names(stream_names(c, named_here))) +
                                    " do not break every cycle of the recycle loop through blocks " +
                                    join_names(block_names(c, blocks)) + " (expected also " +
                                    join_names(stream_names(c, extra)) + ", or leave tear_streams out to choose automatically)");
  }
  diagnostics.throw_if_errors();
  std::sort(tears.begin(), tears.end());
  return tears;
}

}  // namespace

std::vector<CalculationStep> plan_calculation(const Case& c) {
  const FlowsheetGraph graph = graph_of(c);
  const auto components = graph.components_in_order();
  std::optional<std::vector<std::size_t>> named;
  if (!c.solver.tear_streams.empty()) named = user_tears(c, graph, components);

  std::vector<CalculationStep> steps;
  for (const auto& blocks : components) {
    CalculationStep step;
    if (!is_loop(graph, blocks)) {
      step.blocks = blocks;
      steps.push_back(std::move(step));
      continue;
    }
    if (named) {
      for (std::size_t s : graph.internal_streams(blocks))
        if (std::find(named->begin(), named->end(), s) != named->end()) step.tear_streams.push_back(s);
    } else {
      step.tear_streams = graph.fewest_tears(blocks);
    }
    auto order = graph.order_without(blocks, step.tear_streams);
    step.blocks = order ? *order : blocks;  // always set: the tears break every cycle
    steps.push_back(std::move(step));
  }
  return steps;
}

}  // namespace unchain
