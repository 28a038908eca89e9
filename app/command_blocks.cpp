#include "app/command_blocks.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <ostream>

#include "app/exit_codes.hpp"
#include "app/results_json.hpp"
#include "units/block_registry.hpp"

namespace unchain::app {

CLI::App* add_blocks_command(CLI::App& parent, BlocksOptions& options) {
  CLI::App* command = parent.add_subcommand("blocks", "List the block types a case can use, with a line on each");
  command->add_flag("--json", options.json, "Write the list as JSON (name and summary of each type)");
  command->footer(
      "Parameters, units and defaults of every block: docs/block-reference.md; equations and sources: "
      "docs/blocks-*.md.");
  return command;
}

int run_blocks_command(const BlocksOptions& options, std::ostream& out) {
  const auto& types = units::builtin_blocks().all();
  if (options.json) {
    Json list = Json::array();
    for (const auto& [name, info] : types) list.push_back({{"type", name}, {"summary", info.summary}});
    out << Json{{"block_types", list}}.dump(2) << "\n";
    return exit_success;
  }
  std::size_t width = 0;
  for (const auto& [name, info] : types) width = std::max(width, name.size());
  out << "Block types (use as `type:` in a case's blocks section)\n";
  for (const auto& [name, info] : types) out << fmt::format("  {:<{}}  {}\n", name, width, info.summary);
  out << "Parameters, units and defaults: docs/block-reference.md\n";
  return exit_success;
}

}  // namespace unchain::app
