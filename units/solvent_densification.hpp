#pragma once
// Solvent densification: dissolving (or swelling) foam in a solvent, which
// releases the air held in the foam and leaves a gel of a small fraction of
// the foam's volume.
// Equations, assumptions and sources: docs/blocks-densification.md#solvent-densification.

#include "flowsheet/quantity.hpp"

namespace unchain::units {

class BlockRegistry;

// Registers block type `solvent_densification`.
void register_solvent_densification(BlockRegistry& registry);

// The volumes of a foam charge: foam = m / rho_bulk, polymer = m / rho_solid,
// air = foam - polymer (zero when the bulk density is not below the solid
// density).
struct FoamVolumes {
  Volume foam = from_si<Volume>(0.0);
  Volume polymer = from_si<Volume>(0.0);
  Volume air = from_si<Volume>(0.0);
};
FoamVolumes foam_volumes(Mass polymer, Density bulk_density, Density solid_density);

}  // namespace unchain::units
