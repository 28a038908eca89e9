// Block solvent_recovery: the sweep-gas rule, the condenser and the dryer.

#include <doctest/doctest.h>

#include <yaml-cpp/yaml.h>

#include <algorithm>
#include <cmath>
#include <map>
#include <memory>
#include <string>
#include <vector>

#include "flowsheet/balance.hpp"
#include "flowsheet/block_model.hpp"
#include "flowsheet/component_library.hpp"
#include "flowsheet/pure_properties.hpp"
#include "flowsheet/yaml_reader.hpp"
#include "units/block_registry.hpp"
#include "units/solvent_recovery.hpp"

using namespace unchain;

namespace {

const ComponentSet& recovery_components() {
  static const ComponentSet set = [] {
    DiagnosticList diagnostics;
    ComponentSet s = make_component_set(builtin_library(), {"polystyrene", "toluene", "acetone", "nitrogen", "oxygen"},
                                        {}, diagnostics);
    diagnostics.throw_if_errors();
    return s;
  }();
  return set;
}

std::size_t id(const char* name) { return recovery_components().require(name); }

const units::BlockRegistry& registry() {
  static const units::BlockRegistry r = [] {
    units::BlockRegistry reg;
    units::register_solvent_recovery(reg);
    return reg;
  }();
  return r;
}

std::unique_ptr<BlockModel> build(const std::string& yaml, DiagnosticList& diagnostics, Basis basis = Basis::batch) {
  MappingReader parameters(YAML::Load(yaml), "test.yaml", "blocks.dryer", diagnostics);
  return registry().create("solvent_recovery", parameters, BlockSetup{recovery_components(), basis, "dryer", "USD"});
}

std::unique_ptr<BlockModel> build_clean(const std::string& yaml, Basis basis = Basis::batch) {
  DiagnosticList diagnostics;
  auto model = build(yaml, diagnostics, basis);
  for (const auto& d : diagnostics.all()) INFO(d.to_string());
  REQUIRE_FALSE(diagnostics.has_errors());
  REQUIRE(model != nullptr);
  return model;
}

// 1 kg PS dissolved in 4 kg toluene at 20 degC.
Stream gel() {
  Stream s(recovery_components());
  s.set_mass(Phase::liquid, id("polystyrene"), kilograms(1.0));
  s.set_mass(Phase::liquid, id("toluene"), kilograms(4.0));
  s.set_temperature(celsius(20.0));
  return s;
}

struct Dried {
  Stream polymer, condensate, vent;
  BlockResources resources;
  Warnings warnings;
};

std::unique_ptr<Dried> dry(const BlockModel& model, const Stream& feed, const Stream* sweep = nullptr,
                           Basis basis = Basis::batch) {
  auto d = std::make_unique<Dried>();
  const ComponentSet& c = recovery_components();
  d->polymer = Stream(c);
  d->condensate = Stream(c);
  d->vent = Stream(c);
  std::map<std::string, std::vector<const Stream*>> inlets{{"feed", {&feed}}};
  if (sweep != nullptr) inlets["sweep_gas"] = {sweep};
  const BlockPorts ports(inlets, {{"polymer", {&d->polymer}},
                                  {"recovered_solvent", {&d->condensate}},
                                  {"vent", {&d->vent}}});
  const std::string name = "dryer";
  const BlockContext context{c, basis, name, celsius(20.0), d->warnings};
  model.compute(context, ports, d->resources);
  return d;
}

bool warned(const Warnings& w, const std::string& text) {
  const auto all = w.messages();
  return std::any_of(all.begin(), all.end(), [&](const std::string& m) { return m.find(text) != std::string::npos; });
}

double figure(const BlockResources& r, const char* key) {
  const BlockFigure* f = r.figure(key);
  REQUIRE_MESSAGE(f != nullptr, key);
  return f->value;
}

// Toluene vapour pressure by the data file's Antoine constants, evaluated
// here independently. Source: data/components.yaml, toluene (Lange's
// Handbook Table 5.8 there): log10(P/mmHg) = 6.95464 - 1344.8 / (219.482 + t/degC).
double toluene_psat_Pa(double t_C) { return std::pow(10.0, 6.95464 - 1344.8 / (219.482 + t_C)) * 133.322387415; }

const char* oven_yaml =
    "dryer: oven\ndrying_temperature: \"120 degC\"\ncondenser_temperature: \"5 degC\"\n"
    "residual_solvent_fraction: 0.05\nheater_power: \"2 kW\"\nvessel_volume: \"20 L\"\nvessel_mass: \"8 kg\"\n"
    "vessel_material: steel\ninsulation: mineral_wool\nproduct_bulk_density: \"600 kg/m3\"\n";

}  // namespace

