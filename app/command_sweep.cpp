#include "app/command_sweep.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <filesystem>
#include <ostream>

#include "app/atomic_file.hpp"
#include "app/csv_tables.hpp"
#include "app/exit_codes.hpp"
#include "app/safety_notes.hpp"
#include "app/study_output.hpp"
#include "costs/parameter_sweep.hpp"

namespace unchain::app {

// ---- the sweep -----------------------------------------------------------------

namespace {

// The figures of the first solved point give the keys, units and basis.
const costs::CaseFigures* first_figures(const costs::SweepResult& r) {
  for (const auto& p : r.points)
    if (p.figures) return &*p.figures;
  return nullptr;
}

std::string first_error_line(const std::string& error) { return error.substr(0, error.find('\n')); }

std::string sweep_text(const costs::SweepResult& r, const std::string& title) {
  std::string out = fmt::format("Sweep of {} ({})\n", title, r.case_file);
  for (const auto& o : r.fixed_overrides) out += fmt::format("  with {} = {}\n", o.path, o.value);
  out += fmt::format("{} of {} points solved\n\n", r.solved_count(), r.points.size());
  const costs::CaseFigures* reference = first_figures(r);
  std::vector<std::string> headings = r.swept_paths;
  headings.push_back("status");
  std::vector<std::string> keys;
  if (reference)
    for (const auto& key : study_summary_keys())
      if (const auto* f = reference->find(key)) {
        const bool any = std::any_of(r.points.begin(), r.points.end(), [&](const costs::SweepPoint& p) {
          return p.figures && p.figures->value(key).has_value();
        });
        if (!any) continue;
        keys.push_back(key);
        headings.push_back(study_text_heading(study_figure_name(key, reference->basis_label), f->unit));
      }
  std::vector<std::vector<std::string>> rows;
  for (const auto& p : r.points) {
    std::vector<std::string> row = p.values;
    row.push_back(costs::study_point_status_name(p.status));
    for (const auto& key : keys) row.push_back(study_number_text(p.figures ? p.figures->value(key) : std::nullopt));
    rows.push_back(std::move(row));
  }
  out += study_text_table(headings, rows);
  bool any_failed = false;
  for (std::size_t i = 0; i < r.points.size(); ++i) {
    const auto& p = r.points[i];
    if (p.status == costs::StudyPointStatus::solved) continue;
    if (!any_failed) out += "\nfailed points:\n";
    any_failed = true;
    std::string values;
    for (std::size_t k = 0; k < p.values.size(); ++k)
      values += (k ? ", " : "") + r.swept_paths[k] + " = " + p.values[k];
    out += fmt::format("  {}: {}\n", values, first_error_line(p.error));
  }
  return out;
}

Json sweep_json(const costs::SweepResult& r, const std::string& title, const std::vector<std::string>& cautions) {
  Json j;
  j["kind"] = "sweep";
  j["schema_version"] = 1;
  j["case_file"] = r.case_file;
  j["title"] = title;
  j["parameters"] = r.swept_paths;
  Json fixed = Json::array();
  for (const auto& o : r.fixed_overrides) fixed.push_back({{"path", o.path}, {"value", o.value}});
  j["fixed_overrides"] = fixed;
  j["points_solved"] = r.solved_count();
  Json points = Json::array();
  for (const auto& p : r.points) {
    Json point;
    Json values = Json::object();
    for (std::size_t k = 0; k < p.values.size(); ++k) values[r.swept_paths[k]] = p.values[k];
    point["values"] = values;
    point["status"] = costs::study_point_status_name(p.status);
    point["error"] = p.error.empty() ? Json(nullptr) : Json(p.error);
    point["basis"] = p.figures ? Json(p.figures->basis_label) : Json(nullptr);
    point["figures"] = p.figures ? study_figures_to_json(*p.figures) : Json(nullptr);
    points.push_back(std::move(point));
  }
  j["points"] = points;
  j["cautions"] = cautions;
  return j;
}

void write_sweep_csv(const std::string& folder, const costs::SweepResult& r) {
  if (!std::filesystem::is_directory(folder))
    throw OutputFileError("CSV folder '" + folder + "' does not exist (expected a folder)");
  const costs::CaseFigures* reference = first_figures(r);
  std::vector<std::string> headings = r.swept_paths;
  headings.push_back("status");
  if (reference)
    for (const auto& f : reference->figures)
      headings.push_back(study_csv_heading(study_figure_name(f.key, reference->basis_label), f.unit));
  headings.push_back("error");
  std::string text;
  auto row = [&](const std::vector<std::string>& cells) {
    for (std::size_t i = 0; i < cells.size(); ++i) text += (i ? "," : "") + csv_field(cells[i]);
    text += "\n";
  };
  row(headings);
  for (const auto& p : r.points) {
    std::vector<std::string> cells = p.values;
    cells.push_back(costs::study_point_status_name(p.status));
    if (reference)
      for (const auto& f : reference->figures) {
        const auto v = p.figures ? p.figures->value(f.key) : std::nullopt;
        cells.push_back(v ? csv_number(*v) : std::string());
      }
    cells.push_back(first_error_line(p.error));
    row(cells);
  }
  write_output_file((std::filesystem::path(folder) / "sweep.csv").string(), text);
}

std::string case_title(const YAML::Node& document) {
  if (document["case"] && document["case"]["title"] && document["case"]["title"].IsScalar())
    return document["case"]["title"].Scalar();
  return {};
}

}  // namespace

CLI::App* add_sweep_command(CLI::App& parent, SweepOptions& options) {
  CLI::App* command = parent.add_subcommand(
      "sweep", "Evaluate a case over a list of values of one parameter, or a grid of two, with the key figures "
               "per point");
  command->add_option("CASE", options.case_file, "The case file (YAML)")->required()->type_name("FILE");
  command
      ->add_option("-s,--set", options.settings,
                   "PATH=V1,V2,... sweeps PATH over the values (quantities as in the case, e.g. "
                   "blocks.reactor.reactor_temperature=\"450 degC,500 degC\"); at most two paths with lists (a "
                   "grid); PATH=VALUE with one value is an ordinary override")
      ->type_name("PATH=V1,V2,...")
      ->required()
      ->allow_extra_args(false);
  command->add_option("-j,--json", options.json_file,
                      "Write the sweep as JSON to FILE (written whole or not at all); '-' writes it to standard "
                      "output and the table to standard error")
      ->type_name("FILE|-");
  command->add_option("--csv", options.csv_folder, "Write sweep.csv (one row per point) into FOLDER, which must exist")
      ->type_name("FOLDER");
  command->add_flag("-q,--quiet", options.quiet, "Do not print the table");
  command->footer(
      "Examples:\n"
      "  unchain sweep cases/my_case.yaml --set blocks.reactor.reactor_temperature=\"450 degC,500 degC,550 degC\"\n"
      "  unchain sweep cases/my_case.yaml --set blocks.still.reflux_ratio=2,4,6 --set "
      "blocks.still.stages=4,6 --csv out\n"
      "A point that fails is listed with its error; the others go on.\n"
      "Exit codes: 0 at least one point solved, 2 bad input (or every point had bad input), 3 no point converged.");
  return command;
}

int run_sweep_command(const SweepOptions& options, std::ostream& out, std::ostream& err) {
  std::vector<costs::SweepSetting> settings;
  DiagnosticList problems;
  for (const auto& text : options.settings) {
    try {
      settings.push_back(costs::parse_sweep_setting(text));
    } catch (const InputError& e) {
      for (const auto& d : e.diagnostics()) problems.error(d.where, d.message);
    }
  }
  problems.throw_if_errors();
  const bool swept = std::any_of(settings.begin(), settings.end(), [](const auto& s) { return s.is_swept(); });
  if (!swept)
    throw UsageError("sweep: no --set has a list of values (expected PATH=V1,V2,... for at least one parameter)");

  const costs::PreparedCase prepared(options.case_file);
  const costs::SweepResult result = costs::run_sweep(prepared, settings);
  const std::string title = case_title(prepared.document());
  const std::vector<std::string> cautions = study_cautions(document_block_types(prepared.document()));

  const bool json_to_stdout = options.json_file == "-";
  std::ostream& text = json_to_stdout ? err : out;
  if (!options.quiet) {
    text << sweep_text(result, title);
    for (const auto& c : cautions) text << "\ncaution: " << c << "\n";
  }
  std::vector<std::string> errors;
  for (const auto& p : result.points)
    if (p.status != costs::StudyPointStatus::solved) errors.push_back(p.error);
  print_study_errors(errors, err);

  std::vector<costs::StudyPointStatus> statuses;
  for (const auto& p : result.points) statuses.push_back(p.status);
  const int code = study_exit_code(statuses);
  if (code != exit_success) {
    err << "error: no point of the sweep solved; nothing written\n";
    return code;
  }
  if (!options.json_file.empty()) {
    write_output_file(options.json_file, sweep_json(result, title, cautions).dump(2) + "\n");
    if (!json_to_stdout && !options.quiet) text << "\nsweep written to " << options.json_file << "\n";
  }
  if (!options.csv_folder.empty()) {
    write_sweep_csv(options.csv_folder, result);
    if (!options.quiet) text << "table written to " << options.csv_folder << "/sweep.csv\n";
  }
  return code;
}

}  // namespace unchain::app
