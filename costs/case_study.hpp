#pragma once
// One case evaluated many times with different parameter values: the common
// ground of sweeps, scale ladders, tornado charts, Monte Carlo and
// comparisons. A PreparedCase parses the file once; each evaluation applies
// overrides to a copy of the document, loads, solves, checks the balances
// and costs the result, and returns the key figures. evaluate() is const and
// safe to call from many threads at once.

#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "costs/batch_economics.hpp"
#include "flowsheet/case.hpp"
#include "flowsheet/solver.hpp"

namespace unchain::costs {

// A figure people compare between runs. `key` is stable (JSON, CSV);
// `label` is for people; `unit` is the unit `value` is expressed in.
struct KeyFigure {
  std::string key;
  std::string label;
  std::string unit;
  std::optional<double> value;  // absent when it cannot be computed (no monomer, no price)
};

// Stable keys of the key figures, in display order.
//   monomer_per_basis (kg), monomer_purity (-), energy_per_kg_monomer (MJ/kg),
//   net_cost_per_basis (CUR), net_cost_per_kg_monomer (CUR/kg), labour_share (-),
//   solvent_lost_per_kg_monomer (kg/kg), installed_capital (CUR),
//   npv (CUR), irr (-), payback (yr), minimum_selling_price (CUR/kg)
struct CaseFigures {
  std::string case_file;
  std::string title;
  std::string basis_label;   // "batch" or "hour"
  std::string currency;
  std::vector<KeyFigure> figures;

  [[nodiscard]] const KeyFigure* find(std::string_view key) const;
  [[nodiscard]] std::optional<double> value(std::string_view key) const;
};

CaseFigures key_figures(const Case& c, const CostReport& report);

// Everything one evaluation produced, for callers that want more than the
// key figures (the report, the scale ladder).
struct Evaluation {
  std::shared_ptr<const Case> loaded;
  SolveResult result;
  CostReport report;
  CaseFigures figures;
};

class PreparedCase {
 public:
  // Reads and parses the file; throws InputError as load_case_file does.
  explicit PreparedCase(const std::string& path, std::vector<Override> base_overrides = {});

  // Applies base overrides, then these, loads, solves and costs. Throws
  // InputError for a bad value or path, ConvergenceError when the solve
  // does not converge or a balance does not close.
  [[nodiscard]] Evaluation evaluate_full(const std::vector<Override>& overrides = {}) const;
  [[nodiscard]] CaseFigures evaluate(const std::vector<Override>& overrides = {}) const;

  [[nodiscard]] const std::string& path() const { return path_; }
  // The parsed document before any override (to read study sections such as
  // `uncertainty`, `sensitivity` and `scale`).
  [[nodiscard]] const YAML::Node& document() const;

 private:
  struct State;
  std::string path_;
  std::shared_ptr<const State> state_;
};


// ---- shared by the studies (tornado, Monte Carlo, sweeps) -------------------

// Why a dotted path (as for --set) names nothing in the case, or nothing
// when it does. A path under `prices.` also counts as existing when the
// shared price file named by `prices.file` has it (an override in the case
// then replaces the file's value). The message names the first missing
// part and suggests the closest existing key.
std::optional<std::string> missing_case_path(const YAML::Node& document, const std::string& case_file,
                                             const std::string& path);

// A study input written as "number unit" (or a bare number), converted to
// the unit of a reference value so that the parameters of one distribution
// or one tornado bar can be compared and combined.
struct StudyValue {
  double number = 0;           // in the reference unit
  std::string unit;            // the reference unit as written ("USD/kWh", "degC", "" for a bare number)
};
// Parses `text` as the reference of its group: its unit becomes the unit
// of the group. Throws UnitError on a malformed value.
StudyValue parse_study_reference(const std::string& text);
// Converts `text` to the unit of `reference`. `difference` reads it as a
// spread (a temperature difference: no offset). Throws UnitError when the
// dimensions or currencies differ.
double parse_study_value(const std::string& text, const std::string& reference_text, bool difference);
// The override text of a value: shortest round-trip number, a space and the unit.
std::string study_value_text(double number, const std::string& unit);

}  // namespace unchain::costs