TEST_CASE("dryer ventilation rule: sweep gas for a fraction of the lower flammable limit") {
  // One solvent: n_sweep = n_s (1 / (f LFL) - 1). 10 mol acetone, LFL 2.5 %
  // (NFPA 325 via data/components.yaml), f = 0.25: 10 x (160 - 1) = 1590 mol.
  CHECK(to_si(units::sweep_gas_for_flammable_limit({10.0}, {0.025}, 0.25)) == doctest::Approx(1590.0).epsilon(1e-12));
  // Check: 10 / (10 + 1590) = 0.625 % = 25 % of 2.5 %.
  CHECK(10.0 / (10.0 + 1590.0) == doctest::Approx(0.25 * 0.025).epsilon(1e-12));
  // Two vapours, Le Chatelier: 4 mol toluene (LFL 1.1 %) and 6 mol acetone
  // (2.5 %), f = 0.25: (4/0.011 + 6/0.025) / 0.25 - 10 = (363.64 + 240) x 4 - 10 = 2404.55 mol.
  CHECK(to_si(units::sweep_gas_for_flammable_limit({4.0, 6.0}, {0.011, 0.025}, 0.25)) ==
        doctest::Approx((4.0 / 0.011 + 6.0 / 0.025) / 0.25 - 10.0).epsilon(1e-12));
  // A non-flammable vapour (no LFL) needs no sweep of its own.
  CHECK(to_si(units::sweep_gas_for_flammable_limit({5.0}, {0.0}, 0.25)) == 0.0);
}

TEST_CASE("condenser vent loss against the vapour pressure at the condenser temperature") {
  // n_vent = n_gas Psat(Tc) / (P - Psat(Tc)) for one condensable.
  const double psat = toluene_psat_Pa(5.0);  // about 1.2 kPa
  CHECK(psat == doctest::Approx(1.2e3).epsilon(0.05));
  const double K = psat / 101325.0;
  Eigen::VectorXd condensable(1);
  condensable << 40.0;
  Eigen::VectorXd Kv(1);
  Kv << K;
  const Eigen::VectorXd left = units::condensable_left_in_vapour(condensable, 1000.0, Kv);
  CHECK(left[0] == doctest::Approx(1000.0 * psat / (101325.0 - psat)).epsilon(1e-12));
  // Capped at what there is: with little to condense all stays vapour.
  condensable << 0.5;
  CHECK(units::condensable_left_in_vapour(condensable, 1000.0, Kv)[0] == doctest::Approx(0.5).epsilon(1e-15));
  // No carrier gas and a condenser below the boiling point: all condenses.
  condensable << 40.0;
  CHECK(units::condensable_left_in_vapour(condensable, 0.0, Kv)[0] == 0.0);
  // A condensable that is absent (K = 0, as for a component with no vapour
  // here) changes nothing.
  Eigen::VectorXd with_absent(2), K_absent(2);
  with_absent << 40.0, 0.0;
  K_absent << K, 0.0;
  const Eigen::VectorXd l_absent = units::condensable_left_in_vapour(with_absent, 1000.0, K_absent);
  CHECK(l_absent[0] == doctest::Approx(1000.0 * psat / (101325.0 - psat)).epsilon(1e-12));
  CHECK(l_absent[1] == 0.0);
  // Two condensables (ideal Raoult): each vapour mole fraction is x_i K_i.
  Eigen::VectorXd two(2), K2(2);
  two << 30.0, 20.0;
  K2 << 0.1, 0.02;
  const Eigen::VectorXd l2 = units::condensable_left_in_vapour(two, 500.0, K2);
  const double V = 500.0 + l2.sum();
  const double L = 50.0 - l2.sum();
  for (int i = 0; i < 2; ++i) CHECK(l2[i] / V == doctest::Approx((two[i] - l2[i]) / L * K2[i]).epsilon(1e-10));
}

