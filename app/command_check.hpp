#pragma once
// `unchain check`: loads a case file and reports whether it is valid,
// without solving it.

#include <CLI/CLI.hpp>

#include <iosfwd>
#include <string>
#include <vector>

#include "flowsheet/case.hpp"

namespace unchain::app {

struct CheckOptions {
  std::string case_file;
  std::vector<std::string> overrides;  // "PATH=VALUE"
};

CLI::App* add_check_command(CLI::App& parent, CheckOptions& options);
int run_check_command(const CheckOptions& options, std::ostream& out);

// Adds the --set option shared by check and run.
void add_override_option(CLI::App& command, std::vector<std::string>& overrides);
// Parses the --set texts; a text without '=' is an InputError.
std::vector<Override> parse_overrides(const std::vector<std::string>& texts);

// Loads a case with the built-in blocks and overrides; throws InputError
// with every problem found.
Case load_case_for_command(const std::string& path, const std::vector<std::string>& overrides);

}  // namespace unchain::app
