#pragma once
// Solvent recovery: a dryer or evaporator that drives the solvent out of a
// gel, with a sweep gas that keeps the solvent vapour below a fraction of
// its lower flammable limit, and a condenser that recovers the solvent.
// Equations, assumptions and sources: docs/blocks-densification.md#solvent-recovery.

#include <Eigen/Core>

#include <vector>

#include "flowsheet/quantity.hpp"

namespace unchain::units {

class BlockRegistry;

// Registers block type `solvent_recovery`.
void register_solvent_recovery(BlockRegistry& registry);

// Sweep gas that keeps the average vapour concentration at the dryer exit
// at or below f x LFL. For one solvent, n_sweep = n_s (1 / (f LFL) - 1);
// for several flammable vapours Le Chatelier's rule gives
//   sum_i y_i / LFL_i <= f  ->  n_sweep = sum_i (n_i / LFL_i) / f - sum_i n_i,
// where non-flammable vapours (no LFL) count in the total but not in the sum.
// Never negative.
AmountOfSubstance sweep_gas_for_flammable_limit(const std::vector<double>& evaporated_mol,
                                                const std::vector<double>& lower_limits, double limit_fraction);

// Partial condensation of condensable vapours (ideal liquid, Raoult's law,
// K_i = Psat_i(T) / P) in the presence of a non-condensable gas (K = inf):
// Rachford-Rice with the gas term z_g / beta. Returns the moles of each
// condensable left in the vapour. For one condensable this is
//   n_vapour = n_gas Psat / (P - Psat), capped at what there is.
Eigen::VectorXd condensable_left_in_vapour(const Eigen::VectorXd& condensable_mol, double gas_mol,
                                           const Eigen::VectorXd& K);

}  // namespace unchain::units
