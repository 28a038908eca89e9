#pragma once
// The block flow diagram of a solved case as one <svg> element.
//
// Layout rule (docs/report.md): blocks are placed in columns by calculation
// order, each block one column to the right of the furthest block that
// feeds it by a stream that is not a tear stream (longest path over the
// acyclic graph the solver calculates); blocks that share a column are
// stacked in calculation order. Feeds come down from labels above a block
// into its left side; products leave its right side and go down to labels
// below it. Streams between blocks run left to right; a stream back to an
// earlier column (a recycle, cut by a tear stream) is dashed and routed
// below all boxes, and a stream that skips columns is routed above them.

#include <cstddef>
#include <string>
#include <vector>

#include "flowsheet/case.hpp"
#include "flowsheet/solver.hpp"

namespace unchain::app {

// Column and row of each block, indexed as Case::blocks.
struct BlockPlacement {
  std::size_t column = 0;
  std::size_t row = 0;
};
std::vector<BlockPlacement> place_blocks(const Case& c, const SolveResult& result);

std::string flow_diagram_svg(const Case& c, const SolveResult& result);

}  // namespace unchain::app
