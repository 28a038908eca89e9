#include "units/pyrolysis_parts.hpp"

#include <cmath>
#include <string>
#include <vector>

#include "flowsheet/diagnostics.hpp"
#include "flowsheet/pure_properties.hpp"

namespace unchain::units {

namespace {

Energy enthalpy_at(const Stream& s, Temperature T, Warnings* warnings) {
  Stream copy = s;
  copy.set_temperature(T);
  return copy.enthalpy(warnings);
}

// Everything in a condensed state (volatiles liquid, gases as gas, solids
// solid) at T.
Energy condensed_enthalpy_at(const Stream& s, Temperature T, Warnings* warnings) {
  Stream copy = s;
  copy.collapse_into(Phase::liquid);
  copy.set_temperature(T);
  return copy.enthalpy(warnings);
}

}  // namespace

HeatSplit split_heat(const Stream& feed, const std::vector<const Stream*>& products, Warnings& warnings) {
  // At the reference temperature no heat-capacity correlation is integrated,
  // so those evaluations raise no range warnings.
  const Temperature T0 = kelvin(reference_temperature_K);
  HeatSplit s;
  const double feed_in = to_si(feed.enthalpy(&warnings));
  const double feed_298 = to_si(enthalpy_at(feed, T0, nullptr));
  const double feed_condensed_298 = to_si(condensed_enthalpy_at(feed, T0, nullptr));
  double out = 0.0, out_298 = 0.0, out_condensed_298 = 0.0;
  for (const Stream* p : products) {
    out += to_si(p->enthalpy(&warnings));
    out_298 += to_si(enthalpy_at(*p, T0, nullptr));
    out_condensed_298 += to_si(condensed_enthalpy_at(*p, T0, nullptr));
  }
  s.sensible_feed_J = feed_298 - feed_in;
  s.reaction_J = out_condensed_298 - feed_condensed_298;
  s.vaporization_J = (out_298 - out_condensed_298) - (feed_298 - feed_condensed_298);
  s.sensible_products_J = out - out_298;
  return s;
}

PyrolysisFeed pyrolysis_feed(const PyrolysisSettings& settings, const ComponentSet& components, const Stream& feed,
                             const std::string& who) {
  PyrolysisFeed f;
  f.condensed = feed.phase_masses(Phase::solid) + feed.phase_masses(Phase::liquid);
  f.polymer_kg = f.condensed[static_cast<Eigen::Index>(settings.polymer)];
  if (!(f.polymer_kg > 0.0))
    throw ModelError(who + ": the feed carries no " + components[settings.polymer].id +
                     " in its solid or liquid phase (expected a polymer charge)");
  f.charge_kg = f.condensed.sum();
  return f;
}

std::vector<double> check_pyrolysis_conditions(const PyrolysisSettings& settings, const ComponentSet& components,
                                     const PyrolysisFeed& feed, const std::string& who, Warnings& warnings) {
  const Temperature Tr = settings.reactor_temperature;
  const double Tr_C = in_celsius(Tr);
  if (Tr_C < pyrolysis_usual_low_C || Tr_C > pyrolysis_usual_high_C)
    warnings.add(who + ": reactor temperature " + format_celsius(Tr) +
                 " is outside the usual range of pyrolysis for monomer recovery, 400 to 600 degC");
  settings.kinetics.check_range(Tr, who, warnings);
  std::vector<double> table_yields;
  if (settings.yields == YieldSource::table) table_yields = settings.table->at(Tr, who, warnings);

  bool other_polymer = false;
  for (std::size_t i = 0; i < components.size(); ++i)
    if (i != settings.polymer && components[i].kind == ComponentKind::polymer &&
        feed.condensed[static_cast<Eigen::Index>(i)] > 0.0)
      other_polymer = true;
  if (other_polymer)
    warnings.add(who + ": the feed holds another polymer besides " + components[settings.polymer].id +
                 "; it is not converted and leaves with the residue");
  return table_yields;
}

ProductStreams pyrolysis_products(const PyrolysisSettings& settings, const ComponentSet& components,
                                  const Stream& feed, const PyrolysisFeed& charge, double conversion,
                                  const Eigen::VectorXd& closed_yields) {
  ProductStreams p{Stream(components), Stream(components)};
  const double converted_kg = conversion * charge.polymer_kg;
  for (std::size_t i = 0; i < components.size(); ++i) {
    const auto ii = static_cast<Eigen::Index>(i);
    const double made = converted_kg * closed_yields[ii];
    const double from_feed =
        i == settings.polymer ? 0.0 : charge.condensed[ii] + feed.phase_masses(Phase::vapour)[ii];
    const double unconverted = i == settings.polymer ? charge.polymer_kg - converted_kg : 0.0;
    if (components[i].is_condensed_only()) {
      p.residue.set_mass(Phase::solid, i, kilograms(made + from_feed + unconverted));
    } else {
      p.vapour.set_mass(Phase::vapour, i, kilograms(made + from_feed));
    }
  }
  set_state(p.vapour, settings.reactor_temperature, settings.pressure);
  set_state(p.residue, settings.reactor_temperature, settings.pressure);
  return p;
}

PurgeSupply purge_supply(const PyrolysisSettings& settings, const ComponentSet& components, const Stream* inert,
                         const std::string& who, Warnings& warnings) {
  // Purge flows are stated at 0 degC and 1 atm ("normal" litres).
  constexpr double normal_temperature_K = 273.15;
  const Temperature Tr = settings.reactor_temperature;
  PurgeSupply p;
  p.nitrogen = components.index_of("nitrogen");
  p.flow_normal_m3_per_s = settings.inert_gas_flow ? to_si(*settings.inert_gas_flow) : 0.0;
  p.added = inert == nullptr && p.flow_normal_m3_per_s > 0.0;
  if (p.added && !p.nitrogen)
    throw ModelError(who + ": inert_gas_flow is given without an inert_gas inlet, so nitrogen is added to the "
                           "vapour, but 'nitrogen' is not among the case's components (expected nitrogen in the "
                           "component list, or an inert_gas inlet stream)");
  if (inert != nullptr && p.flow_normal_m3_per_s > 0.0)
    warnings.add(who + ": the inert_gas inlet supplies the purge; inert_gas_flow is not used");
  if (p.added) {
    const Component& n2 = components[*p.nitrogen];
    const double mol_per_s =
        standard_atmosphere_Pa * p.flow_normal_m3_per_s / (gas_constant_J_per_mol_K * normal_temperature_K);
    p.kg_per_s = mol_per_s * n2.molar_mass;
    p.heating_W = mol_per_s * to_si(vapour_molar_enthalpy(n2, Tr, &warnings));
  }
  if (inert != nullptr && !inert->is_empty()) {
    Stream hot = *inert;
    hot.collapse_into(Phase::vapour);
    set_state(hot, Tr, settings.pressure);
    p.inlet_heating_J = to_si(hot.enthalpy(&warnings)) - to_si(inert->enthalpy(&warnings));
  }
  return p;
}

void fill_pyrolysis_outlets(const PyrolysisSettings& settings, const ProductStreams& products, const Stream* inert,
                            const PurgeSupply& purge, double purge_kg, Stream& vapour, Stream& residue) {
  vapour = products.vapour;
  if (inert != nullptr) {
    Stream gas = *inert;
    gas.collapse_into(Phase::vapour);
    vapour.add_contents(gas);
  }
  if (purge.added) vapour.add_mass(Phase::vapour, *purge.nitrogen, kilograms(purge_kg));
  set_state(vapour, settings.reactor_temperature, settings.pressure);
  vapour.set_bulk_density(std::nullopt);
  residue = products.residue;
  const Temperature T_residue = settings.residue_discharge_temperature.value_or(settings.reactor_temperature);
  set_state(residue, T_residue, settings.pressure);
}

void add_closure_figures(const PyrolysisSettings& settings, const ComponentSet& components,
                         const ElementClosure& closure, double converted_kg, double closure_fraction,
                         BlockResources& resources) {
  resources.add_figure("element_closure_adjustment_kg", closure.total_adjustment * converted_kg, "kg",
                       "sum of the changes to the closure species' yields");
  resources.add_figure("element_closure_adjustment_fraction", closure_fraction, "-",
                       "closure adjustment per kg of polymer charged");
  for (std::size_t j : settings.closure_species)
    resources.add_figure("element_closure_" + components[j].id + "_kg",
                         closure.adjustment[static_cast<Eigen::Index>(j)] * converted_kg, "kg",
                         "change to the yield of " + components[j].id + " that closes the elements");
}

void add_pyrolysis_cautions(const PyrolysisSettings& settings, const Stream& vapour, BlockResources& resources) {
  const Temperature Tr = settings.reactor_temperature;
  resources.cautions.push_back(
      "Hot surfaces and glassware at " + format_celsius(Tr) +
      ": guard the reactor, use a heating mantle or furnace rated for the temperature, and never open it hot.");
  resources.cautions.push_back(
      "Pyrolysis needs an inert atmosphere: purge the reactor with nitrogen before heating and keep the purge on; "
      "air drawn into a hot reactor holding pyrolysis vapour can ignite or explode.");
  if (settings.continuous)
    resources.cautions.push_back(
        "A continuously fed reactor draws air in with its feed: feed through a nitrogen-blanketed hopper and a melt "
        "seal or lock hopper, and draw the hot residue off through a sealed, cooled discharge.");
  resources.cautions.push_back(
      "Pyrolysis gas (hydrogen, methane, ethylene and aromatic vapour) is flammable: lead it through the condenser "
      "to a flare or a safe vent, never into the room.");
  resources.cautions.push_back(
      "Styrene vapour is harmful by inhalation: work in a fume hood or with local exhaust; the condensed monomer "
      "can self-polymerise (add inhibitor, store cool).");
  resources.cautions.push_back(
      "Char may be pyrophoric when hot: let the residue cool under nitrogen before opening the reactor, and dispose "
      "of residue under local rules.");
  const auto flammable = flammable_vapours(vapour);
  const std::string vapour_caution = flammable_vapour_caution("pyrolysis vapour", flammable);
  if (!vapour_caution.empty()) resources.cautions.push_back(vapour_caution);
}

}  // namespace unchain::units
