#pragma once
// Figures per batch (or per hour, for a continuous case) and per kilogram
// of monomer: energy by block and kind, solvent and water, waste streams,
// the cost breakdown, credits, CO2e, yield, and the distance from the
// thermodynamic minimum energy. Formulas: docs/costing.md.

#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "costs/accounting.hpp"
#include "costs/capital.hpp"
#include "costs/cash_flow.hpp"
#include "costs/minimum_energy.hpp"
#include "costs/price_book.hpp"
#include "flowsheet/solver.hpp"

namespace unchain::costs {

struct BlockEnergy {
  std::string block;
  std::string type;
  double heat_J = 0;         // heat drawn from the supply (electric or fuel)
  double electricity_J = 0;  // electricity drawn, electric heating included
  double fuel_J = 0;         // fuel energy (heat drawn / burner efficiency) for fuel-heated blocks
  double cooling_J = 0;      // heat rejected to cooling
  double chiller_electricity_J = 0;
  double purchased_J = 0;    // electricity + fuel + chiller electricity
};

struct WasteLine {
  std::string stream;
  std::string waste_class;
  std::string description;   // what it is: its main components
  double mass_kg = 0;
  double volume_m3 = 0;      // condensed volume (aqueous wastes are priced by volume)
  double disposal_cost = 0;
  bool priced = false;
};

enum class CostCategory { energy, solvent, water, waste, labour, capital, materials, credit };
const char* cost_category_name(CostCategory c);

struct CostLine {
  CostCategory category;
  std::string item;
  double quantity = 0;       // SI amount of what is bought or credited
  std::string unit;          // SI unit of quantity
  double cost = 0;           // case currency; credits negative
};

struct CostReport {
  std::string basis_label;   // "batch" or "hour"
  std::optional<double> monomer_kg;
  std::optional<double> monomer_purity;       // mass fraction
  std::string monomer_component;
  double polymer_fed_kg = 0;
  std::optional<double> monomer_yield;        // kg monomer / kg polymer fed

  std::vector<BlockEnergy> energy_by_block;
  BlockEnergy energy_total;

  double solvent_bought_kg = 0;
  double solvent_recovered_kg = 0;
  double solvent_lost_kg = 0;                 // leaving the flowsheet in any product stream
  double process_water_m3 = 0;
  double cooling_water_m3 = 0;
  double inert_gas_m3 = 0;

  std::vector<WasteLine> wastes;
  std::vector<CostLine> lines;
  double total_cost = 0;                      // before credits
  double total_credits = 0;                   // positive number
  double net_cost = 0;                        // total cost less credits
  std::optional<double> monomer_price;        // per kg, by the grade its purity reaches
  double monomer_revenue = 0;
  double margin = 0;                          // revenue less net cost
  double co2e_kg = 0;
  std::optional<MinimumEnergy> minimum_energy;
  std::optional<double> efficiency_ratio;     // minimum / modelled purchased energy per kg
  CapitalEstimate capital;
  std::optional<CashFlowResult> cash_flow;    // when the case has an economics section and a priced monomer
  std::vector<std::string> missing_prices;    // things that cost money but have no price
  std::vector<std::string> notes;

  // Per kilogram of monomer, if the monomer is known and non-zero.
  [[nodiscard]] std::optional<double> per_kg(double per_batch) const;
};

CostReport evaluate_costs(const Case& c, const SolveResult& result, const PriceBook& prices,
                          const Accounting& accounting, const CapitalSettings& capital);

// What the discounted cash flow is built from: the installed capital, and
// the figures per basis times the batches (or hours) in a year. Operating
// cost is the total cost less the capital charge line; credits are other
// revenue. Absent (with the reason) when there is no monomer or no price.
struct CashFlowBasis {
  std::optional<CashFlowInputs> inputs;
  double basis_per_year = 0;   // batches, or operating hours, in a year at full capacity
  std::string reason;          // why there is no cash flow
};
CashFlowBasis cash_flow_basis(const Case& c, const CostReport& report, const CashFlowSettings& settings,
                              const CapitalSettings& capital);

// Reads prices, accounting, capital and economics from the case and
// evaluates them (the cash flow only when there is an economics section).
// Input errors are thrown together as InputError.
CostReport evaluate_case_costs(const Case& c, const SolveResult& result);
// The same with the file named by prices.file already read (a study reads
// it once for all its evaluations): the same report, without parsing the
// file again. A null pointer reads the file as above.
CostReport evaluate_case_costs(const Case& c, const SolveResult& result, const SharedPriceFile* shared_prices);

// What evaluate_case_costs reads from the case besides its prices.
struct CostSettings {
  Accounting accounting;
  CapitalSettings capital;
  CashFlowSettings economics;
};
// The same again, with the settings kept between calls: read from the case
// (their input errors thrown together with the prices' errors) when
// `settings` is empty, and left in it; used as they are when it is set. A
// study whose overrides cannot change them (case_study.cpp) reads them once
// for all its evaluations: the same report, about a tenth less work each.
CostReport evaluate_case_costs(const Case& c, const SolveResult& result, const SharedPriceFile* shared_prices,
                               std::shared_ptr<const CostSettings>& settings);

}  // namespace unchain::costs
