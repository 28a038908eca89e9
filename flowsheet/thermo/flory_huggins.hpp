#pragma once
// Polymer-solvent equilibrium by Flory-Huggins theory (Flory, Principles of
// Polymer Chemistry, 1953, ch. XII), for a polymer of very high degree of
// polymerization:
//   ln a_s = ln(1 - phi_p) + phi_p + chi phi_p^2
// with phi_p the polymer volume fraction and chi the interaction parameter.
// With a finite segment ratio r (polymer molar volume / solvent molar
// volume) the term phi_p becomes (1 - 1/r) phi_p.

namespace unchain {

// Solvent activity at a polymer volume fraction (0 <= phi_p < 1).
double flory_huggins_solvent_activity(double polymer_volume_fraction, double chi, double segment_ratio = 1e12);

// The polymer volume fraction at which the solvent has activity a
// (0 < a <= 1), i.e. the equilibrium swelling at a solvent partial pressure
// a * Psat. Monotone for chi < 0.5; for chi >= 0.5 the root on the
// polymer-rich branch (phi_p above the spinodal) is returned.
double flory_huggins_polymer_fraction_at_activity(double solvent_activity, double chi, double segment_ratio = 1e12);

// Residual solvent mass per mass of polymer from the volume fraction.
double solvent_to_polymer_mass_ratio(double polymer_volume_fraction, double solvent_density, double polymer_density);

}  // namespace unchain
