#pragma once
// Batch distillation (lab and pilot still): a charge boiled in a still
// under a column of theoretical stages with a total condenser, taken off
// as a sequence of cuts; what stays in the pot is the residue.
// Rayleigh balance over a quasi-steady column (units/column_stages.hpp).
// Equations, assumptions and ranges: docs/blocks-separation.md#batch-distillation.

namespace unchain::units {

class BlockRegistry;

// Registers block type `batch_distillation`.
void register_batch_distillation(BlockRegistry& registry);

}  // namespace unchain::units