TEST_CASE("oven drying with a residual fraction: sweep air, vent loss, energy by hand") {
  auto model = build_clean(oven_yaml);
  const Stream feed = gel();
  auto d = dry(*model, feed);
  const BlockResources& r = d->resources;
  const ComponentSet& c = recovery_components();
  const double M_tol = c[id("toluene")].molar_mass;

  // Residual 0.05 kg/kg x 1 kg = 50 g; 3.95 kg evaporate.
  CHECK(to_si(d->polymer.mass(Phase::solid, id("toluene"))) == doctest::Approx(0.05).epsilon(1e-12));
  CHECK(to_si(d->polymer.mass(Phase::solid, id("polystyrene"))) == doctest::Approx(1.0).epsilon(1e-12));
  const double n_s = 3.95 / M_tol;
  // Sweep by the rule: n_s (1 / (0.25 x 0.011) - 1), LFL of toluene 1.1 %
  // (NFPA 325 via data/components.yaml). Supplied as ambient air:
  // m3 at 0 degC and 1 atm = n R 273.15 / 101325.
  const double n_sweep = n_s * (1.0 / (0.25 * 0.011) - 1.0);
  REQUIRE(r.materials.size() == 1);
  CHECK(r.materials[0].kind == "air");
  CHECK(r.materials[0].amount == doctest::Approx(n_sweep * 8.314462618 * 273.15 / 101325.0).epsilon(1e-12));
  CHECK(figure(r, "solvent_concentration_percent_lfl") == doctest::Approx(25.0).epsilon(1e-12));
  // Vent loss: n_sweep Psat(5 degC) / (P - Psat), capped at what evaporated.
  // Here the cap applies: the sweep is so lean (y = 0.25 x 1.1 % = 0.275 %,
  // 278.6 Pa of toluene = 2.0899 mmHg) that the dryer gas has its dew point
  // at t = 1344.8 / (6.95464 - log10 2.0899) - 219.482 = -16.8 degC, below the
  // 5 degC condenser: nothing condenses, all of it leaves with the vent.
  const double psat = toluene_psat_Pa(5.0);
  CHECK(n_sweep * psat / (101325.0 - psat) > n_s);
  CHECK(to_si(d->vent.mass(Phase::vapour, id("toluene"))) == doctest::Approx(3.95).epsilon(1e-12));
  CHECK(to_si(d->condensate.total_mass()) == doctest::Approx(0.0));
  CHECK(figure(r, "recovered_fraction") == doctest::Approx(0.0));
  const double p_mmHg = 0.25 * 0.011 * 101325.0 / 133.322387415;
  CHECK(in_celsius(kelvin(figure(r, "dryer_gas_dew_point"))) ==
        doctest::Approx(1344.8 / (6.95464 - std::log10(p_mmHg)) - 219.482).epsilon(1e-9));
  CHECK(figure(r, "dryer_gas_dew_point") - 273.15 == doctest::Approx(-16.8).epsilon(0.01));
  std::string all_warnings;
  for (const auto& m : d->warnings.messages()) all_warnings += m + "\n";
  CAPTURE(all_warnings);
  CHECK(warned(d->warnings, "recovers only 0 % of the solvent evaporated"));
  CHECK(in_celsius(d->polymer.temperature()) == doctest::Approx(120.0));
  CHECK(in_celsius(d->vent.temperature()) == doctest::Approx(5.0));
  REQUIRE(d->polymer.bulk_density().has_value());
  CHECK(to_si(*d->polymer.bulk_density()) == doctest::Approx(600.0));

  // Dryer time and energy by the vessel model: time at set-point = evaporation
  // heat / (P - UA (T_set - T_a)) (no drying_time given); drawn = P t_heat-up
  // + loss t_set + Q_process.
  const double UA = figure(r, "loss_conductance");
  const double Q = figure(r, "vaporization_heat") + figure(r, "sweep_gas_heating");
  const double loss = UA * 100.0;
  const double t_set = Q / (2000.0 - loss);
  CHECK(figure(r, "time_at_drying_temperature") == doctest::Approx(t_set).epsilon(1e-12));
  CHECK(r.duration_s == doctest::Approx(figure(r, "heat_up_time") + t_set).epsilon(1e-12));
  CHECK(r.heat_drawn_J == doctest::Approx(2000.0 * figure(r, "heat_up_time") + loss * t_set + Q).epsilon(1e-12));
  CHECK(r.electricity_J == doctest::Approx(r.heat_drawn_J));
  // The toluene's latent heat dominates: 3.95 kg x about 360-400 kJ/kg at
  // 120 degC (Watson from 33.18 kJ/mol at the normal boiling point).
  CHECK(figure(r, "vaporization_heat") / 3.95 == doctest::Approx(3.6e5).epsilon(0.1));
  // The oven caution, the vent and the hot-glassware cautions.
  REQUIRE(r.cautions.size() == 3);
  CHECK(r.cautions[0].find("not rated for flammable solvent vapour") != std::string::npos);
  CHECK(r.cautions[1].find("toluene") != std::string::npos);

  // Mass and energy close over the streams; the sweep air is not a stream.
  const BalanceClosure closure =
      close_balance({&feed}, {&d->polymer, &d->condensate, &d->vent}, r.process_heat_J + r.work_to_streams_J);
  CHECK(closure.mass_relative_error <= 1e-12);
  CHECK(closure.energy_relative_error <= 1e-9);
}

