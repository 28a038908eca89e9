#pragma once
// Condenser: cools a vapour against cooling water, so that the condensable
// part condenses and the non-condensed gas leaves by the vent. Reports the
// vent losses, the cooling water needed and the heat-transfer area.
// Equations: docs/blocks-generic.md#condenser.

namespace unchain::units {

class BlockRegistry;

// Registers block type `condenser`.
void register_condenser(BlockRegistry& registry);

}  // namespace unchain::units
