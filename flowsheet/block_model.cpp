#include "flowsheet/block_model.hpp"

namespace unchain {

const char* basis_name(Basis basis) { return basis == Basis::batch ? "batch" : "continuous"; }

void BlockResources::add_figure(std::string key, double value, std::string unit, std::string description) {
  figures.push_back({std::move(key), value, std::move(unit), std::move(description)});
}

const BlockFigure* BlockResources::figure(std::string_view key) const {
  for (const auto& f : figures)
    if (f.key == key) return &f;
  return nullptr;
}

BlockPorts::BlockPorts(std::map<std::string, std::vector<const Stream*>> inlets,
                       std::map<std::string, std::vector<Stream*>> outlets)
    : inlets_(inlets.begin(), inlets.end()), outlets_(outlets.begin(), outlets.end()) {}

namespace {
template <class Map>
const auto& find_role(const Map& map, std::string_view role, const char* what) {
  auto it = map.find(role);
  if (it == map.end() || it->second.empty())
    throw ModelError(std::string("no ") + what + " stream connected as '" + std::string(role) + "'");
  return it->second;
}
}  // namespace

const Stream& BlockPorts::inlet(std::string_view role, std::size_t index) const {
  const auto& list = find_role(inlets_, role, "inlet");
  if (index >= list.size()) throw ModelError("inlet '" + std::string(role) + "' has no stream " + std::to_string(index));
  return *list[index];
}

const std::vector<const Stream*>& BlockPorts::inlets(std::string_view role) const {
  static const std::vector<const Stream*> none;
  auto it = inlets_.find(role);
  return it == inlets_.end() ? none : it->second;
}

bool BlockPorts::has_inlet(std::string_view role) const {
  auto it = inlets_.find(role);
  return it != inlets_.end() && !it->second.empty();
}

Stream& BlockPorts::outlet(std::string_view role, std::size_t index) const {
  const auto& list = find_role(outlets_, role, "outlet");
  if (index >= list.size()) throw ModelError("outlet '" + std::string(role) + "' has no stream " + std::to_string(index));
  return *list[index];
}

const std::vector<Stream*>& BlockPorts::outlets(std::string_view role) const {
  static const std::vector<Stream*> none;
  auto it = outlets_.find(role);
  return it == outlets_.end() ? none : it->second;
}

bool BlockPorts::has_outlet(std::string_view role) const {
  auto it = outlets_.find(role);
  return it != outlets_.end() && !it->second.empty();
}

}  // namespace unchain
