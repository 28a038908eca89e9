#pragma once
// The balance-closure rule shared by `unchain run` and every study that
// evaluates a case many times (sweeps, tornado, Monte Carlo): a result whose
// mass, element or energy balance does not close is not a result.

#include <string>
#include <vector>

#include "flowsheet/solver.hpp"

namespace unchain::costs {

// Relative closure above which a solved case counts as not closing. A
// shipped case closes mass to 1e-9 and energy to 1e-6; these limits leave a
// margin for user cases with long recycle loops while still catching a
// block that loses material or heat.
inline constexpr double mass_closure_limit = 1e-6;
inline constexpr double energy_closure_limit = 1e-4;

// The balances that do not close, one line each ("mass balance of block
// 'dryer' does not close: ..."); empty when everything closes. Elements
// count as mass.
std::vector<std::string> open_balances(const SolveResult& result);

}  // namespace unchain::costs
