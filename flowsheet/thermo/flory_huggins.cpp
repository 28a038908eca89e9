#include "flowsheet/thermo/flory_huggins.hpp"

#include <boost/math/tools/toms748_solve.hpp>

#include <cmath>
#include <cstdint>
#include <sstream>
#include <stdexcept>
#include <string>

#include "flowsheet/diagnostics.hpp"

namespace unchain {

namespace {

void check_segment_ratio(double segment_ratio) {
  if (!(segment_ratio >= 1.0) || !std::isfinite(segment_ratio))
    throw std::invalid_argument("Flory-Huggins: segment ratio must be at least 1 (found " +
                                std::to_string(segment_ratio) + ")");
}

void check_chi(double chi) {
  if (!std::isfinite(chi)) throw std::invalid_argument("Flory-Huggins: chi must be a finite number");
}

// ln a_s written in the solvent volume fraction u = 1 - phi_p, through
// s = ln u: near phi_p = 1 the solvent fraction keeps its precision, which
// phi_p itself would lose.
double ln_activity_of_ln_solvent_fraction(double s, double chi, double segment_ratio) {
  const double phi = -std::expm1(s);  // 1 - e^s, accurate for small |s|
  return s + (1.0 - 1.0 / segment_ratio) * phi + chi * phi * phi;
}

// The spinodal (d ln a / d phi = 0) on the polymer-rich side, or 0 when
// ln a decreases monotonically. With q = 1 - 1/r the condition is
//   2 chi phi^2 + (q - 2 chi) phi + 1/r = 0.
double polymer_rich_spinodal(double chi, double segment_ratio) {
  if (chi <= 0.0) return 0.0;
  const double q = 1.0 - 1.0 / segment_ratio;
  const double b = q - 2.0 * chi;
  const double discriminant = b * b - 8.0 * chi / segment_ratio;
  if (discriminant <= 0.0 || b >= 0.0) return 0.0;  // below the critical chi: no spinodal
  return (-b + std::sqrt(discriminant)) / (4.0 * chi);
}

// Solves ln a(s) = ln_a for s = ln(1 - phi_p) on [s_low, s_high], where
// ln a(s_low) < ln_a <= ln a(s_high) and ln a increases with s.
double solve_for_ln_solvent_fraction(double ln_a, double chi, double segment_ratio, double s_low, double s_high) {
  auto f = [&](double s) { return ln_activity_of_ln_solvent_fraction(s, chi, segment_ratio) - ln_a; };
  const double f_low = f(s_low);
  const double f_high = f(s_high);
  if (f_high == 0.0) return s_high;
  if (f_low >= 0.0 || f_high < 0.0) throw ConvergenceError("Flory-Huggins: no root in the bracket");
  std::uintmax_t iterations = 200;
  const auto root = boost::math::tools::toms748_solve(f, s_low, s_high, f_low, f_high,
                                                      boost::math::tools::eps_tolerance<double>(50), iterations);
  if (iterations >= 200) throw ConvergenceError("Flory-Huggins: polymer fraction did not converge");
  return 0.5 * (root.first + root.second);
}

}  // namespace

double flory_huggins_solvent_activity(double polymer_volume_fraction, double chi, double segment_ratio) {
  check_segment_ratio(segment_ratio);
  check_chi(chi);
  const double phi = polymer_volume_fraction;
  if (!(phi >= 0.0 && phi <= 1.0))
    throw std::invalid_argument("Flory-Huggins: polymer volume fraction must be within 0 to 1 (found " +
                                std::to_string(phi) + ")");
  if (phi == 1.0) return 0.0;  // dry polymer: no solvent, no solvent activity
  return std::exp(std::log1p(-phi) + (1.0 - 1.0 / segment_ratio) * phi + chi * phi * phi);
}

double flory_huggins_polymer_fraction_at_activity(double solvent_activity, double chi, double segment_ratio) {
  check_segment_ratio(segment_ratio);
  check_chi(chi);
  const double a = solvent_activity;
  if (!(a > 0.0 && a <= 1.0))
    throw std::invalid_argument("Flory-Huggins: solvent activity must be above 0 and at most 1 (found " +
                                std::to_string(a) + ")");
  const double ln_a = std::log(a);
  // Lower end (polymer-rich): there ln a(s) <= s + 1 + |chi|, so this s
  // gives ln a(s) <= ln_a - 1 < ln_a.
  const double s_low = ln_a - 2.0 - std::abs(chi);

  const double phi_spinodal = polymer_rich_spinodal(chi, segment_ratio);
  if (phi_spinodal <= 0.0) {
    // Monotone: a = 1 only for pure solvent (the polymer dissolves).
    if (a == 1.0) return 0.0;
    return -std::expm1(solve_for_ln_solvent_fraction(ln_a, chi, segment_ratio, s_low, 0.0));
  }
  // Beyond the critical chi, a(phi) rises to a maximum at the spinodal and
  // then falls to 0 at phi = 1. The polymer-rich branch is the swollen
  // polymer in equilibrium with the solvent; for an infinitely long chain
  // the coexisting solvent-rich phase is pure solvent, so a = 1 there.
  const double s_spinodal = std::log1p(-phi_spinodal);
  const double ln_a_spinodal = ln_activity_of_ln_solvent_fraction(s_spinodal, chi, segment_ratio);
  if (ln_a <= ln_a_spinodal)
    return -std::expm1(solve_for_ln_solvent_fraction(ln_a, chi, segment_ratio, s_low, s_spinodal));
  // A finite chain only slightly above its critical chi: the maximum is
  // below a, so the root is on the dilute branch (between pure solvent and
  // the other spinodal, the minimum of a).
  if (a == 1.0) return 0.0;
  // The product of the two spinodal roots is (1/r) / (2 chi).
  const double phi_dilute_spinodal = (1.0 / segment_ratio) / (2.0 * chi * phi_spinodal);
  return -std::expm1(solve_for_ln_solvent_fraction(ln_a, chi, segment_ratio, std::log1p(-phi_dilute_spinodal), 0.0));
}

double solvent_to_polymer_mass_ratio(double polymer_volume_fraction, double solvent_density, double polymer_density) {
  const double phi = polymer_volume_fraction;
  if (!(phi > 0.0 && phi <= 1.0))
    throw std::invalid_argument("solvent-to-polymer mass ratio: polymer volume fraction must be above 0 and at most 1 "
                                "(found " + std::to_string(phi) + "; at 0 the polymer is dissolved, no finite ratio)");
  if (!(solvent_density > 0.0) || !(polymer_density > 0.0))
    throw std::invalid_argument("solvent-to-polymer mass ratio: densities must be positive");
  // No excess volume: volumes add.
  return (1.0 - phi) * solvent_density / (phi * polymer_density);
}

}  // namespace unchain
