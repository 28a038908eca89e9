// Flory-Huggins solvent activity and its inverse.

#include <doctest/doctest.h>

#include <cmath>
#include <stdexcept>

#include "flowsheet/thermo/flory_huggins.hpp"

namespace {

using unchain::flory_huggins_polymer_fraction_at_activity;
using unchain::flory_huggins_solvent_activity;

// ln a_s = ln(1 - phi) + (1 - 1/r) phi + chi phi^2, written out here
// independently of the implementation.
// Source: Flory, Principles of Polymer Chemistry (1953), ch. XII, eq. 22
// (from memory).
double closed_form_activity(double phi, double chi, double r) {
  return std::exp(std::log(1.0 - phi) + (1.0 - 1.0 / r) * phi + chi * phi * phi);
}

}  // namespace

TEST_CASE("flory_huggins: activity at phi 0.5 and chi 0.5 equals the closed form") {
  // Source: Flory (1953) ch. XII (from memory): ln a = ln 0.5 + 0.5 + 0.5 * 0.25
  // = -0.0681472, a = 0.934122. Tolerance: rounding only.
  const double expected = std::exp(std::log(0.5) + 0.5 + 0.125);
  CHECK(expected == doctest::Approx(0.934122).epsilon(1e-6));
  CHECK(flory_huggins_solvent_activity(0.5, 0.5) == doctest::Approx(expected).epsilon(1e-12));
}

TEST_CASE("flory_huggins: limits and finite chain length") {
  CHECK(flory_huggins_solvent_activity(0.0, 0.4) == doctest::Approx(1.0).epsilon(1e-15));
  CHECK(flory_huggins_solvent_activity(1.0, 0.4) == 0.0);
  // A short chain (r = 100) raises nothing but the (1 - 1/r) factor.
  for (double phi : {0.05, 0.3, 0.6, 0.9})
    CHECK(flory_huggins_solvent_activity(phi, 0.35, 100.0) ==
          doctest::Approx(closed_form_activity(phi, 0.35, 100.0)).epsilon(1e-12));
  // Better solvent (lower chi) means lower activity at the same swelling.
  CHECK(flory_huggins_solvent_activity(0.6, 0.2) < flory_huggins_solvent_activity(0.6, 0.45));
}

TEST_CASE("flory_huggins: inverse round trip for chi below 0.5") {
  for (double chi : {-0.3, 0.0, 0.3, 0.45, 0.5}) {
    for (double a : {1e-6, 0.05, 0.3, 0.7, 0.95, 0.999}) {
      const double phi = flory_huggins_polymer_fraction_at_activity(a, chi);
      CAPTURE(chi);
      CAPTURE(a);
      CHECK(phi > 0.0);
      CHECK(phi < 1.0);
      CHECK(closed_form_activity(phi, chi, 1e12) == doctest::Approx(a).epsilon(1e-10));
    }
  }
  // Lower activity, drier polymer.
  CHECK(flory_huggins_polymer_fraction_at_activity(0.2, 0.4) > flory_huggins_polymer_fraction_at_activity(0.8, 0.4));
}

TEST_CASE("flory_huggins: activity 1 below chi 0.5 means the polymer dissolves") {
  CHECK(flory_huggins_polymer_fraction_at_activity(1.0, 0.3) == 0.0);
  CHECK(flory_huggins_polymer_fraction_at_activity(1.0, 0.5) == 0.0);
}

TEST_CASE("flory_huggins: chi above 0.5 gives the swollen polymer-rich branch") {
  const double chi = 0.8;
  // Past the critical chi the activity exceeds 1 at low polymer fraction:
  // ln a = ln 0.9 + 0.1 + 0.8 * 0.01 = +0.00264.
  CHECK(flory_huggins_solvent_activity(0.1, chi) > 1.0);
  // In contact with pure solvent the polymer swells but does not dissolve.
  // The spinodal is at phi = 1 - 1/(2 chi) = 0.375 for an infinite chain.
  const double swollen = flory_huggins_polymer_fraction_at_activity(1.0, chi);
  CHECK(swollen > 0.375);
  CHECK(swollen < 1.0);
  CHECK(closed_form_activity(swollen, chi, 1e12) == doctest::Approx(1.0).epsilon(1e-10));
  for (double a : {0.01, 0.5, 0.9, 1.0}) {
    const double phi = flory_huggins_polymer_fraction_at_activity(a, chi);
    CAPTURE(a);
    CHECK(phi >= 0.375);
    CHECK(closed_form_activity(phi, chi, 1e12) == doctest::Approx(a).epsilon(1e-10));
  }
}

TEST_CASE("flory_huggins: short chain just past its critical chi") {
  // chi_c = 0.5 (1 + 1/sqrt(r))^2 = 0.605 for r = 100: the maximum of a on
  // the polymer-rich side is then below 1 and a near 1 is met on the dilute
  // branch. Either way the returned fraction must reproduce the activity.
  const double r = 100.0;
  const double chi = 0.62;
  for (double a : {0.2, 0.6, 0.95, 0.999}) {
    const double phi = flory_huggins_polymer_fraction_at_activity(a, chi, r);
    CAPTURE(a);
    CHECK(phi > 0.0);
    CHECK(closed_form_activity(phi, chi, r) == doctest::Approx(a).epsilon(1e-9));
  }
}

TEST_CASE("flory_huggins: residual solvent mass ratio and bad input") {
  // Volumes add: (1 - phi) rho_s / (phi rho_p) = 0.5 * 867 / (0.5 * 1050).
  CHECK(unchain::solvent_to_polymer_mass_ratio(0.5, 867.0, 1050.0) == doctest::Approx(867.0 / 1050.0).epsilon(1e-14));
  CHECK(unchain::solvent_to_polymer_mass_ratio(1.0, 867.0, 1050.0) == 0.0);
  CHECK_THROWS_AS(unchain::solvent_to_polymer_mass_ratio(0.0, 867.0, 1050.0), std::invalid_argument);
  CHECK_THROWS_AS(flory_huggins_solvent_activity(1.2, 0.4), std::invalid_argument);
  CHECK_THROWS_AS(flory_huggins_polymer_fraction_at_activity(0.0, 0.4), std::invalid_argument);
  CHECK_THROWS_AS(flory_huggins_polymer_fraction_at_activity(1.1, 0.4), std::invalid_argument);
}
