#pragma once
// What the study commands (sweep, scale, compare, sensitivity, uncertainty)
// share in their output: figure names and headings with units, figures as
// JSON, the caution line, text tables and the exit code of a study.

#include <iosfwd>
#include <optional>
#include <string>
#include <vector>

#include "app/results_json.hpp"
#include "costs/case_study.hpp"
#include "costs/scale_ladder.hpp"

namespace unchain::app {

// A figure's name with the basis filled in: "net_cost_per_basis" becomes
// "net_cost_per_batch" (or "_per_hour").
std::string study_figure_name(const std::string& key, const std::string& basis_label);
// A CSV heading with the unit: "energy_per_kg_monomer_MJ_per_kg",
// "installed_capital_USD"; dimensionless figures have no unit suffix.
std::string study_csv_heading(const std::string& name, const std::string& unit);
// A text-table heading: "energy_per_kg_monomer [MJ/kg]".
std::string study_text_heading(const std::string& name, const std::string& unit);
// "12.35", or "-" for an absent value.
std::string study_number_text(const std::optional<double>& value);

// {"KEY": {"label", "unit", "value"}, ...} in display order.
Json study_figures_to_json(const costs::CaseFigures& figures);

// The short caution for a study whose flowsheet has a pyrolysis reactor
// (empty otherwise); printed once per command.
std::vector<std::string> study_cautions(const std::vector<std::string>& block_types);
// The block types written in a case document (blocks.*.type).
std::vector<std::string> document_block_types(const YAML::Node& document);

// 0 when at least one point solved; otherwise the exit code of the first
// failure (2 bad input, 3 not converged).
int study_exit_code(const std::vector<costs::StudyPointStatus>& statuses);

// A plain text table, each column padded to its widest cell.
std::string study_text_table(const std::vector<std::string>& headings, const std::vector<std::vector<std::string>>& rows);
// Prints the error lines of failed points to `err`, each distinct line once.
void print_study_errors(const std::vector<std::string>& errors, std::ostream& err);

// The key figures shown in the text tables (all of them go to JSON and CSV).
const std::vector<std::string>& study_summary_keys();

}  // namespace unchain::app
