#include "costs/minimum_energy.hpp"

#include "flowsheet/diagnostics.hpp"
#include "flowsheet/pure_properties.hpp"

namespace unchain::costs {

MinimumEnergy minimum_energy_per_kg_monomer(const Component& polymer, const Component& monomer,
                                            Temperature reaction_temperature, Warnings* warnings) {
  if (polymer.formula != monomer.formula)
    throw ModelError("minimum energy: the repeat unit of '" + polymer.id + "' and the monomer '" + monomer.id +
                     "' differ in formula");
  const Temperature T0 = kelvin(reference_temperature_K);
  const double h_polymer = to_si(condensed_molar_enthalpy(polymer, T0, warnings));
  const double h_monomer_liquid_298 = to_si(condensed_molar_enthalpy(monomer, T0, warnings));
  const double h_monomer_vapour = to_si(vapour_molar_enthalpy(monomer, reaction_temperature, warnings));
  MinimumEnergy out;
  out.reaction_temperature_K = in_kelvin(reaction_temperature);
  out.per_kg_monomer_J = (h_monomer_vapour - h_polymer) / monomer.molar_mass;
  out.depolymerization_J_per_kg = (h_monomer_liquid_298 - h_polymer) / monomer.molar_mass;
  out.sensible_and_vaporization_J_per_kg = (h_monomer_vapour - h_monomer_liquid_298) / monomer.molar_mass;
  return out;
}

}  // namespace unchain::costs
