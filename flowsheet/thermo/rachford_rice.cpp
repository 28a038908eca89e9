// The Rachford-Rice equation (Rachford and Rice, J. Petrol. Technol. 4
// (1952) 19), solved for the vapour fraction on a bracket that contains no
// pole, so the root found is the physical one.

#include <boost/math/tools/toms748_solve.hpp>

#include <cmath>
#include <cstdint>
#include <stdexcept>
#include <string>

#include "flowsheet/diagnostics.hpp"
#include "flowsheet/thermo/phase_equilibrium.hpp"

namespace unchain {

namespace {

using Index = Eigen::Index;

bool is_non_condensable(double K) { return K >= non_condensable_K; }

// f(V) = sum z_i (K_i - 1) / (1 + V (K_i - 1)), strictly decreasing in V.
// A non-condensable component contributes its limit z_i / V.
double rachford_rice_residual(const Eigen::VectorXd& z, const Eigen::VectorXd& K, double V) {
  double sum = 0.0;
  for (Index i = 0; i < z.size(); ++i) {
    if (z[i] == 0.0) continue;
    if (is_non_condensable(K[i])) {
      sum += z[i] / V;
    } else {
      const double d = K[i] - 1.0;
      sum += z[i] * d / (1.0 + V * d);
    }
  }
  return sum;
}

}  // namespace

double solve_rachford_rice(const Eigen::VectorXd& z_in, const Eigen::VectorXd& K) {
  if (z_in.size() != K.size())
    throw std::invalid_argument("solve_rachford_rice: " + std::to_string(z_in.size()) + " feed fractions but " +
                                std::to_string(K.size()) + " K-values");
  double total = 0.0;
  for (Index i = 0; i < z_in.size(); ++i) {
    if (!(z_in[i] >= 0.0) || !std::isfinite(z_in[i]))
      throw std::invalid_argument("solve_rachford_rice: feed fraction " + std::to_string(i) + " is negative or NaN");
    if (z_in[i] > 0.0 && !(K[i] >= 0.0))
      throw std::invalid_argument("solve_rachford_rice: K-value " + std::to_string(i) + " is negative or NaN");
    total += z_in[i];
  }
  if (!(total > 0.0)) throw std::invalid_argument("solve_rachford_rice: the feed is empty");
  const Eigen::VectorXd z = z_in / total;

  // Non-condensables (K -> infinity) must all be in the vapour, so V is at
  // least their share; involatiles (K = 0) must all be in the liquid, so V
  // is at most 1 less theirs. On [low, high] the residual is finite, and
  // f(low) >= 0 >= f(high) (each bound puts one group at its limit).
  double non_condensable = 0.0, involatile = 0.0, sum_zK = 0.0, sum_z_over_K = 0.0;
  for (Index i = 0; i < z.size(); ++i) {
    if (z[i] == 0.0) continue;
    if (is_non_condensable(K[i])) non_condensable += z[i];
    else sum_zK += z[i] * (K[i] - 1.0);
    if (K[i] == 0.0) involatile += z[i];
    else if (!is_non_condensable(K[i])) sum_z_over_K += z[i] * (1.0 - 1.0 / K[i]);
  }
  // Sub-cooled or at the bubble point: f(0) = sum z_i (K_i - 1) <= 0. This
  // also covers every K equal to 1, where any V solves and 0 is returned.
  if (non_condensable == 0.0 && sum_zK <= 0.0) return 0.0;
  // Superheated or at the dew point: f(1) = sum z_i (1 - 1/K_i) >= 0.
  if (involatile == 0.0 && sum_z_over_K >= 0.0) return 1.0;

  const double low = non_condensable;
  const double high = 1.0 - involatile;
  if (low >= high) return low;  // only gas and involatile matter: the split is fixed
  auto f = [&](double V) { return rachford_rice_residual(z, K, V); };
  const double f_low = low == 0.0 ? sum_zK : f(low);
  const double f_high = high == 1.0 ? sum_z_over_K : f(high);
  if (f_low <= 0.0) return low;
  if (f_high >= 0.0) return high;
  std::uintmax_t iterations = 200;
  const auto root = boost::math::tools::toms748_solve(f, low, high, f_low, f_high,
                                                      boost::math::tools::eps_tolerance<double>(52), iterations);
  if (iterations >= 200) throw ConvergenceError("Rachford-Rice: vapour fraction did not converge");
  return 0.5 * (root.first + root.second);
}

}  // namespace unchain
