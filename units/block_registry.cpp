#include "units/block_registry.hpp"

#include <stdexcept>

#include "units/registrations.hpp"

namespace unchain::units {

void BlockRegistry::add(BlockTypeInfo info) {
  const std::string name = info.name;
  if (!types_.emplace(name, std::move(info)).second)
    throw std::logic_error("block type '" + name + "' registered twice");
}

const BlockTypeInfo* BlockRegistry::find(const std::string& name) const {
  auto it = types_.find(name);
  return it == types_.end() ? nullptr : &it->second;
}

std::vector<std::string> BlockRegistry::type_names() const {
  std::vector<std::string> names;
  for (const auto& [name, info] : types_) names.push_back(name);
  return names;
}

std::unique_ptr<BlockModel> BlockRegistry::create(const std::string& type, MappingReader& parameters,
                                                  const BlockSetup& setup) const {
  const BlockTypeInfo* info = find(type);
  if (info == nullptr) return nullptr;
  return info->create(parameters, setup);
}

const BlockRegistry& builtin_blocks() {
  static const BlockRegistry registry = [] {
    BlockRegistry r;
    register_all_blocks(r);
    return r;
  }();
  return registry;
}

}  // namespace unchain::units
