#pragma once
// Splitter: divides one feed into several products of the feed's
// composition, phase split, temperature and pressure, by fractions or by
// fixed amounts. Equations: docs/blocks-generic.md#splitter.

namespace unchain::units {

class BlockRegistry;

// Registers block type `splitter`.
void register_splitter(BlockRegistry& registry);

}  // namespace unchain::units
