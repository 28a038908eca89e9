#pragma once
// Vapour-liquid equilibrium by modified Raoult's law,
//   y_i P = x_i gamma_i(x, T) Psat_i(T),
// with bubble and dew points, the isothermal flash (Rachford-Rice) and the
// flash at a given duty. Permanent gases (kind gas) are non-condensable:
// they stay in the vapour. Polymers and solids never vaporize and are left
// out of the fluid mixture (the caller keeps them in their phase).

#include <Eigen/Core>

#include "flowsheet/component_library.hpp"
#include "flowsheet/quantity.hpp"
#include "flowsheet/stream.hpp"

namespace unchain {

class Warnings;

struct FlashResult {
  double vapour_fraction = 0.0;   // moles of vapour / moles of fluid feed
  Eigen::VectorXd x;              // liquid mole fractions (fluid components)
  Eigen::VectorXd y;              // vapour mole fractions
  Eigen::VectorXd K;              // y/x at the solution
  Eigen::VectorXd liquid_kg;      // per component, kg per basis
  Eigen::VectorXd vapour_kg;
  int iterations = 0;             // outer iterations on the activity coefficients
};

// K-value reported for a permanent gas (kind gas). Such a gas is taken as
// non-condensable: the flash puts all of it in the vapour (none dissolves),
// and solve_rachford_rice treats any K at or above this value, including
// +infinity, as that limit. See docs/thermodynamics.md.
inline constexpr double non_condensable_K = 1e12;

// Rachford-Rice for given K-values and feed mole fractions z:
//   sum z_i (K_i - 1) / (1 + V (K_i - 1)) = 0,
// solved for V in [0, 1] (clamped to 0 or 1 when the feed is sub-cooled or
// superheated). Exposed for testing against worked examples.
double solve_rachford_rice(const Eigen::VectorXd& z, const Eigen::VectorXd& K);

// Bubble and dew points of a fluid mixture given by mole fractions
// (polymer and solid entries must be zero; permanent gases make a dew point
// exist but a bubble point at any finite pressure only if absent).
Temperature bubble_temperature(const ComponentSet& components, const Eigen::VectorXd& x, Pressure P,
                               Warnings* warnings = nullptr);
Temperature dew_temperature(const ComponentSet& components, const Eigen::VectorXd& y, Pressure P,
                            Warnings* warnings = nullptr);
Pressure bubble_pressure(const ComponentSet& components, const Eigen::VectorXd& x, Temperature T,
                         Warnings* warnings = nullptr);
Pressure dew_pressure(const ComponentSet& components, const Eigen::VectorXd& y, Temperature T,
                      Warnings* warnings = nullptr);

// Isothermal flash of component masses (kg per basis; polymer and solid
// entries are ignored and returned in neither phase).
FlashResult isothermal_flash(const ComponentSet& components, const Eigen::VectorXd& feed_kg, Temperature T, Pressure P,
                             Warnings* warnings = nullptr);

// Flashes a whole stream at T and P: its fluid part is split into liquid and
// vapour; polymers and solids keep their phase (solid, or liquid when
// dissolved). The result has temperature T and pressure P.
Stream flash_stream(const Stream& feed, Temperature T, Pressure P, Warnings* warnings = nullptr);

// Flash at a given duty: finds the temperature at which the outlet's
// enthalpy equals the feed's plus `duty`, at pressure P (bounded, monotone
// search with Boost.Math root finding). Returns the outlet stream.
Stream flash_stream_at_duty(const Stream& feed, Energy duty, Pressure P, Warnings* warnings = nullptr);

}  // namespace unchain
