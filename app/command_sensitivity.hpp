#pragma once
// `unchain sensitivity CASE`: the one-at-a-time tornado of the net cost per
// kg of monomer and the NPV from the case's `sensitivity` section
// (docs/uncertainty.md).

#include <CLI/CLI.hpp>

#include <iosfwd>
#include <string>
#include <vector>

namespace unchain::app {

struct SensitivityOptions {
  std::string case_file;
  std::string json_file;               // empty: none; "-": standard output
  std::string csv_folder;              // sensitivity.csv
  std::vector<std::string> overrides;  // --set, applied to the base case
  unsigned threads = 0;
  bool quiet = false;
};

CLI::App* add_sensitivity_command(CLI::App& parent, SensitivityOptions& options);
int run_sensitivity_command(const SensitivityOptions& options, std::ostream& out, std::ostream& err);

}  // namespace unchain::app
