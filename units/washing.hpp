#pragma once
// Water wash of a crude organic liquid (pyrolysis oil): cross-current
// liquid-liquid extraction, fresh water at every wash, each wash one
// equilibrium stage. Also the theoretical oxygen demand of the aqueous
// waste. Equations, assumptions and ranges: docs/blocks-separation.md#washing.

#include <string>

#include "flowsheet/elements.hpp"

namespace unchain::units {

class BlockRegistry;

// Registers block type `washing`.
void register_washing(BlockRegistry& registry);

// Theoretical oxygen demand of an organic compound, kg O2 per kg, from
// complete oxidation
//   CcHhOoNnXx + (c + (h - 3n - x)/4 - o/2) O2 -> c CO2 + (h - 3n - x)/2 H2O + n NH3 + x HX
// (nitrogen to ammonia, halogens X = F, Cl, Br, I to the hydrogen halide;
// nitrification not counted). Zero for a formula without carbon. Elements
// other than C, H, O, N and the halogens are not counted; `ignored`, when
// given, receives their symbols.
double theoretical_oxygen_demand_per_mass(const ElementCounts& formula, std::string* ignored = nullptr);

}  // namespace unchain::units
