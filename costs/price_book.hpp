#pragma once
// Prices and factors for one case: read from the case's `prices` section,
// optionally on top of a shared price file (`prices.file`) that several
// cases use. Values in the case override those in the file. Every price is
// optional; a cost with no price is reported as missing, never guessed.
// Keys and units: docs/costing.md.

#include <map>
#include <optional>
#include <string>
#include <vector>

#include "costs/money_types.hpp"
#include "flowsheet/diagnostics.hpp"
#include "flowsheet/yaml_reader.hpp"

namespace unchain::costs {

enum class CoolingSupply { cooling_water, chiller };

// A product price that applies from a minimum purity upwards.
struct PurityGrade {
  double minimum_purity = 0.0;  // mass fraction of the product component
  PricePerMass price = from_si<PricePerMass>(0.0);
};

struct PriceBook {
  std::string currency;

  std::optional<PricePerEnergy> electricity;
  std::optional<PricePerEnergy> fuel;                // per MJ of fuel (lower heating value)
  double burner_efficiency = 0.8;                    // fraction of fuel energy that reaches the process
  CoolingSupply cooling = CoolingSupply::cooling_water;
  std::optional<PricePerVolume> cooling_water;       // per m3 of cooling water
  TemperatureDifference cooling_water_temperature_rise = kelvin_difference(10.0);
  double chiller_coefficient_of_performance = 3.0;   // heat removed / electricity
  std::map<std::string, PricePerMass> solvents;      // by component id
  std::optional<PricePerVolume> process_water;
  std::optional<PricePerVolume> wastewater_disposal;
  std::optional<PricePerMass> solid_waste_disposal;
  std::optional<PricePerMass> hazardous_waste_disposal;
  std::optional<PricePerVolume> inert_gas;           // per m3 at 0 degC, 1 atm
  std::optional<PricePerMass> inhibitor;
  double inhibitor_dose = 0.0;                       // kg inhibitor per kg monomer product
  std::optional<PricePerTime> labour_rate;
  Time labour_hours_per_batch = seconds(0.0);
  std::map<std::string, std::vector<PurityGrade>> products;  // by component id, best grade first
  std::optional<PricePerEnergy> byproduct_fuel_value;        // credit per MJ of heating value
  std::map<std::string, PricePerMass> byproduct_chemicals;   // credit per kg, by component id
  std::optional<PricePerMass> gate_fee;              // received per kg of waste polymer accepted
  std::optional<EmissionFactor> grid_emission_factor;
  std::optional<EmissionFactor> fuel_emission_factor;

  // The best grade whose minimum purity is met, if any.
  [[nodiscard]] const PurityGrade* grade_for(const std::string& component, double purity) const;
};

// What the shared price file named by `prices.file` gives on its own, read
// once for the many evaluations of one case (a Monte Carlo run, a sweep)
// instead of parsing the file again each time. Immutable once read, so one
// may be shared by threads.
struct SharedPriceFile {
  std::string path;                     // case folder / prices.file, as read_price_book resolves it
  std::string currency;                 // the currency its prices were read in
  PriceBook book;                       // the file's prices alone
  std::vector<Diagnostic> diagnostics;  // what reading the file reported (its own FILE:LINE:COLUMN)
};

// The shared price file of a case document, if `prices.file` names one
// (an unreadable file gives its errors in `diagnostics`, as on every read).
std::optional<SharedPriceFile> read_shared_price_file(const YAML::Node& document, const std::string& case_file,
                                                      const std::string& currency);

// Reads `prices` from the case document (and `prices.file` relative to the
// case file's folder). Errors go to `diagnostics`. `shared`, when given and
// it is the file the document names in the same currency, stands for
// reading that file again (same prices, same diagnostics).
PriceBook read_price_book(const YAML::Node& document, const std::string& case_file, const std::string& currency,
                          DiagnosticList& diagnostics, const SharedPriceFile* shared = nullptr);

}  // namespace unchain::costs