TEST_CASE("Flory-Huggins residual solvent at the dryer's exit activity") {
  std::string yaml = oven_yaml;
  yaml.replace(yaml.find("residual_solvent_fraction: 0.05"), 31, "residual_solvent: flory_huggins");
  auto model = build_clean(yaml);
  const Stream feed = gel();
  auto d = dry(*model, feed);
  const ComponentSet& c = recovery_components();
  // Exit gas at the LFL limit: y = 0.25 x 0.011; a = y P / Psat(120 degC).
  const double a = 0.25 * 0.011 * 101325.0 / toluene_psat_Pa(120.0);
  CHECK(figure(d->resources, "solvent_activity") == doctest::Approx(a).epsilon(1e-9));
  // The residual satisfies ln a = ln(1 - phi) + phi + chi phi^2 with chi = 0.44
  // (data/binary_pairs.yaml, Polymer Handbook there) and phi from the volumes
  // of polymer (1050 kg/m3) and residual solvent at 120 degC.
  const double residual = to_si(d->polymer.mass(Phase::solid, id("toluene")));
  const double rho_s = to_si(liquid_density(c[id("toluene")], celsius(120.0)));
  const double vp = 1.0 / 1050.0;
  const double phi = vp / (vp + residual / rho_s);
  CHECK(std::log(1.0 - phi) + phi + 0.44 * phi * phi == doctest::Approx(std::log(a)).epsilon(1e-9));
  // A few tenths of a percent at this low activity.
  CHECK(residual > 0.0);
  CHECK(residual < 0.01);
  // Drying below the glass transition of PS (100 degC) would warn; 120 degC does not.
  CHECK_FALSE(warned(d->warnings, "glass transition"));
  CHECK(warned(d->warnings, "chi"));  // chi given at 25 degC, used at 120 degC
  const BalanceClosure closure = close_balance({&feed}, {&d->polymer, &d->condensate, &d->vent},
                                               d->resources.process_heat_J);
  CHECK(closure.mass_relative_error <= 1e-12);
  CHECK(closure.energy_relative_error <= 1e-9);
}

TEST_CASE("a given sweep gas stream passes through; too little of it warns") {
  auto model = build_clean(oven_yaml);
  const Stream feed = gel();
  Stream nitrogen(recovery_components());
  nitrogen.set_mass(Phase::vapour, id("nitrogen"), kilograms(10.0));
  nitrogen.set_temperature(celsius(20.0));
  auto d = dry(*model, feed, &nitrogen);
  // 10 kg N2 = 357 mol against the 15.6 kmol the rule asks for.
  CHECK(warned(d->warnings, "of its lower flammable limit"));
  CHECK(d->resources.materials.empty());
  CHECK(to_si(d->vent.mass(Phase::vapour, id("nitrogen"))) == doctest::Approx(10.0).epsilon(1e-12));
  const double n_n2 = 10.0 / recovery_components()[id("nitrogen")].molar_mass;
  const double psat = toluene_psat_Pa(5.0);
  CHECK(to_si(d->vent.mass(Phase::vapour, id("toluene"))) / recovery_components()[id("toluene")].molar_mass ==
        doctest::Approx(n_n2 * psat / (101325.0 - psat)).epsilon(1e-9));
  const BalanceClosure closure = close_balance({&feed, &nitrogen}, {&d->polymer, &d->condensate, &d->vent},
                                               d->resources.process_heat_J);
  CHECK(closure.mass_relative_error <= 1e-12);
  CHECK(closure.energy_relative_error <= 1e-9);
}

TEST_CASE("solvent recovery refuses a heater that cannot reach the drying temperature") {
  std::string yaml = oven_yaml;
  yaml.replace(yaml.find("\"2 kW\""), 6, "\"20 W\"");
  yaml.replace(yaml.find("insulation: mineral_wool"), 24, "insulation: bare_glass");
  auto model = build_clean(yaml);
  const Stream feed = gel();
  // Bare: UA = 12 x 0.415 = 5 W/K, 100 K above ambient needs ~500 W.
  CHECK_THROWS_WITH_AS(dry(*model, feed), doctest::Contains("cannot reach its set-point of 120.0 degC"), ModelError);
}

