#pragma once
// Lumped first-order kinetics of polymer thermal degradation.
//
// The polymer P decomposes by parallel first-order channels, one per lumped
// product j (styrene, dimer, char, ...):
//   P -> product_j,   k_j(T) = A_j exp(-E_j / (R T)),   dm_P/dt = -(sum_j k_j) m_P
// so the product made by channel j is k_j / sum k (its selectivity) of the
// polymer converted at T, and at constant T the conversion is
//   X(t) = 1 - exp(-k_total t).
// Yields are mass fractions of the polymer converted (first order in the
// polymer mass). A built-in set for polystyrene is fitted to published
// rate and product data (see default_polystyrene_kinetics and
// docs/blocks-pyrolysis.md); a case may give its own set for any polymer.

#include <array>
#include <functional>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "flowsheet/component_library.hpp"
#include "flowsheet/quantity.hpp"

namespace unchain {
class MappingReader;
class Warnings;
}  // namespace unchain

namespace unchain::units {

using RateConstant = decltype(1.0 / Time{});

struct KineticChannel {
  std::string product;  // component id
  RateConstant pre_exponential = from_si<RateConstant>(0.0);
  MolarEnergy activation_energy = from_si<MolarEnergy>(0.0);

  [[nodiscard]] RateConstant rate_constant(Temperature T) const;
};

struct KineticSet {
  std::string polymer;  // component id the set was made for; empty = given in a case for its polymer
  std::vector<KineticChannel> channels;
  // Where the set is trusted; outside it a warning is given. Absent = not stated.
  std::optional<Temperature> valid_from;
  std::optional<Temperature> valid_to;
  std::string source;

  [[nodiscard]] RateConstant total_rate_constant(Temperature T) const;
  // k_j / sum k, in channel order; they sum to 1.
  [[nodiscard]] std::vector<double> selectivities(Temperature T) const;
  // Warns (once per message) when T is outside the stated range. `who`
  // names the block in the message.
  void check_range(Temperature T, const std::string& who, Warnings& warnings) const;
  [[nodiscard]] std::vector<std::string> products() const;
};

// ---- the built-in polystyrene set ------------------------------------------

// An overall first-order rate k = A exp(-E / (R T)).
struct OverallRate {
  RateConstant pre_exponential = from_si<RateConstant>(0.0);
  MolarEnergy activation_energy = from_si<MolarEnergy>(0.0);
  std::string source;
};

// Mass fractions of the products of the polymer converted at one temperature.
struct ProductSlate {
  Temperature temperature = kelvin(0.0);
  std::vector<std::pair<std::string, double>> fractions;
  std::string source;
};

// The published data the built-in set is fitted to (each value sourced in
// pyrolysis_kinetics.cpp).
const OverallRate& polystyrene_overall_rate();
const std::array<ProductSlate, 2>& polystyrene_product_slates();

// Parallel channels that reproduce two product slates exactly while the
// total rate follows the overall rate at both temperatures:
//   k_j(T_i) = w_j(T_i) k_overall(T_i), i = 1, 2
//   E_j = R ln(k_j(T_2) / k_j(T_1)) / (1/T_1 - 1/T_2),  A_j = k_j(T_1) exp(E_j / (R T_1)).
// The slates must name the same products, each with a positive fraction.
// Throws std::invalid_argument otherwise.
KineticSet fit_parallel_channels(const OverallRate& overall, const ProductSlate& low, const ProductSlate& high);

// The built-in polystyrene set (fitted once, on first use).
const KineticSet& default_polystyrene_kinetics();

// ---- conversion ----------------------------------------------------------------

// X = 1 - exp(-k t), written with expm1 for small k t.
double isothermal_conversion(RateConstant k, Time t);
// The time at constant k to go from conversion X_from to X_to (X_to < 1):
//   t = ln((1 - X_from) / (1 - X_to)) / k ; zero when X_from >= X_to.
Time time_between_conversions(RateConstant k, double from, double to);
// A first-order conversion in an ideal stirred (mixed-flow) reactor of mean
// residence time tau, from the mixed-flow design equation
//   tau = X / (k (1 - X))  ->  X = k tau / (1 + k tau)
// (Levenspiel, Chemical Reaction Engineering, 3rd ed., ch. 5, first-order
// reaction in a mixed-flow reactor). k or tau not above zero gives 0.
double mixed_flow_conversion(RateConstant k, Time tau);

// Conversion and products along a temperature history, by integrating
//   dm_P/dt = -sum_j k_j(T(t)) m_P,   dy_j/dt = k_j(T(t)) m_P
// with an adaptive Dormand-Prince (Runge-Kutta 4/5) step (Boost.Odeint),
// starting from unconverted polymer m_P = 1.
struct HistoryResult {
  double conversion = 0.0;            // 1 - m_P at the end
  std::vector<double> product_yields; // y_j, kg per kg of initial polymer, channel order
};
HistoryResult integrate_conversion(const KineticSet& kinetics, const std::function<Temperature(Time)>& temperature,
                                   Time duration);

// ---- reading a set from a case -------------------------------------------------

// Reads `kinetics: {channels: [{product, pre_exponential, activation_energy}, ...],
// temperature_range: [low, high], source: "..."}` from a block mapping.
// Every product must be in the component set. Empty when the key is absent
// or wrong (errors reported to the reader's diagnostics).
std::optional<KineticSet> read_kinetic_set(MappingReader& parameters, std::string_view key,
                                           const ComponentSet& components);

}  // namespace unchain::units
