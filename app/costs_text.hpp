#pragma once
// The human summary of the costing: energy per kg of monomer by block and
// kind, solvent and water, wastes, the cost breakdown, credits, capital,
// the distance from the thermodynamic minimum and the discounted cash flow.

#include <string>

#include "costs/batch_economics.hpp"
#include "flowsheet/case.hpp"

namespace unchain::app {

std::string costs_summary_text(const Case& c, const costs::CostReport& report);

}  // namespace unchain::app
