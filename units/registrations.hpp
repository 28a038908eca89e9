#pragma once
// One registration function per block file; register_all_blocks calls each.
// Adding a block: write units/<name>.{hpp,cpp} with register_<name>(), declare
// it here and call it in registrations.cpp.

namespace unchain::units {

class BlockRegistry;

void register_all_blocks(BlockRegistry& registry);

}  // namespace unchain::units
