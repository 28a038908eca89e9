#include "units/vessel_heating.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <numbers>
#include <sstream>

#include "flowsheet/diagnostics.hpp"
#include "flowsheet/yaml_reader.hpp"

namespace unchain::units {

namespace {

std::string format_value(double value, int significant = 4) {
  std::ostringstream out;
  out.precision(significant);
  out << value;
  return out.str();
}

std::string format_celsius(double T_K) {
  std::ostringstream out;
  out.setf(std::ios::fixed);
  out.precision(1);
  out << T_K - 273.15 << " degC";
  return out.str();
}

std::string key_path(const MappingReader& parameters, std::string_view key) {
  return parameters.path().empty() ? std::string(key) : parameters.path() + "." + std::string(key);
}

// Reads an optional quantity that must be positive.
template <class Q>
std::optional<Q> positive(MappingReader& parameters, std::string_view key) {
  auto q = parameters.optional_quantity<Q>(key);
  if (q && !(to_si(*q) > 0.0)) {
    parameters.error(key, "'" + key_path(parameters, key) + "' must be positive (found " + format_value(to_si(*q)) +
                              " in SI units)");
    return std::nullopt;
  }
  return q;
}

}  // namespace

const VesselMaterialData& vessel_material_data(VesselMaterial material) {
  // Specific heats near room temperature. They rise by some 10-15 % up to
  // 200-300 degC; the lumped model uses one value.
  static const std::array<VesselMaterialData, 4> table{{
      {"glass", 835.0, "borosilicate glass (Pyrex), Incropera and DeWitt, Fundamentals of Heat and Mass Transfer, "
                       "Table A.3, 300 K (from memory)"},
      {"steel", 434.0, "plain carbon steel, Incropera and DeWitt, Fundamentals of Heat and Mass Transfer, Table A.1, "
                       "300 K (from memory)"},
      {"stainless", 477.0, "stainless steel AISI 304, Incropera and DeWitt, Fundamentals of Heat and Mass Transfer, "
                           "Table A.1, 300 K (from memory)"},
      {"aluminium", 903.0, "pure aluminium, Incropera and DeWitt, Fundamentals of Heat and Mass Transfer, Table A.1, "
                           "300 K (from memory)"},
  }};
  return table[static_cast<std::size_t>(material)];
}

std::optional<VesselMaterial> parse_vessel_material(std::string_view text) {
  if (text == "glass") return VesselMaterial::glass;
  if (text == "steel") return VesselMaterial::steel;
  if (text == "stainless") return VesselMaterial::stainless;
  if (text == "aluminium") return VesselMaterial::aluminium;
  return std::nullopt;
}

std::optional<Insulation> parse_insulation(std::string_view text) {
  if (text == "bare_glass") return Insulation::bare_glass;
  if (text == "foil_wrap") return Insulation::foil_wrap;
  if (text == "mineral_wool") return Insulation::mineral_wool;
  return std::nullopt;
}

HeatTransferCoefficient insulation_loss_coefficient(Insulation insulation, Length mineral_wool_thickness) {
  switch (insulation) {
    case Insulation::bare_glass:
      // Natural convection 5-7 W/(m2 K) plus linearised radiation
      // 4 eps sigma T^3 = 6-9 W/(m2 K) (eps ~ 0.9) at 80-200 degC.
      return from_si<HeatTransferCoefficient>(12.0);
    case Insulation::foil_wrap:
      // Bright aluminium foil (eps ~ 0.05-0.1) removes most of the
      // radiation; natural convection remains.
      return from_si<HeatTransferCoefficient>(7.0);
    case Insulation::mineral_wool: {
      // Conduction through the wool in series with the outer film; the
      // inner film and the wall are small resistances and are left out.
      const double t = to_si(mineral_wool_thickness);
      return from_si<HeatTransferCoefficient>(
          1.0 / (t / mineral_wool_conductivity_W_per_m_K + 1.0 / insulated_outer_film_W_per_m2_K));
    }
    case Insulation::given_coefficient:
      break;
  }
  return from_si<HeatTransferCoefficient>(0.0);
}

std::string insulation_basis(Insulation insulation) {
  switch (insulation) {
    case Insulation::bare_glass:
      return "bare hot glass: natural convection plus radiation, about 10-15 W/(m2 K) (common practice; "
             "Incropera and DeWitt, Fundamentals of Heat and Mass Transfer, ch. 9 and 12)";
    case Insulation::foil_wrap:
      return "aluminium foil wrap: natural convection with little radiation, about 7 W/(m2 K) (common practice)";
    case Insulation::mineral_wool:
      return "mineral wool, k = 0.04 W/(m K) (manufacturers' data, from memory), over its thickness in series with "
             "an outer film of 8 W/(m2 K)";
    case Insulation::given_coefficient:
      return "heat-loss coefficient given in the case";
  }
  return {};
}

Area cylinder_outer_area(Volume volume) {
  const double D = std::cbrt(to_si(volume) / (0.375 * std::numbers::pi));
  return from_si<Area>(2.0 * std::numbers::pi * D * D);
}

VesselDesign read_vessel_design(MappingReader& parameters, std::optional<Volume> volume_when_not_given) {
  VesselDesign design;
  if (!parameters.has("heater_power")) {
    parameters.accept("heater_power");
    parameters.error({}, "missing required key '" + key_path(parameters, "heater_power") +
                             "' (expected power (W), the heater's rating, such as \"1.5 kW\")");
  } else if (auto p = positive<Power>(parameters, "heater_power")) {
    design.heater_power = *p;
  }

  auto volume = positive<Volume>(parameters, "vessel_volume");
  const auto area = positive<Area>(parameters, "outer_area");
  const bool has_volume = parameters.has("vessel_volume");
  const bool has_area = parameters.has("outer_area");
  if (!has_volume && !has_area && volume_when_not_given) {
    volume = volume_when_not_given;
  } else if (has_volume && has_area) {
    parameters.error("outer_area", "give either '" + key_path(parameters, "vessel_volume") + "' or '" +
                                       key_path(parameters, "outer_area") + "', not both");
  } else if (!has_volume && !has_area) {
    parameters.error({}, "missing '" + key_path(parameters, "vessel_volume") + "' or '" +
                             key_path(parameters, "outer_area") +
                             "' (expected the vessel's volume such as \"20 L\" or its outer area such as \"0.4 m2\")");
  }
  if (volume) {
    design.volume = *volume;
    design.outer_area = cylinder_outer_area(*volume);
  }
  if (area) design.outer_area = *area;

  const auto given_capacity = parameters.optional_quantity<HeatCapacity>("vessel_heat_capacity");
  const auto vessel_mass = parameters.optional_quantity<Mass>("vessel_mass");
  const auto material_text = parameters.optional_text("vessel_material");
  if (given_capacity && vessel_mass) {
    parameters.error("vessel_mass", "give either '" + key_path(parameters, "vessel_heat_capacity") + "' or '" +
                                        key_path(parameters, "vessel_mass") + "', not both");
  } else if (!parameters.has("vessel_heat_capacity") && !parameters.has("vessel_mass")) {
    parameters.error({}, "missing '" + key_path(parameters, "vessel_mass") + "' or '" +
                             key_path(parameters, "vessel_heat_capacity") +
                             "' (expected the vessel's mass such as \"4 kg\", with vessel_material, or its heat "
                             "capacity such as \"3.3 kJ/K\")");
  }
  if (given_capacity) {
    if (to_si(*given_capacity) < 0.0)
      parameters.error("vessel_heat_capacity", "'" + key_path(parameters, "vessel_heat_capacity") + "' must not be negative");
    else
      design.vessel_heat_capacity = *given_capacity;
    if (material_text)
      parameters.error("vessel_material", "'" + key_path(parameters, "vessel_material") +
                                              "' goes with vessel_mass, not with vessel_heat_capacity");
  }
  VesselMaterial material = VesselMaterial::glass;
  if (material_text) {
    if (auto m = parse_vessel_material(*material_text)) {
      material = *m;
    } else {
      const std::string suggestion = closest_match(*material_text, {"glass", "steel", "stainless", "aluminium"});
      parameters.error("vessel_material", "'" + key_path(parameters, "vessel_material") +
                                              "': unknown material (expected glass, steel, stainless or aluminium, "
                                              "found \"" + *material_text + "\"" +
                                              (suggestion.empty() ? "" : "; did you mean '" + suggestion + "'?") + ")");
    }
  }
  if (vessel_mass) {
    if (to_si(*vessel_mass) < 0.0)
      parameters.error("vessel_mass", "'" + key_path(parameters, "vessel_mass") + "' must not be negative");
    else
      design.vessel_heat_capacity =
          from_si<HeatCapacity>(to_si(*vessel_mass) * vessel_material_data(material).specific_heat_J_per_kg_K);
  }

  const auto insulation_text = parameters.optional_text("insulation");
  const auto thickness = positive<Length>(parameters, "insulation_thickness");
  const auto given_u = positive<HeatTransferCoefficient>(parameters, "heat_loss_coefficient");
  if (insulation_text && parameters.has("heat_loss_coefficient"))
    parameters.error("heat_loss_coefficient", "give either '" + key_path(parameters, "insulation") + "' or '" +
                                                  key_path(parameters, "heat_loss_coefficient") + "', not both");
  if (insulation_text) {
    if (auto i = parse_insulation(*insulation_text)) {
      design.insulation = *i;
    } else {
      const std::string suggestion = closest_match(*insulation_text, {"bare_glass", "foil_wrap", "mineral_wool"});
      parameters.error("insulation", "'" + key_path(parameters, "insulation") +
                                         "': unknown insulation (expected bare_glass, foil_wrap or mineral_wool, "
                                         "found \"" + *insulation_text + "\"" +
                                         (suggestion.empty() ? "" : "; did you mean '" + suggestion + "'?") + ")");
    }
  }
  if (parameters.has("insulation_thickness") && design.insulation != Insulation::mineral_wool)
    parameters.error("insulation_thickness", "'" + key_path(parameters, "insulation_thickness") +
                                                 "' applies only to insulation: mineral_wool");
  if (parameters.has("heat_loss_coefficient")) {
    design.insulation = Insulation::given_coefficient;
    if (given_u) design.loss_coefficient = *given_u;
  } else {
    design.loss_coefficient = insulation_loss_coefficient(
        design.insulation, thickness.value_or(from_si<Length>(default_mineral_wool_thickness_m)));
  }
  return design;
}

Time lumped_heat_up_time(HeatCapacity total_heat_capacity, Power heater_power, ThermalConductance loss_conductance,
                         Temperature start, Temperature set_point, Temperature ambient) {
  const double C = to_si(total_heat_capacity);
  const double P = to_si(heater_power);
  const double UA = to_si(loss_conductance);
  const double theta0 = in_kelvin(start) - in_kelvin(ambient);
  const double theta_set = in_kelvin(set_point) - in_kelvin(ambient);
  if (in_kelvin(start) >= in_kelvin(set_point)) return seconds(0.0);
  const double loss_at_set_point = UA * theta_set;
  if (P <= loss_at_set_point) {
    throw ModelError("the heater cannot reach its set-point of " + format_celsius(in_kelvin(set_point)) + ": with " +
                     format_value(P) + " W against a heat loss of " + format_value(UA) +
                     " W/K the charge levels off at " + format_celsius(in_kelvin(ambient) + P / UA) +
                     " (ambient + P/UA); more than " + format_value(loss_at_set_point) +
                     " W is needed to hold the set-point (fit a larger heater or insulate the vessel)");
  }
  if (UA <= 0.0) return seconds(C * (theta_set - theta0) / P);
  // ln((P/UA - theta0) / (P/UA - theta_set)) written with log1p so that a
  // small loss (UA -> 0) tends to C dT / P without cancellation.
  const double x = UA / P;
  return seconds(C / UA * (std::log1p(-x * theta0) - std::log1p(-x * theta_set)));
}

Temperature lumped_temperature_at(HeatCapacity total_heat_capacity, Power heater_power,
                                  ThermalConductance loss_conductance, Temperature start, Temperature ambient, Time t) {
  const double C = to_si(total_heat_capacity);
  const double P = to_si(heater_power);
  const double UA = to_si(loss_conductance);
  const double Ta = in_kelvin(ambient);
  const double T0 = in_kelvin(start);
  if (UA <= 0.0 || C <= 0.0) return kelvin(T0 + (C > 0.0 ? P * to_si(t) / C : 0.0));
  // T_a + P/UA + (T_0 - T_a - P/UA) exp(-UA t / C), written with expm1.
  const double steady = P / UA;
  return kelvin(T0 - (T0 - Ta - steady) * -std::expm1(-UA * to_si(t) / C));
}

VesselHeatingResult heat_vessel(const VesselDesign& design, const VesselCharge& charge) {
  VesselHeatingResult r;
  r.loss_conductance = design.loss_conductance();
  r.outer_area = design.outer_area;
  const double UA = to_si(r.loss_conductance);
  const double P = to_si(design.heater_power);
  const double Ta = in_kelvin(charge.ambient);
  const double Tset = in_kelvin(charge.set_point);
  const double T0 = in_kelvin(charge.start);
  r.max_reachable_temperature = kelvin(UA > 0.0 ? Ta + P / UA : 1e9);
  r.loss_at_set_point = from_si<Power>(UA * (Tset - Ta));

  const HeatCapacity total = charge.charge_heat_capacity + design.vessel_heat_capacity;
  r.heat_up_time = lumped_heat_up_time(total, design.heater_power, r.loss_conductance, charge.start, charge.set_point,
                                       charge.ambient);
  if (P <= to_si(r.loss_at_set_point)) {
    // Reached only when the charge starts above its set-point: it still
    // cannot be held there.
    throw ModelError("the heater cannot hold the set-point of " + format_celsius(Tset) + ": with " + format_value(P) +
                     " W against a heat loss of " + format_value(UA) + " W/K the charge levels off at " +
                     format_celsius(Ta + P / UA) + "; more than " + format_value(to_si(r.loss_at_set_point)) +
                     " W is needed");
  }
  const double dT = T0 < Tset ? Tset - T0 : 0.0;
  r.energy_to_charge = joules(to_si(charge.charge_heat_capacity) * dT);
  r.energy_to_vessel = joules(to_si(design.vessel_heat_capacity) * dT);
  r.energy_to_process = charge.process_heat_at_set_point;

  const double Q = to_si(charge.process_heat_at_set_point);
  const double spare = P - to_si(r.loss_at_set_point);
  r.hold_time = seconds(std::max(to_si(charge.hold_time), Q > 0.0 ? Q / spare : 0.0));

  const double heat_up_drawn = P * to_si(r.heat_up_time);
  const double hold_loss = to_si(r.loss_at_set_point) * to_si(r.hold_time);
  r.energy_drawn = joules(heat_up_drawn + hold_loss + Q);
  // What the wall lost while heating up is what the heater gave beyond the
  // sensible heat of charge and vessel.
  r.energy_lost = joules(heat_up_drawn - to_si(r.energy_to_charge) - to_si(r.energy_to_vessel) + hold_loss);
  return r;
}

SteadyHeatingResult heat_vessel_steadily(const VesselDesign& design, Power heat_to_streams, Temperature set_point,
                                         Temperature ambient) {
  SteadyHeatingResult r;
  r.loss_conductance = design.loss_conductance();
  r.outer_area = design.outer_area;
  const double UA = to_si(r.loss_conductance);
  const double P = to_si(design.heater_power);
  const double Ta = in_kelvin(ambient);
  const double Tset = in_kelvin(set_point);
  r.max_reachable_temperature = kelvin(UA > 0.0 ? Ta + P / UA : 1e9);
  r.heat_to_streams = heat_to_streams;
  r.loss = from_si<Power>(UA * (Tset - Ta));
  const double needed = std::max(0.0, to_si(heat_to_streams)) + to_si(r.loss);
  if (P < needed) {
    throw ModelError("the heater (" + format_value(P) + " W) cannot hold " + format_celsius(Tset) +
                     " in continuous operation: the streams take " + format_value(to_si(heat_to_streams)) +
                     " W and the wall loses " + format_value(to_si(r.loss)) + " W, so at least " +
                     format_value(needed) + " W is needed");
  }
  r.power_drawn = from_si<Power>(needed);
  return r;
}

}  // namespace unchain::units
