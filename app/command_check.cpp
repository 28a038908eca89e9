#include "app/command_check.hpp"

#include <fmt/format.h>

#include <ostream>

#include "app/exit_codes.hpp"
#include "units/block_registry.hpp"

namespace unchain::app {

void add_override_option(CLI::App& command, std::vector<std::string>& overrides) {
  command
      .add_option("-s,--set", overrides,
                  "Change one value of the case before loading, as PATH=VALUE with PATH a dotted path into the "
                  "case file (repeatable), e.g. --set blocks.dryer.temperature=\"80 degC\"")
      ->type_name("PATH=VALUE")
      ->allow_extra_args(false);
}

std::vector<Override> parse_overrides(const std::vector<std::string>& texts) {
  std::vector<Override> out;
  out.reserve(texts.size());
  for (const auto& text : texts) out.push_back(parse_override(text));
  return out;
}

Case load_case_for_command(const std::string& path, const std::vector<std::string>& overrides) {
  return load_case_file(path, units::builtin_blocks(), parse_overrides(overrides));
}

CLI::App* add_check_command(CLI::App& parent, CheckOptions& options) {
  CLI::App* command =
      parent.add_subcommand("check", "Check a case file for errors without solving it (every error found is listed)");
  command->add_option("CASE", options.case_file, "The case file (YAML)")->required()->type_name("FILE");
  add_override_option(*command, options.overrides);
  command->footer(
      "Examples:\n  unchain check cases/my_case.yaml\n"
      "  unchain check cases/my_case.yaml --set blocks.dryer.temperature=\"80 degC\"\n"
      "Errors read FILE:LINE:COLUMN: error: WHAT; the exit code is 2 when there is any.");
  return command;
}

int run_check_command(const CheckOptions& options, std::ostream& out) {
  const Case c = load_case_for_command(options.case_file, options.overrides);
  // Warnings do not make a case invalid (exit 0) but are worth reading.
  for (const auto& w : c.warnings) out << w.to_string() << "\n";
  const std::size_t components = c.components ? c.components->size() : 0;
  out << fmt::format("{}: ok ({} components, {} streams, {} blocks)\n", options.case_file, components,
                     c.streams.size(), c.blocks.size());
  return exit_success;
}

}  // namespace unchain::app
