#pragma once
// A NaN or an infinity in a result is an error, never a printed "nan".
//
// After a solve, every number a report could show is walked: each stream's
// component amounts (per phase), temperature, pressure, bulk density and
// enthalpy; each block's heat, electricity, cooling, duration, materials,
// equipment sizes, figures and balance closure; and the overall balance.
// Each non-finite value becomes one message naming the block (or feed) and
// the quantity, e.g. "block 'still': outlet 'vapour' temperature is not
// finite". A model that produces such a value has failed silently; the
// caller refuses the results (`unchain run` exits 3, writes nothing).

#include <string>
#include <vector>

#include "flowsheet/case.hpp"
#include "flowsheet/solver.hpp"

namespace unchain {

// Every non-finite value of the result, in case order (streams, then
// blocks, then the overall balance); empty when all are finite. Streams
// and blocks are named from `c` (SolveResult is indexed as Case).
std::vector<std::string> find_non_finite_values(const Case& c, const SolveResult& result);

}  // namespace unchain
