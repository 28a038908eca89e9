#pragma once
// The contract between the solver (flowsheet/) and the unit operations
// (units/). A block reads its parameters once, when the case is loaded;
// compute() then turns inlet streams into outlet streams and reports the
// physical resources it used. compute() is const and keeps no state, so one
// loaded case can be solved on many threads at once.

#include <map>
#include <memory>
#include <string>
#include <string_view>
#include <vector>

#include "flowsheet/component_library.hpp"
#include "flowsheet/diagnostics.hpp"
#include "flowsheet/quantity.hpp"
#include "flowsheet/stream.hpp"

namespace unchain {

class MappingReader;

enum class Basis {
  batch,       // amounts are kg per batch, energies J per batch
  continuous,  // amounts are kg per hour, energies J per hour
};
const char* basis_name(Basis basis);

// A named inlet or outlet role of a block ("feed", "vapour", "liquid").
struct PortSpec {
  std::string role;
  bool required = true;
  bool many = false;  // accepts a list of streams (a mixer's feeds)
  std::string description;
};

// Something a block consumed that is neither heat nor electricity.
struct MaterialUse {
  std::string name;      // "nitrogen purge", "sweep air", "wash water"
  std::string kind;      // inert_gas, air, process_water, inhibitor, solvent_makeup, ...
  double amount = 0.0;   // SI: kg, or m3 at the stated conditions
  std::string unit;      // "kg" or "m3"
};

// The size of an item of equipment, for the capital estimate.
struct EquipmentSize {
  std::string item;      // "dryer oven", "pyrolysis reactor"
  std::string kind;      // vessel, heater, condenser, grinder, column, dryer, pump, mixer
  std::string measure;   // "volume", "power", "area", "diameter", "stages", "throughput"
  double size = 0.0;     // SI
  std::string unit;      // SI unit text: "m3", "W", "m2", "m", "-", "kg/s"
};

// A named result of a block for reports: "air released", "charge per run".
struct BlockFigure {
  std::string key;       // snake_case, stable for JSON
  double value = 0.0;    // SI
  std::string unit;      // SI unit text
  std::string description;
};

struct BlockResources {
  // Net heat put into the process streams (negative when removed). The
  // block's energy balance is: sum H_out = sum H_in + process_heat_J +
  // work_to_streams_J.
  double process_heat_J = 0.0;
  double work_to_streams_J = 0.0;  // shaft work that ends in the streams
  double heat_drawn_J = 0.0;       // heat taken from the supply (with losses), >= 0
  double electricity_J = 0.0;      // electricity drawn, >= 0 (includes electric heating)
  double cooling_J = 0.0;          // heat rejected to cooling utility, >= 0
  double duration_s = 0.0;         // time the block takes per batch (0 for instantaneous)
  std::string heat_source = "electric";  // electric or fuel, for the heat drawn
  std::vector<MaterialUse> materials;
  std::vector<EquipmentSize> equipment;
  std::vector<BlockFigure> figures;
  std::vector<std::string> cautions;  // safety cautions that apply to this block

  void add_figure(std::string key, double value, std::string unit, std::string description);
  [[nodiscard]] const BlockFigure* figure(std::string_view key) const;
};

// What a block sees while computing.
struct BlockContext {
  const ComponentSet& components;
  Basis basis;
  const std::string& block_name;
  Temperature ambient_temperature;
  Warnings& warnings;
};

// Inlet and outlet streams by role. Outlets arrive as empty streams of the
// case's component set; the block fills them.
class BlockPorts {
 public:
  BlockPorts(std::map<std::string, std::vector<const Stream*>> inlets, std::map<std::string, std::vector<Stream*>> outlets);
  [[nodiscard]] const Stream& inlet(std::string_view role, std::size_t index = 0) const;
  [[nodiscard]] const std::vector<const Stream*>& inlets(std::string_view role) const;
  [[nodiscard]] bool has_inlet(std::string_view role) const;
  [[nodiscard]] Stream& outlet(std::string_view role, std::size_t index = 0) const;
  [[nodiscard]] const std::vector<Stream*>& outlets(std::string_view role) const;
  [[nodiscard]] bool has_outlet(std::string_view role) const;

 private:
  std::map<std::string, std::vector<const Stream*>, std::less<>> inlets_;
  std::map<std::string, std::vector<Stream*>, std::less<>> outlets_;
};

class BlockModel {
 public:
  virtual ~BlockModel() = default;
  [[nodiscard]] virtual std::vector<PortSpec> inlet_ports() const = 0;
  [[nodiscard]] virtual std::vector<PortSpec> outlet_ports() const = 0;
  // Throws ModelError for a request the physics refuses (a heater that
  // cannot reach its set-point); the solver adds the block's name.
  virtual void compute(const BlockContext& context, const BlockPorts& ports, BlockResources& resources) const = 0;
};

// What a block sees while reading its parameters.
struct BlockSetup {
  const ComponentSet& components;
  Basis basis;
  std::string block_name;
  std::string currency;
};

// Creates blocks by type name; implemented by units/ (block_registry).
class BlockCatalogue {
 public:
  virtual ~BlockCatalogue() = default;
  [[nodiscard]] virtual std::vector<std::string> type_names() const = 0;
  // Reads the block's parameters (reporting errors to the reader's
  // diagnostics, including unknown keys) and returns the model, or null
  // when the type is unknown.
  [[nodiscard]] virtual std::unique_ptr<BlockModel> create(const std::string& type, MappingReader& parameters,
                                                           const BlockSetup& setup) const = 0;
};

}  // namespace unchain
