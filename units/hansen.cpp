#include "units/hansen.hpp"

#include <cmath>

namespace unchain::units {

SqrtPressure hansen_distance(const HansenParameters& a, const HansenParameters& b) {
  const double dD = a.dispersion - b.dispersion;
  const double dP = a.polar - b.polar;
  const double dH = a.hydrogen_bonding - b.hydrogen_bonding;
  // The factor 4 on the dispersion term makes the solubility region a
  // sphere in these coordinates (Hansen's empirical finding, ch. 1).
  return from_si<SqrtPressure>(std::sqrt(4.0 * dD * dD + dP * dP + dH * dH));
}

std::optional<SolventQuality> solvent_quality(const Component& polymer, const Component& solvent,
                                              std::string* why_not) {
  auto refuse = [&](std::string reason) -> std::optional<SolventQuality> {
    if (why_not != nullptr) *why_not = std::move(reason);
    return std::nullopt;
  };
  if (!polymer.hansen) return refuse("'" + polymer.id + "' has no Hansen solubility parameters");
  if (!polymer.hansen->interaction_radius)
    return refuse("'" + polymer.id + "' has no Hansen interaction radius R0");
  if (!solvent.hansen) return refuse("'" + solvent.id + "' has no Hansen solubility parameters");
  SolventQuality q;
  constexpr double per_MPa_half = 1e-3;  // Pa^0.5 -> MPa^0.5
  q.distance_MPa_half = to_si(hansen_distance(*polymer.hansen, *solvent.hansen)) * per_MPa_half;
  q.interaction_radius_MPa_half = *polymer.hansen->interaction_radius * per_MPa_half;
  if (!(q.interaction_radius_MPa_half > 0.0))
    return refuse("'" + polymer.id + "' has a Hansen interaction radius that is not positive");
  q.relative_energy_difference = q.distance_MPa_half / q.interaction_radius_MPa_half;
  return q;
}

}  // namespace unchain::units
