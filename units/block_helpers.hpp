#pragma once
// Helpers shared by the block files: reading the parameters many blocks
// have in common (a component id, the outlet pressure, the heat supply, an
// amount or duty per basis), standard port lists, booking a heat duty in
// BlockResources, and setting the state of an outlet stream.
//
// Reading helpers report problems to the reader's diagnostics and return
// an empty optional (or a default) so that a factory can go on and report
// every mistake of the block in one run.

#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include <yaml-cpp/yaml.h>

#include "flowsheet/block_model.hpp"
#include "flowsheet/component_library.hpp"
#include "flowsheet/quantity.hpp"
#include "flowsheet/stream.hpp"
#include "flowsheet/yaml_reader.hpp"

namespace unchain::units {

// ---- ports -----------------------------------------------------------------

PortSpec single_port(std::string role, std::string description);
PortSpec optional_port(std::string role, std::string description);
PortSpec list_port(std::string role, std::string description);

// ---- components --------------------------------------------------------------

// Reads a component id at `key` and checks that the case uses it; an
// unknown id is reported with the closest id of the set. Empty when the
// key is absent (and reported as missing when `required`).
std::optional<std::size_t> read_component(MappingReader& parameters, std::string_view key,
                                          const ComponentSet& components, bool required = true);
// Reads a list of component ids (each checked as above).
std::vector<std::size_t> read_component_list(MappingReader& parameters, std::string_view key,
                                             const ComponentSet& components, bool required = true);

// ---- pressure -------------------------------------------------------------------

// The outlet pressure of a block: given outright, or the inlet pressure
// less a drop, or (neither given) the inlet pressure.
struct OutletPressure {
  std::optional<Pressure> outlet;
  std::optional<Pressure> drop;
  // Throws ModelError when the drop leaves no positive pressure.
  [[nodiscard]] Pressure at_outlet(Pressure inlet) const;
};
// Reads `outlet_pressure` or `pressure_drop` (not both; both optional).
OutletPressure read_outlet_pressure(MappingReader& parameters);

// ---- heat supply and duties -------------------------------------------------------

enum class HeatSource { electric, fuel };
const char* heat_source_name(HeatSource source);

struct HeatSupply {
  HeatSource source = HeatSource::electric;
  double efficiency = 1.0;  // heat into the process / heat drawn, in (0, 1]; excludes burner stack losses
};
// Reads `heat_source` (electric or fuel, default electric) and
// `heater_efficiency` (default 1.0, the value for electric heating).
HeatSupply read_heat_supply(MappingReader& parameters);

// Adds a heat duty to the resources: the net heat into the streams always;
// a positive duty is drawn from the supply (divided by its efficiency, as
// electricity for an electric supply); a negative one goes to cooling.
void book_heat_duty(BlockResources& resources, Energy process_heat, const HeatSupply& supply);

// ---- per-basis amounts -----------------------------------------------------------

// The time one basis stands for: one hour on a continuous basis; none for
// a batch (a batch duty becomes a rate only through a duration).
std::optional<Time> basis_period(Basis basis);

// An energy per basis at `key`: J per batch, or J per hour on a continuous
// basis, where a power such as "12 kW" is accepted too.
std::optional<Energy> read_energy_per_basis(MappingReader& parameters, std::string_view key, Basis basis);
// A mass per basis in a YAML node (a list entry): kg per batch, or kg per
// hour on a continuous basis, where a mass flow such as "5 kg/h" is
// accepted too. `key_path` names the node in messages.
std::optional<Mass> read_mass_per_basis(const YAML::Node& node, const MappingReader& parameters,
                                        const std::string& key_path, Basis basis);

// Reads an optional positive `duration` (the time a batch block takes).
std::optional<Time> read_duration(MappingReader& parameters);
// The rate of a duty: per hour on a continuous basis, per duration for a
// batch when a duration is known; empty otherwise.
std::optional<Power> duty_rate(Energy duty, Basis basis, std::optional<Time> duration);

// ---- streams -------------------------------------------------------------------------

void set_state(Stream& stream, Temperature T, Pressure P);
// An empty stream of the feed's component set at T and P.
Stream empty_like(const Stream& feed, Temperature T, Pressure P);
// Relative tolerance for deciding that a duty computed from enthalpy
// differences is zero (enthalpies are relative to the elements and large).
bool is_negligible_duty(Energy duty, Energy enthalpy_in, Energy enthalpy_out);

// Components present in the vapour of a stream that have flammability
// data (limits or a flash point), with their mole fraction in the vapour.
struct FlammableVapour {
  std::string id;
  double mole_fraction = 0.0;
  std::optional<double> lower_limit;  // volume fraction in air
};
std::vector<FlammableVapour> flammable_vapours(const Stream& stream);
// Caution text for a vapour stream carrying flammable vapour, or empty.
std::string flammable_vapour_caution(const std::string& where, const std::vector<FlammableVapour>& vapours);

// ---- text ---------------------------------------------------------------------------------

std::string format_celsius(Temperature T);  // "80.0 degC"
std::string format_number(double value, int significant = 6);

}  // namespace unchain::units
