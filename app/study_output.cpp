#include "app/study_output.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <ostream>

#include "app/exit_codes.hpp"
#include "app/safety_notes.hpp"

namespace unchain::app {

std::string study_figure_name(const std::string& key, const std::string& basis_label) {
  const std::string marker = "per_basis";
  const auto at = key.find(marker);
  if (at == std::string::npos) return key;
  return key.substr(0, at) + "per_" + (basis_label.empty() ? std::string("basis") : basis_label) +
         key.substr(at + marker.size());
}

std::string study_csv_heading(const std::string& name, const std::string& unit) {
  if (unit.empty() || unit == "-") return name;
  std::string u;
  for (char ch : unit) u += ch == '/' ? std::string("_per_") : std::string(1, ch);
  return name + "_" + u;
}

std::string study_text_heading(const std::string& name, const std::string& unit) {
  if (unit.empty()) return name + " [-]";
  return name + " [" + unit + "]";
}

std::string study_number_text(const std::optional<double>& value) {
  if (!value) return "-";
  return fmt::format("{:.4g}", *value);
}

Json study_figures_to_json(const costs::CaseFigures& figures) {
  Json out = Json::object();
  for (const auto& f : figures.figures) {
    Json item;
    item["label"] = f.label;
    item["unit"] = f.unit;
    item["value"] = f.value ? Json(*f.value) : Json(nullptr);
    out[f.key] = std::move(item);
  }
  return out;
}

std::vector<std::string> document_block_types(const YAML::Node& document) {
  std::vector<std::string> types;
  const YAML::Node blocks = document["blocks"];
  if (!blocks || !blocks.IsMap()) return types;
  for (const auto& kv : blocks)
    if (kv.second.IsMap() && kv.second["type"] && kv.second["type"].IsScalar())
      types.push_back(kv.second["type"].Scalar());
  return types;
}

std::vector<std::string> study_cautions(const std::vector<std::string>& block_types) {
  if (std::find(block_types.begin(), block_types.end(), "pyrolysis") == block_types.end()) return {};
  const SafetyNote& note = safety_note(SafetyTopic::hot_reactor);
  return {note.title + ": " + note.text + " (A planning aid, not a safety assessment: see the safety notes in "
                                          "the README.)"};
}

int study_exit_code(const std::vector<costs::StudyPointStatus>& statuses) {
  for (auto s : statuses)
    if (s == costs::StudyPointStatus::solved) return exit_success;
  for (auto s : statuses) {  // the first failure decides
    if (s == costs::StudyPointStatus::not_converged) return exit_not_converged;
    if (s == costs::StudyPointStatus::bad_input) return exit_input_error;
  }
  return exit_input_error;  // nothing was evaluated
}

const std::vector<std::string>& study_summary_keys() {
  static const std::vector<std::string> keys{"monomer_per_basis",        "energy_per_kg_monomer",
                                             "net_cost_per_basis",       "net_cost_per_kg_monomer",
                                             "labour_share",             "installed_capital",
                                             "npv",                      "minimum_selling_price"};
  return keys;
}

// A plain text table, columns padded to their widest cell.
std::string study_text_table(const std::vector<std::string>& headings, const std::vector<std::vector<std::string>>& rows) {
  std::vector<std::size_t> width(headings.size());
  for (std::size_t i = 0; i < headings.size(); ++i) width[i] = headings[i].size();
  for (const auto& r : rows)
    for (std::size_t i = 0; i < r.size() && i < width.size(); ++i) width[i] = std::max(width[i], r[i].size());
  auto line = [&](const std::vector<std::string>& cells) {
    std::string text;
    for (std::size_t i = 0; i < cells.size(); ++i)
      text += (i ? "  " : "") + fmt::format("{:<{}}", cells[i], width[i]);
    while (!text.empty() && text.back() == ' ') text.pop_back();
    return text + "\n";
  };
  std::string out = line(headings);
  for (const auto& r : rows) out += line(r);
  return out;
}

void print_study_errors(const std::vector<std::string>& errors, std::ostream& err) {
  std::vector<std::string> seen;
  for (const auto& e : errors)
    for (std::size_t at = 0, next = 0; at < e.size(); at = next + 1) {
      next = e.find('\n', at);
      if (next == std::string::npos) next = e.size();
      const std::string line = e.substr(at, next - at);
      if (line.empty() || std::find(seen.begin(), seen.end(), line) != seen.end()) continue;
      seen.push_back(line);
      err << (line.find(": error: ") != std::string::npos ? line : "error: " + line) << "\n";
    }
}

}  // namespace unchain::app
