#pragma once
// Pyrolysis (thermal depolymerization) of a polymer, in batch runs or continuously.
//
// The feed is charged in runs of at most reactor volume x fill fraction x
// the feed's bulk density (so a loose foam needs many more runs than a
// densified one), heated in the shared vessel model (units/vessel_heating),
// and held at the reactor temperature. The polymer converts by lumped
// first-order kinetics (units/pyrolysis_kinetics) into products whose
// distribution comes from the kinetics' parallel channels or from a yield
// table against temperature (units/yield_table); the yields are closed on
// the elements (units/element_closure). Vapours (products, evaporated
// residual solvent, inert gas) leave at the reactor temperature; the
// residue (char, unconverted polymer) stays in the reactor until it is
// discharged.
//
// On a continuous basis the same block is a stirred melt reactor fed by the
// hour (units/pyrolysis_continuous.hpp): the melt holdup and the feed rate
// set the residence time, the mixed-flow design equation the conversion,
// and the vessel runs steadily at its set-point. What both modes share is
// in units/pyrolysis_parts.hpp. Equations, sources and ranges:
// docs/blocks-pyrolysis.md.

namespace unchain::units {

class BlockRegistry;

// Registers block type `pyrolysis`.
void register_pyrolysis(BlockRegistry& registry);

}  // namespace unchain::units
