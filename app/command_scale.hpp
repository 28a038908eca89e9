#pragma once
// `unchain scale CASE`: the case at several multiples of its batch (or
// hourly throughput), by the rules of its `scale` section, with energy and
// cost per kg of monomer, capital, labour share and NPV per size
// (docs/scale-and-sweep.md).

#include <CLI/CLI.hpp>

#include <iosfwd>
#include <string>
#include <vector>

namespace unchain::app {

struct ScaleOptions {
  std::string case_file;
  std::string factors;                 // "1,10,100": replaces scale.factors
  std::vector<std::string> overrides;  // --set PATH=VALUE
  std::string json_file;               // empty: none; "-": standard output
  std::string csv_folder;
  bool quiet = false;
};

CLI::App* add_scale_command(CLI::App& parent, ScaleOptions& options);
int run_scale_command(const ScaleOptions& options, std::ostream& out, std::ostream& err);

}  // namespace unchain::app
