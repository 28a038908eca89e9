#include "flowsheet/thermo/activity.hpp"

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

bool in_liquid_mixture(const Component& c) { return !c.is_condensed_only(); }

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

}  // namespace

Eigen::VectorXd activity_coefficients(const ComponentSet& components, const Eigen::VectorXd& x, Temperature T,
                                      Warnings* warnings) {
  const std::size_t n = components.size();
  if (static_cast<std::size_t>(x.size()) != n)
    throw std::invalid_argument("activity_coefficients: " + std::to_string(x.size()) + " mole fractions for " +
                                std::to_string(n) + " components");
  const double T_K = in_kelvin(T);
  Eigen::VectorXd gamma = Eigen::VectorXd::Ones(static_cast<Index>(n));

  // The liquid mixture: every component that can be in it as a fluid,
  // including those at zero mole fraction (their gamma is the value at
  // infinite dilution, which a dew point needs). Polymers and solids are
  // left out and their share is removed by renormalising.
  std::vector<Index> members;
  double total = 0.0;
  for (std::size_t i = 0; i < n; ++i) {
    if (!in_liquid_mixture(components[i])) continue;
    const double xi = x[static_cast<Index>(i)];
    if (!(xi >= 0.0) || !std::isfinite(xi))
      throw std::invalid_argument("activity_coefficients: mole fraction of '" + components[i].id +
                                  "' is negative or not a number");
    members.push_back(static_cast<Index>(i));
    total += xi;
  }
  const Index m = static_cast<Index>(members.size());
  if (m == 0 || !(total > 0.0)) return gamma;

  Eigen::VectorXd xm(m);
  for (Index a = 0; a < m; ++a) xm[a] = x[members[static_cast<std::size_t>(a)]] / total;

  // tau(i, j) and G(i, j) in the notation of Renon and Prausnitz (1968):
  // tau_ij = a_ij + b_ij / T, G_ij = exp(-alpha_ij tau_ij); pairs without
  // parameters have tau = 0, G = 1 (ideal).
  Eigen::MatrixXd tau = Eigen::MatrixXd::Zero(m, m);
  Eigen::MatrixXd G = Eigen::MatrixXd::Ones(m, m);
  auto local = [&](const std::string& id) -> Index {
    for (Index a = 0; a < m; ++a)
      if (components[static_cast<std::size_t>(members[static_cast<std::size_t>(a)])].id == id) return a;
    return -1;
  };
  bool any_pair = false;
  for (const auto& pair : components.nrtl_pairs()) {
    const Index i = local(pair.first);
    const Index j = local(pair.second);
    if (i < 0 || j < 0 || i == j) continue;
    any_pair = true;
    tau(i, j) = pair.a12 + pair.b12 / T_K;
    tau(j, i) = pair.a21 + pair.b21 / T_K;
    G(i, j) = std::exp(-pair.alpha * tau(i, j));
    G(j, i) = std::exp(-pair.alpha * tau(j, i));
    if (warnings != nullptr && !pair.range.contains(T_K) && xm[i] > 0.0 && xm[j] > 0.0)
      warn_outside_range(pair, T_K, *warnings);
  }
  if (warnings != nullptr) warn_missing_water_pairs(components, x / total, *warnings);
  if (!any_pair) return gamma;

  // ln gamma_i = S_i / D_i + sum_j x_j G_ij / D_j (tau_ij - S_j / D_j)
  // with D_j = sum_k x_k G_kj and S_j = sum_k x_k tau_kj G_kj.
  Eigen::VectorXd D(m), S(m);
  for (Index j = 0; j < m; ++j) {
    double d = 0.0, s = 0.0;
    for (Index k = 0; k < m; ++k) {
      d += xm[k] * G(k, j);
      s += xm[k] * tau(k, j) * G(k, j);
    }
    D[j] = d;
    S[j] = s;
  }
  for (Index i = 0; i < m; ++i) {
    double ln_gamma = S[i] / D[i];
    for (Index j = 0; j < m; ++j) ln_gamma += xm[j] * G(i, j) / D[j] * (tau(i, j) - S[j] / D[j]);
    gamma[members[static_cast<std::size_t>(i)]] = std::exp(ln_gamma);
  }
  return gamma;
}

}  // namespace unchain
