#include "flowsheet/pure_properties.hpp"

#include <cmath>
#include <cstdio>
#include <sstream>

#include "flowsheet/diagnostics.hpp"

namespace unchain {

namespace {

// The message names the side but not the temperature: the sink keeps each
// distinct message once, so a recycle loop that passes slightly different
// temperatures still reports the correlation once (see the header).
void check_range(const Component& c, const char* property, const TemperatureRange& range, double T_K,
                 Warnings* warnings) {
  if (warnings == nullptr || range.contains(T_K)) return;
  const bool below = T_K < range.low_K;
  if (!warnings->first_time(c.id, property, below ? 0 : 1)) return;  // its message is held already
  // "%.5g" is what a stream with precision 5 writes; snprintf spares the
  // stream's set-up, which the solve pays for on every out-of-range call.
  char low[32], high[32];
  std::snprintf(low, sizeof low, "%.5g", range.low_K);
  std::snprintf(high, sizeof high, "%.5g", range.high_K);
  std::string message = c.id;
  message += ": ";
  message += property;
  message += " correlation used outside its range ";
  message += low;
  message += " to ";
  message += high;
  message += below ? " K (below it; extrapolated)" : " K (above it; extrapolated)";
  warnings->add(std::move(message));
}

[[noreturn]] void missing(const Component& c, const char* what) {
  throw ModelError("component '" + c.id + "' has no " + what + " data");
}

MolarHeatCapacity as_molar_cp(double value) { return from_si<MolarHeatCapacity>(value); }
MolarEnergy as_molar_energy(double value) { return from_si<MolarEnergy>(value); }

// Enthalpy change along the polymer's glass then melt heat capacities.
double condensed_sensible_J_per_mol(const Component& c, double T_K, Warnings* warnings) {
  if (!c.solid_heat_capacity) missing(c, "solid heat capacity");
  const double T0 = reference_temperature_K;
  if (c.polymer && c.polymer->melt_heat_capacity && c.polymer->glass_transition_temperature) {
    const double Tg = c.polymer->glass_transition_temperature->value;
    const auto& glass = *c.solid_heat_capacity;
    const auto& melt = *c.polymer->melt_heat_capacity;
    auto glass_part = [&](double a, double b) {
      check_range(c, "glass heat capacity", glass.range, b, warnings);
      return glass.molar_enthalpy_change(a, b);
    };
    auto melt_part = [&](double a, double b) {
      check_range(c, "melt heat capacity", melt.range, b, warnings);
      return melt.molar_enthalpy_change(a, b);
    };
    if (T_K <= Tg && T0 <= Tg) return glass_part(T0, T_K);
    if (T_K >= Tg && T0 <= Tg) return glass_part(T0, Tg) + melt_part(Tg, T_K);
    if (T_K >= Tg) return melt_part(T0, T_K);
    return melt_part(T0, Tg) + glass_part(Tg, T_K);
  }
  check_range(c, "solid heat capacity", c.solid_heat_capacity->range, T_K, warnings);
  return c.solid_heat_capacity->molar_enthalpy_change(T0, T_K);
}

}  // namespace

Pressure vapour_pressure(const Component& c, Temperature T, Warnings* warnings) {
  if (!c.vapour_pressure) missing(c, "vapour-pressure");
  const double T_K = in_kelvin(T);
  check_range(c, "vapour-pressure", c.vapour_pressure->range, T_K, warnings);
  return pascal(c.vapour_pressure->pressure_Pa(T_K));
}

Temperature saturation_temperature(const Component& c, Pressure P, Warnings* warnings) {
  if (!c.vapour_pressure) missing(c, "vapour-pressure");
  const double T_K = c.vapour_pressure->temperature_K(to_si(P));
  check_range(c, "vapour-pressure", c.vapour_pressure->range, T_K, warnings);
  return kelvin(T_K);
}

MolarHeatCapacity liquid_heat_capacity(const Component& c, Temperature T, Warnings* warnings) {
  if (!c.liquid_heat_capacity) missing(c, "liquid heat-capacity");
  check_range(c, "liquid heat-capacity", c.liquid_heat_capacity->range, in_kelvin(T), warnings);
  return as_molar_cp(c.liquid_heat_capacity->molar_cp(in_kelvin(T)));
}

MolarHeatCapacity ideal_gas_heat_capacity(const Component& c, Temperature T, Warnings* warnings) {
  if (!c.ideal_gas_heat_capacity) missing(c, "ideal-gas heat-capacity");
  check_range(c, "ideal-gas heat-capacity", c.ideal_gas_heat_capacity->range, in_kelvin(T), warnings);
  return as_molar_cp(c.ideal_gas_heat_capacity->molar_cp(in_kelvin(T)));
}

MolarHeatCapacity solid_heat_capacity(const Component& c, Temperature T, Warnings* warnings) {
  if (!c.solid_heat_capacity) missing(c, "solid heat-capacity");
  const double T_K = in_kelvin(T);
  if (c.polymer && c.polymer->melt_heat_capacity && c.polymer->glass_transition_temperature &&
      T_K > c.polymer->glass_transition_temperature->value) {
    check_range(c, "melt heat-capacity", c.polymer->melt_heat_capacity->range, T_K, warnings);
    return as_molar_cp(c.polymer->melt_heat_capacity->molar_cp(T_K));
  }
  check_range(c, "solid heat-capacity", c.solid_heat_capacity->range, T_K, warnings);
  return as_molar_cp(c.solid_heat_capacity->molar_cp(T_K));
}

MolarEnergy enthalpy_of_vaporization(const Component& c, Temperature T, Warnings* warnings) {
  if (!c.enthalpy_of_vaporization_at_nbp || !c.normal_boiling_point || !c.critical_temperature)
    missing(c, "enthalpy-of-vaporization (needs the value at the normal boiling point, Tb and Tc)");
  const double Tb = c.normal_boiling_point->value;
  const double Tc = c.critical_temperature->value;
  const double T_K = in_kelvin(T);
  if (T_K >= Tc) return as_molar_energy(0.0);
  // Watson (1943) is reliable from the triple point to about 0.9 Tc.
  if (warnings != nullptr && T_K > 0.9 * Tc) {
    std::ostringstream message;
    message << c.id << ": Watson scaling of the vaporization enthalpy used above 0.9 Tc = " << 0.9 * Tc
            << " K (less accurate towards the critical point)";
    warnings->add(message.str());
  }
  const double ratio = (Tc - T_K) / (Tc - Tb);
  return as_molar_energy(c.enthalpy_of_vaporization_at_nbp->value * std::pow(ratio, c.watson_exponent));
}

Density liquid_density(const Component& c, Temperature T, Warnings* warnings) {
  if (!c.liquid_density) missing(c, "liquid-density");
  const double T_K = in_kelvin(T);
  if (warnings != nullptr && c.normal_boiling_point && T_K > c.normal_boiling_point->value + 50.0) {
    warnings->add(c.id + ": liquid density extrapolated with a constant expansion coefficient far above the "
                         "normal boiling point");
  }
  return from_si<Density>(c.liquid_density->at(T_K));
}

Density condensed_density(const Component& c, Temperature T, Warnings* warnings) {
  if (c.is_condensed_only()) {
    if (!c.solid_density) missing(c, "solid-density");
    return from_si<Density>(c.solid_density->value);
  }
  return liquid_density(c, T, warnings);
}

MolarEnergy vapour_molar_enthalpy(const Component& c, Temperature T, Warnings* warnings) {
  if (c.is_condensed_only())
    throw ModelError("component '" + c.id + "' (" + kind_name(c.kind) + ") cannot be in a vapour phase");
  if (!c.ideal_gas_heat_capacity) missing(c, "ideal-gas heat-capacity");
  const double T_K = in_kelvin(T);
  check_range(c, "ideal-gas heat-capacity", c.ideal_gas_heat_capacity->range, T_K, warnings);
  return as_molar_energy(c.enthalpy_of_formation.value +
                         c.ideal_gas_heat_capacity->molar_enthalpy_change(reference_temperature_K, T_K));
}

MolarEnergy condensed_molar_enthalpy(const Component& c, Temperature T, Warnings* warnings) {
  const double T_K = in_kelvin(T);
  switch (c.kind) {
    case ComponentKind::polymer:
    case ComponentKind::solid:
      return as_molar_energy(c.enthalpy_of_formation.value + condensed_sensible_J_per_mol(c, T_K, warnings));
    case ComponentKind::gas:
      return vapour_molar_enthalpy(c, T, warnings);
    case ComponentKind::volatile_liquid:
      break;
  }
  const double latent_298 = to_si(enthalpy_of_vaporization(c, kelvin(reference_temperature_K), warnings));
  if (c.liquid_heat_capacity) {
    check_range(c, "liquid heat-capacity", c.liquid_heat_capacity->range, T_K, warnings);
    return as_molar_energy(c.enthalpy_of_formation.value - latent_298 +
                           c.liquid_heat_capacity->molar_enthalpy_change(reference_temperature_K, T_K));
  }
  // Without liquid heat-capacity data: the vapour path less the latent heat.
  return as_molar_energy(to_si(vapour_molar_enthalpy(c, T, warnings)) -
                         to_si(enthalpy_of_vaporization(c, T, warnings)));
}

}  // namespace unchain
