#pragma once
// The block graph of a flowsheet and the calculation order derived from it.
//
// Vertices are blocks; every stream that runs from one block to another is
// a directed edge. Recycle loops are the strongly connected components of
// this graph (found with Boost.Graph's strong_components, Tarjan's
// algorithm). Components are calculated in topological order; inside a
// loop, tear streams are cut so that the loop's blocks can be run in
// sequence. See docs/solver.md.

#include <cstddef>
#include <optional>
#include <vector>

namespace unchain {

struct Case;

// A stream seen as an edge of the block graph.
struct StreamEdge {
  std::size_t stream = 0;  // index into Case::streams (or any stream numbering)
  std::size_t from = 0;    // source block
  std::size_t to = 0;      // destination block
};

// Beyond this many streams inside one loop the exhaustive search for the
// fewest tears (2^n subsets) is replaced by a greedy choice.
inline constexpr std::size_t max_exhaustive_tear_candidates = 20;

class FlowsheetGraph {
 public:
  FlowsheetGraph(std::size_t block_count, std::vector<StreamEdge> edges);

  [[nodiscard]] std::size_t block_count() const { return block_count_; }
  [[nodiscard]] const std::vector<StreamEdge>& edges() const { return edges_; }

  // Strongly connected components in calculation order: every component
  // comes after all components that feed it. Blocks inside a component are
  // sorted by index; among independent components the one holding the
  // lowest block index comes first, so the order follows the case file.
  [[nodiscard]] std::vector<std::vector<std::size_t>> components_in_order() const;

  // Streams with both ends among `blocks` (self-loops included), by index.
  [[nodiscard]] std::vector<std::size_t> internal_streams(const std::vector<std::size_t>& blocks) const;

  // True when the blocks contain a cycle, ignoring the `removed` streams.
  [[nodiscard]] bool has_cycle(const std::vector<std::size_t>& blocks, const std::vector<std::size_t>& removed) const;

  // Topological order of `blocks` over their internal streams minus
  // `removed`; ties go to the lower block index. Nothing when a cycle
  // remains.
  [[nodiscard]] std::optional<std::vector<std::size_t>> order_without(const std::vector<std::size_t>& blocks,
                                                                      const std::vector<std::size_t>& removed) const;

  // The fewest internal streams whose removal leaves `blocks` acyclic.
  // Exhaustive over subsets by increasing size (the first subset found in
  // stream-index order wins) when the loop has at most
  // max_exhaustive_tear_candidates internal streams; otherwise the back
  // edges of a depth-first search, pruned of any tear not needed.
  [[nodiscard]] std::vector<std::size_t> fewest_tears(const std::vector<std::size_t>& blocks) const;
  // The greedy choice on its own (used above the exhaustive limit).
  [[nodiscard]] std::vector<std::size_t> greedy_tears(const std::vector<std::size_t>& blocks) const;

 private:
  std::size_t block_count_;
  std::vector<StreamEdge> edges_;
};

// One step of the calculation: a single block run once, or a recycle loop
// iterated to convergence on its tear streams.
struct CalculationStep {
  std::vector<std::size_t> blocks;        // in calculation order
  std::vector<std::size_t> tear_streams;  // empty for a single block without a self-loop
  [[nodiscard]] bool is_loop() const { return !tear_streams.empty(); }
};

// The block graph of a loaded case.
FlowsheetGraph graph_of(const Case& c);

// The calculation order of a case. User-named tears (SolverSettings) are
// validated: each must be a stream between two blocks of one loop, and
// together they must break every cycle; otherwise InputError.
std::vector<CalculationStep> plan_calculation(const Case& c);

}  // namespace unchain
