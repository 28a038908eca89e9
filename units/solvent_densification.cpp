#include "units/solvent_densification.hpp"

#include <algorithm>
#include <cmath>
#include <memory>
#include <optional>

#include "flowsheet/pure_properties.hpp"
#include "flowsheet/thermo/flory_huggins.hpp"
#include "flowsheet/thermo/vle_support.hpp"
#include "units/block_helpers.hpp"
#include "units/block_registry.hpp"
#include "units/hansen.hpp"

namespace unchain::units {

FoamVolumes foam_volumes(Mass polymer, Density bulk_density, Density solid_density) {
  FoamVolumes v;
  v.foam = polymer / bulk_density;
  v.polymer = polymer / solid_density;
  v.air = to_si(v.foam) > to_si(v.polymer) ? v.foam - v.polymer : from_si<Volume>(0.0);
  return v;
}

namespace {

// Molar mass of dry air (ISO 2533 standard atmosphere), used when the case
// has no nitrogen and oxygen to make air from.
constexpr double dry_air_molar_mass_kg_per_mol = 0.0289644;

enum class RatioKind { mass_ratio, volume_ratio, polymer_mass_fraction };

struct DensificationSettings {
  std::size_t solvent = 0;
  std::optional<std::size_t> polymer;
  RatioKind ratio_kind = RatioKind::mass_ratio;
  double ratio_value = 0.0;
  std::optional<Power> stirrer_power;
  std::optional<Time> mixing_time;
};

std::string path_in(const MappingReader& parameters, std::string_view key) {
  return parameters.path().empty() ? std::string(key) : parameters.path() + "." + std::string(key);
}

Eigen::Index at(std::size_t i) { return static_cast<Eigen::Index>(i); }

class SolventDensification final : public BlockModel {
 public:
  explicit SolventDensification(DensificationSettings s) : s_(s) {}

  [[nodiscard]] std::vector<PortSpec> inlet_ports() const override {
    return {single_port("polymer", "foam: solid polymer with its air as vapour, bulk density set"),
            single_port("solvent", "liquid solvent (fresh, recycled or both)")};
  }
  [[nodiscard]] std::vector<PortSpec> outlet_ports() const override {
    return {single_port("gel", "polymer dissolved or swollen in the solvent (liquid)"),
            single_port("vent", "air released from the foam, saturated with solvent vapour"),
            optional_port("excess_solvent", "solvent beyond what the ratio needs")};
  }

  void compute(const BlockContext& context, const BlockPorts& ports, BlockResources& resources) const override;

 private:
  DensificationSettings s_;

  [[nodiscard]] std::size_t polymer_index(const ComponentSet& components, const Stream& feed,
                                          const std::string& who) const {
    if (s_.polymer) return *s_.polymer;
    std::optional<std::size_t> best;
    const Eigen::VectorXd m = feed.component_masses();
    for (std::size_t i = 0; i < components.size(); ++i) {
      if (components[i].kind != ComponentKind::polymer || m[at(i)] <= 0.0) continue;
      if (!best || m[at(i)] > m[at(*best)]) best = i;
    }
    if (!best) throw ModelError(who + ": the polymer inlet carries no polymer");
    return *best;
  }

