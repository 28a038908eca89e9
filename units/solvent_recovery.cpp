#include "units/solvent_recovery.hpp"

#include <algorithm>
#include <cmath>
#include <memory>
#include <optional>

#include "flowsheet/pure_properties.hpp"
#include "flowsheet/thermo/flory_huggins.hpp"
#include "units/block_helpers.hpp"
#include "units/block_registry.hpp"
#include "units/vessel_heating.hpp"

namespace unchain::units {

AmountOfSubstance sweep_gas_for_flammable_limit(const std::vector<double>& evaporated_mol,
                                                const std::vector<double>& lower_limits, double limit_fraction) {
  double weighted = 0.0;  // sum n_i / LFL_i over the flammable vapours
  double total = 0.0;     // all vapour moles
  for (std::size_t i = 0; i < evaporated_mol.size(); ++i) {
    total += evaporated_mol[i];
    if (i < lower_limits.size() && lower_limits[i] > 0.0) weighted += evaporated_mol[i] / lower_limits[i];
  }
  return from_si<AmountOfSubstance>(std::max(0.0, weighted / limit_fraction - total));
}

Eigen::VectorXd condensable_left_in_vapour(const Eigen::VectorXd& condensable_mol, double gas_mol,
                                           const Eigen::VectorXd& K) {
  const double condensable_total = condensable_mol.sum();
  Eigen::VectorXd left = Eigen::VectorXd::Zero(condensable_mol.size());
  if (condensable_total <= 0.0) return left;
  const double F = condensable_total + std::max(0.0, gas_mol);
  const Eigen::VectorXd z = condensable_mol / F;
  const double zg = std::max(0.0, gas_mol) / F;
  // Rachford-Rice with the non-condensable gas in the limit K -> infinity:
  //   f(beta) = z_g / beta + sum z_i (K_i - 1) / (1 + beta (K_i - 1)),
  // which falls monotonically in beta; the root lies in [z_g, 1].
  auto f = [&](double beta) {
    double sum = zg > 0.0 ? zg / beta : 0.0;
    for (Eigen::Index i = 0; i < z.size(); ++i)
      if (z[i] > 0.0) sum += z[i] * (K[i] - 1.0) / (1.0 + beta * (K[i] - 1.0));  // absent ones may have K = 0
    return sum;
  };
  if (f(1.0) >= 0.0) return condensable_mol;  // above the dew point: nothing condenses
  double low = zg;
  if (zg <= 0.0 && f(0.0) <= 0.0) return left;  // below the bubble point: all condenses
  double high = 1.0;
  for (int iteration = 0; iteration < 400 && high - low > 1e-15 * high; ++iteration) {
    const double mid = 0.5 * (low + high);
    if (mid <= low || mid >= high) break;
    if (f(mid) > 0.0) low = mid;
    else high = mid;
  }
  const double beta = 0.5 * (low + high);
  for (Eigen::Index i = 0; i < z.size(); ++i)
    if (z[i] > 0.0) left[i] = condensable_mol[i] * K[i] * beta / (1.0 + beta * (K[i] - 1.0));
  return left;
}

namespace {

// Molar volume of an ideal gas at 0 degC and 1 atm (normal cubic metres).
constexpr double normal_molar_volume_m3 = gas_constant_J_per_mol_K * 273.15 / standard_atmosphere_Pa;
// Heat capacity of air near 300-400 K, used for sweep air the case cannot
// represent as a stream (no nitrogen and oxygen components): about
// 29.1-29.4 J/(mol K) (Incropera and DeWitt, Table A.4, from memory).
constexpr double air_molar_heat_capacity = 29.2;

enum class DryerKind { oven, vacuum_dryer, evaporator, rotary_evaporator };

std::optional<DryerKind> parse_dryer(std::string_view text) {
  if (text == "oven") return DryerKind::oven;
  if (text == "vacuum_dryer") return DryerKind::vacuum_dryer;
  if (text == "evaporator") return DryerKind::evaporator;
  if (text == "rotary_evaporator") return DryerKind::rotary_evaporator;
  return std::nullopt;
}

const char* dryer_item(DryerKind kind) {
  switch (kind) {
    case DryerKind::oven: return "drying oven";
    case DryerKind::vacuum_dryer: return "vacuum dryer";
    case DryerKind::evaporator: return "evaporator";
    case DryerKind::rotary_evaporator: return "rotary evaporator";
  }
  return "dryer";
}

struct RecoverySettings {
  Temperature drying_temperature = kelvin(0.0);
  Pressure pressure = pascal(standard_atmosphere_Pa);
  DryerKind dryer = DryerKind::oven;
  std::optional<std::size_t> solvent;
  std::optional<std::size_t> polymer;
  bool flory_huggins_residual = false;
  double residual_solvent_fraction = 0.0;
  double lfl_fraction_limit = 0.25;
  // Air-swept dryer kept below a fraction of the LFL (an oven), or a closed
  // vessel whose atmosphere is the solvent vapour itself (vacuum dryer,
  // evaporator): there no air is swept through and the rule does not apply.
  bool lfl_ventilation = true;
  Temperature condenser_temperature = kelvin(0.0);
  VesselDesign vessel;
  std::optional<Density> product_bulk_density;
  Time drying_time = seconds(0.0);
};

Eigen::Index at(std::size_t i) { return static_cast<Eigen::Index>(i); }

std::string path_in(const MappingReader& parameters, std::string_view key) {
  return parameters.path().empty() ? std::string(key) : parameters.path() + "." + std::string(key);
}

std::optional<std::size_t> largest_of_kind(const ComponentSet& components, const Eigen::VectorXd& masses,
                                           ComponentKind kind) {
  std::optional<std::size_t> best;
  for (std::size_t i = 0; i < components.size(); ++i) {
    if (components[i].kind != kind || masses[at(i)] <= 0.0) continue;
    if (!best || masses[at(i)] > masses[at(*best)]) best = i;
  }
  return best;
}

class SolventRecovery final : public BlockModel {
 public:
  explicit SolventRecovery(RecoverySettings s) : s_(std::move(s)) {}

