#pragma once
// `unchain blocks`: the block types a case can use, one line each, with the
// page of docs/ that holds their parameters and equations.

#include <CLI/CLI.hpp>

#include <iosfwd>

namespace unchain::app {

struct BlocksOptions {
  bool json = false;
};

CLI::App* add_blocks_command(CLI::App& parent, BlocksOptions& options);
int run_blocks_command(const BlocksOptions& options, std::ostream& out);

}  // namespace unchain::app
