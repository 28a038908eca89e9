#include "units/registrations.hpp"

#include "units/block_registry.hpp"

namespace unchain::units {

void register_all_blocks(BlockRegistry& registry) { (void)registry; }

}  // namespace unchain::units
