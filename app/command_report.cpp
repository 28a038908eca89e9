#include "app/command_report.hpp"

#include <fmt/format.h>

#include <ostream>

#include "app/atomic_file.hpp"
#include "app/command_check.hpp"
#include "app/command_run.hpp"
#include "app/exit_codes.hpp"
#include "app/report_html.hpp"
#include "app/safety_notes.hpp"
#include "costs/batch_economics.hpp"
#include "costs/case_study.hpp"
#include "costs/monte_carlo.hpp"
#include "costs/scale_ladder.hpp"
#include "costs/sensitivity.hpp"
#include "flowsheet/finite_check.hpp"
#include "flowsheet/solver.hpp"

namespace unchain::app {

namespace {

// The same cautions as `run` shows: the general notes for the block types
// present, and the blocks' own cautions from the solve.
CaseCautions cautions_of(const Case& c, const SolveResult& result) {
  std::vector<std::string> types, block_cautions;
  for (const auto& b : c.blocks) types.push_back(b.type);
  for (const auto& b : result.blocks)
    block_cautions.insert(block_cautions.end(), b.resources.cautions.begin(), b.resources.cautions.end());
  return collect_cautions(types, block_cautions);
}

constexpr const char* cost_key = "net_cost_per_kg_monomer";
constexpr const char* energy_key = "energy_per_kg_monomer";

std::string joined(const std::vector<std::string>& lines, const char* separator) {
  std::string out;
  for (std::size_t i = 0; i < lines.size(); ++i) out += (i ? separator : "") + lines[i];
  return out;
}

ScaleLadderSection scale_section(const costs::PreparedCase& prepared, const std::vector<Override>& overrides) {
  const costs::ScaleLadder ladder = costs::run_scale_ladder(prepared, overrides);
  ScaleLadderSection section;
  std::vector<std::string> failed;
  for (const auto& rung : ladder.rungs) {
    if (rung.status != costs::StudyPointStatus::solved || !rung.figures) {
      failed.push_back(fmt::format("x{:g}: {}", rung.factor, rung.error));
      continue;
    }
    if (const auto cost = rung.figures->value(cost_key)) section.cost_per_kg.push_back({rung.factor, *cost});
    if (const auto energy = rung.figures->value(energy_key)) section.energy_MJ_per_kg.push_back({rung.factor, *energy});
  }
  std::vector<std::string> notes = {"Feeds times the scale factor and scaled parameters times its power, by the rules "
                                    "of docs/scale-and-sweep.md."};
  notes.insert(notes.end(), ladder.notes.begin(), ladder.notes.end());
  if (!failed.empty()) notes.push_back("Sizes that did not solve: " + joined(failed, "; "));
  section.note = joined(notes, " ");
  return section;
}

std::vector<SensitivitySection> sensitivity_sections(const costs::PreparedCase& prepared, unsigned threads) {
  const auto parameters = costs::read_sensitivity_parameters(prepared);
  const costs::SensitivityResult result = costs::run_sensitivity(prepared, parameters, threads);
  std::vector<SensitivitySection> sections;
  for (const auto& tornado : result.tornadoes) {
    if (!tornado.base) continue;
    SensitivitySection section;
    section.chart.key = "tornado-" + tornado.key;
    section.chart.title = "Sensitivity of " + tornado.label + " (" + tornado.unit + ")";
    section.chart.value_label = tornado.label + " (" + tornado.unit + ")";
    section.chart.base = *tornado.base;
    std::vector<std::string> missing;
    for (const auto& bar : tornado.bars) {
      const auto& p = result.parameters[bar.parameter];
      if (!bar.low_output || !bar.high_output) {
        missing.push_back(p.label);
        continue;
      }
      section.chart.bars.push_back({p.label, *bar.low_output, *bar.high_output, p.low, p.high});
    }
    section.note = "One input at a time set to its low and its high value, every other input at base.";
    if (!missing.empty()) section.note += " Without a value at one end (left out): " + joined(missing, ", ") + ".";
    sections.push_back(std::move(section));
  }
  return sections;
}

MonteCarloSection monte_carlo_section(const costs::PreparedCase& prepared, const ReportOptions& options) {
  const costs::UncertaintySettings settings = costs::read_uncertainty_settings(prepared);
  costs::MonteCarloOptions mc;
  if (options.monte_carlo_samples > 0) mc.samples = options.monte_carlo_samples;
  mc.threads = options.threads;
  const costs::MonteCarloResult result = costs::run_monte_carlo(prepared, settings, mc);
  MonteCarloSection section;
  section.samples = result.samples;
  const costs::OutputStatistics* stats = result.find(cost_key);
  if (!stats) stats = result.outputs.empty() ? nullptr : &result.outputs.front();
  if (stats) {
    section.histogram.key = "monte-carlo";
    section.histogram.title = "Monte Carlo: " + stats->label + " (" + stats->unit + ")";
    section.histogram.value_label = stats->label + " (" + stats->unit + ")";
    for (const auto& bin : stats->histogram) {
      if (section.histogram.edges.empty()) section.histogram.edges.push_back(bin.low);
      section.histogram.edges.push_back(bin.high);
      section.histogram.counts.push_back(static_cast<double>(bin.count));
    }
    section.histogram.p10 = stats->p10;
    section.histogram.p50 = stats->p50;
    section.histogram.p90 = stats->p90;
  }
  std::vector<std::string> labels;
  for (const auto& p : result.parameters) labels.push_back(p.label);
  section.note = fmt::format("{} uncertain inputs ({}), seed {}.", result.parameters.size(), joined(labels, ", "),
                             result.seed);
  if (result.failed > 0)
    section.note += fmt::format(" {} samples failed and are left out; the first: {}", result.failed, result.first_error);
  return section;
}

// The study sections the case asks for, each computed by its engine from
// the case file with the same --set overrides as the base case.
ReportStudies studies_of(const Case& c, const ReportOptions& options) {
  ReportStudies studies;
  if (options.skip_studies) return studies;
  const bool scale = c.document["scale"].IsDefined();
  const bool sensitivity = c.document["sensitivity"].IsDefined();
  const bool uncertainty = c.document["uncertainty"].IsDefined();
  if (!scale && !sensitivity && !uncertainty) return studies;
  const std::vector<Override> overrides = parse_overrides(options.overrides);
  const costs::PreparedCase prepared(options.case_file, overrides);
  if (scale) studies.scale_ladder = scale_section(prepared, overrides);
  if (sensitivity) studies.sensitivity = sensitivity_sections(prepared, options.threads);
  if (uncertainty) studies.monte_carlo = monte_carlo_section(prepared, options);
  return studies;
}

}  // namespace

CLI::App* add_report_command(CLI::App& parent, ReportOptions& options) {
  CLI::App* command = parent.add_subcommand(
      "report", "Solve and cost a case and write a self-contained HTML report (diagrams, tables, cautions)");
  command->add_option("CASE", options.case_file, "The case file (YAML)")->required()->type_name("FILE");
  command->add_option("-o,--output", options.output_file,
                      "The HTML file to write (written whole or not at all); '-' writes it to standard output")
      ->required()
      ->type_name("FILE.html|-");
  add_override_option(*command, options.overrides);
  command->add_flag("-q,--quiet", options.quiet, "Print nothing but warnings and errors");
  command->add_flag("--no-studies", options.skip_studies,
                    "Leave out the scale ladder, sensitivity and Monte Carlo sections even when the case has them");
  command->add_option("--samples", options.monte_carlo_samples,
                      "Monte Carlo samples for the report (replaces uncertainty.samples)")
      ->type_name("N")
      ->check(CLI::PositiveNumber);
  command->add_option("--threads", options.threads, "Threads for the studies (0: every core)")->type_name("N");
  command->footer(
      "Examples:\n  unchain report cases/my_case.yaml -o my_case.html\n"
      "  unchain report cases/my_case.yaml -o hot.html --set blocks.reactor.reactor_temperature=\"520 degC\"\n"
      "  unchain report cases/my_case.yaml -o quick.html --samples 200\n"
      "Contents: docs/report.md. Exit codes: 0 written, 2 bad input, 3 not converged or a balance that does not "
      "close (nothing written).");
  return command;
}

int run_report_command(const ReportOptions& options, std::ostream& out, std::ostream& err) {
  const Case c = load_case_for_command(options.case_file, options.overrides);
  const SolveResult result = solve(c);
  // A NaN or infinity is a model failure, not a result: name it, write nothing.
  if (const std::vector<std::string> non_finite = find_non_finite_values(c, result); !non_finite.empty()) {
    for (const auto& p : non_finite) err << "error: " << p << "\n";
    err << "error: report not written to '" << options.output_file << "'\n";
    return exit_not_converged;
  }
  const CaseCautions cautions = cautions_of(c, result);
  const std::vector<std::string> problems = open_balances(result);
  const costs::CostReport costs = costs::evaluate_case_costs(c, result);

  for (const auto& w : result.warnings) err << "warning: " << w << "\n";
  // A report of results that break conservation would mislead: as with
  // `run`, nothing is written.
  if (!problems.empty()) {
    for (const auto& p : problems) err << "error: " << p << "\n";
    err << "error: report not written to '" << options.output_file << "'\n";
    return exit_not_converged;
  }
  if (!result.converged) {
    err << "error: the solve did not converge; report not written to '" << options.output_file << "'\n";
    return exit_not_converged;
  }
  const ReportStudies studies = studies_of(c, options);
  const std::string html = report_html(ReportInputs{c, result, costs, cautions, studies});
  write_output_file(options.output_file, html);
  if (!options.quiet && options.output_file != "-") out << "report written to " << options.output_file << "\n";
  return exit_success;
}

}  // namespace unchain::app
