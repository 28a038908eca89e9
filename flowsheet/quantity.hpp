#pragma once
// Typed physical quantities used at every parameter boundary.
//
// Inside the model everything is SI. Functions that take or return a
// physical value use these Boost.Units types so that a pressure cannot be
// passed where a temperature is expected. An absolute temperature and a
// temperature difference are distinct types: adding two absolute
// temperatures does not compile.

#include <boost/units/absolute.hpp>
#include <boost/units/base_dimension.hpp>
#include <boost/units/base_unit.hpp>
#include <boost/units/derived_dimension.hpp>
#include <boost/units/make_system.hpp>
#include <boost/units/pow.hpp>
#include <boost/units/quantity.hpp>
#include <boost/units/systems/si.hpp>
#include <boost/units/unit.hpp>

namespace unchain {

namespace bu = boost::units;
namespace si = boost::units::si;

// Money is a dimension of its own. Which currency a value is in is a property
// of the case (one currency per case), checked when the value is read, so
// there is never a silent conversion between currencies.
struct money_base_dimension : bu::base_dimension<money_base_dimension, 901> {};
using money_dimension = money_base_dimension::dimension_type;
struct currency_base_unit : bu::base_unit<currency_base_unit, money_dimension, 901> {
  static const char* name() { return "currency unit"; }
  static const char* symbol() { return "cu"; }
};
using money_system = bu::make_system<currency_base_unit>::type;
using currency_unit = bu::unit<money_dimension, money_system>;
// Money composed with SI units (price per kWh, per kg) is handled as a
// plain Money value divided by an SI quantity at the point of use; the
// parser checks the full dimension (see unit_parser.hpp).

using Mass = bu::quantity<si::mass>;
using Length = bu::quantity<si::length>;
using Area = bu::quantity<si::area>;
using Volume = bu::quantity<si::volume>;
using Time = bu::quantity<si::time>;
using Temperature = bu::quantity<bu::absolute<si::temperature>>;
using TemperatureDifference = bu::quantity<si::temperature>;
using Pressure = bu::quantity<si::pressure>;
using Energy = bu::quantity<si::energy>;
using Power = bu::quantity<si::power>;
using Density = bu::quantity<si::mass_density>;
using AmountOfSubstance = bu::quantity<si::amount>;
using Money = bu::quantity<currency_unit>;
using Dimensionless = bu::quantity<si::dimensionless>;

// Derived quantities that have no ready-made Boost.Units name.
using MolarMass = decltype(Mass{} / AmountOfSubstance{});
using MolarEnergy = decltype(Energy{} / AmountOfSubstance{});
using MolarHeatCapacity = decltype(Energy{} / AmountOfSubstance{} / TemperatureDifference{});
using SpecificEnergy = decltype(Energy{} / Mass{});
using SpecificHeatCapacity = decltype(Energy{} / Mass{} / TemperatureDifference{});
using MassFlow = decltype(Mass{} / Time{});
using VolumeFlow = decltype(Volume{} / Time{});
using HeatTransferCoefficient = decltype(Power{} / Area{} / TemperatureDifference{});
using ThermalConductance = decltype(Power{} / TemperatureDifference{});
using ExpansionCoefficient = decltype(1.0 / TemperatureDifference{});
// Hansen solubility parameters are square roots of a cohesive energy density.
using SqrtPressure = decltype(bu::root<2>(Pressure{}));

// Construction from and extraction to SI numbers. These are the only
// places where a raw double meets a typed quantity.
template <class Q>
constexpr Q from_si(double value) {
  return Q::from_value(value);
}
template <class Q>
constexpr double to_si(const Q& q) {
  return q.value();
}

inline Temperature kelvin(double value) { return Temperature::from_value(value); }
inline double in_kelvin(Temperature t) { return t.value(); }
inline Temperature celsius(double value) { return Temperature::from_value(value + 273.15); }
inline double in_celsius(Temperature t) { return t.value() - 273.15; }
inline TemperatureDifference kelvin_difference(double value) {
  return TemperatureDifference::from_value(value);
}
inline Pressure pascal(double value) { return Pressure::from_value(value); }
inline Mass kilograms(double value) { return Mass::from_value(value); }
inline Energy joules(double value) { return Energy::from_value(value); }
inline Time seconds(double value) { return Time::from_value(value); }

// Standard reference state for enthalpies of formation.
inline constexpr double reference_temperature_K = 298.15;
inline constexpr double standard_atmosphere_Pa = 101325.0;
// CODATA 2018 molar gas constant (exact since the 2019 SI redefinition).
inline constexpr double gas_constant_J_per_mol_K = 8.314462618;

}  // namespace unchain
