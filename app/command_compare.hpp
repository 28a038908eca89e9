#pragma once
// `unchain compare CASE1 CASE2 [CASE...]`: the key figures of several cases
// side by side, per batch (or hour) and per kg of monomer, with the
// difference from and the ratio to the first case (docs/scale-and-sweep.md).

#include <CLI/CLI.hpp>

#include <iosfwd>
#include <string>
#include <vector>

namespace unchain::app {

struct CompareOptions {
  std::vector<std::string> case_files;  // two or more
  std::vector<std::string> overrides;   // --set, applied to every case
  std::string json_file;                // empty: none; "-": standard output
  std::string csv_folder;
  bool quiet = false;
};

CLI::App* add_compare_command(CLI::App& parent, CompareOptions& options);
int run_compare_command(const CompareOptions& options, std::ostream& out, std::ostream& err);

}  // namespace unchain::app
