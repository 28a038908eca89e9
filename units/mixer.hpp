#pragma once
// Mixer: joins any number of feeds into one product, adiabatically.
// Equations and assumptions: docs/blocks-generic.md#mixer.

namespace unchain::units {

class BlockRegistry;

// Registers block type `mixer`.
void register_mixer(BlockRegistry& registry);

}  // namespace unchain::units
