#include "costs/equipment_correlations.hpp"

#include <cmath>

namespace unchain::costs {

double CostCorrelation::cost(double size_SI) const { return a + b * std::pow(size_SI * size_scale, n); }

bool CostCorrelation::in_range(double size_SI) const {
  const double s = size_SI * size_scale;
  return s >= low && s <= high;
}

const std::vector<CostCorrelation>& published_correlations() {
  // Source for all: Towler & Sinnott, Chemical Engineering Design, 2nd ed.
  // (2012), Table 6.6, purchased equipment costs on a US Gulf Coast basis,
  // January 2010 (CEPCI 532.9; we escalate from the 2010 annual average),
  // carbon steel (from memory). These are for industrial sizes: below their
  // range (a lab flask) they do not apply, and unchain says so.
  static const std::vector<CostCorrelation> table = {
      {"jacketed_agitated_reactor", "vessel", "volume", 61500, 32500, 0.80, 1.0, "m3", 0.5, 100, 2010, "USD",
       "Towler & Sinnott, Chemical Engineering Design 2nd ed., Table 6.6: reactors, jacketed agitated (from memory)"},
      {"vertical_pressure_vessel", "vessel_shell", "mass", 11600, 34, 0.85, 1.0, "kg", 160, 250000, 2010, "USD",
       "Towler & Sinnott, Chemical Engineering Design 2nd ed., Table 6.6: pressure vessels, vertical, CS (from memory)"},
      {"u_tube_heat_exchanger", "condenser", "area", 28000, 54, 1.2, 1.0, "m2", 10, 1000, 2010, "USD",
       "Towler & Sinnott, Chemical Engineering Design 2nd ed., Table 6.6: exchangers, U-tube shell and tube (from memory)"},
      {"cylindrical_furnace", "heater", "power", 80000, 109000, 0.8, 1e-6, "MW", 0.2, 60, 2010, "USD",
       "Towler & Sinnott, Chemical Engineering Design 2nd ed., Table 6.6: furnaces, cylindrical (from memory)"},
      {"sieve_tray", "column_tray", "diameter", 110, 380, 1.8, 1.0, "m", 0.5, 5.0, 2010, "USD",
       "Towler & Sinnott, Chemical Engineering Design 2nd ed., Table 6.6: trays, sieve, per tray (from memory)"},
  };
  return table;
}

const CostCorrelation* find_correlation(std::string_view name) {
  for (const auto& c : published_correlations())
    if (c.name == name) return &c;
  return nullptr;
}

const CostCorrelation* default_correlation(std::string_view kind, std::string_view measure) {
  for (const auto& c : published_correlations())
    if (c.equipment_kind == kind && c.measure == measure) return &c;
  return nullptr;
}

}  // namespace unchain::costs
