#pragma once
// The thermodynamic minimum energy per kilogram of monomer: heat the
// polymer from 298.15 K to the reaction temperature, depolymerize it
// completely to monomer, and leave the monomer as vapour at that
// temperature; no losses and no heat recovery:
//   q_min = [H_vapour(monomer, T_r) - H_condensed(polymer, 298.15 K)] / M_monomer
// per repeat unit (the repeat unit and the monomer have the same formula).
// Because enthalpies are relative to the elements, this equals
//   -dH_polymerization + sensible heat of the liquid + vaporization, by any path.

#include "flowsheet/component_library.hpp"
#include "flowsheet/quantity.hpp"

namespace unchain::costs {

struct MinimumEnergy {
  double per_kg_monomer_J = 0.0;
  double depolymerization_J_per_kg = 0.0;  // -dHp at 298.15 K (liquid monomer)
  double sensible_and_vaporization_J_per_kg = 0.0;
  double reaction_temperature_K = 0.0;
};

// Throws ModelError when the polymer's monomer differs in formula.
MinimumEnergy minimum_energy_per_kg_monomer(const Component& polymer, const Component& monomer,
                                            Temperature reaction_temperature, Warnings* warnings = nullptr);

}  // namespace unchain::costs
