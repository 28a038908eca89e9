#pragma once
// `unchain sweep CASE --set PATH=V1,V2,V3 [--set PATH2=W1,W2]`: one
// parameter over a list of values, or two over a grid, with a table of the
// key figures per point (docs/scale-and-sweep.md).

#include <CLI/CLI.hpp>

#include <iosfwd>
#include <string>
#include <vector>


namespace unchain::app {

struct SweepOptions {
  std::string case_file;
  std::vector<std::string> settings;  // "PATH=V1,V2,..." or "PATH=VALUE"
  std::string json_file;              // empty: none; "-": standard output
  std::string csv_folder;
  bool quiet = false;
};

CLI::App* add_sweep_command(CLI::App& parent, SweepOptions& options);
int run_sweep_command(const SweepOptions& options, std::ostream& out, std::ostream& err);

}  // namespace unchain::app
