#include "app/command_compare.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <optional>
#include <ostream>

#include "app/atomic_file.hpp"
#include "app/command_check.hpp"
#include "app/study_output.hpp"
#include "app/csv_tables.hpp"
#include "app/exit_codes.hpp"
#include "costs/case_study.hpp"

namespace unchain::app {

namespace {

// One row of the comparison: a figure with its value in every case.
struct CompareRow {
  std::string key;     // with the basis filled in ("net_cost_per_batch")
  std::string label;
  std::string unit;
  std::vector<std::optional<double>> values;
  std::vector<std::string> units;  // per case (the currency may differ)
};

struct ComparedCase {
  std::string file;
  std::string title;
  std::string basis;
  std::string currency;
};

// Differences and ratios only between values of the same unit.
std::optional<double> difference(const CompareRow& row, std::size_t k) {
  if (!row.values[0] || !row.values[k] || row.units[0] != row.units[k]) return std::nullopt;
  return *row.values[k] - *row.values[0];
}

std::optional<double> ratio(const CompareRow& row, std::size_t k) {
  if (!row.values[0] || !row.values[k] || row.units[0] != row.units[k] || *row.values[0] == 0.0)
    return std::nullopt;
  return *row.values[k] / *row.values[0];
}

// The key figures, plus energy and solvent per batch (the key figures give
// them per kg of monomer only), so that each comparison is shown both ways.
std::vector<CompareRow> compare_rows(const std::vector<costs::Evaluation>& evaluations) {
  std::vector<CompareRow> rows;
  const std::size_t n = evaluations.size();
  auto row_for = [&](const std::string& key, const std::string& label, const std::string& unit) -> CompareRow& {
    for (auto& r : rows)
      if (r.key == key) return r;
    rows.push_back({key, label, unit, std::vector<std::optional<double>>(n), std::vector<std::string>(n)});
    return rows.back();
  };
  const std::string basis = evaluations.front().figures.basis_label;
  for (std::size_t k = 0; k < n; ++k) {
    const costs::Evaluation& e = evaluations[k];
    for (const auto& f : e.figures.figures) {
      // Rows are named by the first case's basis; a case on another basis
      // reports per its own basis (its heading says so in the cases table).
      CompareRow& r = row_for(study_figure_name(f.key, basis), f.label, f.unit);
      r.values[k] = f.value;
      r.units[k] = f.unit;
      if (f.key == "monomer_per_basis") {
        CompareRow& energy = row_for(study_figure_name("energy_per_basis", basis),
                                     "Purchased energy per " + basis, "MJ");
        energy.values[k] = e.report.energy_total.purchased_J / 1e6;
        energy.units[k] = "MJ";
      }
      if (f.key == "solvent_lost_per_kg_monomer") {
        CompareRow& solvent = row_for(study_figure_name("solvent_lost_per_basis", basis),
                                      "Solvent lost per " + basis, "kg");
        solvent.values[k] = e.report.solvent_lost_kg;
        solvent.units[k] = "kg";
      }
    }
  }
  // Put each per-batch row just before its per-kg partner.
  auto move_before = [&](const std::string& key, const std::string& anchor) {
    auto it = std::find_if(rows.begin(), rows.end(), [&](const CompareRow& r) { return r.key == key; });
    if (it == rows.end()) return;
    CompareRow moved = *it;
    rows.erase(it);
    auto at = std::find_if(rows.begin(), rows.end(), [&](const CompareRow& r) { return r.key == anchor; });
    rows.insert(at, std::move(moved));
  };
  move_before(study_figure_name("energy_per_basis", basis), "energy_per_kg_monomer");
  move_before(study_figure_name("solvent_lost_per_basis", basis), "solvent_lost_per_kg_monomer");
  return rows;
}

std::string compare_text(const std::vector<ComparedCase>& cases, const std::vector<CompareRow>& rows) {
  std::string out = "Comparison of " + std::to_string(cases.size()) + " cases (differences and ratios against case 1)\n";
  for (std::size_t k = 0; k < cases.size(); ++k)
    out += fmt::format("  case {}: {} ({}, per {}, {})\n", k + 1, cases[k].title, cases[k].file, cases[k].basis,
                       cases[k].currency);
  out += "\n";
  std::vector<std::string> headings{"figure [unit]", "case 1"};
  for (std::size_t k = 1; k < cases.size(); ++k) {
    headings.push_back(fmt::format("case {}", k + 1));
    headings.push_back(fmt::format("case {} - case 1", k + 1));
    headings.push_back(fmt::format("case {} / case 1 [-]", k + 1));
  }
  std::vector<std::vector<std::string>> table;
  for (const auto& r : rows) {
    std::vector<std::string> line{study_text_heading(r.key, r.unit), study_number_text(r.values[0])};
    for (std::size_t k = 1; k < cases.size(); ++k) {
      line.push_back(study_number_text(r.values[k]) + (r.units[k] != r.units[0] && r.values[k] ? " " + r.units[k] : ""));
      line.push_back(study_number_text(difference(r, k)));
      line.push_back(study_number_text(ratio(r, k)));
    }
    table.push_back(std::move(line));
  }
  out += study_text_table(headings, table);
  out += "(a difference is in the figure's own unit; '-' where a value is missing or the units differ)\n";
  return out;
}

Json compare_json(const std::vector<ComparedCase>& cases, const std::vector<CompareRow>& rows,
                  const std::vector<std::string>& cautions) {
  Json j;
  j["kind"] = "compare";
  j["schema_version"] = 1;
  Json list = Json::array();
  for (const auto& c : cases)
    list.push_back({{"case_file", c.file}, {"title", c.title}, {"basis", c.basis}, {"currency", c.currency}});
  j["cases"] = list;
  auto opt = [](const std::optional<double>& v) { return v ? Json(*v) : Json(nullptr); };
  Json figures = Json::array();
  for (const auto& r : rows) {
    Json f;
    f["key"] = r.key;
    f["label"] = r.label;
    f["unit"] = r.unit;
    Json values = Json::array(), units = Json::array(), differences = Json::array(), ratios = Json::array();
    for (std::size_t k = 0; k < cases.size(); ++k) {
      values.push_back(opt(r.values[k]));
      units.push_back(r.units[k]);
      differences.push_back(k == 0 ? Json(nullptr) : opt(difference(r, k)));
      ratios.push_back(k == 0 ? Json(nullptr) : opt(ratio(r, k)));
    }
    f["values"] = values;
    f["units"] = units;
    f["difference_from_first"] = differences;
    f["ratio_to_first"] = ratios;
    figures.push_back(std::move(f));
  }
  j["figures"] = figures;
  j["cautions"] = cautions;
  return j;
}

// compare.csv: one row per case; per figure its value, the difference from
// case 1 (same unit) and the ratio to case 1.
void write_compare_csv(const std::string& folder, const std::vector<ComparedCase>& cases,
                       const std::vector<CompareRow>& rows) {
  if (!std::filesystem::is_directory(folder))
    throw OutputFileError("CSV folder '" + folder + "' does not exist (expected a folder)");
  std::vector<std::string> headings{"case", "case_file", "title", "basis"};
  for (const auto& r : rows) {
    const std::string h = study_csv_heading(r.key, r.unit);
    headings.push_back(h);
    headings.push_back(study_csv_heading(r.key + "_difference_from_first", r.unit));
    headings.push_back(r.key + "_ratio_to_first");
  }
  std::string text;
  auto line = [&](const std::vector<std::string>& cells) {
    for (std::size_t i = 0; i < cells.size(); ++i) text += (i ? "," : "") + csv_field(cells[i]);
    text += "\n";
  };
  auto number = [](const std::optional<double>& v) { return v ? csv_number(*v) : std::string(); };
  line(headings);
  for (std::size_t k = 0; k < cases.size(); ++k) {
    std::vector<std::string> cells{std::to_string(k + 1), cases[k].file, cases[k].title, cases[k].basis};
    for (const auto& r : rows) {
      cells.push_back(r.units[k] == r.units[0] ? number(r.values[k]) : std::string());
      cells.push_back(k == 0 ? std::string() : number(difference(r, k)));
      cells.push_back(k == 0 ? std::string() : number(ratio(r, k)));
    }
    line(cells);
  }
  write_output_file((std::filesystem::path(folder) / "compare.csv").string(), text);
}

}  // namespace

CLI::App* add_compare_command(CLI::App& parent, CompareOptions& options) {
  CLI::App* command = parent.add_subcommand(
      "compare", "Key figures of two or more cases side by side, per batch and per kg of monomer, with the "
                 "differences from and ratios to the first case");
  command->add_option("CASES", options.case_files, "Two or more case files (YAML); the first is the reference")
      ->required()
      ->expected(2, -1)
      ->type_name("FILE");
  add_override_option(*command, options.overrides);
  command->add_option("-j,--json", options.json_file,
                      "Write the comparison as JSON to FILE (written whole or not at all); '-' writes it to "
                      "standard output and the table to standard error")
      ->type_name("FILE|-");
  command->add_option("--csv", options.csv_folder, "Write compare.csv (one row per case) into FOLDER, which must exist")
      ->type_name("FOLDER");
  command->add_flag("-q,--quiet", options.quiet, "Do not print the table");
  command->footer(
      "Examples:\n  unchain compare cases/lab_acetone_densification.yaml cases/lab_ground_foam.yaml\n"
      "  unchain compare a.yaml b.yaml c.yaml --csv out\n"
      "--set values apply to every case. Exit codes: 0 ok, 2 bad input, 3 a case did not converge.");
  return command;
}

int run_compare_command(const CompareOptions& options, std::ostream& out, std::ostream& err) {
  if (options.case_files.size() < 2)
    throw UsageError("compare needs two or more case files (found " + std::to_string(options.case_files.size()) + ")");
  (void)err;  // errors end the command through exceptions (app/cli.cpp prints them)
  const std::vector<Override> overrides = parse_overrides(options.overrides);
  std::vector<costs::Evaluation> evaluations;
  std::vector<ComparedCase> cases;
  std::vector<std::string> types;
  for (const auto& file : options.case_files) {
    const costs::PreparedCase prepared(file, overrides);
    costs::Evaluation e = prepared.evaluate_full();  // errors end the command (exit 2 or 3)
    cases.push_back({file, e.figures.title, e.figures.basis_label, e.figures.currency});
    for (const auto& b : e.loaded->blocks) types.push_back(b.type);
    evaluations.push_back(std::move(e));
  }
  const std::vector<CompareRow> rows = compare_rows(evaluations);
  const std::vector<std::string> cautions = study_cautions(types);

  const bool json_to_stdout = options.json_file == "-";
  std::ostream& text = json_to_stdout ? err : out;
  if (!options.quiet) {
    text << compare_text(cases, rows);
    for (const auto& c : cautions) text << "\ncaution: " << c << "\n";
  }
  if (!options.json_file.empty()) {
    write_output_file(options.json_file, compare_json(cases, rows, cautions).dump(2) + "\n");
    if (!json_to_stdout && !options.quiet) text << "\ncomparison written to " << options.json_file << "\n";
  }
  if (!options.csv_folder.empty()) {
    write_compare_csv(options.csv_folder, cases, rows);
    if (!options.quiet) text << "table written to " << options.csv_folder << "/compare.csv\n";
  }
  return exit_success;
}

}  // namespace unchain::app
