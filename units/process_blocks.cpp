#include "units/block_registry.hpp"
#include "units/registrations.hpp"
#include "units/batch_distillation.hpp"
#include "units/pyrolysis.hpp"
#include "units/shortcut_distillation.hpp"
#include "units/washing.hpp"
#include "units/size_reduction.hpp"
#include "units/solvent_densification.hpp"
#include "units/solvent_recovery.hpp"

namespace unchain::units {

void register_process_blocks(BlockRegistry& registry) {
  register_size_reduction(registry);
  register_solvent_densification(registry);
  register_solvent_recovery(registry);
  register_pyrolysis(registry);
  register_washing(registry);
  register_batch_distillation(registry);
  register_continuous_distillation(registry);
}

}  // namespace unchain::units
