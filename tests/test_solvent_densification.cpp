// Block solvent_densification and the Hansen solvent-quality check.

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
#include "units/hansen.hpp"
#include "units/solvent_densification.hpp"

using namespace unchain;

namespace {

const ComponentSet& densification_components() {
  static const ComponentSet set = [] {
    DiagnosticList diagnostics;
    ComponentSet s = make_component_set(builtin_library(), {"polystyrene", "toluene", "acetone", "nitrogen", "oxygen"},
                                        {}, diagnostics);
    diagnostics.throw_if_errors();
    return s;
  }();
  return set;
}

std::size_t id(const char* name) { return densification_components().require(name); }

const units::BlockRegistry& registry() {
  static const units::BlockRegistry r = [] {
    units::BlockRegistry reg;
    units::register_solvent_densification(reg);
    return reg;
  }();
  return r;
}

std::unique_ptr<BlockModel> build(const std::string& yaml, DiagnosticList& diagnostics, Basis basis = Basis::batch) {
  MappingReader parameters(YAML::Load(yaml), "test.yaml", "blocks.dissolver", diagnostics);
  return registry().create("solvent_densification", parameters,
                           BlockSetup{densification_components(), basis, "dissolver", "USD"});
}

std::unique_ptr<BlockModel> build_clean(const std::string& yaml) {
  DiagnosticList diagnostics;
  auto model = build(yaml, diagnostics);
  for (const auto& d : diagnostics.all()) INFO(d.to_string());
  REQUIRE_FALSE(diagnostics.has_errors());
  REQUIRE(model != nullptr);
  return model;
}

Stream foam(double polymer_kg, double air_kg) {
  Stream s(densification_components());
  s.set_mass(Phase::solid, id("polystyrene"), kilograms(polymer_kg));
  s.set_mass(Phase::vapour, id("nitrogen"), kilograms(0.79 * air_kg));
  s.set_mass(Phase::vapour, id("oxygen"), kilograms(0.21 * air_kg));
  s.set_temperature(celsius(20.0));
  s.set_bulk_density(from_si<Density>(18.0));
  return s;
}

Stream solvent(const char* name, double kg) {
  Stream s(densification_components());
  s.set_mass(Phase::liquid, id(name), kilograms(kg));
  s.set_temperature(celsius(20.0));
  return s;
}

struct Dissolved {
  Stream gel, vent, excess;
  BlockResources resources;
  Warnings warnings;
};

std::unique_ptr<Dissolved> dissolve(const BlockModel& model, const Stream& polymer, const Stream& solvent_in,
                                    bool with_excess = false) {
  auto d = std::make_unique<Dissolved>();
  const ComponentSet& c = densification_components();
  d->gel = Stream(c);
  d->vent = Stream(c);
  d->excess = Stream(c);
  std::map<std::string, std::vector<Stream*>> outlets{{"gel", {&d->gel}}, {"vent", {&d->vent}}};
  if (with_excess) outlets["excess_solvent"] = {&d->excess};
  const BlockPorts ports({{"polymer", {&polymer}}, {"solvent", {&solvent_in}}}, outlets);
  const std::string name = "dissolver";
  const BlockContext context{c, Basis::batch, name, celsius(20.0), d->warnings};
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

}  // namespace

TEST_CASE("air released from foam by its bulk and solid densities") {
  // Hand calculation: 1 kg PS foam at 18 kg/m3 bulk, 1050 kg/m3 solid:
  // foam 1/18 = 55.556 L, polymer 1/1050 = 0.952 L, air 54.603 L.
  const units::FoamVolumes v = units::foam_volumes(kilograms(1.0), from_si<Density>(18.0), from_si<Density>(1050.0));
  CHECK(to_si(v.foam) * 1e3 == doctest::Approx(55.556).epsilon(1e-5));
  CHECK(to_si(v.polymer) * 1e3 == doctest::Approx(0.952).epsilon(1e-3));
  CHECK(to_si(v.air) * 1e3 == doctest::Approx(54.603).epsilon(1e-5));
  CHECK(to_si(v.air) == doctest::Approx(1.0 / 18.0 - 1.0 / 1050.0).epsilon(1e-14));
  // A "foam" denser than its polymer holds no air.
  CHECK(to_si(units::foam_volumes(kilograms(1.0), from_si<Density>(1100.0), from_si<Density>(1050.0)).air) == 0.0);
}

TEST_CASE("Hansen relative energy difference of polystyrene in toluene and acetone") {
  const ComponentSet& c = densification_components();
  const Component& ps = c[id("polystyrene")];
  const Component& toluene = c[id("toluene")];
  const Component& acetone = c[id("acetone")];
  REQUIRE(ps.hansen.has_value());
  REQUIRE(ps.hansen->interaction_radius.has_value());
  // Source: the data file's values (Hansen, Hansen Solubility Parameters: A
  // User's Handbook, 2nd ed., tables, from memory there): PS (21.3, 5.8, 4.3),
  // R0 12.7; toluene (18.0, 1.4, 2.0); acetone (15.5, 10.4, 7.0), all MPa^0.5.
  auto by_hand = [&](const Component& s) {
    const double dD = (ps.hansen->dispersion - s.hansen->dispersion) * 1e-3;
    const double dP = (ps.hansen->polar - s.hansen->polar) * 1e-3;
    const double dH = (ps.hansen->hydrogen_bonding - s.hansen->hydrogen_bonding) * 1e-3;
    return std::sqrt(4.0 * dD * dD + dP * dP + dH * dH) / (*ps.hansen->interaction_radius * 1e-3);
  };
  const auto good = units::solvent_quality(ps, toluene);
  const auto poor = units::solvent_quality(ps, acetone);
  REQUIRE(good.has_value());
  REQUIRE(poor.has_value());
  CHECK(good->relative_energy_difference == doctest::Approx(by_hand(toluene)).epsilon(1e-12));
  CHECK(poor->relative_energy_difference == doctest::Approx(by_hand(acetone)).epsilon(1e-12));
  // With the numbers above: toluene Ra^2 = 4 x 3.3^2 + 4.4^2 + 2.3^2 = 68.21,
  // RED = 8.259 / 12.7 = 0.650; acetone Ra^2 = 4 x 5.8^2 + 4.6^2 + 2.7^2 =
  // 163.01, RED = 12.767 / 12.7 = 1.005 (a borderline, poor solvent).
  CHECK(good->relative_energy_difference == doctest::Approx(0.6503).epsilon(1e-3));
  CHECK(poor->relative_energy_difference == doctest::Approx(1.0053).epsilon(1e-3));
  CHECK(good->is_good());
  CHECK_FALSE(poor->is_good());
  // A component without Hansen data gives no verdict, and says why.
  std::string why;
  CHECK_FALSE(units::solvent_quality(ps, c[id("nitrogen")], &why).has_value());
  CHECK(why.find("nitrogen") != std::string::npos);
}

TEST_CASE("solvent densification: gel, air and volume figures by hand, balances close") {
  auto model = build_clean("solvent: toluene\nsolvent_to_polymer_ratio: 4\nstirrer_power: \"40 W\"\n"
                           "mixing_time: \"30 min\"\n");
  const Stream polymer = foam(1.0, 0.0);
  const Stream toluene = solvent("toluene", 4.0);
  auto d = dissolve(*model, polymer, toluene);
  const BlockResources& r = d->resources;

  // Without air in the feed nothing leaves by the vent and the gel holds
  // all: 1 kg PS dissolved (liquid phase) in 4 kg toluene at 20 degC.
  CHECK(to_si(d->vent.total_mass()) == 0.0);
  CHECK(to_si(d->gel.mass(Phase::liquid, id("polystyrene"))) == doctest::Approx(1.0).epsilon(1e-12));
  CHECK(to_si(d->gel.mass(Phase::liquid, id("toluene"))) == doctest::Approx(4.0).epsilon(1e-12));
  CHECK(in_celsius(d->gel.temperature()) == doctest::Approx(20.0).epsilon(1e-8));
  // Air: 54.603 L (above). Its mass, ideal gas at 20 degC and 1 atm with
  // M = 0.79 M(N2) + 0.21 M(O2) = 28.85 g/mol: 101325 x 0.054603 / (8.3145 x 293.15)
  // = 2.2700 mol = 65.49 g.
  CHECK(figure(r, "air_released_volume") == doctest::Approx(1.0 / 18.0 - 1.0 / 1050.0).epsilon(1e-12));
  CHECK(figure(r, "air_released_mass") == doctest::Approx(0.06549).epsilon(1e-3));
  // Gel volume: 1/1050 + 4 / rho_toluene(20 degC); Source: data/components.yaml,
  // toluene 866.9 kg/m3 at 20 degC (CRC Handbook there): 0.952 + 4.614 = 5.566 L.
  const double gel_volume = 1.0 / 1050.0 + 4.0 / 866.9;
  CHECK(figure(r, "gel_volume") == doctest::Approx(gel_volume).epsilon(1e-9));
  CHECK(figure(r, "volume_reduction_ratio") == doctest::Approx((1.0 / 18.0) / gel_volume).epsilon(1e-9));
  CHECK(figure(r, "polymer_mass_fraction") == doctest::Approx(0.2).epsilon(1e-12));
  CHECK(figure(r, "polymer_concentration") == doctest::Approx(1.0 / gel_volume).epsilon(1e-9));
  CHECK(figure(r, "relative_energy_difference") < 1.0);
  CHECK_FALSE(warned(d->warnings, "dissolution will be incomplete"));
  // Stirrer: 40 W x 1800 s = 72 kJ, over the mixing time.
  CHECK(r.electricity_J == doctest::Approx(72e3).epsilon(1e-12));
  CHECK(r.duration_s == doctest::Approx(1800.0));
  CHECK_FALSE(r.cautions.empty());
  CHECK(r.cautions[0].find("toluene (flash point 4.0 degC)") != std::string::npos);

  const BalanceClosure closure = close_balance({&polymer, &toluene}, {&d->gel, &d->vent}, r.process_heat_J);
  CHECK(closure.mass_relative_error <= 1e-12);
  CHECK(closure.energy_relative_error <= 1e-9);
  // Adiabatic: what is booked as heat is only the round-off of the search.
  CHECK(std::abs(r.process_heat_J) <= 1e-9 * std::abs(closure.enthalpy_in_J));
}

TEST_CASE("solvent densification: released air leaves saturated with solvent vapour") {
  auto model = build_clean("solvent: toluene\nsolvent_to_polymer_ratio: 4\n");
  // Air in the feed as a vapour: 65.5 g.
  const Stream polymer = foam(1.0, 0.0655);
  const Stream toluene = solvent("toluene", 4.0);
  auto d = dissolve(*model, polymer, toluene);
  const ComponentSet& c = densification_components();
  const double T = in_kelvin(d->gel.temperature());
  // The gel is cooled a little by the solvent that evaporates into the air.
  CHECK(T < 293.15);
  CHECK(T > 292.0);
  // Hand formula: n_s = n_air x a Psat(T) / (P - a Psat(T)), a from
  // Flory-Huggins ln a = ln(1 - phi) + phi + chi phi^2 with chi = 0.44
  // (data/binary_pairs.yaml, Polymer Handbook there) and phi the polymer
  // volume fraction of the gel.
  const double n_air = 0.79 * 0.0655 / c[id("nitrogen")].molar_mass + 0.21 * 0.0655 / c[id("oxygen")].molar_mass;
  const Component& tol = c[id("toluene")];
  // Antoine, data/components.yaml: log10(P/mmHg) = 6.95464 - 1344.8 / (219.482 + t/degC).
  const double t_C = T - 273.15;
  const double psat = std::pow(10.0, 6.95464 - 1344.8 / (219.482 + t_C)) * 133.322387415;
  const double vent_toluene = to_si(d->vent.mass(Phase::vapour, id("toluene")));
  const double gel_toluene = to_si(d->gel.mass(Phase::liquid, id("toluene")));
  const double vp = 1.0 / 1050.0;
  const double vs = gel_toluene / to_si(liquid_density(tol, kelvin(T)));
  const double phi = vp / (vp + vs);
  const double a = std::exp(std::log(1.0 - phi) + phi + 0.44 * phi * phi);
  const double n_s = n_air * a * psat / (101325.0 - a * psat);
  CHECK(vent_toluene / tol.molar_mass == doctest::Approx(n_s).epsilon(1e-9));
  // At 20 degC toluene has about 2.9 kPa: roughly 2.8 % of the vent, ~6 g here.
  CHECK(vent_toluene == doctest::Approx(0.0060).epsilon(0.1));
  // The air mass comes from the feed's vapour.
  CHECK(figure(d->resources, "air_released_mass") == doctest::Approx(0.0655).epsilon(1e-12));
  CHECK(to_si(d->vent.mass(Phase::vapour, id("nitrogen"))) == doctest::Approx(0.79 * 0.0655).epsilon(1e-12));

  const BalanceClosure closure = close_balance({&polymer, &toluene}, {&d->gel, &d->vent}, d->resources.process_heat_J);
  CHECK(closure.mass_relative_error <= 1e-12);
  CHECK(closure.energy_relative_error <= 1e-9);
  CHECK(std::abs(d->resources.process_heat_J) <= 1e-9 * std::abs(closure.enthalpy_in_J));
}

TEST_CASE("solvent densification: ratios, excess solvent and a poor solvent") {
  // Volume ratio 3: V_p = 1/1050 m3, solvent 3 V_p x 866.9 kg/m3 = 2.4769 kg;
  // 5 kg supplied, the rest leaves as excess at the inlet's state.
  auto by_volume = build_clean("solvent: toluene\nsolvent_to_polymer_volume_ratio: 3\n");
  const Stream polymer = foam(1.0, 0.0);
  const Stream plenty = solvent("toluene", 5.0);
  auto d = dissolve(*by_volume, polymer, plenty, true);
  const double needed = 3.0 / 1050.0 * 866.9;
  CHECK(to_si(d->gel.mass(Phase::liquid, id("toluene"))) == doctest::Approx(needed).epsilon(1e-12));
  CHECK(to_si(d->excess.mass(Phase::liquid, id("toluene"))) == doctest::Approx(5.0 - needed).epsilon(1e-12));
  CHECK(figure(d->resources, "solvent_needed") == doctest::Approx(needed).epsilon(1e-12));
  CHECK(figure(d->resources, "solvent_supplied") == doctest::Approx(5.0).epsilon(1e-12));
  const BalanceClosure closure =
      close_balance({&polymer, &plenty}, {&d->gel, &d->vent, &d->excess}, d->resources.process_heat_J);
  CHECK(closure.mass_relative_error <= 1e-12);
  CHECK(closure.energy_relative_error <= 1e-9);

  // Without an excess outlet all solvent goes in, with a warning.
  auto all_in = dissolve(*by_volume, polymer, plenty, false);
  CHECK(to_si(all_in->gel.mass(Phase::liquid, id("toluene"))) == doctest::Approx(5.0).epsilon(1e-12));
  CHECK(warned(all_in->warnings, "more than the"));

  // Target mass fraction 0.25: solvent = 1 x 0.75 / 0.25 = 3 kg; 2 kg is too little.
  auto by_fraction = build_clean("solvent: toluene\ntarget_polymer_mass_fraction: 0.25\n");
  const Stream short_supply = solvent("toluene", 2.0);
  CHECK_THROWS_WITH_AS(dissolve(*by_fraction, polymer, short_supply), doctest::Contains("needs 3 kg of toluene"),
                       ModelError);

  // Acetone (RED 1.005 with the data's values) is flagged.
  auto in_acetone = build_clean("solvent: acetone\nsolvent_to_polymer_ratio: 5\n");
  const Stream acetone = solvent("acetone", 5.0);
  auto poor = dissolve(*in_acetone, polymer, acetone);
  CHECK(warned(poor->warnings, "dissolution will be incomplete"));
  CHECK(figure(poor->resources, "relative_energy_difference") >= 1.0);
}

TEST_CASE("solvent densification: parameter errors") {
  DiagnosticList none;
  (void)build("solvent: toluene\n", none);
  CHECK(none.has_errors());
  DiagnosticList two;
  (void)build("solvent: toluene\nsolvent_to_polymer_ratio: 4\ntarget_polymer_mass_fraction: 0.2\n", two);
  CHECK(two.has_errors());
  DiagnosticList wrong;
  (void)build("solvent: toluen\nsolvent_to_polymer_ratio: 4\nstirrer_power: \"40 W\"\n", wrong);
  auto mentions = [&](const DiagnosticList& list, const std::string& text) {
    return std::any_of(list.all().begin(), list.all().end(),
                       [&](const Diagnostic& d) { return d.message.find(text) != std::string::npos; });
  };
  CHECK(mentions(wrong, "did you mean 'toluene'"));
  CHECK(mentions(wrong, "needs 'mixing_time'"));
  DiagnosticList not_solvent;
  (void)build("solvent: polystyrene\nsolvent_to_polymer_ratio: 4\n", not_solvent);
  CHECK(mentions(not_solvent, "is not a liquid solvent"));
}
