#include "app/cli.hpp"

#include <CLI/CLI.hpp>

#include <algorithm>
#include <iostream>
#include <string>
#include <vector>

#include "app/atomic_file.hpp"
#include "app/command_blocks.hpp"
#include "app/command_check.hpp"
#include "app/command_compare.hpp"
#include "app/command_components.hpp"
#include "app/command_property.hpp"
#include "app/command_report.hpp"
#include "app/command_run.hpp"
#include "app/command_scale.hpp"
#include "app/command_sensitivity.hpp"
#include "app/command_sweep.hpp"
#include "app/command_uncertainty.hpp"
#include "app/exit_codes.hpp"
#include "flowsheet/diagnostics.hpp"
#include "flowsheet/unit_parser.hpp"
#include "flowsheet/yaml_reader.hpp"

namespace unchain::app {

namespace {

constexpr const char* program_description =
    "unchain - mass, element and energy balances for small-scale chemical recycling of polystyrene foam "
    "to styrene (solvent densification or grinding, solvent recovery, pyrolysis, washing, distillation).\n"
    "A planning aid, not a safety assessment; follow local codes, permits and licensed professionals.";

constexpr const char* program_footer =
    "Examples:\n"
    "  unchain components                          list the built-in component data\n"
    "  unchain blocks                              list the block types a case can use\n"
    "  unchain property styrene -T \"145 degC\"      properties of styrene at 145 degC\n"
    "  unchain check cases/my_case.yaml            check a case file\n"
    "  unchain run cases/my_case.yaml --json out.json\n"
    "Run 'unchain COMMAND --help' for the options of a command.\n"
    "Exit codes: 0 ok, 1 unexpected failure, 2 bad input or usage, 3 not converged or a balance that does not close.";

// CLI11 reports a mistyped command as a missing subcommand; name the word
// and suggest the closest command instead.
bool reject_unknown_command(CLI::App& app, int argc, char** argv) {
  if (argc < 2) return false;
  const std::string first = argv[1];
  if (first.empty() || first.front() == '-') return false;
  std::vector<std::string> names;
  for (const CLI::App* command : app.get_subcommands([](CLI::App*) { return true; }))
    names.push_back(command->get_name());
  if (std::find(names.begin(), names.end(), first) != names.end()) return false;
  const std::string suggestion = closest_match(first, names);
  std::cerr << "error: unknown command '" << first << "'"
            << (suggestion.empty() ? std::string() : " (did you mean '" + suggestion + "'?)")
            << " (see 'unchain --help' for the commands)\n";
  return true;
}

void print_input_error(const InputError& e) {
  if (e.diagnostics().empty()) {
    std::cerr << "error: " << e.what() << "\n";
    return;
  }
  for (const auto& d : e.diagnostics()) std::cerr << d.to_string() << "\n";
}

}  // namespace

int run_cli(int argc, char** argv) {
  try {
    CLI::App app{program_description, "unchain"};
    app.footer(program_footer);
    app.set_version_flag("--version", "unchain 0.1.0");
    app.require_subcommand(1);

    ComponentsOptions components;
    BlocksOptions blocks;
    PropertyOptions property;
    CheckOptions check;
    RunOptions run;
    ReportOptions report;
    CLI::App* components_command = add_components_command(app, components);
    CLI::App* blocks_command = add_blocks_command(app, blocks);
    CLI::App* property_command = add_property_command(app, property);
    CLI::App* check_command = add_check_command(app, check);
    CLI::App* run_command = add_run_command(app, run);
    CLI::App* report_command = add_report_command(app, report);
    ScaleOptions scale; CLI::App* scale_command = add_scale_command(app, scale);
    SweepOptions sweep; CLI::App* sweep_command = add_sweep_command(app, sweep);
    CompareOptions compare; CLI::App* compare_command = add_compare_command(app, compare);
    UncertaintyOptions uncertainty; CLI::App* uncertainty_command = add_uncertainty_command(app, uncertainty);
    SensitivityOptions sensitivity; CLI::App* sensitivity_command = add_sensitivity_command(app, sensitivity);

    if (reject_unknown_command(app, argc, argv)) return exit_input_error;
    try {
      app.parse(argc, argv);
    } catch (const CLI::ParseError& e) {
      // Help and version requests are successes; every other parse error is
      // a usage error (CLI11's own codes are not ours).
      const int cli11_code = app.exit(e, std::cout, std::cerr);
      return cli11_code == 0 ? exit_success : exit_input_error;
    }

    if (components_command->parsed()) return run_components_command(components, std::cout);
    if (blocks_command->parsed()) return run_blocks_command(blocks, std::cout);
    if (property_command->parsed()) return run_property_command(property, std::cout, std::cerr);
    if (check_command->parsed()) return run_check_command(check, std::cout);
    if (run_command->parsed()) return run_run_command(run, std::cout, std::cerr);
    if (report_command->parsed()) return run_report_command(report, std::cout, std::cerr);
    if (scale_command->parsed()) return run_scale_command(scale, std::cout, std::cerr);
    if (sweep_command->parsed()) return run_sweep_command(sweep, std::cout, std::cerr);
    if (compare_command->parsed()) return run_compare_command(compare, std::cout, std::cerr);
    if (uncertainty_command->parsed()) return run_uncertainty_command(uncertainty, std::cout, std::cerr);
    if (sensitivity_command->parsed()) return run_sensitivity_command(sensitivity, std::cout, std::cerr);
    std::cerr << "error: no command given (run 'unchain --help')\n";
    return exit_input_error;
  } catch (const InputError& e) {
    print_input_error(e);
    return exit_input_error;
  } catch (const UsageError& e) {
    std::cerr << "error: " << e.what() << "\n";
    return exit_input_error;
  } catch (const ModelError& e) {
    std::cerr << "error: " << e.what() << "\n";
    return exit_input_error;
  } catch (const OutputFileError& e) {
    std::cerr << "error: " << e.what() << "\n";
    return exit_input_error;
  } catch (const UnitError& e) {
    std::cerr << "error: " << e.what() << "\n";
    return exit_input_error;
  } catch (const ConvergenceError& e) {
    std::cerr << "error: " << e.what() << "\n";
    return exit_not_converged;
  } catch (const std::exception& e) {
    std::cerr << "error: unexpected failure: " << e.what() << "\n";
    return exit_failure;
  } catch (...) {
    std::cerr << "error: unexpected failure of an unknown kind\n";
    return exit_failure;
  }
}

}  // namespace unchain::app
