#pragma once
// Flash drum: brings a feed to a set temperature and pressure and
// separates the vapour from the liquid (solids leave with the liquid).
// Equations: docs/blocks-generic.md#flash-drum.

namespace unchain::units {

class BlockRegistry;

// Registers block type `flash`.
void register_flash_drum(BlockRegistry& registry);

}  // namespace unchain::units
