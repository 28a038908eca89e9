#include "units/block_registry.hpp"
#include "units/registrations.hpp"

namespace unchain::units {

void register_generic_blocks(BlockRegistry& registry) { (void)registry; }

}  // namespace unchain::units
