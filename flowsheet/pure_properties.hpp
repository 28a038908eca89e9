#pragma once
// Pure-component properties from the correlations in the data file.
//
// Every function takes a Warnings sink (may be null) and reports a
// correlation used outside its validity range once per component and
// property. Enthalpies are relative to the elements in their standard
// states at 298.15 K, so reaction heats follow from formation enthalpies.
// See docs/thermodynamics.md for the equations and their sources.

#include "flowsheet/component.hpp"
#include "flowsheet/quantity.hpp"

namespace unchain {

class Warnings;

// Saturation (vapour) pressure by the component's Antoine correlation.
// Throws ModelError when the component has no vapour-pressure data.
Pressure vapour_pressure(const Component& c, Temperature T, Warnings* warnings = nullptr);
// Saturation temperature at a pressure: the exact inverse of the Antoine form.
Temperature saturation_temperature(const Component& c, Pressure P, Warnings* warnings = nullptr);

MolarHeatCapacity liquid_heat_capacity(const Component& c, Temperature T, Warnings* warnings = nullptr);
MolarHeatCapacity ideal_gas_heat_capacity(const Component& c, Temperature T, Warnings* warnings = nullptr);
// Condensed-phase heat capacity of polymers and solids (glass below Tg,
// melt above).
MolarHeatCapacity solid_heat_capacity(const Component& c, Temperature T, Warnings* warnings = nullptr);

// Enthalpy of vaporization by Watson scaling from the normal boiling point:
//   dHv(T) = dHv(Tb) * ((Tc - T) / (Tc - Tb))^n ; zero at and above Tc.
MolarEnergy enthalpy_of_vaporization(const Component& c, Temperature T, Warnings* warnings = nullptr);

Density liquid_density(const Component& c, Temperature T, Warnings* warnings = nullptr);
// The density of the condensed component as it sits in a stream: liquid
// density for volatiles, solid density for polymers and solids.
Density condensed_density(const Component& c, Temperature T, Warnings* warnings = nullptr);

// Molar enthalpy of the component as an ideal gas at T:
//   H = dHf_ig(298.15) + integral cp_ig dT
MolarEnergy vapour_molar_enthalpy(const Component& c, Temperature T, Warnings* warnings = nullptr);
// Molar enthalpy in a condensed phase (liquid, dissolved, or solid) at T.
//   volatiles: dHf_ig - dHv(298.15) + integral cp_L dT
//   polymers and solids: dHf_condensed + integral cp_s dT (glass, then melt)
//   permanent gases: their ideal-gas enthalpy (dissolved gas, no latent heat)
MolarEnergy condensed_molar_enthalpy(const Component& c, Temperature T, Warnings* warnings = nullptr);

}  // namespace unchain
