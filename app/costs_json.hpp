#pragma once
// The costing results as JSON: `kpis` (figures per batch and per kilogram
// of monomer) and `costs` (the money). Layout: docs/results-json.md.

#include "app/results_json.hpp"
#include "costs/batch_economics.hpp"

namespace unchain::app {

Json kpis_to_json(const costs::CostReport& report);
Json costs_to_json(const Case& c, const costs::CostReport& report);

}  // namespace unchain::app
