#pragma once
// Hansen solubility parameters: the distance between a solvent and a
// polymer and the relative energy difference (Hansen, Hansen Solubility
// Parameters: A User's Handbook, 2nd ed., CRC Press 2007, ch. 1):
//   Ra^2 = 4 (dD1 - dD2)^2 + (dP1 - dP2)^2 + (dH1 - dH2)^2
//   RED  = Ra / R0
// with R0 the interaction radius of the polymer. RED < 1: the solvent lies
// inside the polymer's solubility sphere (good solvent); RED >= 1: poor, the
// polymer swells at most and dissolution is incomplete.

#include <optional>
#include <string>

#include "flowsheet/component.hpp"
#include "flowsheet/quantity.hpp"

namespace unchain::units {

SqrtPressure hansen_distance(const HansenParameters& a, const HansenParameters& b);

struct SolventQuality {
  double distance_MPa_half = 0.0;  // Ra, MPa^0.5 (as tabulated)
  double interaction_radius_MPa_half = 0.0;  // R0
  double relative_energy_difference = 0.0;   // RED = Ra / R0
  [[nodiscard]] bool is_good() const { return relative_energy_difference < 1.0; }
};

// The solvent quality of `solvent` for `polymer`; empty when either lacks
// Hansen parameters or the polymer has no interaction radius (the reason
// is then put in `why_not`, when given).
std::optional<SolventQuality> solvent_quality(const Component& polymer, const Component& solvent,
                                              std::string* why_not = nullptr);

}  // namespace unchain::units
