#pragma once
// Heater and cooler: change a stream's temperature to a set-point or by a
// given duty, with an optional pressure change, finding the phases by a
// flash. Equations: docs/blocks-generic.md#heater-and-cooler.

namespace unchain::units {

class BlockRegistry;

// Registers block types `heater` and `cooler`.
void register_heater(BlockRegistry& registry);

}  // namespace unchain::units
