#pragma once
// The pyrolysis block on a continuous basis: a stirred melt reactor (an
// ideal mixed-flow reactor, CSTR) fed with polymer by the hour.
//
//   melt holdup     M = reactor_volume x fill_fraction x melt_density
//   residence time  tau = M / polymer feed rate   (or residence_time given)
//   conversion      X = k tau / (1 + k tau),  k = sum_j k_j(T_reactor)
//   products        selectivities k_j / k of the converted polymer, or a
//                   yield table at T_reactor; closed on the elements
//   heat per hour   H_out - H_in of the streams (sensible heat of the feed,
//                   reaction from formation enthalpies, vaporization,
//                   sensible heat of the products) plus the steady wall loss
//                   of the shared vessel model; no heat-up per run.
// The unconverted polymer leaves with the residue (a bleed of melt and
// char). Equations, sources and ranges: docs/blocks-pyrolysis.md#continuous-operation.

#include "flowsheet/block_model.hpp"
#include "units/pyrolysis_parts.hpp"

namespace unchain::units {

// Fills the block's outlets and resources for one basis hour. `settings`
// must have been read without errors.
void compute_continuous_pyrolysis(const PyrolysisSettings& settings, const BlockContext& context,
                                  const BlockPorts& ports, BlockResources& resources);

}  // namespace unchain::units
