#include "units/pyrolysis.hpp"

#include <algorithm>
#include <cmath>
#include <memory>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "flowsheet/diagnostics.hpp"
#include "flowsheet/pure_properties.hpp"
#include "flowsheet/yaml_reader.hpp"
#include "units/block_helpers.hpp"
#include "units/block_registry.hpp"
#include "units/element_closure.hpp"
#include "units/pyrolysis_continuous.hpp"
#include "units/pyrolysis_kinetics.hpp"
#include "units/pyrolysis_parts.hpp"
#include "units/vessel_heating.hpp"
#include "units/yield_table.hpp"

namespace unchain::units {

namespace {

// The hard limits outside which the lumped kinetics and the vessel model
// mean nothing.
constexpr double lowest_C = 300.0;
constexpr double highest_C = 900.0;
// A warning when more than this share of the conversion happens below the
// kinetic set's range during heat-up.
constexpr double heat_up_extrapolation_share = 0.10;

// Conversion and raw (unclosed) yields of one run.
struct RunKinetics {
  double conversion = 0.0;
  double conversion_heat_up = 0.0;
  double conversion_below_range = 0.0;  // converted during heat-up below the kinetic set's range
  Time reaction_hold = seconds(0.0);    // time at the set-point the kinetics ask for
  Eigen::VectorXd yields;               // kg per kg converted, by component index
};

class Pyrolysis final : public BlockModel {
 public:
  explicit Pyrolysis(PyrolysisSettings settings) : s_(std::move(settings)) {}

  [[nodiscard]] std::vector<PortSpec> inlet_ports() const override {
    return {single_port("feed", s_.continuous
                                    ? "polymer fed by the hour (solid or melt), with any residual solvent"
                                    : "polymer charge (solid), with any residual solvent; its bulk density sets the "
                                      "charge"),
            optional_port("inert_gas", "purge gas (nitrogen) through the reactor")};
  }
  [[nodiscard]] std::vector<PortSpec> outlet_ports() const override {
    return {single_port("vapour", "pyrolysis vapour and gas with the purge gas, at the reactor temperature"),
            single_port("residue", s_.continuous ? "char and unconverted polymer drawn off with the melt bleed"
                                                 : "char and unconverted polymer left in the reactor")};
  }

  void compute(const BlockContext& context, const BlockPorts& ports, BlockResources& resources) const override;

 private:
  PyrolysisSettings s_;

