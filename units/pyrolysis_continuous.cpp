#include "units/pyrolysis_continuous.hpp"

#include <cmath>
#include <string>
#include <vector>

#include "flowsheet/diagnostics.hpp"

namespace unchain::units {

namespace {

// The basis hour of a continuous case: stream amounts are kg per hour and
// energies J per hour.
constexpr double basis_hour_s = 3600.0;
// Below this conversion a warning says how much polymer leaves unconverted.
constexpr double low_conversion = 0.90;

}  // namespace

void compute_continuous_pyrolysis(const PyrolysisSettings& s, const BlockContext& context, const BlockPorts& ports,
                                  BlockResources& resources) {
  const std::string who = "pyrolysis '" + context.block_name + "'";
  const ComponentSet& cs = context.components;
  const Component& polymer = cs[s.polymer];
  const Stream& feed = ports.inlet("feed");
  const Stream* inert = ports.has_inlet("inert_gas") ? &ports.inlet("inert_gas") : nullptr;
  const Temperature Tr = s.reactor_temperature;
  Warnings& warnings = context.warnings;

  // ---- feed rate, melt holdup and residence time ----
  const PyrolysisFeed whole = pyrolysis_feed(s, cs, feed, who);
  const double polymer_kg_per_s = whole.polymer_kg / basis_hour_s;
  const double melt_capacity_m3 = to_si(s.reactor_volume) * s.fill_fraction;
  double holdup_kg = 0.0, tau_s = 0.0;
  if (s.residence_time) {
    tau_s = to_si(*s.residence_time);
    holdup_kg = tau_s * polymer_kg_per_s;
    if (s.melt_density && holdup_kg / to_si(*s.melt_density) > melt_capacity_m3 * (1.0 + 1e-12))
      throw ModelError(who + ": a residence time of " + format_number(tau_s / 60.0, 4) + " min at " +
                       format_number(whole.polymer_kg, 4) + " kg/h of polymer needs " +
                       format_number(holdup_kg / to_si(*s.melt_density) * 1e3, 4) + " L of melt, more than the " +
                       format_number(melt_capacity_m3 * 1e3, 4) +
                       " L the reactor holds at its fill fraction (expected a larger reactor_volume or "
                       "fill_fraction, a lower feed rate, or a shorter residence_time)");
  } else {
    holdup_kg = melt_capacity_m3 * to_si(*s.melt_density);
    tau_s = holdup_kg / polymer_kg_per_s;
  }

  // ---- conversion and yields ----
  const std::vector<double> table_yields = check_pyrolysis_conditions(s, cs, whole, who, warnings);
  const RateConstant k = s.kinetics.total_rate_constant(Tr);
  const double X = mixed_flow_conversion(k, seconds(tau_s));
  Eigen::VectorXd yields = Eigen::VectorXd::Zero(static_cast<Eigen::Index>(cs.size()));
  if (s.yields == YieldSource::kinetics) {
    // Every parallel channel sees the same melt at the one reactor
    // temperature: channel j makes k_j / k of what is converted.
    const std::vector<double> selectivity = s.kinetics.selectivities(Tr);
    for (std::size_t j = 0; j < selectivity.size(); ++j)
      yields[static_cast<Eigen::Index>(s.channel_products[j])] += selectivity[j];
  } else {
    for (std::size_t j = 0; j < table_yields.size(); ++j)
      yields[static_cast<Eigen::Index>(s.table_products[j])] += table_yields[j];
  }
  // The limit is on the feed: an adjustment d per kg converted moves d X of
  // each kg fed.
  const double limit = X > 0.0 ? s.closure_limit / X : 1e300;
  const ElementClosure closure = close_element_balance(cs, s.polymer, yields, s.closure_species, limit);
  const double closure_fraction = closure.total_adjustment * X;
  if (closure_fraction > pyrolysis_closure_warning_fraction)
    warnings.add(who + ": closing the element balance of the yields moves " +
                 format_number(100.0 * closure_fraction, 3) + " % of the polymer fed (above 1 %)");
  if (X < low_conversion)
    warnings.add(who + ": only " + format_number(100.0 * X, 3) + " % of the polymer is converted at a residence time "
                 "of " + format_number(tau_s / 60.0, 4) + " min; the rest leaves unconverted with the residue "
                 "(a larger melt holdup, a lower feed rate or a higher temperature converts more)");

  const ProductStreams products = pyrolysis_products(s, cs, feed, whole, X, closure.yields);

  // ---- purge gas and outlets ----
  const PurgeSupply purge = purge_supply(s, cs, inert, who, warnings);
  const double purge_kg = purge.kg_per_s * basis_hour_s;
  Stream& vapour = ports.outlet("vapour");
  Stream& residue = ports.outlet("residue");
  fill_pyrolysis_outlets(s, products, inert, purge, purge_kg, vapour, residue);

  // ---- energy, per basis hour ----
  // The heater holds the reactor at its set-point: it gives the heat that
  // takes the feed to its products at the reactor temperature, heats the
  // purge, and covers the steady wall loss. A residue discharged cooler
  // gives its heat off outside the reactor.
  const HeatSplit split = split_heat(feed, {&products.vapour, &products.residue}, warnings);
  const double purge_heating_J = purge.inlet_heating_J + purge.heating_W * basis_hour_s;
  const double to_streams_J = split.total() + purge_heating_J;
  SteadyHeatingResult steady;
  try {
    steady = heat_vessel_steadily(s.vessel, from_si<Power>(to_streams_J / basis_hour_s), Tr,
                                  context.ambient_temperature);
  } catch (const ModelError& e) {
    throw ModelError(who + ": " + e.what());
  }
  double H_in = to_si(feed.enthalpy(&warnings));
  if (inert != nullptr) H_in += to_si(inert->enthalpy(&warnings));
  const double H_out = to_si(vapour.enthalpy(&warnings)) + to_si(residue.enthalpy(&warnings));
  const double residue_cooling = to_si(products.residue.enthalpy(&warnings)) - to_si(residue.enthalpy(&warnings));
  resources.process_heat_J = H_out - H_in;
  const double drawn_J = to_si(steady.power_drawn) * basis_hour_s;
  resources.cooling_J = to_streams_J < 0.0 ? -to_streams_J : 0.0;
  resources.heat_source = heat_source_name(s.heat_source);
  if (s.heat_source == HeatSource::electric) {
    resources.heat_drawn_J = drawn_J;
    resources.electricity_J = drawn_J;
  } else {
    resources.heat_drawn_J = drawn_J / s.burner_efficiency;
  }
  resources.duration_s = 0.0;  // runs around the clock; the basis is one hour

  if (purge.added) resources.materials.push_back({"nitrogen purge", "inert_gas", purge_kg, "kg"});
  resources.equipment.push_back({"pyrolysis reactor", "vessel", "volume", to_si(s.reactor_volume), "m3"});
  resources.equipment.push_back({"pyrolysis reactor heater", "heater", "power", to_si(s.vessel.heater_power), "W"});

  // ---- figures ----
  auto fig = [&](std::string key, double value, std::string unit, std::string description) {
    resources.add_figure(std::move(key), value, std::move(unit), std::move(description));
  };
  fig("reactor_temperature", in_kelvin(Tr), "K", "reactor set-point");
  fig("polymer_feed_rate", polymer_kg_per_s, "kg/s", "polymer fed to the reactor");
  fig("melt_holdup_kg", holdup_kg, "kg",
      s.residence_time ? "residence time x polymer feed rate" : "reactor volume x fill fraction x melt density");
  if (s.melt_density)
    fig("melt_volume", holdup_kg / to_si(*s.melt_density), "m3", "volume of the melt holdup");
  fig("residence_time", tau_s, "s", s.residence_time ? "given" : "melt holdup / polymer feed rate");
  fig("rate_constant_at_set_point", to_si(k), "1/s", "total first-order rate constant at the reactor temperature");
  fig("damkohler_number", to_si(k) * tau_s, "-", "k tau, the mixed-flow reactor's first-order Damkohler number");
  fig("conversion", X, "-", "fraction of the polymer converted, k tau / (1 + k tau)");
  fig("unconverted_polymer_kg", (1.0 - X) * whole.polymer_kg, "kg", "polymer leaving with the residue, per hour");
  if (polymer.polymer) {
    if (auto m = cs.index_of(polymer.polymer->monomer))
      fig("monomer_yield", to_si(vapour.mass(Phase::vapour, *m)) / whole.polymer_kg, "kg/kg",
          "monomer in the vapour per kg of polymer fed");
  }
  add_closure_figures(s, cs, closure, X * whole.polymer_kg, closure_fraction, resources);
  fig("process_heat", resources.process_heat_J, "J", "sum H_out - sum H_in of the streams, per hour");
  fig("sensible_heat_feed_to_298K", split.sensible_feed_J, "J", "bringing the feed to 25 degC, per hour");
  fig("reaction_heat_298K", split.reaction_J, "J", "reaction to condensed products at 25 degC, per hour");
  fig("vaporization_heat_298K", split.vaporization_J, "J", "vaporization of the volatile products at 25 degC, per hour");
  fig("sensible_heat_products", split.sensible_products_J, "J",
      "products from 25 degC to the reactor temperature, per hour");
  fig("inert_gas_heating", purge_heating_J, "J", "purge gas to the reactor temperature, per hour");
  fig("residue_cooling", residue_cooling, "J", "heat the residue gives off down to its discharge temperature, per hour");
  fig("heat_to_streams_rate", to_si(steady.heat_to_streams), "W", "heat into the streams while at the set-point");
  fig("loss_at_set_point", to_si(steady.loss), "W", "steady wall loss at the reactor temperature");
  fig("heater_power_drawn", to_si(steady.power_drawn), "W", "heat the heater gives: streams and wall loss");
  fig("heater_energy", drawn_J, "J", "heat the heater gives, per hour");
  fig("heat_lost_through_wall", to_si(steady.loss) * basis_hour_s, "J", "vessel wall loss, per hour");
  fig("max_reachable_temperature", in_kelvin(steady.max_reachable_temperature), "K", "ambient + P/UA");
  fig("heater_energy_per_kg_polymer", drawn_J / whole.polymer_kg, "J/kg", "heat given per kg of polymer fed");
  if (purge.added) {
    fig("nitrogen_purge_kg", purge_kg, "kg", "nitrogen added to the vapour by the purge, per hour");
    fig("nitrogen_purge_normal_volume", purge.flow_normal_m3_per_s * basis_hour_s, "m3",
        "purge volume at 0 degC, 1 atm, per hour");
  }

  add_pyrolysis_cautions(s, vapour, resources);
}

}  // namespace unchain::units
