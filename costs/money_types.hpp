#pragma once
// Prices and factors as typed quantities. Money is its own dimension (see
// flowsheet/quantity.hpp); the case's currency is checked when a price is
// read, and nothing is ever converted between currencies.

#include "flowsheet/quantity.hpp"

namespace unchain::costs {

using PricePerEnergy = decltype(Money{} / Energy{});
using PricePerMass = decltype(Money{} / Mass{});
using PricePerVolume = decltype(Money{} / Volume{});
using PricePerTime = decltype(Money{} / Time{});
// kg CO2-equivalent per unit of energy drawn.
using EmissionFactor = decltype(Mass{} / Energy{});

}  // namespace unchain::costs
