#include "flowsheet/component.hpp"

#include <cmath>

namespace unchain {

double AntoineCorrelation::pressure_Pa(double T_K) const {
  const double t = temperature_in_celsius ? T_K - 273.15 : T_K;
  return pressure_unit_Pa * std::pow(10.0, A - B / (C + t));
}

double AntoineCorrelation::temperature_K(double P_Pa) const {
  // log10(P/u) = A - B/(C + t)  =>  t = B / (A - log10(P/u)) - C
  const double t = B / (A - std::log10(P_Pa / pressure_unit_Pa)) - C;
  return temperature_in_celsius ? t + 273.15 : t;
}

double HeatCapacityPolynomial::molar_cp(double T_K) const {
  double value = 0.0;
  double power = 1.0;
  for (double c : coefficients) {
    value += c * power;
    power *= T_K;
  }
  return value;
}

double HeatCapacityPolynomial::molar_enthalpy_change(double T1_K, double T2_K) const {
  double value = 0.0;
  double p1 = T1_K, p2 = T2_K;
  for (std::size_t i = 0; i < coefficients.size(); ++i) {
    value += coefficients[i] * (p2 - p1) / static_cast<double>(i + 1);
    p1 *= T1_K;
    p2 *= T2_K;
  }
  return value;
}

const char* kind_name(ComponentKind kind) {
  switch (kind) {
    case ComponentKind::volatile_liquid: return "volatile";
    case ComponentKind::gas: return "gas";
    case ComponentKind::polymer: return "polymer";
    case ComponentKind::solid: return "solid";
  }
  return "unknown";
}

}  // namespace unchain
