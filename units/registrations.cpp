#include "units/registrations.hpp"

#include "units/block_registry.hpp"

namespace unchain::units {

void register_all_blocks(BlockRegistry& registry) {
  register_generic_blocks(registry);
  register_process_blocks(registry);
}

}  // namespace unchain::units
