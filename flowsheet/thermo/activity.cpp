#include "flowsheet/thermo/activity.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <sstream>
#include <stdexcept>
#include <string>
#include <vector>

#include "flowsheet/diagnostics.hpp"

namespace unchain {

namespace {

using Index = Eigen::Index;

// Mole fractions below this are too small for a warning about the mixture
// they sit in to matter.
constexpr double noticeable_mole_fraction = 1e-3;
// A volatile organic whose solubility in water is below this mass fraction
// forms a second liquid phase with water.
constexpr double poorly_miscible_mass_fraction = 0.01;

bool is_water(const Component& c) {
  if (c.formula.size() != 2) return false;
  auto h = c.formula.find("H");
  auto o = c.formula.find("O");
  return h != c.formula.end() && o != c.formula.end() && h->second == 2.0 && o->second == 1.0;
}

bool has_pair(const ComponentSet& components, const std::string& a, const std::string& b) {
  for (const auto& p : components.nrtl_pairs())
    if ((p.first == a && p.second == b) || (p.first == b && p.second == a)) return true;
  return false;
}

// The messages carry no temperature or composition so that a solve that
// passes the same point many times reports it once.
void warn_outside_range(const NrtlPair& pair, double T_K, Warnings& warnings) {
  std::ostringstream message;
  message.precision(5);
  message << pair.first << "-" << pair.second << ": NRTL parameters used " << (T_K < pair.range.low_K ? "below" : "above")
          << " their temperature range " << pair.range.low_K << " to " << pair.range.high_K << " K (extrapolated)";
  warnings.add(message.str());
}

// Without a binary pair the mixture is taken as ideal; for water with a
// hydrocarbon that hides a liquid-liquid split, which the user should know.
void warn_missing_water_pairs(const ComponentSet& components, const Eigen::VectorXd& x, Warnings& warnings) {
  const std::size_t n = components.size();
  for (std::size_t w = 0; w < n; ++w) {
    if (!is_water(components[w]) || x[static_cast<Index>(w)] < noticeable_mole_fraction) continue;
    for (std::size_t i = 0; i < n; ++i) {
      const Component& c = components[i];
      if (i == w || c.kind != ComponentKind::volatile_liquid || x[static_cast<Index>(i)] < noticeable_mole_fraction)
        continue;
      if (!c.water_solubility || c.water_solubility->mass_fraction >= poorly_miscible_mass_fraction) continue;
      if (has_pair(components, c.id, components[w].id)) continue;
      warnings.add(c.id + " and " + components[w].id +
                   ": no NRTL pair, liquid taken as one ideal phase although the two are nearly immiscible "
                   "(liquid-liquid split not modelled; bubble points are too high)");
    }
  }
}

// Room for tau and G of a liquid mixture of this many members on the stack;
// larger mixtures take it from the heap.
constexpr std::size_t members_on_stack = 24;

}  // namespace

void activity_coefficients(const ComponentSet& components, const Eigen::VectorXd& x, double T_K,
                           Eigen::VectorXd& gamma, Warnings* warnings) {
  const std::size_t n = components.size();
  if (static_cast<std::size_t>(x.size()) != n)
    throw std::invalid_argument("activity_coefficients: " + std::to_string(x.size()) + " mole fractions for " +
                                std::to_string(n) + " components");
  gamma.setOnes(static_cast<Index>(n));

  // The liquid mixture: every component that can be in it as a fluid,
  // including those at zero mole fraction (their gamma is the value at
  // infinite dilution, which a dew point needs). Polymers and solids are
  // left out and their share is removed by renormalising.
  const NrtlIndex& index = components.nrtl_index();
  const std::vector<std::size_t>& members = index.members;
  double total = 0.0;
  for (std::size_t i : members) {
    const double xi = x[static_cast<Index>(i)];
    if (!(xi >= 0.0) || !std::isfinite(xi))
      throw std::invalid_argument("activity_coefficients: mole fraction of '" + components[i].id +
                                  "' is negative or not a number");
    total += xi;
  }
  const std::size_t m = members.size();
  if (m == 0 || !(total > 0.0)) return;

  // Scratch: xm, D, S (m each), tau and G (m x m, column-major).
  std::array<double, 3 * members_on_stack + 2 * members_on_stack * members_on_stack> on_stack;
  std::vector<double> on_heap;
  double* scratch = on_stack.data();
  if (m > members_on_stack) {
    on_heap.resize(3 * m + 2 * m * m);
    scratch = on_heap.data();
  }
  double* xm = scratch;
  double* D = xm + m;
  double* S = D + m;
  double* tau = S + m;
  double* G = tau + m * m;
  for (std::size_t a = 0; a < m; ++a) xm[a] = x[static_cast<Index>(members[a])] / total;

  // tau(i, j) and G(i, j) in the notation of Renon and Prausnitz (1968):
  // tau_ij = a_ij + b_ij / T, G_ij = exp(-alpha_ij tau_ij); pairs without
  // parameters have tau = 0, G = 1 (ideal).
  // Only the paired columns are read below (the others are ideal
  // throughout), so only they are filled.
  for (std::size_t j : index.paired) {
    std::fill(tau + j * m, tau + (j + 1) * m, 0.0);
    std::fill(G + j * m, G + (j + 1) * m, 1.0);
  }
  const auto& pairs = components.nrtl_pairs();
  for (const NrtlIndex::Pair& p : index.pairs) {
    const NrtlPair& pair = pairs[p.pair];
    const std::size_t i = p.first;
    const std::size_t j = p.second;
    const double tau_ij = pair.a12 + pair.b12 / T_K;
    const double tau_ji = pair.a21 + pair.b21 / T_K;
    tau[i + j * m] = tau_ij;
    tau[j + i * m] = tau_ji;
    G[i + j * m] = std::exp(-pair.alpha * tau_ij);
    G[j + i * m] = std::exp(-pair.alpha * tau_ji);
    if (warnings != nullptr && !pair.range.contains(T_K) && xm[i] > 0.0 && xm[j] > 0.0)
      warn_outside_range(pair, T_K, *warnings);
  }
  if (warnings != nullptr) warn_missing_water_pairs(components, x / total, *warnings);
  if (index.pairs.empty()) return;

  // ln gamma_i = S_i / D_i + sum_j x_j G_ij / D_j (tau_ij - S_j / D_j)
  // with D_j = sum_k x_k G_kj and S_j = sum_k x_k tau_kj G_kj.
  // A column j outside every pair has G_kj = 1 and tau_kj = 0: D_j is the
  // plain sum of x and S_j is zero, and its term of every ln gamma_i is an
  // exact zero, so only the paired columns are summed (the same sums, in
  // the same order, as over all columns).
  double plain_sum = 0.0;
  for (std::size_t k = 0; k < m; ++k) plain_sum += xm[k];
  for (std::size_t j = 0; j < m; ++j) {
    D[j] = plain_sum;
    S[j] = 0.0;
  }
  for (std::size_t j : index.paired) {
    double d = 0.0, s = 0.0;
    const double* G_j = G + j * m;
    const double* tau_j = tau + j * m;
    for (std::size_t k = 0; k < m; ++k) {
      d += xm[k] * G_j[k];
      s += xm[k] * tau_j[k] * G_j[k];
    }
    D[j] = d;
    S[j] = s;
  }
  for (std::size_t i = 0; i < m; ++i) {
    double ln_gamma = S[i] / D[i];
    for (std::size_t j : index.paired)
      ln_gamma += xm[j] * G[i + j * m] / D[j] * (tau[i + j * m] - S[j] / D[j]);
    gamma[static_cast<Index>(members[i])] = std::exp(ln_gamma);
  }
}

Eigen::VectorXd activity_coefficients(const ComponentSet& components, const Eigen::VectorXd& x, Temperature T,
                                      Warnings* warnings) {
  Eigen::VectorXd gamma;
  activity_coefficients(components, x, in_kelvin(T), gamma, warnings);
  return gamma;
}

}  // namespace unchain
