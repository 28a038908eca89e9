#pragma once
// Tidy CSV tables for spreadsheets and plotting scripts: one row per
// stream, phase and component; per block; per block figure; per energy
// line; per cost line; per waste stream; per key figure; per year of the
// discounted cash flow. Units are in the
// column headings. Each file is written whole or not at all.

#include <string>

#include "costs/batch_economics.hpp"
#include "flowsheet/case.hpp"
#include "flowsheet/solver.hpp"

namespace unchain::app {

// Quotes a field when it holds a comma, a quote or a line break (RFC 4180).
std::string csv_field(const std::string& text);
std::string csv_number(double value);

// Writes streams.csv, blocks.csv, block_figures.csv, energy.csv, costs.csv,
// wastes.csv, kpis.csv and cash_flow.csv into `folder` (which must exist).
void write_csv_tables(const std::string& folder, const Case& c, const SolveResult& result,
                      const costs::CostReport& report);

}  // namespace unchain::app
