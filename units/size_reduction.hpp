#pragma once
// Size reduction: grinding or shredding foam into a denser regrind.
// The electricity is the specific comminution energy times the mass ground,
// divided by the drive efficiency; all of it ends as heat in the
// surroundings, so the streams leave at the inlet temperature. A fines
// fraction of the solids is lost as dust.
// Equations, ranges and sources: docs/blocks-densification.md#size-reduction.

namespace unchain::units {

class BlockRegistry;

// Registers block type `size_reduction`.
void register_size_reduction(BlockRegistry& registry);

}  // namespace unchain::units
