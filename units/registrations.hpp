#pragma once
// Registration of the built-in block types. Each block file pair provides
// a register_<block>() function; the group files below call them:
//   units/generic_blocks.cpp  - mixer, splitter, heater, cooler, flash, condenser
//   units/process_blocks.cpp  - size reduction, solvent densification, solvent recovery,
//                               pyrolysis, washing, distillation
// Adding a block: write units/<name>.{hpp,cpp} with register_<name>(BlockRegistry&)
// and call it from the group file it belongs to.

namespace unchain::units {

class BlockRegistry;

void register_generic_blocks(BlockRegistry& registry);
void register_process_blocks(BlockRegistry& registry);
void register_all_blocks(BlockRegistry& registry);

}  // namespace unchain::units