  [[nodiscard]] double solvent_needed_kg(double polymer_kg, double polymer_density, double solvent_density) const {
    switch (s_.ratio_kind) {
      case RatioKind::mass_ratio: return s_.ratio_value * polymer_kg;
      case RatioKind::volume_ratio: return s_.ratio_value * polymer_kg / polymer_density * solvent_density;
      case RatioKind::polymer_mass_fraction: return polymer_kg * (1.0 - s_.ratio_value) / s_.ratio_value;
    }
    return 0.0;
  }
};

// The outlets for one trial temperature: the gel and the vent, with the
// vent saturated with solvent at the solvent's activity in the gel.
struct MixedOutlets {
  Stream gel;
  Stream vent;
};

void SolventDensification::compute(const BlockContext& context, const BlockPorts& ports,
                                   BlockResources& resources) const {
  const ComponentSet& components = context.components;
  const std::string who = "solvent_densification '" + context.block_name + "'";
  const Stream& foam = ports.inlet("polymer");
  const Stream& solvent_in = ports.inlet("solvent");
  const std::size_t ip = polymer_index(components, foam, who);
  const std::size_t is = s_.solvent;
  const Component& polymer = components[ip];
  const Component& solvent = components[is];

  // ---- how much solvent -------------------------------------------------------
  const double polymer_kg = foam.component_masses()[at(ip)];
  if (polymer_kg <= 0.0) throw ModelError(who + ": the polymer inlet carries no " + polymer.id);
  const double rho_p = to_si(condensed_density(polymer, foam.temperature(), &context.warnings));
  const double rho_s = to_si(liquid_density(solvent, solvent_in.temperature(), &context.warnings));
  const double needed_kg = solvent_needed_kg(polymer_kg, rho_p, rho_s);
  const double supplied_kg = solvent_in.component_masses()[at(is)];
  if (supplied_kg <= 0.0) throw ModelError(who + ": the solvent inlet carries no " + solvent.id);
  if (needed_kg > supplied_kg * (1.0 + 1e-9))
    throw ModelError(who + ": the ratio needs " + format_number(needed_kg, 6) + " kg of " + solvent.id + " for " +
                     format_number(polymer_kg, 6) + " kg of " + polymer.id + ", but the solvent inlet carries only " +
                     format_number(supplied_kg, 6) + " kg (supply at least the amount needed)");
  double use_fraction = 1.0;
  if (ports.has_outlet("excess_solvent")) {
    use_fraction = std::min(1.0, needed_kg / supplied_kg);
    Stream& excess = ports.outlet("excess_solvent");
    excess = solvent_in.scaled(1.0 - use_fraction);
    excess.set_bulk_density(std::nullopt);
  } else if (supplied_kg > needed_kg * 1.01) {
    context.warnings.add(who + ": the solvent inlet supplies " + format_number(supplied_kg, 6) + " kg of " +
                         solvent.id + ", more than the " + format_number(needed_kg, 6) +
                         " kg the ratio needs; all of it goes into the gel (connect an 'excess_solvent' outlet to "
                         "take only what is needed)");
  }
  const Stream used = solvent_in.scaled(use_fraction);

  // ---- air in the foam -----------------------------------------------------------
  const double solids_kg = to_si(foam.phase_total(Phase::solid));
  Stream solids_only = empty_like(foam, foam.temperature(), foam.pressure());
  solids_only.phase_masses(Phase::solid) = foam.phase_masses(Phase::solid);
  const double solid_volume = solids_kg > 0.0 ? to_si(solids_only.condensed_volume(&context.warnings)) : 0.0;
  const double feed_vapour_volume = to_si(foam.vapour_volume());
  double foam_volume = solid_volume + feed_vapour_volume;
  double air_volume = feed_vapour_volume;
  if (auto bulk = foam.bulk_density(); bulk && solids_kg > 0.0) {
    const FoamVolumes v = foam_volumes(kilograms(solids_kg), *bulk, from_si<Density>(solids_kg / solid_volume));
    foam_volume = to_si(v.foam);
    air_volume = to_si(v.air);
    if (to_si(v.foam) < to_si(v.polymer))
      context.warnings.add(who + ": the bulk density of the polymer inlet is above the solid density of its "
                                 "solids: no air is released");
    if (feed_vapour_volume > 0.0 && std::abs(feed_vapour_volume - air_volume) > 0.1 * std::max(air_volume, 1e-12))
      context.warnings.add(who + ": the vapour in the polymer inlet (" + format_number(feed_vapour_volume * 1e3, 4) +
                           " L at its temperature and pressure) differs by more than 10 % from the air its bulk "
                           "density implies (" + format_number(air_volume * 1e3, 4) + " L)");
  } else if (feed_vapour_volume <= 0.0) {
    context.warnings.add(who + ": the polymer inlet has neither a bulk density nor air (vapour): the air released "
                               "and the volume reduction are not known");
  }
  double air_kg = to_si(foam.phase_total(Phase::vapour));
  if (air_kg <= 0.0 && air_volume > 0.0) {
    // No air in the stream: the figure is computed (ideal gas at the feed's
    // state) but nothing is added to the vent, so mass still balances.
    double molar_mass = dry_air_molar_mass_kg_per_mol;
    const auto n2 = components.index_of("nitrogen");
    const auto o2 = components.index_of("oxygen");
    if (n2 && o2) molar_mass = 0.79 * components[*n2].molar_mass + 0.21 * components[*o2].molar_mass;
    air_kg = to_si(foam.pressure()) * air_volume / (gas_constant_J_per_mol_K * in_kelvin(foam.temperature())) *
             molar_mass;
  }

  // ---- the contents of gel and vent ------------------------------------------------
  // Polymers dissolve (or swell) into the liquid; inert solids stay solid;
  // permanent gases and any vapour go to the vent.
  Stream base_gel(components);
  Stream base_vent(components);
  for (const Stream* in : {&foam, &used}) {
    for (std::size_t i = 0; i < components.size(); ++i) {
      const Component& c = components[i];
      const double condensed = in->phase_masses(Phase::solid)[at(i)] + in->phase_masses(Phase::liquid)[at(i)];
      const double vapour = in->phase_masses(Phase::vapour)[at(i)];
      if (c.kind == ComponentKind::gas) {
        base_vent.add_mass(Phase::vapour, i, kilograms(condensed + vapour));
      } else if (c.kind == ComponentKind::solid) {
        base_gel.add_mass(Phase::solid, i, kilograms(condensed));
      } else {
        base_gel.add_mass(Phase::liquid, i, kilograms(condensed));
        base_vent.add_mass(Phase::vapour, i, kilograms(vapour));
      }
    }
  }
  const Pressure P = pascal(std::min(to_si(foam.pressure()), to_si(solvent_in.pressure())));

  // Vent gas leaves saturated with solvent: y_s P = a_s Psat(T), with a_s
  // from Flory-Huggins when chi is known, else 1 (pure solvent: an upper
  // bound on the loss). Solvent already in the vapour joins the pool.
  const double solvent_pool_kg =
      base_gel.phase_masses(Phase::liquid)[at(is)] + base_vent.phase_masses(Phase::vapour)[at(is)];
  double other_vent_mol = 0.0;
  for (std::size_t i = 0; i < components.size(); ++i)
    if (i != is) other_vent_mol += base_vent.phase_masses(Phase::vapour)[at(i)] / components[i].molar_mass;
  const FloryHugginsPair* pair = components.find_flory_huggins(polymer.id, solvent.id);
  const double gel_polymer_kg = base_gel.phase_masses(Phase::liquid)[at(ip)];

  auto outlets_at = [&](double T_K, Warnings* warnings) {
    MixedOutlets out{base_gel, base_vent};
    set_state(out.gel, kelvin(T_K), P);
    set_state(out.vent, kelvin(T_K), P);
    out.gel.phase_masses(Phase::liquid)[at(is)] = solvent_pool_kg;
    out.vent.phase_masses(Phase::vapour)[at(is)] = 0.0;
    if (other_vent_mol <= 0.0 || solvent_pool_kg <= 0.0) return out;
    const double psat = to_si(vapour_pressure(solvent, kelvin(T_K), warnings));
    const double rho_solvent = to_si(liquid_density(solvent, kelvin(T_K), warnings));
    // The activity belongs to the gel as it leaves (the pool less what the
    // vent takes); the vent takes a small part, so a few substitutions
    // converge to round-off.
    double vent_kg = 0.0;
    for (int iteration = 0; iteration < 50; ++iteration) {
      double activity = 1.0;
      if (pair != nullptr && gel_polymer_kg > 0.0) {
        const double vp = gel_polymer_kg / rho_p;
        const double vs = (solvent_pool_kg - vent_kg) / rho_solvent;
        activity = flory_huggins_solvent_activity(vp / (vp + vs), pair->chi);
      }
      const double p_s = activity * psat;
      if (p_s >= to_si(P))
        throw ModelError(who + ": " + solvent.id + " would boil at " + format_celsius(kelvin(T_K)) + " and " +
                         format_number(to_si(P), 6) + " Pa; cool the solvent or the foam");
      const double vent_mol =
          std::min(other_vent_mol * p_s / (to_si(P) - p_s), solvent_pool_kg / solvent.molar_mass);
      const double next = vent_mol * solvent.molar_mass;
      const bool done = std::abs(next - vent_kg) <= 1e-15 * solvent_pool_kg;
      vent_kg = next;
      if (done) break;
    }
    out.vent.phase_masses(Phase::vapour)[at(is)] = vent_kg;
    out.gel.phase_masses(Phase::liquid)[at(is)] = solvent_pool_kg - vent_kg;
    return out;
  };

  // Adiabatic mixing, no heat of mixing: find T with H_out(T) = H_in.
  // H_out rises with T (sensible heat and solvent evaporation), so the
  // root is bracketed from the two inlet temperatures outwards and closed
  // by TOMS 748, as the bubble and dew points are (vle_support.hpp). Trial
  // temperatures may lie outside correlation ranges, so their warnings are
  // not kept.
  const double H_in = to_si(foam.enthalpy(&context.warnings)) + to_si(used.enthalpy(&context.warnings));
  auto residual = [&](double T_K) {
    const MixedOutlets o = outlets_at(T_K, nullptr);
    const double r = to_si(o.gel.enthalpy()) + to_si(o.vent.enthalpy()) - H_in;
    if (!std::isfinite(r))  // the root search checks its bracket ends only
      throw ModelError(who + ": the outlet enthalpy is not finite at " + format_celsius(kelvin(T_K)));
    return r;
  };
  const vle::Bracket root =
      vle::increasing_temperature_root(residual, in_kelvin(foam.temperature()), in_kelvin(used.temperature()),
                                       who + ": mixed temperature");
  const double T_mix = root.middle();
  MixedOutlets mixed = outlets_at(T_mix, &context.warnings);
  ports.outlet("gel") = mixed.gel;
  ports.outlet("vent") = mixed.vent;
  const Stream& gel = ports.outlet("gel");
  const double H_out = to_si(gel.enthalpy(&context.warnings)) + to_si(mixed.vent.enthalpy(&context.warnings)) +
                       (ports.has_outlet("excess_solvent") ? to_si(ports.outlet("excess_solvent").enthalpy()) : 0.0);
  const double H_in_all = H_in + (ports.has_outlet("excess_solvent")
                                      ? to_si(ports.outlet("excess_solvent").enthalpy())
                                      : 0.0);
  // What is left of the bisection (far below 1e-9 of H) is booked so that
  // the balance closes exactly.
  resources.process_heat_J = H_out - H_in_all;

  // ---- solvent quality --------------------------------------------------------------
  std::string why_not;
  if (auto q = solvent_quality(polymer, solvent, &why_not)) {
    resources.add_figure("relative_energy_difference", q->relative_energy_difference, "-",
                         "Hansen RED = Ra / R0 of the solvent for the polymer (< 1 good)");
    resources.add_figure("hansen_distance", q->distance_MPa_half * 1e3, "Pa^0.5", "Hansen distance Ra");
    if (!q->is_good())
      context.warnings.add(who + ": " + solvent.id + " is a poor solvent for " + polymer.id + " (Hansen RED " +
                           format_number(q->relative_energy_difference, 3) +
                           " >= 1): dissolution will be incomplete");
  } else {
    context.warnings.add(who + ": solvent quality not checked (" + why_not + ")");
  }

  // ---- mixing energy -----------------------------------------------------------------
  if (s_.stirrer_power) {
    const double t = context.basis == Basis::batch ? to_si(*s_.mixing_time) : 3600.0;
    // The stirrer's work is small against the enthalpies here; it is taken
    // as lost to the surroundings (no work to the streams).
    resources.electricity_J = to_si(*s_.stirrer_power) * t;
    resources.equipment.push_back({"dissolving tank stirrer", "mixer", "power", to_si(*s_.stirrer_power), "W"});
  }
  if (context.basis == Basis::batch && s_.mixing_time) resources.duration_s = to_si(*s_.mixing_time);
  resources.heat_source = "electric";

  // ---- figures --------------------------------------------------------------------------
  const double gel_volume = to_si(gel.condensed_volume(&context.warnings));
  const double gel_condensed_kg = to_si(gel.phase_total(Phase::liquid)) + to_si(gel.phase_total(Phase::solid));
  resources.equipment.push_back({"dissolving tank", "vessel", "volume", gel_volume, "m3"});
  resources.add_figure("polymer_mass", polymer_kg, "kg", "polymer dissolved");
  resources.add_figure("solvent_needed", needed_kg, "kg", "solvent the ratio asks for");
  resources.add_figure("solvent_supplied", supplied_kg, "kg", "solvent in the solvent inlet");
  resources.add_figure("solvent_used", supplied_kg * use_fraction, "kg", "solvent taken into the gel");
  resources.add_figure("foam_volume", foam_volume, "m3", "bulk volume of the foam charged");
  resources.add_figure("polymer_volume", solid_volume, "m3", "volume of the solids without voids");
  resources.add_figure("air_released_volume", air_volume, "m3", "air released, at the feed's temperature and pressure");
  resources.add_figure("air_released_mass", air_kg, "kg", "mass of the air released");
  resources.add_figure("gel_volume", gel_volume, "m3", "gel volume: polymer plus solvent volumes (no excess volume)");
  if (gel_volume > 0.0) {
    resources.add_figure("volume_reduction_ratio", foam_volume / gel_volume, "-", "foam volume / gel volume");
    resources.add_figure("polymer_concentration", gel_polymer_kg / gel_volume, "kg/m3",
                         "polymer per gel volume (kg/m3 = g/L)");
  }
  if (gel_condensed_kg > 0.0)
    resources.add_figure("polymer_mass_fraction", gel_polymer_kg / gel_condensed_kg, "-", "polymer mass fraction of the gel");
  resources.add_figure("solvent_in_vent", mixed.vent.phase_masses(Phase::vapour)[at(is)], "kg",
                       "solvent vapour carried off by the released air");
  resources.add_figure("gel_temperature", T_mix, "K", "temperature of the gel after adiabatic mixing");

  std::string flash = solvent.flash_point
                          ? " (flash point " + format_celsius(kelvin(solvent.flash_point->value)) + ")"
                          : std::string();
  resources.cautions.push_back("Dissolving foam in " + solvent.id + flash +
                               " releases flammable solvent vapour with the air: work in a well-ventilated place or "
                               "under extraction, keep ignition sources away (no open flames, sparks or "
                               "non-rated electrical equipment), earth containers against static.");
  if (auto text = flammable_vapour_caution("The vent of '" + context.block_name + "'", flammable_vapours(mixed.vent));
      !text.empty())
    resources.cautions.push_back(text);
}

std::unique_ptr<BlockModel> make_solvent_densification(MappingReader& parameters, const BlockSetup& setup) {
  DensificationSettings s;
  if (auto i = read_component(parameters, "solvent", setup.components, true)) {
    s.solvent = *i;
    const Component& c = setup.components[*i];
    if (c.kind != ComponentKind::volatile_liquid)
      parameters.error("solvent", "'" + path_in(parameters, "solvent") + "': '" + c.id +
                                      "' is not a liquid solvent (expected a component of kind volatile, found " +
                                      kind_name(c.kind) + ")");
  }
  s.polymer = read_component(parameters, "polymer", setup.components, false);
  if (s.polymer && setup.components[*s.polymer].kind != ComponentKind::polymer) {
    parameters.error("polymer", "'" + path_in(parameters, "polymer") + "': '" + setup.components[*s.polymer].id +
                                    "' is not a polymer (expected a component of kind polymer)");
  }

  const char* ratio_keys[] = {"solvent_to_polymer_ratio", "solvent_to_polymer_volume_ratio",
                              "target_polymer_mass_fraction"};
  int given = 0;
  for (const char* key : ratio_keys) given += parameters.has(key) ? 1 : 0;
  if (given != 1)
    parameters.error({}, "'" + parameters.path() +
                             "' needs exactly one of solvent_to_polymer_ratio (mass), solvent_to_polymer_volume_ratio "
                             "or target_polymer_mass_fraction (found " + std::to_string(given) + ")");
  if (auto r = parameters.optional_number_in("solvent_to_polymer_ratio", 1e-3, 1e3)) {
    s.ratio_kind = RatioKind::mass_ratio;
    s.ratio_value = *r;
  }
  if (auto r = parameters.optional_number_in("solvent_to_polymer_volume_ratio", 1e-3, 1e3)) {
    s.ratio_kind = RatioKind::volume_ratio;
    s.ratio_value = *r;
  }
  if (auto r = parameters.optional_number_in("target_polymer_mass_fraction", 1e-3, 0.999)) {
    s.ratio_kind = RatioKind::polymer_mass_fraction;
    s.ratio_value = *r;
  }

  s.stirrer_power = parameters.optional_quantity<Power>("stirrer_power");
  s.mixing_time = parameters.optional_quantity<Time>("mixing_time");
  if (s.stirrer_power && !(to_si(*s.stirrer_power) > 0.0)) {
    parameters.error("stirrer_power", "'" + path_in(parameters, "stirrer_power") + "' must be positive");
    s.stirrer_power.reset();
  }
  if (s.mixing_time && !(to_si(*s.mixing_time) > 0.0)) {
    parameters.error("mixing_time", "'" + path_in(parameters, "mixing_time") + "' must be positive");
    s.mixing_time.reset();
  }
  if (setup.basis == Basis::batch && parameters.has("stirrer_power") && !parameters.has("mixing_time"))
    parameters.error("stirrer_power", "'" + path_in(parameters, "stirrer_power") +
                                          "' needs 'mixing_time' on a batch basis (the electricity is power x time)");
  parameters.finish();
  return std::make_unique<SolventDensification>(s);
}

}  // namespace

void register_solvent_densification(BlockRegistry& registry) {
  registry.add({"solvent_densification",
                "dissolves foam in a solvent: releases the air, gives a gel; Hansen solvent-quality check",
                make_solvent_densification});
}

}  // namespace unchain::units
