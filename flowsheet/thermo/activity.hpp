#pragma once
// Liquid-phase activity coefficients. NRTL for the pairs that have
// published parameters in the component set (acetone-water at least);
// every other pair is taken as ideal (gamma = 1).

#include <Eigen/Core>

#include "flowsheet/component_library.hpp"
#include "flowsheet/quantity.hpp"

namespace unchain {

class Warnings;

// Activity coefficients of every component at liquid mole fractions x
// (size of the component set; polymers and solids are excluded from the
// liquid mixture and get gamma = 1). Multicomponent NRTL with the binary
// parameters present; missing pairs have tau = 0.
Eigen::VectorXd activity_coefficients(const ComponentSet& components, const Eigen::VectorXd& x, Temperature T,
                                      Warnings* warnings = nullptr);

// The same into `gamma` (resized to the component set), for loops that call
// it many times and keep their vectors.
void activity_coefficients(const ComponentSet& components, const Eigen::VectorXd& x, double T_K,
                           Eigen::VectorXd& gamma, Warnings* warnings = nullptr);

}  // namespace unchain