  void compute_batch(const BlockContext& context, const BlockPorts& ports, BlockResources& resources) const;
  [[nodiscard]] RunKinetics run_kinetics(const std::function<Temperature(Time)>& history, Time heat_up,
                                         std::size_t size) const;
};

RunKinetics Pyrolysis::run_kinetics(const std::function<Temperature(Time)>& history, Time heat_up,
                                    std::size_t size) const {
  RunKinetics r;
  const Temperature Tr = s_.reactor_temperature;
  const std::size_t n = s_.kinetics.channels.size();
  std::vector<double> made(n, 0.0);  // per kg of initial polymer
  if (s_.integrate_heat_up && to_si(heat_up) > 0.0) {
    const HistoryResult h = integrate_conversion(s_.kinetics, history, heat_up);
    r.conversion_heat_up = h.conversion;
    made = h.product_yields;
    if (s_.kinetics.valid_from && in_kelvin(*s_.kinetics.valid_from) < in_kelvin(Tr)) {
      // The time the heat-up passes the bottom of the set's range.
      double lo = 0.0, hi = to_si(heat_up);
      const double T_low = in_kelvin(*s_.kinetics.valid_from);
      if (in_kelvin(history(seconds(0.0))) < T_low) {
        for (int i = 0; i < 100 && hi - lo > 1e-9 * to_si(heat_up); ++i) {
          const double mid = 0.5 * (lo + hi);
          (in_kelvin(history(seconds(mid))) < T_low ? lo : hi) = mid;
        }
        r.conversion_below_range = integrate_conversion(s_.kinetics, history, seconds(lo)).conversion;
      }
    }
  }
  const RateConstant k = s_.kinetics.total_rate_constant(Tr);
  if (s_.hold_time) {
    r.reaction_hold = *s_.hold_time;
  } else {
    r.reaction_hold = time_between_conversions(k, r.conversion_heat_up, *s_.target_conversion);
  }
  const double remaining = 1.0 - r.conversion_heat_up;
  const double converted_at_set_point = remaining * isothermal_conversion(k, r.reaction_hold);
  r.conversion = r.conversion_heat_up + converted_at_set_point;
  const std::vector<double> s = s_.kinetics.selectivities(Tr);
  for (std::size_t j = 0; j < n; ++j) made[j] += converted_at_set_point * s[j];

  r.yields = Eigen::VectorXd::Zero(static_cast<Eigen::Index>(size));
  if (s_.yields == YieldSource::kinetics) {
    if (r.conversion > 0.0) {
      for (std::size_t j = 0; j < n; ++j)
        r.yields[static_cast<Eigen::Index>(s_.channel_products[j])] += made[j] / r.conversion;
    } else {
      for (std::size_t j = 0; j < n; ++j) r.yields[static_cast<Eigen::Index>(s_.channel_products[j])] += s[j];
    }
  }
  return r;
}

void Pyrolysis::compute(const BlockContext& context, const BlockPorts& ports, BlockResources& resources) const {
  const std::string who = "pyrolysis '" + context.block_name + "'";
  if (!s_.valid) throw ModelError(who + ": the block's parameters have errors (see the messages above)");
  if (s_.continuous) {
    compute_continuous_pyrolysis(s_, context, ports, resources);
    return;
  }
  compute_batch(context, ports, resources);
}

void Pyrolysis::compute_batch(const BlockContext& context, const BlockPorts& ports, BlockResources& resources) const {
  const std::string who = "pyrolysis '" + context.block_name + "'";
  const ComponentSet& cs = context.components;
  const Component& polymer = cs[s_.polymer];
  const Stream& feed = ports.inlet("feed");
  const Stream* inert = ports.has_inlet("inert_gas") ? &ports.inlet("inert_gas") : nullptr;
  const Temperature Tr = s_.reactor_temperature;
  const double Tr_K = in_kelvin(Tr);
  const Temperature T_feed = feed.temperature();
  Warnings& warnings = context.warnings;

  // ---- the charge and the number of runs ----
  const PyrolysisFeed whole = pyrolysis_feed(s_, cs, feed, who);
  const double polymer_kg = whole.polymer_kg;
  const double charge_kg = whole.charge_kg;
  std::optional<Density> bulk = feed.bulk_density();
  if (bulk && s_.feed_bulk_density && std::abs(to_si(*bulk) - to_si(*s_.feed_bulk_density)) > 0.01 * to_si(*bulk))
    warnings.add(who + ": the feed stream's bulk density (" + format_number(to_si(*bulk), 4) +
                 " kg/m3) is used; feed_bulk_density (" + format_number(to_si(*s_.feed_bulk_density), 4) +
                 " kg/m3) applies only to a feed without one");
  if (!bulk) bulk = s_.feed_bulk_density;
  if (!bulk)
    throw ModelError(who + ": the feed has no bulk density, which sets how much fits in the reactor (expected the "
                           "feed's bulk_density or the block's feed_bulk_density, such as \"18 kg/m3\" for foam)");
  const double capacity_kg = to_si(s_.reactor_volume) * s_.fill_fraction * to_si(*bulk);
  // The small allowance keeps an exact fit (2.0000000001 runs by round-off) at 2.
  const double runs = std::max(1.0, std::ceil(charge_kg / capacity_kg * (1.0 - 1e-12)));
  const double charge_per_run_kg = charge_kg / runs;
  const double polymer_per_run_kg = polymer_kg / runs;

  // ---- range checks ----
  const std::vector<double> table_yields = check_pyrolysis_conditions(s_, cs, whole, who, warnings);

  // ---- the heat-up, the kinetics and the products, solved together ----
  // The charge's heat capacity sets the heat-up history, which sets the
  // conversion during heat-up and (with kinetic yields) the products, whose
  // sensible heat sets the charge's heat capacity: a fixed point, reached
  // in a few passes because the products change the heat capacity little.
  const double Ta_K = in_kelvin(context.ambient_temperature);
  const double dT = Tr_K - in_kelvin(T_feed);
  const HeatCapacity vessel_C = s_.vessel.vessel_heat_capacity;
  const ThermalConductance UA = s_.vessel.loss_conductance();

  RunKinetics kin;
  ElementClosure closure;
  ProductStreams products{Stream(cs), Stream(cs)};
  HeatSplit split;
  double charge_C = 0.0;  // J/K per run
  Time heat_up = seconds(0.0);
  bool settled = false;
  for (int pass = 0; pass < 60 && !settled; ++pass) {
    const HeatCapacity total_C = from_si<HeatCapacity>(charge_C) + vessel_C;
    heat_up = lumped_heat_up_time(total_C, s_.vessel.heater_power, UA, T_feed, Tr, context.ambient_temperature);
    const Power heater = s_.vessel.heater_power;
    const auto history = [&, total_C, heater](Time t) {
      const Temperature T = lumped_temperature_at(total_C, heater, UA, T_feed, context.ambient_temperature, t);
      return kelvin(std::min(in_kelvin(T), Tr_K));
    };
    kin = run_kinetics(history, heat_up, cs.size());
    if (s_.yields == YieldSource::table) {
      for (std::size_t j = 0; j < table_yields.size(); ++j)
        kin.yields[static_cast<Eigen::Index>(s_.table_products[j])] += table_yields[j];
    }
    // The limit is on the charge: an adjustment d per kg converted moves
    // d X of each kg charged.
    const double limit = kin.conversion > 0.0 ? s_.closure_limit / kin.conversion : 1e300;
    closure = close_element_balance(cs, s_.polymer, kin.yields, s_.closure_species, limit);

    // The products of the charge (without purge gas), batch totals.
    products = pyrolysis_products(s_, cs, feed, whole, kin.conversion, closure.yields);
    split = split_heat(feed, {&products.vapour, &products.residue}, warnings);
    const double new_C = dT > 0.0 ? std::max(0.0, split.sensible()) / runs / dT : 0.0;
    settled = std::abs(new_C - charge_C) <= 1e-12 * std::max(new_C, 1.0);
    charge_C = new_C;
  }
  if (!settled)
    throw ConvergenceError(who + ": the charge's heat capacity and the heat-up conversion did not settle in 60 passes");

  if (kin.conversion > 0.0 && kin.conversion_below_range > heat_up_extrapolation_share * kin.conversion)
    warnings.add(who + ": " + format_number(100.0 * kin.conversion_below_range / kin.conversion, 3) +
                 " % of the conversion happens during heat-up below " + format_celsius(*s_.kinetics.valid_from) +
                 ", where the product selectivities of the kinetic set are extrapolated");
  const double closure_fraction = closure.total_adjustment * kin.conversion;  // of the charge of polymer
  if (closure_fraction > pyrolysis_closure_warning_fraction)
    warnings.add(who + ": closing the element balance of the yields moves " +
                 format_number(100.0 * closure_fraction, 3) + " % of the polymer charged (above 1 %)");

  // ---- purge gas and the time at set-point ----
  const PurgeSupply purge = purge_supply(s_, cs, inert, who, warnings);
  const double purge_kg_per_s = purge.kg_per_s;    // nitrogen added (kg/s)
  const double purge_heating_W = purge.heating_W;  // from 25 degC to the reactor temperature (W)
  const double inert_inlet_heating_J = purge.inlet_heating_J;  // per batch

  // Per run: the heat at set-point is the reaction, the vaporization and the
  // purge gas heating over the whole hot period t_h + t_set. When the heater
  // limits the time at set-point, t_set = (Q0 + q (t_h + t_set)) / spare,
  // solved for t_set.
  // Q0 is what the charge's heat capacity does not take: the reaction and
  // the vaporization (and all of it should the feed come in above the
  // reactor temperature).
  const double Q0 = (split.total() + inert_inlet_heating_J) / runs - charge_C * std::max(dT, 0.0);
  const double spare = to_si(s_.vessel.heater_power) - to_si(UA) * (Tr_K - Ta_K);
  if (purge_heating_W >= spare)
    throw ModelError(who + ": heating the purge gas (" + format_number(purge_heating_W, 4) +
                     " W) takes all the heater power left at the set-point (" + format_number(spare, 4) +
                     " W) (expected a smaller inert_gas_flow or a larger heater)");
  const double t_h = to_si(heat_up);
  const double t_limited = (Q0 + purge_heating_W * t_h) / (spare - purge_heating_W);
  const double t_set = std::max(to_si(kin.reaction_hold), t_limited);
  VesselCharge charge;
  charge.charge_heat_capacity = from_si<HeatCapacity>(charge_C);
  charge.start = T_feed;
  charge.set_point = Tr;
  charge.ambient = context.ambient_temperature;
  charge.hold_time = kin.reaction_hold;
  const double Q_set = Q0 + purge_heating_W * (t_h + t_set);
  charge.process_heat_at_set_point = joules(std::max(0.0, Q_set));
  const VesselHeatingResult heating = heat_vessel(s_.vessel, charge);
  const double hot_time = to_si(heating.total_time());
  const double purge_kg = purge_kg_per_s * hot_time * runs;

  // ---- the outlets ----
  Stream& vapour = ports.outlet("vapour");
  Stream& residue = ports.outlet("residue");
  fill_pyrolysis_outlets(s_, products, inert, purge, purge_kg, vapour, residue);

  // ---- energy ----
  // The streams' balance: process heat = sum H_out - sum H_in, with the purge
  // nitrogen entering at 25 degC (zero enthalpy).
  double H_in = to_si(feed.enthalpy(&warnings));
  if (inert != nullptr) H_in += to_si(inert->enthalpy(&warnings));
  const double H_out = to_si(vapour.enthalpy(&warnings)) + to_si(residue.enthalpy(&warnings));
  const double residue_cooling = to_si(products.residue.enthalpy(&warnings)) - to_si(residue.enthalpy(&warnings));
  resources.process_heat_J = H_out - H_in;
  // What the heater gives per run (vessel model): charge, vessel, wall
  // losses and the heat at set-point; the residue cools afterwards to the
  // surroundings, which the heater does not recover.
  const double drawn_by_heater = to_si(heating.energy_drawn) * runs;
  const double negative_set_point_heat = Q_set < 0.0 ? -Q_set * runs : 0.0;
  resources.cooling_J = negative_set_point_heat;
  resources.heat_source = heat_source_name(s_.heat_source);
  if (s_.heat_source == HeatSource::electric) {
    resources.heat_drawn_J = drawn_by_heater;
    resources.electricity_J = drawn_by_heater;
  } else {
    resources.heat_drawn_J = drawn_by_heater / s_.burner_efficiency;
  }
  const double run_duration = hot_time + to_si(s_.cool_down_time) + to_si(s_.turnaround_time);
  resources.duration_s = run_duration * runs;

  if (purge.added)
    resources.materials.push_back({"nitrogen purge", "inert_gas", purge_kg, "kg"});
  resources.equipment.push_back({"pyrolysis reactor", "vessel", "volume", to_si(s_.reactor_volume), "m3"});
  resources.equipment.push_back({"pyrolysis reactor heater", "heater", "power", to_si(s_.vessel.heater_power), "W"});

  // ---- figures ----
  auto fig = [&](std::string key, double value, std::string unit, std::string description) {
    resources.add_figure(std::move(key), value, std::move(unit), std::move(description));
  };
  fig("reactor_temperature", in_kelvin(Tr), "K", "reactor set-point");
  fig("bulk_density_used", to_si(*bulk), "kg/m3", "bulk density of the feed as charged");
  fig("charge_capacity_kg", capacity_kg, "kg", "reactor volume x fill fraction x bulk density");
  fig("charge_per_run_kg", charge_per_run_kg, "kg", "feed charged per run (the batch split into equal runs)");
  fig("polymer_per_run_kg", polymer_per_run_kg, "kg", "polymer charged per run");
  fig("runs_per_batch", runs, "-", "reactor runs needed for the batch");
  fig("conversion", kin.conversion, "-", "fraction of the polymer converted");
  fig("conversion_during_heat_up", kin.conversion_heat_up, "-", "fraction converted before the set-point is reached");
  fig("rate_constant_at_set_point", to_si(s_.kinetics.total_rate_constant(Tr)), "1/s",
      "total first-order rate constant at the reactor temperature");
  fig("reaction_hold_time", to_si(kin.reaction_hold), "s", "time at set-point asked by the kinetics or given");
  fig("heat_up_time", t_h, "s", "heat-up time per run (vessel model)");
  fig("time_at_set_point", to_si(heating.hold_time), "s",
      "time at set-point per run: the reaction hold, or longer when the heater limits the heat supply");
  fig("run_duration", run_duration, "s", "heat-up, set-point, cool-down and turnaround per run");
  fig("batch_duration", resources.duration_s, "s", "all runs of the batch");
  if (polymer.polymer) {
    if (auto m = cs.index_of(polymer.polymer->monomer))
      fig("monomer_yield", to_si(vapour.mass(Phase::vapour, *m)) / polymer_kg, "kg/kg",
          "monomer in the vapour per kg of polymer charged");
  }
  add_closure_figures(s_, cs, closure, kin.conversion * polymer_kg, closure_fraction, resources);
  fig("process_heat", resources.process_heat_J, "J", "sum H_out - sum H_in of the streams");
  fig("sensible_heat_feed_to_298K", split.sensible_feed_J, "J", "bringing the feed to 25 degC");
  fig("reaction_heat_298K", split.reaction_J, "J", "reaction to condensed products at 25 degC");
  fig("vaporization_heat_298K", split.vaporization_J, "J", "vaporization of the volatile products at 25 degC");
  fig("sensible_heat_products", split.sensible_products_J, "J", "products from 25 degC to the reactor temperature");
  fig("inert_gas_heating", inert_inlet_heating_J + purge_heating_W * hot_time * runs, "J",
      "purge gas to the reactor temperature");
  fig("residue_cooling", residue_cooling, "J", "heat the residue gives off down to its discharge temperature");
  fig("heat_to_vessel", to_si(heating.energy_to_vessel) * runs, "J", "sensible heat of the vessel, all runs");
  fig("heat_lost_through_wall", to_si(heating.energy_lost) * runs, "J", "vessel wall loss, heat-up and hold, all runs");
  fig("heater_energy", drawn_by_heater, "J", "heat the heater gives, all runs");
  fig("loss_at_set_point", to_si(heating.loss_at_set_point), "W", "wall loss at the reactor temperature");
  fig("max_reachable_temperature", in_kelvin(heating.max_reachable_temperature), "K", "ambient + P/UA");
  fig("heater_energy_per_kg_polymer", drawn_by_heater / polymer_kg, "J/kg", "heat given per kg of polymer charged");
  if (purge.added) {
    fig("nitrogen_purge_kg", purge_kg, "kg", "nitrogen added to the vapour by the purge");
    fig("nitrogen_purge_normal_volume", purge.flow_normal_m3_per_s * hot_time * runs, "m3",
        "purge volume at 0 degC, 1 atm");
  }

  // ---- cautions ----
  add_pyrolysis_cautions(s_, vapour, resources);
}

// ---- reading the parameters ----------------------------------------------------

std::string key_path(const MappingReader& parameters, std::string_view key) {
  return parameters.path().empty() ? std::string(key) : parameters.path() + "." + std::string(key);
}

// The vessel parameters are those of the shared vessel model; the reactor
// volume stands for the vessel volume (its outer area) unless the case
// gives vessel_volume or outer_area. A wrong reactor_volume is reported
// already; a stand-in of 1 m3 keeps the vessel reader from reporting it
// again under another name.
VesselDesign read_reactor_vessel(MappingReader& parameters, std::optional<Volume> reactor_volume) {
  return read_vessel_design(parameters, reactor_volume ? *reactor_volume : from_si<Volume>(1.0));
}

std::optional<std::size_t> choose_polymer(MappingReader& parameters, const ComponentSet& cs) {
  if (parameters.has("polymer")) {
    auto p = read_component(parameters, "polymer", cs);
    if (p && cs[*p].kind != ComponentKind::polymer) {
      parameters.error("polymer", "'" + key_path(parameters, "polymer") + "': '" + cs[*p].id +
                                      "' is not a polymer (expected a component of kind polymer)");
      return std::nullopt;
    }
    return p;
  }
  parameters.accept("polymer");
  std::vector<std::size_t> polymers;
  for (std::size_t i = 0; i < cs.size(); ++i)
    if (cs[i].kind == ComponentKind::polymer) polymers.push_back(i);
  if (polymers.size() == 1) return polymers.front();
  parameters.error({}, "'" + key_path(parameters, "polymer") + "' is needed: the case has " +
                           std::to_string(polymers.size()) +
                           " polymer components (expected the id of the polymer to convert)");
  return std::nullopt;
}

std::unique_ptr<BlockModel> make_pyrolysis(MappingReader& p, const BlockSetup& setup) {
  const ComponentSet& cs = setup.components;
  PyrolysisSettings s;
  bool ok = true;
  s.continuous = setup.basis == Basis::continuous;
  // Keys of the other mode are refused by name: a batch hold time means
  // nothing to a stirred reactor fed by the hour, and the other way round.
  const std::vector<std::string_view> batch_only = {"feed_bulk_density", "hold_time", "target_conversion",
                                                     "heat_up_conversion", "cool_down_time", "turnaround_time"};
  const std::vector<std::string_view> continuous_only = {"melt_density", "residence_time"};
  for (const std::string_view key : s.continuous ? batch_only : continuous_only) {
    if (!p.has(key)) continue;
    p.error(key, "'" + key_path(p, key) + "' applies only to basis: " + (s.continuous ? "batch" : "continuous") +
                     " (the case has basis: " + basis_name(setup.basis) + ")");
    p.accept(key);
    ok = false;
  }

  const auto polymer = choose_polymer(p, cs);
  if (polymer) s.polymer = *polymer;
  else ok = false;

  // Reactor and charge.
  const YAML::Node volume_node = p.raw("reactor_volume");
  const auto volume = p.optional_quantity<Volume>("reactor_volume");
  bool volume_ok = false;
  if (!volume_node.IsDefined()) {
    p.error({}, "missing required key '" + key_path(p, "reactor_volume") + "' (expected a volume such as \"10 L\")");
  } else if (volume && to_si(*volume) > 0.0) {
    s.reactor_volume = *volume;
    volume_ok = true;
  } else if (volume) {
    p.error("reactor_volume", "'" + key_path(p, "reactor_volume") + "' must be positive");
  }
  if (!volume_ok) ok = false;
  s.fill_fraction = p.number_in("fill_fraction", 0.5, 1e-6, 1.0);
  if (!s.continuous) {
    s.feed_bulk_density = p.optional_quantity<Density>("feed_bulk_density");
    if (s.feed_bulk_density && !(to_si(*s.feed_bulk_density) > 0.0)) {
      p.error("feed_bulk_density", "'" + key_path(p, "feed_bulk_density") + "' must be positive");
      ok = false;
    }
  } else {
    // The melt holdup sets the residence time, unless it is given.
    s.melt_density = p.optional_quantity<Density>("melt_density");
    s.residence_time = p.optional_quantity<Time>("residence_time");
    if (s.melt_density && !(to_si(*s.melt_density) > 0.0)) {
      p.error("melt_density", "'" + key_path(p, "melt_density") + "' must be positive");
      ok = false;
    }
    if (s.residence_time && !(to_si(*s.residence_time) > 0.0)) {
      p.error("residence_time", "'" + key_path(p, "residence_time") + "' must be positive");
      ok = false;
    }
    if (!p.has("melt_density") && !p.has("residence_time")) {
      p.error({}, "missing '" + key_path(p, "melt_density") + "' or '" + key_path(p, "residence_time") +
                      "' on a continuous basis (expected the density of the polymer melt at the reactor "
                      "temperature such as \"850 kg/m3\", which with the volume and fill fraction sets the "
                      "holdup, or a mean residence time such as \"40 min\")");
      ok = false;
    } else if ((p.has("melt_density") && !s.melt_density) || (p.has("residence_time") && !s.residence_time)) {
      ok = false;
    }
  }

  // Conditions.
  if (!p.has("reactor_temperature")) {
    p.accept("reactor_temperature");
    p.error({}, "missing required key '" + key_path(p, "reactor_temperature") +
                    "' (expected a temperature such as \"500 degC\")");
    ok = false;
  } else if (auto T = p.optional_quantity<Temperature>("reactor_temperature")) {
    s.reactor_temperature = *T;
    const double T_C = in_celsius(*T);
    if (T_C < lowest_C || T_C > highest_C) {
      p.error("reactor_temperature", "'" + key_path(p, "reactor_temperature") + "' of " + format_celsius(*T) +
                                         " is outside what the model covers (expected 300 to 900 degC)");
      ok = false;
    }
  } else {
    ok = false;
  }
  s.pressure = p.quantity<Pressure>("pressure", pascal(standard_atmosphere_Pa));
  if (!(to_si(s.pressure) > 0.0)) {
    p.error("pressure", "'" + key_path(p, "pressure") + "' must be a positive absolute pressure");
    ok = false;
  }
  s.inert_gas_flow = p.optional_quantity<VolumeFlow>("inert_gas_flow");
  if (s.inert_gas_flow && to_si(*s.inert_gas_flow) < 0.0) {
    p.error("inert_gas_flow", "'" + key_path(p, "inert_gas_flow") + "' must not be negative");
    ok = false;
  }

  // Kinetics: the case's set, or the built-in one for its polymer.
  if (auto given = read_kinetic_set(p, "kinetics", cs)) {
    s.kinetics = *given;
    if (polymer) s.kinetics.polymer = cs[*polymer].id;
  } else if (p.has("kinetics")) {
    ok = false;
  } else if (polymer && cs[*polymer].id == default_polystyrene_kinetics().polymer) {
    s.kinetics = default_polystyrene_kinetics();
  } else if (polymer) {
    p.error({}, "'" + key_path(p, "kinetics") + "' is needed: there is no built-in kinetic set for '" +
                    cs[*polymer].id + "' (expected kinetics: {channels: [{product, pre_exponential, "
                    "activation_energy}, ...]})");
    ok = false;
  }

  // Product distribution.
  const YAML::Node yields_node = p.raw("yields");
  if (!yields_node.IsDefined()) {
    s.yields = p.has("yield_table") ? YieldSource::table : YieldSource::kinetics;
    if (s.yields == YieldSource::table) s.table = read_yield_table(p, "yield_table", cs);
  } else if (yields_node.IsScalar()) {
    const std::string mode = yields_node.Scalar();
    if (mode == "kinetics") {
      s.yields = YieldSource::kinetics;
      if (p.has("yield_table")) {
        p.error("yield_table", "'" + key_path(p, "yield_table") + "' is given but yields is kinetics (expected "
                                   "yields: table, or no yield_table)");
        ok = false;
      }
      p.accept("yield_table");
    } else if (mode == "table") {
      s.yields = YieldSource::table;
      if (!p.has("yield_table")) {
        p.error("yields", "'" + key_path(p, "yields") + "' is table but there is no '" + key_path(p, "yield_table") +
                              "' (expected temperatures and one list of mass fractions per product)");
        ok = false;
      }
      s.table = read_yield_table(p, "yield_table", cs);
    } else {
      p.error("yields", "'" + key_path(p, "yields") + "' must be kinetics or table (found \"" + mode + "\")");
      ok = false;
    }
  } else if (yields_node.IsMap()) {
    s.yields = YieldSource::table;
    MappingReader y = p.mapping("yields");
    s.table = read_yield_table(y, "table", cs);
    if (!y.has("table")) {
      y.error({}, "'" + key_path(p, "yields") + "' as a mapping needs 'table' (expected yields: {table: {...}})");
      ok = false;
    }
    y.finish();
    if (p.has("yield_table")) {
      p.error("yield_table", "give the table either in yields: {table: ...} or in yield_table, not both");
      ok = false;
    }
    p.accept("yield_table");
  } else {
    p.error("yields", "'" + key_path(p, "yields") + "' must be kinetics, table or {table: {...}}");
    ok = false;
  }
  if (s.yields == YieldSource::table && !s.table) ok = false;

  // Products must be in the case and must not be polymers.
  auto check_product = [&](const std::string& id, std::string_view key) -> std::optional<std::size_t> {
    const auto index = cs.index_of(id);
    const std::string where = key.empty() ? p.path() : key_path(p, key);
    if (!index) {
      p.error(key, "'" + where + "': product '" + id +
                       "' is not among the case's components (expected it in the component list, or a kinetic set "
                       "or yield table without it)");
      return std::nullopt;
    }
    if (cs[*index].kind == ComponentKind::polymer) {
      p.error(key, "'" + where + "': product '" + id + "' is a polymer (expected monomer, oil, gas or char)");
      return std::nullopt;
    }
    return index;
  };
  // The built-in set's products are checked too: a case without one of them
  // is told which (the error sits at the block).
  const std::string_view kinetics_key = p.has("kinetics") ? "kinetics" : "";
  for (const auto& c : s.kinetics.channels) {
    // In table mode only the total rate is used, but the channels' products
    // still have to exist to evaluate the set as given.
    if (auto i = check_product(c.product, kinetics_key)) s.channel_products.push_back(*i);
    else ok = false;
  }
  if (s.table) {
    for (const auto& id : s.table->products()) {
      if (auto i = check_product(id, p.has("yield_table") ? "yield_table" : "yields")) s.table_products.push_back(*i);
      else ok = false;
    }
    if (volume_ok && !s.table->can_evaluate(s.reactor_temperature)) {
      p.error(p.has("yield_table") ? "yield_table" : "yields",
              "'" + key_path(p, "reactor_temperature") + "' of " + format_celsius(s.reactor_temperature) +
                  " is more than 10 % of the table's span outside the yield table (" +
                  format_celsius(s.table->lowest()) + " to " + format_celsius(s.table->highest()) +
                  "; expected a table that covers the reactor temperature)");
      ok = false;
    }
  }

  // Time at the set-point (batch runs).
  if (!s.continuous) {
    s.hold_time = p.optional_quantity<Time>("hold_time");
    s.target_conversion = p.optional_number("target_conversion");
    if (p.has("hold_time") && p.has("target_conversion")) {
      p.error("target_conversion", "give either '" + key_path(p, "hold_time") + "' or '" +
                                       key_path(p, "target_conversion") + "', not both");
      ok = false;
    } else if (!p.has("hold_time") && !p.has("target_conversion")) {
      p.error({}, "missing '" + key_path(p, "hold_time") + "' or '" + key_path(p, "target_conversion") +
                      "' (expected the time at the reactor temperature such as \"30 min\", or a conversion such as "
                      "0.99)");
      ok = false;
    }
    if (s.hold_time && to_si(*s.hold_time) < 0.0) {
      p.error("hold_time", "'" + key_path(p, "hold_time") + "' must not be negative");
      ok = false;
    }
    if (s.target_conversion && !(*s.target_conversion > 0.0 && *s.target_conversion < 1.0)) {
      p.error("target_conversion", "'" + key_path(p, "target_conversion") + "' must be above 0 and below 1 (found " +
                                       format_number(*s.target_conversion) + "; first-order kinetics never reach 1)");
      ok = false;
    }
    const std::string heat_up_mode = p.text("heat_up_conversion", "integrate");
    if (heat_up_mode == "integrate") {
      s.integrate_heat_up = true;
    } else if (heat_up_mode == "neglect") {
      s.integrate_heat_up = false;
    } else {
      p.error("heat_up_conversion", "'" + key_path(p, "heat_up_conversion") + "' must be integrate or neglect (found \"" +
                                        heat_up_mode + "\")");
      ok = false;
    }
  }

  // Element closure.
  if (p.has("closure_species")) {
    s.closure_species = read_component_list(p, "closure_species", cs);
    if (s.closure_species.empty()) ok = false;
  } else {
    p.accept("closure_species");
    for (const char* id : {"char", "hydrogen"}) {
      if (auto i = cs.index_of(id)) {
        s.closure_species.push_back(*i);
      } else {
        p.error({}, "'" + p.path() + "': the element closure uses char and hydrogen by default, but '" +
                        std::string(id) + "' is not among the case's components (expected it in the component "
                        "list, or closure_species naming others)");
        ok = false;
      }
    }
  }
  for (std::size_t j : s.closure_species)
    if (cs[j].kind == ComponentKind::polymer) {
      p.error("closure_species", "'" + key_path(p, "closure_species") + "': '" + cs[j].id +
                                     "' is a polymer (expected char, a gas or a volatile product)");
      ok = false;
    }
  s.closure_limit = p.number_in("element_closure_limit", 0.05, 0.0, 1.0);

  // Discharge, heating and times.
  s.residue_discharge_temperature = p.optional_quantity<Temperature>("residue_discharge_temperature");
  if (s.residue_discharge_temperature &&
      in_kelvin(*s.residue_discharge_temperature) > in_kelvin(s.reactor_temperature)) {
    p.error("residue_discharge_temperature", "'" + key_path(p, "residue_discharge_temperature") +
                                                 "' must not be above the reactor temperature");
    ok = false;
  }
  const std::string source = p.text("heat_source", "electric");
  if (source == "electric") {
    s.heat_source = HeatSource::electric;
    if (p.has("burner_efficiency")) {
      p.error("burner_efficiency", "'" + key_path(p, "burner_efficiency") + "' applies only to heat_source: fuel");
      ok = false;
    }
    p.accept("burner_efficiency");
  } else if (source == "fuel") {
    s.heat_source = HeatSource::fuel;
    if (!p.has("burner_efficiency")) {
      p.accept("burner_efficiency");
      p.error({}, "missing required key '" + key_path(p, "burner_efficiency") +
                      "' for heat_source: fuel (expected a fraction such as 0.7)");
      ok = false;
    } else {
      s.burner_efficiency = p.number_in("burner_efficiency", 0.7, 1e-3, 1.0);
    }
  } else {
    p.error("heat_source", "'" + key_path(p, "heat_source") + "' must be electric or fuel (found \"" + source + "\")");
    ok = false;
  }
  for (const char* key : {"cool_down_time", "turnaround_time"}) {
    if (s.continuous) continue;  // refused above
    const Time t = p.quantity<Time>(key, seconds(0.0));
    if (to_si(t) < 0.0) {
      p.error(key, "'" + key_path(p, key) + "' must not be negative");
      ok = false;
    }
    (std::string_view(key) == "cool_down_time" ? s.cool_down_time : s.turnaround_time) = t;
  }
  s.vessel = read_reactor_vessel(p, volume_ok ? std::optional<Volume>(s.reactor_volume) : std::nullopt);

  p.finish();
  // With errors the case is refused before any solve; the flag guards
  // compute() all the same.
  s.valid = ok;
  return std::make_unique<Pyrolysis>(std::move(s));
}

}  // namespace

void register_pyrolysis(BlockRegistry& registry) {
  registry.add({"pyrolysis",
                "thermal depolymerization: batch runs charged by bulk density, or a continuous stirred melt reactor; "
                "first-order kinetics or a yield table, element closure, vessel heat-up or steady losses",
                make_pyrolysis});
}

}  // namespace unchain::units
