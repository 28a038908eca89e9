#pragma once
// A pure component and its property data, each value with its source.
//
// Correlations are evaluated through the functions in thermo/; they know
// their validity range and report use outside it to a Warnings sink.

#include <optional>
#include <string>
#include <vector>

#include "flowsheet/elements.hpp"
#include "flowsheet/quantity.hpp"

namespace unchain {

class Warnings;

// A sourced scalar in SI.
struct SourcedValue {
  double value = 0.0;  // SI
  std::string source;
};

struct TemperatureRange {
  double low_K = 0.0;
  double high_K = 0.0;
  [[nodiscard]] bool contains(double T_K) const { return T_K >= low_K && T_K <= high_K; }
};

// log10(P / pressure_unit) = A - B / (C + T / temperature_unit)
struct AntoineCorrelation {
  double A = 0.0, B = 0.0, C = 0.0;
  double pressure_unit_Pa = 133.322387415;  // mmHg by default
  bool temperature_in_celsius = true;
  TemperatureRange range;
  std::string source;

  [[nodiscard]] double pressure_Pa(double T_K) const;
  [[nodiscard]] double temperature_K(double P_Pa) const;  // the exact inverse
};

// cp = sum_i c_i T^i (T in K), in J/(mol K).
struct HeatCapacityPolynomial {
  std::vector<double> coefficients;  // already in J/(mol K)
  TemperatureRange range;
  std::string source;

  [[nodiscard]] double molar_cp(double T_K) const;
  // Integral of cp dT from T1 to T2, J/mol (exact for the polynomial).
  [[nodiscard]] double molar_enthalpy_change(double T1_K, double T2_K) const;
};

struct HansenParameters {
  double dispersion = 0.0;        // Pa^0.5
  double polar = 0.0;             // Pa^0.5
  double hydrogen_bonding = 0.0;  // Pa^0.5
  std::optional<double> interaction_radius;  // Pa^0.5, polymers
  std::string source;
};

struct LiquidDensity {
  double reference_density = 0.0;       // kg/m3
  double reference_temperature_K = 293.15;
  double expansion_coefficient = 0.0;   // 1/K
  std::string source;
  [[nodiscard]] double at(double T_K) const {
    return reference_density / (1.0 + expansion_coefficient * (T_K - reference_temperature_K));
  }
};

struct FlammabilityLimits {
  double lower = 0.0;  // volume fraction in air
  double upper = 0.0;
  std::string source;
};

struct WaterSolubility {
  double mass_fraction = 0.0;  // of the component in water
  double temperature_K = 298.15;
  std::string source;
};

enum class ComponentKind {
  volatile_liquid,  // condensable organic or water
  gas,              // permanent gas at process conditions
  polymer,
  solid,            // char, inert solids
};

struct PolymerData {
  std::string monomer;                   // component id
  SourcedValue heat_of_polymerization;   // J/mol of repeat unit, liquid monomer -> polymer
  std::optional<SourcedValue> glass_transition_temperature;  // K
  std::optional<SourcedValue> ceiling_temperature;           // K
  std::optional<HeatCapacityPolynomial> melt_heat_capacity;   // above Tg
};

struct Component {
  std::string id;
  std::string name;
  std::string cas;
  ElementCounts formula;
  ComponentKind kind = ComponentKind::volatile_liquid;
  double molar_mass = 0.0;  // kg/mol, from the formula and IUPAC atomic weights

  std::optional<SourcedValue> normal_boiling_point;  // K
  std::optional<SourcedValue> critical_temperature;  // K
  std::optional<SourcedValue> critical_pressure;     // Pa
  std::optional<SourcedValue> acentric_factor;

  std::optional<AntoineCorrelation> vapour_pressure;
  std::optional<HeatCapacityPolynomial> liquid_heat_capacity;
  std::optional<HeatCapacityPolynomial> ideal_gas_heat_capacity;
  std::optional<HeatCapacityPolynomial> solid_heat_capacity;

  // Formation enthalpy at 298.15 K, J/mol: ideal gas for volatiles and gases;
  // the condensed (solid or polymer) state for kinds polymer and solid.
  SourcedValue enthalpy_of_formation;
  std::optional<SourcedValue> enthalpy_of_vaporization_at_nbp;  // J/mol
  double watson_exponent = 0.38;  // common practice

  std::optional<LiquidDensity> liquid_density;
  std::optional<SourcedValue> solid_density;  // kg/m3
  std::optional<SourcedValue> flash_point;    // K
  std::optional<FlammabilityLimits> flammability_limits;
  std::optional<WaterSolubility> water_solubility;
  std::optional<HansenParameters> hansen;
  std::optional<PolymerData> polymer;

  [[nodiscard]] bool is_condensed_only() const {
    return kind == ComponentKind::polymer || kind == ComponentKind::solid;
  }
  [[nodiscard]] bool can_vaporize() const { return kind == ComponentKind::volatile_liquid; }
};

const char* kind_name(ComponentKind kind);

}  // namespace unchain
