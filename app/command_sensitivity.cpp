#include "app/command_sensitivity.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <filesystem>
#include <ostream>

#include "app/atomic_file.hpp"
#include "app/command_check.hpp"
#include "app/study_output.hpp"
#include "app/csv_tables.hpp"
#include "app/exit_codes.hpp"
#include "costs/sensitivity.hpp"

namespace unchain::app {

namespace {

std::string document_title(const YAML::Node& document) {
  const YAML::Node title = document["case"] ? document["case"]["title"] : YAML::Node();
  return title && title.IsScalar() ? title.Scalar() : std::string();
}

// A bar of '#' as long as the swing relative to the largest, so that the
// table reads as a tornado.
std::string bar_text(double swing, double largest) {
  constexpr double width = 24;
  if (!(largest > 0)) return {};
  return std::string(static_cast<std::size_t>(std::lround(width * swing / largest)), '#');
}

std::string tornado_text(const costs::SensitivityResult& r, const std::string& title, const std::string& file) {
  std::string out = fmt::format("One-at-a-time sensitivity (tornado): {} ({})\n", title, file);
  out += "Each parameter set to its low and its high value, every other input at the base case; bars sorted by swing.\n";
  for (const auto& t : r.tornadoes) {
    const std::string name = study_figure_name(t.key, r.base.basis_label);
    out += fmt::format("\n{}, base {}\n", study_text_heading(name, t.unit), study_number_text(t.base));
    const double largest = t.bars.empty() ? 0.0 : t.bars.front().swing;
    std::vector<std::vector<std::string>> rows;
    for (const auto& b : t.bars) {
      const auto& p = r.parameters[b.parameter];
      rows.push_back({p.label, p.low, p.high, study_number_text(b.low_output), study_number_text(b.high_output),
                      study_number_text(b.swing), bar_text(b.swing, largest)});
    }
    const std::string unit = " [" + t.unit + "]";
    out += study_text_table({"parameter", "low value", "high value", "at low" + unit, "at high" + unit,
                             "swing" + unit, ""},
                            rows);
  }
  if (std::none_of(r.tornadoes.begin(), r.tornadoes.end(), [](const auto& t) { return t.key == "npv"; }))
    out += "\nno NPV tornado: the case has no discounted cash flow (economics section, monomer price)\n";
  return out;
}

Json sensitivity_json(const costs::SensitivityResult& r, const std::string& title, const std::string& file,
                      const std::vector<std::string>& cautions) {
  Json j;
  j["case"] = file;
  j["title"] = title;
  j["basis"] = r.base.basis_label;
  j["currency"] = r.base.currency;
  j["base"] = study_figures_to_json(r.base);
  Json parameters = Json::array();
  for (std::size_t i = 0; i < r.parameters.size(); ++i) {
    const auto& p = r.parameters[i];
    parameters.push_back({{"path", p.path},
                          {"label", p.label},
                          {"low", p.low},
                          {"high", p.high},
                          {"at_low", study_figures_to_json(r.low[i])},
                          {"at_high", study_figures_to_json(r.high[i])}});
  }
  j["parameters"] = parameters;
  Json tornadoes = Json::array();
  for (const auto& t : r.tornadoes) {
    Json item;
    item["key"] = t.key;
    item["label"] = t.label;
    item["unit"] = t.unit;
    item["base"] = t.base ? Json(*t.base) : Json(nullptr);
    Json bars = Json::array();
    for (const auto& b : t.bars) {
      const auto& p = r.parameters[b.parameter];
      bars.push_back({{"path", p.path},
                      {"label", p.label},
                      {"low", p.low},
                      {"high", p.high},
                      {"low_output", b.low_output ? Json(*b.low_output) : Json(nullptr)},
                      {"high_output", b.high_output ? Json(*b.high_output) : Json(nullptr)},
                      {"swing", b.swing}});
    }
    item["bars"] = bars;
    tornadoes.push_back(item);
  }
  j["tornadoes"] = tornadoes;
  j["cautions"] = cautions;
  return j;
}

void write_sensitivity_csv(const std::string& folder, const costs::SensitivityResult& r) {
  std::string text = "figure,unit,path,label,low,high,base,at_low,at_high,swing\n";
  auto number = [](const std::optional<double>& v) { return v ? csv_number(*v) : std::string(); };
  for (const auto& t : r.tornadoes)
    for (const auto& b : t.bars) {
      const auto& p = r.parameters[b.parameter];
      text += csv_field(study_figure_name(t.key, r.base.basis_label)) + "," + csv_field(t.unit) + "," +
              csv_field(p.path) + "," + csv_field(p.label) + "," + csv_field(p.low) + "," + csv_field(p.high) + "," +
              number(t.base) + "," + number(b.low_output) + "," + number(b.high_output) + "," +
              csv_number(b.swing) + "\n";
    }
  write_output_file((std::filesystem::path(folder) / "sensitivity.csv").string(), text);
}

}  // namespace

CLI::App* add_sensitivity_command(CLI::App& parent, SensitivityOptions& options) {
  CLI::App* command = parent.add_subcommand(
      "sensitivity", "One-at-a-time tornado of the net cost per kg of monomer and the NPV from the case's "
                     "sensitivity section");
  command->add_option("CASE", options.case_file, "The case file (YAML) with a sensitivity section")
      ->required()
      ->type_name("FILE");
  command->add_option("-j,--json", options.json_file,
                      "Write the tornado as JSON to FILE; '-' writes it to standard output and the table to "
                      "standard error")
      ->type_name("FILE|-");
  command->add_option("--csv", options.csv_folder, "Write sensitivity.csv (one row per bar) into FOLDER")
      ->type_name("FOLDER");
  command->add_option("-t,--threads", options.threads, "Threads to evaluate on (default: every core)")
      ->type_name("T")
      ->check(CLI::Range(1u, 1024u));
  add_override_option(*command, options.overrides);
  command->add_flag("-q,--quiet", options.quiet, "Do not print the table");
  command->footer(
      "Examples:\n"
      "  unchain sensitivity cases/my_case.yaml\n"
      "  unchain sensitivity cases/my_case.yaml --json tornado.json --csv out\n"
      "Exit codes: 0 done, 2 bad input, 3 the base case or a low/high evaluation does not converge.");
  return command;
}

int run_sensitivity_command(const SensitivityOptions& options, std::ostream& out, std::ostream& err) {
  const costs::PreparedCase prepared(options.case_file, parse_overrides(options.overrides));
  const auto parameters = costs::read_sensitivity_parameters(prepared);
  const std::string title = document_title(prepared.document());
  const std::vector<std::string> cautions = study_cautions(document_block_types(prepared.document()));
  const costs::SensitivityResult result = costs::run_sensitivity(prepared, parameters, options.threads);

  const bool json_to_stdout = options.json_file == "-";
  std::ostream& text = json_to_stdout ? err : out;
  if (!options.quiet) {
    text << tornado_text(result, title, options.case_file);
    for (const auto& c : cautions) text << "\ncaution: " << c << "\n";
  }
  if (!options.json_file.empty()) {
    write_output_file(options.json_file, sensitivity_json(result, title, options.case_file, cautions).dump(2) + "\n");
    if (!json_to_stdout && !options.quiet) text << "\ntornado written to " << options.json_file << "\n";
  }
  if (!options.csv_folder.empty()) {
    write_sensitivity_csv(options.csv_folder, result);
    if (!options.quiet) text << "table written to " << options.csv_folder << "/sensitivity.csv\n";
  }
  return exit_success;
}

}  // namespace unchain::app