TEST_CASE("solvent recovery parameter errors") {
  auto mentions = [](const DiagnosticList& list, const std::string& text) {
    return std::any_of(list.all().begin(), list.all().end(),
                       [&](const Diagnostic& d) { return d.message.find(text) != std::string::npos; });
  };
  DiagnosticList both;
  (void)build(std::string(oven_yaml) + "residual_solvent: flory_huggins\n", both);
  CHECK(mentions(both, "exactly one of residual_solvent_fraction"));
  DiagnosticList kind;
  std::string yaml = oven_yaml;
  yaml.replace(yaml.find("dryer: oven"), 11, "dryer: owen");
  (void)build(yaml, kind);
  CHECK(mentions(kind, "did you mean 'oven'"));
  DiagnosticList limit;
  (void)build("dryer: oven\ndrying_temperature: \"120 degC\"\ncondenser_temperature: \"5 degC\"\n"
              "residual_solvent: flory_huggins\nsolvent: acetone\npolymer: polystyrene\nheater_power: \"2 kW\"\n"
              "vessel_volume: \"20 L\"\nvessel_mass: \"8 kg\"\nlfl_fraction_limit: 2\n",
              limit);
  CHECK(mentions(limit, "lfl_fraction_limit"));
}

TEST_CASE("a closed evaporator recovers the solvent: no air sweep, the condenser takes it all") {
  // Evaporator at 1 atm and 120 degC (above toluene's normal boiling point,
  // 110.6 degC), no sweep: the vapour is toluene alone, the ventilation rule
  // does not apply, and at 5 degC it all condenses.
  std::string yaml = oven_yaml;
  yaml.replace(yaml.find("dryer: oven"), 11, "dryer: evaporator");
  auto model = build_clean(yaml);
  const Stream feed = gel();
  auto d = dry(*model, feed);
  CHECK(d->resources.materials.empty());
  CHECK(to_si(d->condensate.mass(Phase::liquid, id("toluene"))) == doctest::Approx(3.95).epsilon(1e-12));
  CHECK(to_si(d->vent.total_mass()) == doctest::Approx(0.0));
  CHECK(figure(d->resources, "recovered_fraction") == doctest::Approx(3.95 / 4.0).epsilon(1e-12));
  CHECK(d->resources.cautions.size() == 3);  // vent, hot surfaces, closed-vessel purge
  const BalanceClosure closure = close_balance({&feed}, {&d->polymer, &d->condensate, &d->vent},
                                               d->resources.process_heat_J);
  CHECK(closure.mass_relative_error <= 1e-12);
  CHECK(closure.energy_relative_error <= 1e-9);

  // Below the boiling point with no sweep the solvent cannot evaporate.
  std::string cool = yaml;
  cool.replace(cool.find("\"120 degC\""), 10, "\"90 degC\"");
  auto cold = build_clean(cool);
  CHECK_THROWS_WITH_AS(dry(*cold, feed), doctest::Contains("the solvent cannot evaporate"), ModelError);
}

TEST_CASE("solvent recovery on a continuous basis: heater power per hour, no duration") {
  // Per hour: 5 kg/h of gel. The heater covers the heat into the streams and
  // the steady wall loss UA (T_dry - T_a) for one hour; nothing takes time.
  std::string yaml = oven_yaml;
  yaml.replace(yaml.find("\"2 kW\""), 6, "\"20 kW\"");
  auto model = build_clean(yaml, Basis::continuous);
  const Stream feed = gel();
  auto d = dry(*model, feed, nullptr, Basis::continuous);
  const BlockResources& r = d->resources;
  CHECK(r.duration_s == 0.0);
  const double UA = figure(r, "loss_conductance");
  CHECK(r.heat_drawn_J == doctest::Approx(figure(r, "sensible_heat") + figure(r, "vaporization_heat") +
                                          figure(r, "sweep_gas_heating") + UA * 100.0 * 3600.0)
                              .epsilon(1e-12));
  // The average sweep flow is the hour's sweep over 3600 s.
  CHECK(figure(r, "sweep_gas_flow") == doctest::Approx(figure(r, "sweep_gas_normal_volume") / 3600.0).epsilon(1e-12));
  // Heating the sweep air dominates: about 15.5 kmol/h x 29 J/(mol K) x 100 K
  // = 45 MJ/h = 12.6 kW, against 1.4 MJ/h (0.4 kW) to evaporate the toluene.
  CHECK(figure(r, "sweep_gas_heating") / 3600.0 == doctest::Approx(12.6e3).epsilon(0.05));
  // 2 kW cannot do that.
  const std::string small = oven_yaml;
  auto weak = build_clean(small, Basis::continuous);
  CHECK_THROWS_WITH_AS(dry(*weak, feed, nullptr, Basis::continuous), doctest::Contains("continuous operation"),
                       ModelError);
}
