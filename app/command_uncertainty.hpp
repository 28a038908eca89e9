#pragma once
// `unchain uncertainty CASE`: Monte Carlo uncertainty of the key figures
// from the case's `uncertainty` section (docs/uncertainty.md).

#include <CLI/CLI.hpp>

#include <cstdint>
#include <iosfwd>
#include <optional>
#include <string>
#include <vector>

namespace unchain::app {

struct UncertaintyOptions {
  std::string case_file;
  std::optional<std::size_t> samples;   // replaces uncertainty.samples
  std::optional<std::uint64_t> seed;    // replaces uncertainty.seed
  unsigned threads = 0;                 // 0: every core
  std::string samples_csv;              // one row per sample; empty: none
  std::string json_file;                // empty: none; "-": standard output
  std::string csv_folder;               // uncertainty.csv (one row per figure)
  std::vector<std::string> overrides;   // --set, applied before sampling
  bool quiet = false;
};

CLI::App* add_uncertainty_command(CLI::App& parent, UncertaintyOptions& options);
int run_uncertainty_command(const UncertaintyOptions& options, std::ostream& out, std::ostream& err);

}  // namespace unchain::app
