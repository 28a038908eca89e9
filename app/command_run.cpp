#include "app/command_run.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <ostream>

#include "app/atomic_file.hpp"
#include "app/command_check.hpp"
#include "app/costs_json.hpp"
#include "app/costs_text.hpp"
#include "app/csv_tables.hpp"
#include "costs/batch_economics.hpp"
#include "costs/closure_check.hpp"
#include "app/exit_codes.hpp"
#include "app/results_json.hpp"
#include "app/safety_notes.hpp"
#include "app/summary_text.hpp"
#include "flowsheet/finite_check.hpp"

namespace unchain::app {

namespace {

CaseCautions case_cautions(const Case& c, const SolveResult& result) {
  std::vector<std::string> types, block_cautions;
  for (const auto& b : c.blocks) types.push_back(b.type);
  for (const auto& b : result.blocks)
    block_cautions.insert(block_cautions.end(), b.resources.cautions.begin(), b.resources.cautions.end());
  return collect_cautions(types, block_cautions);
}

}  // namespace

std::vector<std::string> open_balances(const SolveResult& result) { return costs::open_balances(result); }

CLI::App* add_run_command(CLI::App& parent, RunOptions& options) {
  CLI::App* command = parent.add_subcommand(
      "run", "Solve a case: mass, element and energy balances, with a summary and optional JSON results");
  command->add_option("CASE", options.case_file, "The case file (YAML)")->required()->type_name("FILE");
  command->add_option("-j,--json", options.json_file,
                      "Write the results as JSON to FILE (written whole or not at all); '-' writes the JSON to "
                      "standard output and the summary to standard error")
      ->type_name("FILE|-");
  command->add_option("--csv", options.csv_folder,
                      "Write CSV tables (streams, blocks, figures, energy, costs, wastes) into FOLDER, which must exist")
      ->type_name("FOLDER");
  add_override_option(*command, options.overrides);
  command->add_flag("-q,--quiet", options.quiet, "Do not print the summary (warnings and errors still go to standard error)");
  command->footer(
      "Examples:\n  unchain run cases/my_case.yaml\n"
      "  unchain run cases/my_case.yaml --json results.json --set blocks.pyrolysis.temperature=\"480 degC\"\n"
      "  unchain run cases/my_case.yaml --json - --quiet | python3 -m json.tool\n"
      "Exit codes: 0 solved and balanced, 2 bad input, 3 not converged or a balance that does not close.");
  return command;
}

int run_run_command(const RunOptions& options, std::ostream& out, std::ostream& err) {
  const Case c = load_case_for_command(options.case_file, options.overrides);
  const SolveResult result = solve(c);
  // A NaN or infinity is a model failure, not a result: name it, write nothing.
  if (const std::vector<std::string> non_finite = find_non_finite_values(c, result); !non_finite.empty()) {
    for (const auto& p : non_finite) err << "error: " << p << "\n";
    if (!options.json_file.empty() && options.json_file != "-")
      err << "error: results not written to '" << options.json_file << "'\n";
    return exit_not_converged;
  }
  const CaseCautions cautions = case_cautions(c, result);
  const std::vector<std::string> problems = open_balances(result);
  const costs::CostReport report = costs::evaluate_case_costs(c, result);
  Json json = results_to_json(c, result, cautions.all());
  json["kpis"] = kpis_to_json(report);
  json["costs"] = costs_to_json(c, report);
  // The summary shows the numbers the JSON holds: none may be NaN or infinite
  // (a bug past the finite check; exit 1 rather than a printed "nan").
  require_finite_json(json);

  // With the JSON on standard output, the summary moves to standard error so
  // that stdout stays one parseable document.
  const bool json_to_stdout = options.json_file == "-";
  std::ostream& summary = json_to_stdout ? err : out;
  if (!options.quiet) {
    summary << run_summary_text(c, result, cautions, costs_summary_text(c, report));
  } else {
    for (const auto& w : result.warnings) err << "warning: " << w << "\n";
  }

  if (!problems.empty()) {
    // Results that break conservation are not results: nothing is written.
    for (const auto& p : problems) err << "error: " << p << "\n";
    if (!options.json_file.empty() && !json_to_stdout)
      err << "error: results not written to '" << options.json_file << "'\n";
    return exit_not_converged;
  }
  if (!result.converged) {
    err << "error: the solve did not converge\n";
    return exit_not_converged;
  }
  if (!options.json_file.empty()) {
    write_output_file(options.json_file, json.dump(2) + "\n");
    if (!json_to_stdout && !options.quiet) summary << "\nresults written to " << options.json_file << "\n";
  }
  if (!options.csv_folder.empty()) {
    write_csv_tables(options.csv_folder, c, result, report);
    if (!options.quiet) summary << "tables written to " << options.csv_folder << "\n";
  }
  return exit_success;
}

}  // namespace unchain::app
