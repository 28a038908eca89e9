#pragma once
// Heating a batch vessel: heat-up time, time at set-point and the energy
// drawn, with the heat lost through the vessel wall. Shared by every block
// that heats a charge and holds it (dryer, pyrolysis reactor, still).
//
// Lumped model: charge and vessel at one uniform temperature T, heater at
// full power P until the set-point, loss conductance UA to ambient T_a:
//   C dT/dt = P - UA (T - T_a),  C = m cp (charge) + m_v cp_v (vessel)
//   T(t) = T_a + P/UA + (T_0 - T_a - P/UA) exp(-UA t / C)
//   t_heat-up = (C/UA) ln((P/UA - (T_0 - T_a)) / (P/UA - (T_set - T_a)))
// At the set-point the thermostat holds T_set; the heater then covers the
// steady loss UA (T_set - T_a) and any process heat Q (vaporization) with
// what is left of P, so the time at set-point is
//   t_set = max(hold, Q / (P - UA (T_set - T_a))).
// See docs/blocks-densification.md for sources and ranges.

#include <optional>
#include <string>
#include <string_view>

#include "flowsheet/quantity.hpp"

namespace unchain {
class MappingReader;
}

namespace unchain::units {

// Heat capacity of a body (J/K).
using HeatCapacity = decltype(Energy{} / TemperatureDifference{});

enum class VesselMaterial { glass, steel, stainless, aluminium };

struct VesselMaterialData {
  std::string_view name;
  double specific_heat_J_per_kg_K = 0.0;
  std::string_view source;
};
const VesselMaterialData& vessel_material_data(VesselMaterial material);
std::optional<VesselMaterial> parse_vessel_material(std::string_view text);

// How the outer wall is dressed; each has a default loss coefficient U
// (outer surface to ambient) documented with its basis.
enum class Insulation { bare_glass, foil_wrap, mineral_wool, given_coefficient };
std::optional<Insulation> parse_insulation(std::string_view text);

// Mineral wool: conductivity and the outer film used with it.
inline constexpr double mineral_wool_conductivity_W_per_m_K = 0.04;
inline constexpr double insulated_outer_film_W_per_m2_K = 8.0;
inline constexpr double default_mineral_wool_thickness_m = 0.05;

// U for a dressing; thickness only for mineral wool.
HeatTransferCoefficient insulation_loss_coefficient(Insulation insulation, Length mineral_wool_thickness);
// One line on where the value of U comes from, for reports.
std::string insulation_basis(Insulation insulation);

// Outer area of a closed cylinder with height = 1.5 diameter holding V:
//   V = (pi/4) D^2 (1.5 D)  ->  D = (V / (0.375 pi))^(1/3),
//   A = pi D (1.5 D) + 2 (pi/4) D^2 = 2 pi D^2.
Area cylinder_outer_area(Volume volume);

// The vessel as read from a block's parameters.
struct VesselDesign {
  Power heater_power = from_si<Power>(0.0);
  std::optional<Volume> volume;                // when the area came from it
  Area outer_area = from_si<Area>(0.0);
  HeatCapacity vessel_heat_capacity = from_si<HeatCapacity>(0.0);
  Insulation insulation = Insulation::bare_glass;
  HeatTransferCoefficient loss_coefficient = from_si<HeatTransferCoefficient>(0.0);

  [[nodiscard]] ThermalConductance loss_conductance() const { return loss_coefficient * outer_area; }
};

// Reads, from a block mapping:
//   heater_power                   required, > 0
//   vessel_volume | outer_area     exactly one (area of a 1.5 D tall cylinder)
//   vessel_heat_capacity | vessel_mass [+ vessel_material, default glass]
//   insulation                     bare_glass (default) | foil_wrap | mineral_wool
//   insulation_thickness           mineral wool only, default 50 mm
//   heat_loss_coefficient          U given outright (instead of insulation)
// Problems go to the reader's diagnostics; the returned design then holds
// zeros where values were wrong. A block whose own size stands for the
// vessel (a reactor's volume) passes it as volume_when_not_given: used when
// neither vessel_volume nor outer_area is written.
VesselDesign read_vessel_design(MappingReader& parameters,
                                std::optional<Volume> volume_when_not_given = std::nullopt);

// What is heated and how long it is held.
struct VesselCharge {
  HeatCapacity charge_heat_capacity = from_si<HeatCapacity>(0.0);  // m cp of the charge, >= 0
  Temperature start = kelvin(293.15);
  Temperature set_point = kelvin(293.15);
  Temperature ambient = kelvin(293.15);
  Time hold_time = seconds(0.0);                   // minimum time at set-point
  Energy process_heat_at_set_point = joules(0.0);  // e.g. vaporization, >= 0
};

struct VesselHeatingResult {
  Time heat_up_time = seconds(0.0);
  Time hold_time = seconds(0.0);       // time at set-point actually needed
  Energy energy_drawn = joules(0.0);   // P t_heat-up + loss t_set + Q
  Energy energy_to_charge = joules(0.0);   // C_charge (T_set - T_0)
  Energy energy_to_vessel = joules(0.0);   // C_vessel (T_set - T_0)
  Energy energy_to_process = joules(0.0);  // Q at set-point
  Energy energy_lost = joules(0.0);        // through the wall, heat-up and hold
  Power loss_at_set_point = from_si<Power>(0.0);
  Temperature max_reachable_temperature = kelvin(0.0);  // T_a + P/UA
  ThermalConductance loss_conductance = from_si<ThermalConductance>(0.0);
  Area outer_area = from_si<Area>(0.0);

  [[nodiscard]] Time total_time() const { return heat_up_time + hold_time; }
};

// The closed-form heat-up time; throws ModelError when P <= UA (T_set - T_a)
// (the heater cannot reach the set-point), naming the set-point, the
// highest reachable temperature and the power needed. Zero when T_0 >= T_set.
Time lumped_heat_up_time(HeatCapacity total_heat_capacity, Power heater_power, ThermalConductance loss_conductance,
                         Temperature start, Temperature set_point, Temperature ambient);
// Temperature after heating for t at full power (the exponential above).
Temperature lumped_temperature_at(HeatCapacity total_heat_capacity, Power heater_power,
                                  ThermalConductance loss_conductance, Temperature start, Temperature ambient, Time t);

// Batch: heat-up, then the time at set-point.
VesselHeatingResult heat_vessel(const VesselDesign& design, const VesselCharge& charge);

// Continuous operation: the vessel stays at its set-point; per hour the
// heater covers the heat into the streams and the steady wall loss.
// Throws ModelError when the heater power cannot cover both.
struct SteadyHeatingResult {
  Power heat_to_streams = from_si<Power>(0.0);
  Power loss = from_si<Power>(0.0);
  Power power_drawn = from_si<Power>(0.0);
  Temperature max_reachable_temperature = kelvin(0.0);
  ThermalConductance loss_conductance = from_si<ThermalConductance>(0.0);
  Area outer_area = from_si<Area>(0.0);
};
SteadyHeatingResult heat_vessel_steadily(const VesselDesign& design, Power heat_to_streams, Temperature set_point,
                                         Temperature ambient);

}  // namespace unchain::units
