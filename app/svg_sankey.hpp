#pragma once
// The mass Sankey diagram of a solved case: every feed on the left, one
// node for the whole flowsheet in the middle, every stream that leaves the
// flowsheet on the right, grouped as the monomer product, by-products,
// wastes and other outlets (vents, losses, unaccounted products). Band
// widths are proportional to mass (kg per batch, or per hour for a
// continuous case); see docs/report.md.

#include <string>
#include <vector>

#include "costs/batch_economics.hpp"
#include "flowsheet/case.hpp"
#include "flowsheet/solver.hpp"

namespace unchain::app {

struct SankeyFlow {
  std::string name;   // stream name
  std::string group;  // one of the groups of its side
  double kg = 0;
};

struct SankeyData {
  std::string unit = "kg";             // "kg" or "kg/h"
  std::vector<SankeyFlow> inputs;      // feeds, in group order
  std::vector<SankeyFlow> outputs;     // products, in group order
  std::vector<std::string> input_groups;   // polymer feed, solvent make-up, process water, other feed
  std::vector<std::string> output_groups;  // monomer product, by-product, waste, other outlet
};

// Feeds and products classified by the case's accounting section and the
// wastes of the cost report.
SankeyData mass_sankey_data(const Case& c, const SolveResult& result, const costs::CostReport& report);

std::string sankey_svg(const SankeyData& data, const std::string& key, const std::string& title);

}  // namespace unchain::app
