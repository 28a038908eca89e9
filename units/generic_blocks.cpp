#include "units/block_registry.hpp"
#include "units/condenser.hpp"
#include "units/flash_drum.hpp"
#include "units/heater.hpp"
#include "units/mixer.hpp"
#include "units/registrations.hpp"
#include "units/splitter.hpp"

namespace unchain::units {

void register_generic_blocks(BlockRegistry& registry) {
  register_mixer(registry);
  register_splitter(registry);
  register_heater(registry);  // heater and cooler
  register_flash_drum(registry);
  register_condenser(registry);
}

}  // namespace unchain::units