  [[nodiscard]] std::vector<PortSpec> inlet_ports() const override {
    return {single_port("feed", "the gel: polymer with solvent"),
            optional_port("sweep_gas", "air or nitrogen swept through the dryer (supplied as ambient air when absent)")};
  }
  [[nodiscard]] std::vector<PortSpec> outlet_ports() const override {
    return {single_port("polymer", "densified polymer with its residual solvent (solid)"),
            single_port("recovered_solvent", "condensate from the condenser (liquid)"),
            single_port("vent", "sweep gas with the solvent the condenser did not catch")};
  }

  void compute(const BlockContext& context, const BlockPorts& ports, BlockResources& resources) const override;

 private:
  RecoverySettings s_;
};

void SolventRecovery::compute(const BlockContext& context, const BlockPorts& ports, BlockResources& resources) const {
  const ComponentSet& components = context.components;
  const std::size_t n = components.size();
  const std::string who = "solvent_recovery '" + context.block_name + "'";
  const Stream& feed = ports.inlet("feed");
  const Stream* sweep_in = ports.has_inlet("sweep_gas") ? &ports.inlet("sweep_gas") : nullptr;
  const Eigen::VectorXd feed_kg = feed.component_masses();
  const double T_dry = in_kelvin(s_.drying_temperature);
  const double T_c = in_kelvin(s_.condenser_temperature);
  const double P = to_si(s_.pressure);
  const double T_a = in_kelvin(context.ambient_temperature);

  const std::optional<std::size_t> solvent_index =
      s_.solvent ? s_.solvent : largest_of_kind(components, feed_kg, ComponentKind::volatile_liquid);
  if (!solvent_index) throw ModelError(who + ": the feed carries no solvent (no volatile component)");
  const std::size_t is = *solvent_index;
  const Component& solvent = components[is];
  const std::optional<std::size_t> polymer_index =
      s_.polymer ? s_.polymer : largest_of_kind(components, feed_kg, ComponentKind::polymer);
  const double polymer_kg = polymer_index ? feed_kg[at(*polymer_index)] : 0.0;
  if (!polymer_index || polymer_kg <= 0.0) throw ModelError(who + ": the feed carries no polymer to dry");
  const Component& polymer = components[*polymer_index];
  const double solvent_feed_kg = feed_kg[at(is)];
  if (T_c >= T_dry)
    context.warnings.add(who + ": the condenser (" + format_celsius(s_.condenser_temperature) +
                         ") is not colder than the dryer (" + format_celsius(s_.drying_temperature) +
                         "): little or nothing condenses");

  // ---- the sweep gas that comes in ---------------------------------------------------
  // Permanent gases of the sweep and of the feed pass through as inerts;
  // volatile components of a given sweep (humidity) join the condensables.
  Eigen::VectorXd sweep_kg = Eigen::VectorXd::Zero(at(n));
  if (sweep_in != nullptr) sweep_kg = sweep_in->component_masses();
  double tracked_inert_mol = 0.0;
  Eigen::VectorXd inert_kg = Eigen::VectorXd::Zero(at(n));
  for (std::size_t i = 0; i < n; ++i) {
    if (components[i].kind != ComponentKind::gas) continue;
    inert_kg[at(i)] = sweep_kg[at(i)] + feed_kg[at(i)];
    tracked_inert_mol += inert_kg[at(i)] / components[i].molar_mass;
  }
  double sweep_volatile_mol = 0.0;
  for (std::size_t i = 0; i < n; ++i)
    if (components[i].kind == ComponentKind::volatile_liquid) sweep_volatile_mol += sweep_kg[at(i)] / components[i].molar_mass;

  // ---- residual solvent and what evaporates ---------------------------------------------
  const double psat_dry = to_si(vapour_pressure(solvent, s_.drying_temperature, &context.warnings));
  const FloryHugginsPair* pair = components.find_flory_huggins(polymer.id, solvent.id);
  if (s_.flory_huggins_residual && pair == nullptr)
    throw ModelError(who + ": residual_solvent: flory_huggins needs a Flory-Huggins chi for " + polymer.id + " in " +
                     solvent.id + " (none in the component data)");
  std::vector<double> lfl(n, 0.0);
  std::vector<std::string> no_limits;
  for (std::size_t i = 0; i < n; ++i) {
    const Component& c = components[i];
    if (c.kind != ComponentKind::volatile_liquid || feed_kg[at(i)] <= 0.0) continue;
    if (c.flammability_limits) lfl[i] = c.flammability_limits->lower;
    else if (c.flash_point) no_limits.push_back(c.id);
  }
  for (const auto& id : no_limits)
    context.warnings.add(who + ": " + id + " has a flash point but no flammability limits: it does not count "
                                          "in the sweep gas set by the LFL rule");

  double residual_kg = std::min(solvent_feed_kg, s_.residual_solvent_fraction * polymer_kg);
  double sweep_mol = 0.0;
  double untracked_sweep_mol = 0.0;
  double y_solvent = 0.0;
  double activity = 0.0;
  double phi_polymer = 0.0;
  Eigen::VectorXd evaporated_mol = Eigen::VectorXd::Zero(at(n));
  auto evaporate = [&] {
    // Everything volatile leaves but the solvent's residual.
    for (std::size_t i = 0; i < n; ++i) {
      if (components[i].kind != ComponentKind::volatile_liquid) continue;
      const double stays = i == is ? residual_kg : 0.0;
      evaporated_mol[at(i)] = std::max(0.0, feed_kg[at(i)] - stays) / components[i].molar_mass;
    }
    const std::vector<double> moles(evaporated_mol.data(), evaporated_mol.data() + n);
    const double required =
        s_.lfl_ventilation ? to_si(sweep_gas_for_flammable_limit(moles, lfl, s_.lfl_fraction_limit)) : 0.0;
    // Gas already there (a given sweep, gases from the feed); without a
    // sweep inlet an air-swept dryer makes up the rest as ambient air.
    const double present = tracked_inert_mol + sweep_volatile_mol;
    untracked_sweep_mol = sweep_in != nullptr ? 0.0 : std::max(0.0, required - present);
    sweep_mol = present + untracked_sweep_mol;
    const double vapour_total = evaporated_mol.sum() + sweep_mol;
    y_solvent = vapour_total > 0.0 ? evaporated_mol[at(is)] / vapour_total : 0.0;
    if (vapour_total > 0.0 && evaporated_mol[at(is)] <= 0.0) y_solvent = 0.0;
    return required;
  };
  double sweep_required_mol = evaporate();
  if (s_.flory_huggins_residual && solvent_feed_kg > 0.0) {
    // Equilibrium with the dryer exit gas: a = y_s P / Psat(T_dry); the
    // exit concentration depends on what evaporates, hence the iteration
    // (it converges in a few steps: the residual is a small part).
    const double rho_p = to_si(condensed_density(polymer, s_.drying_temperature, &context.warnings));
    const double rho_s = to_si(liquid_density(solvent, s_.drying_temperature, &context.warnings));
    bool converged = false;
    for (int iteration = 0; iteration < 100; ++iteration) {
      const double y = evaporated_mol[at(is)] > 0.0 ? y_solvent : 1.0;
      activity = y * P / psat_dry;
      if (activity >= 1.0)
        throw ModelError(who + ": at " + format_celsius(s_.drying_temperature) + " the vapour pressure of " +
                         solvent.id + " (" + format_number(psat_dry, 5) + " Pa) does not exceed its partial pressure " +
                         format_number(y * P, 5) + " Pa in the dryer gas: the solvent cannot evaporate (raise the "
                         "drying temperature, lower the pressure or add sweep gas)");
      phi_polymer = flory_huggins_polymer_fraction_at_activity(activity, pair->chi);
      const double next = std::min(solvent_feed_kg, solvent_to_polymer_mass_ratio(phi_polymer, rho_s, rho_p) * polymer_kg);
      const bool done = std::abs(next - residual_kg) <= 1e-13 * std::max(polymer_kg, 1e-30);
      residual_kg = next;
      sweep_required_mol = evaporate();
      if (done) {
        converged = true;
        break;
      }
    }
    if (!converged) throw ConvergenceError(who + ": the Flory-Huggins residual solvent did not converge");
    if (std::abs(T_dry - pair->temperature_K) > 30.0)
      context.warnings.add(who + ": the Flory-Huggins chi of " + polymer.id + " in " + solvent.id + " is given at " +
                           format_celsius(kelvin(pair->temperature_K)) + " and used at " +
                           format_celsius(s_.drying_temperature));
    if (polymer.polymer && polymer.polymer->glass_transition_temperature &&
        T_dry < polymer.polymer->glass_transition_temperature->value)
      context.warnings.add(who + ": drying below the glass transition of " + polymer.id + " (" +
                           format_celsius(kelvin(polymer.polymer->glass_transition_temperature->value)) +
                           "): solvent diffuses slowly out of glassy polymer, so the equilibrium residual is a lower "
                           "bound; real residuals are higher (give residual_solvent_fraction from trials)");
  } else if (evaporated_mol[at(is)] > 0.0 && y_solvent * P >= psat_dry) {
    throw ModelError(who + ": at " + format_celsius(s_.drying_temperature) + " the vapour pressure of " + solvent.id +
                     " (" + format_number(psat_dry, 5) + " Pa) does not exceed its partial pressure " +
                     format_number(y_solvent * P, 5) + " Pa in the dryer gas: the solvent cannot evaporate (raise "
                     "the drying temperature, lower the pressure or add sweep gas)");
  }
  if (!s_.flory_huggins_residual && s_.residual_solvent_fraction * polymer_kg > solvent_feed_kg)
    context.warnings.add(who + ": the feed holds less solvent than the residual asked for: nothing of it evaporates");

  // Concentration in the dryer gas against the flammable limit (Le
  // Chatelier): sum y_i / LFL_i, as a fraction of the mixture's LFL.
  const double vapour_total = evaporated_mol.sum() + sweep_mol;
  double lfl_fraction = 0.0;
  for (std::size_t i = 0; i < n; ++i)
    if (lfl[i] > 0.0 && vapour_total > 0.0) lfl_fraction += evaporated_mol[at(i)] / vapour_total / lfl[i];
  // The limit matters where the dryer gas holds oxygen: an air-swept
  // dryer, or a closed one given a sweep with oxygen in it.
  const auto oxygen = components.index_of("oxygen");
  const bool oxygen_present = untracked_sweep_mol > 0.0 || (oxygen && inert_kg[at(*oxygen)] > 0.0);
  if ((s_.lfl_ventilation || oxygen_present) && lfl_fraction > s_.lfl_fraction_limit * (1.0 + 1e-9)) {
    const std::vector<double> moles(evaporated_mol.data(), evaporated_mol.data() + n);
    const double needed = to_si(sweep_gas_for_flammable_limit(moles, lfl, s_.lfl_fraction_limit));
    context.warnings.add(who + ": the solvent vapour in the dryer reaches " + format_number(100.0 * lfl_fraction, 3) +
                         " % of its lower flammable limit, above the " + format_number(100.0 * s_.lfl_fraction_limit, 3) +
                         " % allowed: raise the sweep gas to at least " +
                         format_number(needed * normal_molar_volume_m3, 4) + " m3 (0 degC, 1 atm)");
  }

  // ---- outlets ----------------------------------------------------------------------------------
  Stream& product = ports.outlet("polymer");
  Stream& condensate = ports.outlet("recovered_solvent");
  Stream& vent = ports.outlet("vent");
  product = empty_like(feed, s_.drying_temperature, s_.pressure);
  condensate = empty_like(feed, s_.condenser_temperature, s_.pressure);
  vent = empty_like(feed, s_.condenser_temperature, s_.pressure);
  // Dryer exit gas at T_dry, before the condenser.
  Stream dryer_gas = empty_like(feed, s_.drying_temperature, s_.pressure);
  for (std::size_t i = 0; i < n; ++i) {
    const Component& c = components[i];
    if (c.kind == ComponentKind::gas) {
      dryer_gas.set_mass(Phase::vapour, i, kilograms(inert_kg[at(i)]));
    } else if (c.kind == ComponentKind::volatile_liquid) {
      const double evaporated_kg = evaporated_mol[at(i)] * c.molar_mass;
      product.set_mass(Phase::solid, i, kilograms(feed_kg[at(i)] - evaporated_kg));
      dryer_gas.set_mass(Phase::vapour, i, kilograms(evaporated_kg + sweep_kg[at(i)]));
    } else {
      product.set_mass(Phase::solid, i, kilograms(feed_kg[at(i)] + sweep_kg[at(i)]));
    }
  }
  product.set_bulk_density(s_.product_bulk_density);

  // Condenser: the vent leaves saturated at T_c (ideal liquid, Raoult).
  Eigen::VectorXd condensable = Eigen::VectorXd::Zero(at(n));
  Eigen::VectorXd K = Eigen::VectorXd::Zero(at(n));
  for (std::size_t i = 0; i < n; ++i) {
    if (components[i].kind != ComponentKind::volatile_liquid) continue;
    condensable[at(i)] = to_si(dryer_gas.mass(Phase::vapour, i)) / components[i].molar_mass;
    if (condensable[at(i)] > 0.0)
      K[at(i)] = to_si(vapour_pressure(components[i], s_.condenser_temperature, &context.warnings)) / P;
  }
  const Eigen::VectorXd left = condensable_left_in_vapour(condensable, tracked_inert_mol + untracked_sweep_mol, K);
  for (std::size_t i = 0; i < n; ++i) {
    const Component& c = components[i];
    if (c.kind == ComponentKind::gas) {
      vent.set_mass(Phase::vapour, i, kilograms(inert_kg[at(i)]));
    } else if (c.kind == ComponentKind::volatile_liquid) {
      vent.set_mass(Phase::vapour, i, kilograms(left[at(i)] * c.molar_mass));
      condensate.set_mass(Phase::liquid, i, kilograms((condensable[at(i)] - left[at(i)]) * c.molar_mass));
    }
  }

  // ---- energy ---------------------------------------------------------------------------------
  Warnings* w = &context.warnings;
  const double H_feed = to_si(feed.enthalpy(w));
  const double H_sweep_in = sweep_in != nullptr ? to_si(sweep_in->enthalpy(w)) : 0.0;
  // The split into sensible heat and vaporization follows the path "heat
  // the liquid charge to T_dry, then evaporate at T_dry". The hot charge is
  // only a bookkeeping state (a solvent boiling below T_dry would be a
  // superheated liquid there), so its correlation-range warnings are not
  // kept; the total, H_out - H_in, does not depend on the path.
  Stream charge_hot = feed;
  charge_hot.set_temperature(s_.drying_temperature);
  const double H_charge_hot = to_si(charge_hot.enthalpy(nullptr));
  const double sensible = H_charge_hot - H_feed;
  Stream sweep_hot(components);
  double sweep_heating = 0.0;
  if (sweep_in != nullptr) {
    sweep_hot = *sweep_in;
    sweep_hot.set_temperature(s_.drying_temperature);
    sweep_heating = to_si(sweep_hot.enthalpy(w)) - H_sweep_in;
  }
  // Vaporization at T_dry: polymer product plus dryer gas less the hot
  // charge and the hot sweep gas.
  const double vaporization = to_si(product.enthalpy(w)) + to_si(dryer_gas.enthalpy(w)) - H_charge_hot -
                              (sweep_in != nullptr ? to_si(sweep_hot.enthalpy(w)) : 0.0);
  const double condenser_duty = to_si(dryer_gas.enthalpy(w)) - to_si(vent.enthalpy(w)) - to_si(condensate.enthalpy(w));
  // Sweep air outside the streams (no sweep inlet): heating it is heat the
  // dryer draws that leaves with the vent, and the condenser cools it.
  double untracked_heating = 0.0;
  double untracked_cooling = 0.0;
  if (untracked_sweep_mol > 0.0) {
    const auto n2 = components.index_of("nitrogen");
    const auto o2 = components.index_of("oxygen");
    if (n2 && o2) {
      Eigen::VectorXd air = Eigen::VectorXd::Zero(at(n));
      air[at(*n2)] = 0.79 * untracked_sweep_mol * components[*n2].molar_mass;
      air[at(*o2)] = 0.21 * untracked_sweep_mol * components[*o2].molar_mass;
      const double h_a = to_si(phase_enthalpy(components, air, Phase::vapour, context.ambient_temperature, w));
      const double h_d = to_si(phase_enthalpy(components, air, Phase::vapour, s_.drying_temperature, w));
      const double h_c = to_si(phase_enthalpy(components, air, Phase::vapour, s_.condenser_temperature, w));
      untracked_heating = h_d - h_a;
      untracked_cooling = h_d - h_c;
    } else {
      untracked_heating = untracked_sweep_mol * air_molar_heat_capacity * (T_dry - T_a);
      untracked_cooling = untracked_sweep_mol * air_molar_heat_capacity * (T_dry - T_c);
    }
  }
  const double H_out = to_si(product.enthalpy(w)) + to_si(condensate.enthalpy(w)) + to_si(vent.enthalpy(w));
  // Net heat into the streams: dryer heat less condenser duty, taken as
  // the enthalpy difference itself so that the balance closes exactly.
  resources.process_heat_J = H_out - H_feed - H_sweep_in;
  resources.cooling_J = std::max(0.0, condenser_duty) + std::max(0.0, untracked_cooling);
  resources.heat_source = "electric";

  // Heat the vessel draws: the charge's sensible heat sets the heat-up;
  // vaporization and sweep heating are delivered at the set-point.
  const double process_at_set_point = std::max(0.0, vaporization + sweep_heating + untracked_heating);
  double time_at_set_point = 0.0;
  if (context.basis == Basis::batch) {
    VesselCharge charge;
    const double dT = T_dry - in_kelvin(feed.temperature());
    charge.charge_heat_capacity = from_si<HeatCapacity>(dT > 0.0 ? std::max(0.0, sensible) / dT : 0.0);
    charge.start = feed.temperature();
    charge.set_point = s_.drying_temperature;
    charge.ambient = context.ambient_temperature;
    charge.hold_time = s_.drying_time;
    charge.process_heat_at_set_point = joules(process_at_set_point);
    VesselHeatingResult heating;
    try {
      heating = heat_vessel(s_.vessel, charge);
    } catch (const ModelError& e) {
      throw ModelError(who + ": " + e.what());
    }
    resources.heat_drawn_J = to_si(heating.energy_drawn);
    resources.electricity_J = to_si(heating.energy_drawn);
    resources.duration_s = to_si(heating.total_time());
    time_at_set_point = to_si(heating.hold_time);
    resources.add_figure("heat_up_time", to_si(heating.heat_up_time), "s", "heating the charge to the drying temperature");
    resources.add_figure("time_at_drying_temperature", time_at_set_point, "s",
                         "max(drying_time, evaporation heat / (heater power - wall loss))");
    resources.add_figure("heat_lost_through_wall", to_si(heating.energy_lost), "J", "vessel wall loss, heat-up and hold");
    resources.add_figure("heat_to_vessel", to_si(heating.energy_to_vessel), "J", "sensible heat of the vessel itself");
    resources.add_figure("max_reachable_temperature", in_kelvin(heating.max_reachable_temperature), "K",
                         "ambient + heater power / UA");
    resources.add_figure("loss_conductance", to_si(heating.loss_conductance), "W/K", "UA of the vessel wall");
  } else {
    SteadyHeatingResult heating;
    try {
      heating = heat_vessel_steadily(s_.vessel, from_si<Power>((std::max(0.0, sensible) + process_at_set_point) / 3600.0),
                                     s_.drying_temperature, context.ambient_temperature);
    } catch (const ModelError& e) {
      throw ModelError(who + ": " + e.what());
    }
    resources.heat_drawn_J = to_si(heating.power_drawn) * 3600.0;
    resources.electricity_J = resources.heat_drawn_J;
    resources.add_figure("heat_lost_through_wall", to_si(heating.loss) * 3600.0, "J", "vessel wall loss per hour");
    resources.add_figure("max_reachable_temperature", in_kelvin(heating.max_reachable_temperature), "K",
                         "ambient + heater power / UA");
    resources.add_figure("loss_conductance", to_si(heating.loss_conductance), "W/K", "UA of the vessel wall");
  }
  const double period = context.basis == Basis::batch ? time_at_set_point : 3600.0;

  // ---- resources, equipment, figures ---------------------------------------------------------------
  const double sweep_normal_m3 = sweep_mol * normal_molar_volume_m3;
  if (untracked_sweep_mol > 0.0)
    resources.materials.push_back(
        {"sweep air (m3 at 0 degC, 1 atm)", "air", untracked_sweep_mol * normal_molar_volume_m3, "m3"});
  resources.equipment.push_back({dryer_item(s_.dryer), "dryer", s_.vessel.volume ? "volume" : "area",
                                 s_.vessel.volume ? to_si(*s_.vessel.volume) : to_si(s_.vessel.outer_area),
                                 s_.vessel.volume ? "m3" : "m2"});
  resources.equipment.push_back({"dryer heater", "heater", "power", to_si(s_.vessel.heater_power), "W"});
  if (period > 0.0 && resources.cooling_J > 0.0)
    resources.equipment.push_back({"solvent condenser", "condenser", "power", resources.cooling_J / period, "W"});
  if (s_.vessel.volume) {
    const double charge_volume = to_si(feed.condensed_volume(w));
    if (charge_volume > to_si(*s_.vessel.volume))
      context.warnings.add(who + ": the charge (" + format_number(charge_volume * 1e3, 4) +
                           " L) does not fit the vessel (" + format_number(to_si(*s_.vessel.volume) * 1e3, 4) + " L)");
  }

  const double recovered_kg = to_si(condensate.mass(Phase::liquid, is));
  const double vent_loss_kg = to_si(vent.mass(Phase::vapour, is));
  resources.add_figure("sweep_gas_normal_volume", sweep_normal_m3, "m3", "sweep gas at 0 degC and 1 atm");
  resources.add_figure("sweep_gas_volume_at_dryer", sweep_mol * gas_constant_J_per_mol_K * T_dry / P, "m3",
                       "sweep gas at the drying temperature and pressure");
  if (s_.lfl_ventilation)
    resources.add_figure("sweep_gas_required_normal_volume", sweep_required_mol * normal_molar_volume_m3, "m3",
                         "least sweep gas that keeps the vapour at the LFL fraction limit (0 degC, 1 atm)");
  if (period > 0.0)
    resources.add_figure("sweep_gas_flow", sweep_normal_m3 / period, "m3/s",
                         "average sweep gas flow at 0 degC and 1 atm while drying");
  if (s_.lfl_ventilation || oxygen_present)
    resources.add_figure("solvent_concentration_percent_lfl", 100.0 * lfl_fraction, "%",
                         "average solvent vapour concentration at the dryer exit, as % of the lower flammable limit");
  resources.add_figure("solvent_mole_fraction_in_dryer_gas", y_solvent, "-", "average, at the dryer exit");
  resources.add_figure("residual_solvent", residual_kg, "kg", "solvent left in the polymer");
  resources.add_figure("residual_solvent_fraction", residual_kg / polymer_kg, "-", "solvent per mass of polymer");
  if (s_.flory_huggins_residual) {
    resources.add_figure("solvent_activity", activity, "-", "y_s P / Psat(T_dry) at the dryer exit");
    resources.add_figure("polymer_volume_fraction", phi_polymer, "-", "Flory-Huggins equilibrium polymer fraction");
  }
  resources.add_figure("solvent_evaporated", evaporated_mol[at(is)] * solvent.molar_mass, "kg", "solvent driven off");
  resources.add_figure("solvent_recovered", recovered_kg, "kg", "solvent in the condensate");
  resources.add_figure("recovered_fraction", solvent_feed_kg > 0.0 ? recovered_kg / solvent_feed_kg : 0.0, "-",
                       "solvent recovered / solvent fed");
  resources.add_figure("vent_solvent_loss", vent_loss_kg, "kg", "solvent leaving with the vent gas");
  const double evaporated_solvent_kg = evaporated_mol[at(is)] * solvent.molar_mass;
  if (y_solvent > 0.0 && y_solvent < 1.0 && evaporated_solvent_kg > 0.0) {
    // Dew point of the dryer gas for the solvent: Psat(T_dew) = y_s P.
    const double dew = in_kelvin(saturation_temperature(solvent, pascal(y_solvent * P), nullptr));
    resources.add_figure("dryer_gas_dew_point", dew, "K", "temperature at which the solvent starts to condense");
    if (recovered_kg < 0.5 * evaporated_solvent_kg)
      context.warnings.add(who + ": the condenser at " + format_celsius(s_.condenser_temperature) + " recovers only " +
                           format_number(100.0 * recovered_kg / evaporated_solvent_kg, 3) +
                           " % of the solvent evaporated: the dryer gas (" + format_number(100.0 * y_solvent, 3) +
                           " % " + solvent.id + ") has its dew point at " + format_celsius(kelvin(dew)) +
                           "; use a much colder condenser, an adsorber, an inert-gas loop or a closed vacuum dryer");
  }
  resources.add_figure("sensible_heat", sensible, "J", "heating the charge to the drying temperature");
  resources.add_figure("vaporization_heat", vaporization, "J", "evaporating the solvent at the drying temperature");
  resources.add_figure("sweep_gas_heating", sweep_heating + untracked_heating, "J", "heating the sweep gas");
  resources.add_figure("condenser_duty", resources.cooling_J, "J", "condensing and cooling the dryer gas");

  // ---- cautions ---------------------------------------------------------------------------------
  if (s_.dryer == DryerKind::oven)
    resources.cautions.push_back(
        "An ordinary laboratory oven is not rated for flammable solvent vapour: use an oven built and ventilated for "
        "it (e.g. per NFPA 86 / EN 1539), keep below 25 % of the LFL, no ignition sources.");
  const double vent_condensable_mol = left.sum();
  const double vent_total_mol = vent_condensable_mol + tracked_inert_mol + untracked_sweep_mol;
  std::string vent_text = "The vent of '" + context.block_name + "' carries " + solvent.id + " vapour";
  if (vent_total_mol > 0.0) {
    const double y_vent = left[at(is)] / vent_total_mol;
    vent_text += " (" + format_number(100.0 * y_vent, 3) + " % by volume";
    if (solvent.flammability_limits)
      vent_text += ", lower flammable limit " + format_number(100.0 * solvent.flammability_limits->lower, 3) + " %";
    vent_text += ")";
  }
  vent_text += ": discharge it outdoors or to an abatement unit, away from ignition sources.";
  resources.cautions.push_back(vent_text);
  if (!s_.lfl_ventilation)
    resources.cautions.push_back(
        "A closed dryer or evaporator is run with solvent vapour, not air, inside: purge it with nitrogen before "
        "heating, keep it leak-tight, and let it cool before letting air in (air leaking into hot solvent vapour "
        "makes a flammable mixture).");
  resources.cautions.push_back(
      "Hot surfaces and glassware: let the dryer cool before unloading, check glassware for cracks before heating, "
      "and never heat a closed vessel.");
}

std::unique_ptr<BlockModel> make_solvent_recovery(MappingReader& parameters, const BlockSetup& setup) {
  RecoverySettings s;
  s.drying_temperature = parameters.quantity<Temperature>("drying_temperature");
  s.pressure = parameters.quantity<Pressure>("pressure", pascal(standard_atmosphere_Pa));
  if (!(to_si(s.pressure) > 0.0)) {
    parameters.error("pressure", "'" + path_in(parameters, "pressure") + "' must be a positive absolute pressure");
    s.pressure = pascal(standard_atmosphere_Pa);
  }
  const std::string dryer = parameters.text("dryer");
  if (auto d = parse_dryer(dryer)) {
    s.dryer = *d;
  } else if (!dryer.empty()) {
    const std::string suggestion = closest_match(dryer, {"oven", "vacuum_dryer", "evaporator", "rotary_evaporator"});
    parameters.error("dryer", "'" + path_in(parameters, "dryer") +
                                  "': unknown dryer (expected oven, vacuum_dryer, evaporator or rotary_evaporator, "
                                  "found \"" + dryer + "\"" +
                                  (suggestion.empty() ? "" : "; did you mean '" + suggestion + "'?") + ")");
  }
  s.solvent = read_component(parameters, "solvent", setup.components, false);
  if (s.solvent && setup.components[*s.solvent].kind != ComponentKind::volatile_liquid)
    parameters.error("solvent", "'" + path_in(parameters, "solvent") + "': '" + setup.components[*s.solvent].id +
                                    "' is not a volatile solvent");
  s.polymer = read_component(parameters, "polymer", setup.components, false);
  if (s.polymer && setup.components[*s.polymer].kind != ComponentKind::polymer)
    parameters.error("polymer", "'" + path_in(parameters, "polymer") + "': '" + setup.components[*s.polymer].id +
                                    "' is not a polymer");

  const bool has_fraction = parameters.has("residual_solvent_fraction");
  const bool has_model = parameters.has("residual_solvent");
  if (has_fraction == has_model)
    parameters.error({}, "'" + parameters.path() +
                             "' needs exactly one of residual_solvent_fraction (kg solvent per kg polymer) or "
                             "residual_solvent: flory_huggins");
  s.residual_solvent_fraction = parameters.number_in("residual_solvent_fraction", 0.0, 0.0, 10.0);
  if (auto model = parameters.optional_text("residual_solvent")) {
    if (*model == "flory_huggins") {
      s.flory_huggins_residual = true;
      if (s.solvent && s.polymer &&
          setup.components.find_flory_huggins(setup.components[*s.polymer].id, setup.components[*s.solvent].id) ==
              nullptr)
        parameters.error("residual_solvent", "'" + path_in(parameters, "residual_solvent") +
                                                 "': no Flory-Huggins chi for " + setup.components[*s.polymer].id +
                                                 " in " + setup.components[*s.solvent].id + " in the component data");
    } else {
      parameters.error("residual_solvent", "'" + path_in(parameters, "residual_solvent") +
                                               "': unknown model (expected flory_huggins, found \"" + *model + "\")");
    }
  }
  s.lfl_fraction_limit = parameters.number_in("lfl_fraction_limit", 0.25, 0.01, 1.0);
  s.lfl_ventilation = s.dryer == DryerKind::oven;
  if (auto ventilation = parameters.optional_text("ventilation")) {
    if (*ventilation == "lfl_rule") {
      s.lfl_ventilation = true;
    } else if (*ventilation == "none") {
      s.lfl_ventilation = false;
    } else {
      const std::string suggestion = closest_match(*ventilation, {"lfl_rule", "none"});
      parameters.error("ventilation", "'" + path_in(parameters, "ventilation") +
                                          "': expected lfl_rule or none (found \"" + *ventilation + "\"" +
                                          (suggestion.empty() ? "" : "; did you mean '" + suggestion + "'?") + ")");
    }
  }
  s.condenser_temperature = parameters.quantity<Temperature>("condenser_temperature");
  s.vessel = read_vessel_design(parameters);
  s.product_bulk_density = parameters.optional_quantity<Density>("product_bulk_density");
  if (s.product_bulk_density && !(to_si(*s.product_bulk_density) > 0.0)) {
    parameters.error("product_bulk_density", "'" + path_in(parameters, "product_bulk_density") + "' must be positive");
    s.product_bulk_density.reset();
  }
  s.drying_time = parameters.quantity<Time>("drying_time", seconds(0.0));
  if (to_si(s.drying_time) < 0.0) {
    parameters.error("drying_time", "'" + path_in(parameters, "drying_time") + "' must not be negative");
    s.drying_time = seconds(0.0);
  }
  parameters.finish();
  return std::make_unique<SolventRecovery>(std::move(s));
}

}  // namespace

void register_solvent_recovery(BlockRegistry& registry) {
  registry.add({"solvent_recovery",
                "dries a gel: sweep gas by the LFL rule, condenser recovers the solvent, vessel heat-up and losses",
                make_solvent_recovery});
}

}  // namespace unchain::units
