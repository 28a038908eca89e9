#pragma once
// `unchain run`: loads and solves a case, prints the summary and writes
// the results as JSON.

#include <CLI/CLI.hpp>

#include <iosfwd>
#include <string>
#include <vector>

#include "flowsheet/solver.hpp"

namespace unchain::app {

struct RunOptions {
  std::string case_file;
  std::string json_file;  // empty: no JSON; "-": standard output
  std::string csv_folder; // empty: no CSV tables
  std::vector<std::string> overrides;
  bool quiet = false;
};

CLI::App* add_run_command(CLI::App& parent, RunOptions& options);
int run_run_command(const RunOptions& options, std::ostream& out, std::ostream& err);

// The balances that do not close within the limits in exit_codes.hpp, one
// line each ("mass balance of block 'dryer' does not close: ..."); empty
// when everything closes. Elements count as mass: a block that keeps total
// mass but turns carbon into hydrogen is as wrong as one that loses mass.
std::vector<std::string> open_balances(const SolveResult& result);

}  // namespace unchain::app
