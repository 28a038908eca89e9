#pragma once
// Lower heating value of a stream from formation enthalpies: complete
// combustion of C to CO2(g) and H to H2O(g) at 298.15 K (N to N2, other
// elements ignored), LHV = -(sum products dHf - H_stream(298.15 K)).

#include "flowsheet/stream.hpp"

namespace unchain::costs {

// CODATA key values (Cox, Wagman & Medvedev, CODATA Key Values for
// Thermodynamics, 1989): dHf CO2(g) = -393.51 kJ/mol, H2O(g) = -241.826 kJ/mol.
inline constexpr double formation_enthalpy_co2_J_per_mol = -393.51e3;
inline constexpr double formation_enthalpy_water_vapour_J_per_mol = -241.826e3;

Energy lower_heating_value(const Stream& stream, Warnings* warnings = nullptr);

}  // namespace unchain::costs
