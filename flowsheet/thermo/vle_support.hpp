#pragma once
// Private helpers shared by the vapour-liquid equilibrium routines
// (phase_equilibrium.cpp, rachford_rice.cpp, duty_flash.cpp). Plain SI
// doubles: these never cross the public boundary.

#include <Eigen/Core>

#include <functional>
#include <string>

#include "flowsheet/component_library.hpp"

namespace unchain {

class Warnings;

namespace vle {

// Temperatures searched for bubble, dew and duty-flash solutions. Below
// 150 K the Antoine forms in the data approach their pole; above 1200 K the
// heat-capacity polynomials are far outside any fitted range.
inline constexpr double lowest_search_temperature_K = 150.0;
inline constexpr double highest_search_temperature_K = 1200.0;

// Components that take part in vapour-liquid equilibrium: volatiles and
// permanent gases. Polymers and solids never do.
inline bool is_fluid(const Component& c) { return !c.is_condensed_only(); }

// Antoine vapour pressure that stays defined below the correlation's pole
// (C + t <= 0), where it is taken as zero. Range warnings go to `warnings`.
double saturation_pressure_Pa(const Component& c, double T_K, Warnings* warnings);
// Antoine saturation temperature at P, clamped to the search limits (the
// inverse has no meaning beyond the pole).
double saturation_temperature_K(const Component& c, double P_Pa);

// K_i = gamma_i Psat_i / P for volatiles, +infinity for permanent gases,
// 0 for polymers and solids.
Eigen::VectorXd k_values(const ComponentSet& components, const Eigen::VectorXd& gamma, double T_K, double P_Pa,
                         Warnings* warnings);

// Mole fractions of a mixture given on the component set, checked:
// right size, non-negative, no polymer or solid, positive sum. `what`
// names the calculation in the error message.
Eigen::VectorXd fluid_mole_fractions(const ComponentSet& components, const Eigen::VectorXd& fractions,
                                     const std::string& what);

// Root of an increasing function of temperature: the bracket [low, high]
// is widened in growing steps within the search limits until the sign
// changes, then closed with TOMS 748. Throws ModelError (with `what`) when
// there is no sign change inside the limits. Returns the final bracket.
struct Bracket {
  double low = 0.0, high = 0.0;
  [[nodiscard]] double middle() const { return 0.5 * (low + high); }
};
Bracket increasing_temperature_root(const std::function<double(double)>& f, double low, double high,
                                    const std::string& what);

}  // namespace vle
}  // namespace unchain
