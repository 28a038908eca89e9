#pragma once
// The sequential-modular solver.
//
// Blocks are ordered by the strongly connected components of the block
// graph (Boost.Graph); inside each recycle loop the fewest tear streams
// that break every cycle are chosen (or the user's), and the loop is
// converged by Wegstein acceleration with a bounded factor, falling back to
// direct substitution when a step makes the residual grow. Nothing here is
// global: solve() can run on many threads at once, on one Case or many.

#include <string>
#include <vector>

#include "flowsheet/balance.hpp"
#include "flowsheet/case.hpp"

namespace unchain {

struct BlockResult {
  std::string name;
  std::string type;
  BlockResources resources;
  BalanceClosure balance;
};

struct LoopReport {
  std::vector<std::string> blocks;        // the blocks of the loop, in calculation order
  std::vector<std::string> tear_streams;
  int iterations = 0;
  bool converged = false;
  std::vector<double> residual_history;   // largest scaled change per iteration
};

struct SolveResult {
  bool converged = false;
  int iterations = 0;                      // summed over loops
  std::vector<std::string> calculation_order;  // block names
  std::vector<LoopReport> loops;
  std::vector<std::string> tear_streams;   // all loops
  std::vector<Stream> streams;             // final values, indexed as Case::streams
  std::vector<BlockResult> blocks;         // indexed as Case::blocks
  BalanceClosure overall;                  // feeds in, products out, all duties
  std::vector<std::string> warnings;
};

// Solves a loaded case. Throws ModelError (with the block named) when a
// block refuses its input, and ConvergenceError when a loop does not
// converge within the iteration limit; the error text names the tear
// streams and lists the residual history.
SolveResult solve(const Case& c);

}  // namespace unchain
