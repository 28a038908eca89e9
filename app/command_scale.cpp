#include "app/command_scale.hpp"

#include <fmt/format.h>

#include <cerrno>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <ostream>

#include "app/atomic_file.hpp"
#include "app/command_check.hpp"
#include "app/study_output.hpp"
#include "app/csv_tables.hpp"
#include "app/exit_codes.hpp"
#include "costs/scale_ladder.hpp"

namespace unchain::app {

namespace {

std::vector<double> parse_factor_list(const std::string& text) {
  std::vector<double> factors;
  std::size_t start = 0;
  while (true) {
    const auto comma = text.find(',', start);
    std::string item = text.substr(start, comma == std::string::npos ? std::string::npos : comma - start);
    while (!item.empty() && item.front() == ' ') item.erase(item.begin());
    while (!item.empty() && item.back() == ' ') item.pop_back();
    char* end = nullptr;
    errno = 0;
    const double value = std::strtod(item.c_str(), &end);
    if (item.empty() || *end != '\0' || errno != 0 || !std::isfinite(value) || value <= 0.0)
      throw UsageError("--factors: '" + item + "' is not a positive number (expected a list such as 1,10,100)");
    factors.push_back(value);
    if (comma == std::string::npos) break;
    start = comma + 1;
  }
  return factors;
}

std::string rung_basis(const costs::ScaleRung& r) {
  if (r.figures) return r.figures->basis_label;
  return r.continuous ? "hour" : "batch";
}

const costs::CaseFigures* first_figures(const costs::ScaleLadder& l) {
  for (const auto& r : l.rungs)
    if (r.figures) return &*r.figures;
  return nullptr;
}

std::string ladder_text(const costs::ScaleLadder& l) {
  std::string out = fmt::format("Scale ladder of {} ({})\n", l.title, l.case_file);
  std::size_t solved = 0;
  for (const auto& r : l.rungs) solved += r.status == costs::StudyPointStatus::solved ? 1 : 0;
  out += fmt::format("{} of {} sizes solved\n\n", solved, l.rungs.size());
  const costs::CaseFigures* reference = first_figures(l);
  std::vector<std::string> headings{"factor [-]", "basis", "multiplier [-]", "status", "labour [h/basis]",
                                    "annual_monomer [kg/yr]"};
  std::vector<std::string> keys;
  if (reference)
    for (const auto& key : study_summary_keys())
      if (const auto* f = reference->find(key)) {
        keys.push_back(key);
        headings.push_back(study_text_heading(study_figure_name(key, "basis"), f->unit));
      }
  std::vector<std::vector<std::string>> rows;
  for (const auto& r : l.rungs) {
    std::vector<std::string> row{fmt::format("{:g}", r.factor), rung_basis(r), fmt::format("{:.4g}", r.multiplier),
                                 costs::study_point_status_name(r.status),
                                 study_number_text(r.labour_hours_per_basis), study_number_text(r.annual_monomer_kg)};
    for (const auto& key : keys) row.push_back(study_number_text(r.figures ? r.figures->value(key) : std::nullopt));
    rows.push_back(std::move(row));
  }
  out += study_text_table(headings, rows);
  for (const auto& r : l.rungs)
    if (r.continuous && r.target_annual_monomer_kg)
      out += fmt::format("factor {:g}: continuous case {} at {:.4g} x its feeds, to make {:.4g} kg/yr of monomer "
                         "(the batch case's output at factor 1 times {:g})\n",
                         r.factor, r.case_file, r.multiplier, *r.target_annual_monomer_kg, r.factor);
  if (!l.notes.empty()) {
    out += "\nnotes:\n";
    for (const auto& n : l.notes) out += "  " + n + "\n";
  }
  bool any_failed = false;
  for (const auto& r : l.rungs) {
    if (r.status == costs::StudyPointStatus::solved) continue;
    if (!any_failed) out += "\nfailed sizes:\n";
    any_failed = true;
    out += fmt::format("  factor {:g}: {}\n", r.factor, r.error.substr(0, r.error.find('\n')));
  }
  return out;
}

Json settings_json(const costs::ScaleSettings& s) {
  Json j;
  j["factors"] = s.factors;
  j["feeds"] = s.feeds.empty() ? Json("all") : Json(s.feeds);
  Json params = Json::array();
  for (const auto& p : s.scaled_parameters) params.push_back({{"path", p.path}, {"exponent", p.exponent}});
  j["scaled_parameters"] = params;
  j["labour"] = {{"exponent", s.labour.exponent},
                 {"hours_per_batch", s.labour.hours_per_batch_s ? Json(*s.labour.hours_per_batch_s / 3600.0)
                                                                : Json(nullptr)}};
  j["continuous_case"] = s.continuous_case ? Json(*s.continuous_case) : Json(nullptr);
  j["continuous_above"] = s.continuous_above ? Json(*s.continuous_above) : Json(nullptr);
  return j;
}

auto optional_json = [](const std::optional<double>& v) { return v ? Json(*v) : Json(nullptr); };

Json ladder_json(const costs::ScaleLadder& l, const std::vector<std::string>& cautions) {
  Json j;
  j["kind"] = "scale";
  j["schema_version"] = 1;
  j["case_file"] = l.case_file;
  j["title"] = l.title;
  j["settings"] = settings_json(l.settings);
  Json rungs = Json::array();
  for (const auto& r : l.rungs) {
    Json item;
    item["factor"] = r.factor;
    item["basis"] = rung_basis(r);
    item["continuous"] = r.continuous;
    item["case_file"] = r.case_file;
    item["multiplier"] = r.multiplier;
    item["status"] = costs::study_point_status_name(r.status);
    item["error"] = r.error.empty() ? Json(nullptr) : Json(r.error);
    item["labour_hours_per_basis"] = optional_json(r.labour_hours_per_basis);
    item["annual_monomer_kg"] = optional_json(r.annual_monomer_kg);
    item["target_annual_monomer_kg"] = optional_json(r.target_annual_monomer_kg);
    item["figures"] = r.figures ? study_figures_to_json(*r.figures) : Json(nullptr);
    rungs.push_back(std::move(item));
  }
  j["rungs"] = rungs;
  j["notes"] = l.notes;
  j["cautions"] = cautions;
  return j;
}

void write_ladder_csv(const std::string& folder, const costs::ScaleLadder& l) {
  if (!std::filesystem::is_directory(folder))
    throw OutputFileError("CSV folder '" + folder + "' does not exist (expected a folder)");
  const costs::CaseFigures* reference = first_figures(l);
  std::vector<std::string> headings{"factor",         "basis",  "case_file", "multiplier", "status",
                                    "labour_hours_per_basis_h", "annual_monomer_kg_per_yr",
                                    "target_annual_monomer_kg_per_yr"};
  if (reference)
    for (const auto& f : reference->figures) headings.push_back(study_csv_heading(f.key, f.unit));
  headings.push_back("error");
  std::string text;
  auto row = [&](const std::vector<std::string>& cells) {
    for (std::size_t i = 0; i < cells.size(); ++i) text += (i ? "," : "") + csv_field(cells[i]);
    text += "\n";
  };
  auto number = [](const std::optional<double>& v) { return v ? csv_number(*v) : std::string(); };
  row(headings);
  for (const auto& r : l.rungs) {
    std::vector<std::string> cells{csv_number(r.factor),
                                   rung_basis(r),
                                   r.case_file,
                                   csv_number(r.multiplier),
                                   costs::study_point_status_name(r.status),
                                   number(r.labour_hours_per_basis),
                                   number(r.annual_monomer_kg),
                                   number(r.target_annual_monomer_kg)};
    if (reference)
      for (const auto& f : reference->figures) cells.push_back(number(r.figures ? r.figures->value(f.key) : std::nullopt));
    cells.push_back(r.error.substr(0, r.error.find('\n')));
    row(cells);
  }
  write_output_file((std::filesystem::path(folder) / "scale.csv").string(), text);
}

}  // namespace

CLI::App* add_scale_command(CLI::App& parent, ScaleOptions& options) {
  CLI::App* command = parent.add_subcommand(
      "scale", "Evaluate a case at several multiples of its batch (the case's scale section): energy and cost per "
               "kg of monomer, capital, labour share and NPV per size");
  command->add_option("CASE", options.case_file, "The case file (YAML)")->required()->type_name("FILE");
  command->add_option("--factors", options.factors, "Replace scale.factors, e.g. --factors 1,10,100")
      ->type_name("F1,F2,...");
  add_override_option(*command, options.overrides);
  command->add_option("-j,--json", options.json_file,
                      "Write the ladder as JSON to FILE (written whole or not at all); '-' writes it to standard "
                      "output and the table to standard error")
      ->type_name("FILE|-");
  command->add_option("--csv", options.csv_folder, "Write scale.csv (one row per size) into FOLDER, which must exist")
      ->type_name("FOLDER");
  command->add_flag("-q,--quiet", options.quiet, "Do not print the table");
  command->footer(
      "Examples:\n  unchain scale cases/my_case.yaml\n"
      "  unchain scale cases/my_case.yaml --factors 1,5,25 --json ladder.json\n"
      "Rules and the scale section: docs/scale-and-sweep.md. A size that fails is listed with its error.\n"
      "Exit codes: 0 at least one size solved, 2 bad input, 3 no size converged.");
  return command;
}

int run_scale_command(const ScaleOptions& options, std::ostream& out, std::ostream& err) {
  std::optional<std::vector<double>> factors;
  if (!options.factors.empty()) factors = parse_factor_list(options.factors);
  const std::vector<Override> overrides = parse_overrides(options.overrides);
  const costs::PreparedCase prepared(options.case_file, overrides);
  const costs::ScaleLadder ladder = costs::run_scale_ladder(prepared, overrides, factors);

  std::vector<std::string> types = document_block_types(prepared.document());
  if (ladder.settings.continuous_case)
    for (const auto& r : ladder.rungs) types.insert(types.end(), r.block_types.begin(), r.block_types.end());
  const std::vector<std::string> cautions = study_cautions(types);

  const bool json_to_stdout = options.json_file == "-";
  std::ostream& text = json_to_stdout ? err : out;
  if (!options.quiet) {
    text << ladder_text(ladder);
    for (const auto& c : cautions) text << "\ncaution: " << c << "\n";
  }
  std::vector<std::string> errors;
  std::vector<costs::StudyPointStatus> statuses;
  for (const auto& r : ladder.rungs) {
    statuses.push_back(r.status);
    if (r.status != costs::StudyPointStatus::solved) errors.push_back(r.error);
  }
  print_study_errors(errors, err);
  const int code = study_exit_code(statuses);
  if (code != exit_success) {
    err << "error: no size of the ladder solved; nothing written\n";
    return code;
  }
  if (!options.json_file.empty()) {
    write_output_file(options.json_file, ladder_json(ladder, cautions).dump(2) + "\n");
    if (!json_to_stdout && !options.quiet) text << "\nladder written to " << options.json_file << "\n";
  }
  if (!options.csv_folder.empty()) {
    write_ladder_csv(options.csv_folder, ladder);
    if (!options.quiet) text << "table written to " << options.csv_folder << "/scale.csv\n";
  }
  return code;
}

}  // namespace unchain::app
