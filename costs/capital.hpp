#pragma once
// The capital estimate: an equipment list from the sizes the blocks report,
// each item costed by a price the user gives (scaled by the six-tenths rule
// with the item's exponent) or by a published correlation, escalated to the
// cost year by the plant cost index, installed by a Lang factor or a
// per-item factor, and turned into an annual charge by the capital recovery
// factor. Equations: docs/costing.md.

#include <optional>
#include <string>
#include <vector>

#include "costs/cost_index.hpp"
#include "costs/money_types.hpp"
#include "flowsheet/case.hpp"
#include "flowsheet/solver.hpp"

namespace unchain::costs {

// Six-tenths rule: C = C_ref (S / S_ref)^n.
double scale_cost(double reference_cost, double reference_size, double size, double exponent);
// Capital recovery factor: i (1 + i)^n / ((1 + i)^n - 1); 1/n when i = 0.
double capital_recovery_factor(double interest_rate, double years);

// Lang factors (purchased equipment to fixed capital). Source: Lang,
// Chem. Eng. 55 (1948) 112, as tabulated in Peters, Timmerhaus & West,
// Plant Design and Economics for Chemical Engineers, 5th ed., Table 6-9
// (from memory): solid processing 3.10, solid-fluid 3.63, fluid 4.74.
enum class PlantType { solid, solid_fluid, fluid };
double lang_factor(PlantType type);

// A user-given price for an item of equipment.
struct EquipmentPrice {
  std::string block;          // block whose equipment it prices
  std::string item;           // EquipmentSize::item to match (empty = the block's first item of `measure`)
  std::string measure;        // volume, power, area, ...
  double reference_cost = 0;  // in the case currency, at reference_year
  double reference_size = 0;  // SI
  int reference_year = 0;
  double exponent = 0.6;
  std::optional<double> installation_factor;
  std::optional<std::string> correlation;  // use a named published correlation instead
};

struct CapitalSettings {
  int cost_year = 2023;
  CostIndex index = CostIndex::chemical_engineering_plant_cost_index();
  PlantType plant_type = PlantType::solid_fluid;
  std::optional<double> installation_factor;  // overrides the Lang factor
  double interest_rate = 0.08;
  double equipment_life_years = 10.0;
  double batches_per_year = 250.0;
  double operating_hours_per_year = 8000.0;   // continuous cases
  std::vector<EquipmentPrice> prices;
  bool present = false;  // the case has a capital section
};

struct CostedItem {
  std::string block;
  std::string item;
  std::string kind;
  std::string measure;
  double size = 0;            // SI
  std::string unit;
  std::string method;         // "user price, six-tenths rule" / correlation name / "not costed"
  std::string source;
  double purchased_cost = 0;  // case currency, cost year
  double installation_factor = 1;
  double installed_cost = 0;
  std::string note;           // range warnings and the like
};

struct CapitalEstimate {
  std::vector<CostedItem> items;
  double purchased_total = 0;
  double installed_total = 0;
  double capital_recovery_factor = 0;
  double annual_capital_charge = 0;
  double capital_charge_per_batch = 0;  // per basis: per batch, or per hour for continuous
  std::vector<std::string> warnings;
};

CapitalSettings read_capital_settings(const Case& c, DiagnosticList& diagnostics);
CapitalEstimate estimate_capital(const Case& c, const SolveResult& result, const CapitalSettings& settings);

}  // namespace unchain::costs
