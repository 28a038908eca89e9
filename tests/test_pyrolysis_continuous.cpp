// The pyrolysis block on a continuous basis: a stirred melt reactor (ideal
// mixed-flow reactor) fed by the hour. Conversion against the mixed-flow
// design equation, the energy balance against a hand calculation from
// formation enthalpies and heat capacities, the element balance, and the
// residence time and conversion as the throughput changes.

#include <doctest/doctest.h>

#include <yaml-cpp/yaml.h>

#include <algorithm>
#include <cmath>
#include <map>
#include <memory>
#include <numbers>
#include <sstream>
#include <string>
#include <vector>

#include "flowsheet/balance.hpp"
#include "flowsheet/block_model.hpp"
#include "flowsheet/component_library.hpp"
#include "flowsheet/stream.hpp"
#include "flowsheet/yaml_reader.hpp"
#include "python_reference.hpp"
#include "units/block_registry.hpp"
#include "units/pyrolysis.hpp"
#include "units/pyrolysis_kinetics.hpp"

using namespace unchain;
using units::RateConstant;

namespace {

const ComponentSet& ps_set() {
  static const ComponentSet set = [] {
    DiagnosticList diagnostics;
    ComponentSet s = make_component_set(builtin_library(),
                                        {"polystyrene", "styrene", "toluene", "ethylbenzene", "alpha_methylstyrene",
                                         "benzene", "styrene_dimer", "styrene_trimer", "methane", "ethylene",
                                         "hydrogen", "char", "nitrogen", "acetone"},
                                        {}, diagnostics);
    diagnostics.throw_if_errors();
    return s;
  }();
  return set;
}

const units::BlockRegistry& registry() {
  static const units::BlockRegistry r = [] {
    units::BlockRegistry reg;
    units::register_pyrolysis(reg);
    return reg;
  }();
  return r;
}

struct Built {
  DiagnosticList diagnostics;
  std::unique_ptr<BlockModel> model;
  std::string name = "reactor";

  [[nodiscard]] bool has_error_containing(const std::string& text) const {
    return std::any_of(diagnostics.all().begin(), diagnostics.all().end(), [&](const Diagnostic& d) {
      return d.severity == Severity::error && d.message.find(text) != std::string::npos;
    });
  }
};

std::unique_ptr<Built> build(const std::string& yaml, Basis basis = Basis::continuous) {
  auto b = std::make_unique<Built>();
  const YAML::Node node = YAML::Load(yaml);
  MappingReader parameters(node, "test.yaml", "blocks.reactor", b->diagnostics);
  parameters.accept("type");
  b->model = registry().create("pyrolysis", parameters, BlockSetup{ps_set(), basis, b->name, "USD"});
  return b;
}

std::unique_ptr<Built> build_clean(const std::string& yaml) {
  auto b = build(yaml);
  for (const auto& d : b->diagnostics.all()) INFO(d.to_string());
  REQUIRE_FALSE(b->diagnostics.has_errors());
  REQUIRE(b->model != nullptr);
  return b;
}

struct Run {
  Stream vapour, residue;
  BlockResources resources;
  Warnings warnings;

  [[nodiscard]] double figure(const std::string& key) const {
    const BlockFigure* f = resources.figure(key);
    REQUIRE_MESSAGE(f != nullptr, "missing figure " << key);
    return f->value;
  }
  [[nodiscard]] bool warned(const std::string& text) const {
    const auto all = warnings.messages();
    return std::any_of(all.begin(), all.end(), [&](const std::string& m) { return m.find(text) != std::string::npos; });
  }
};

std::unique_ptr<Run> run(const Built& b, const Stream& feed) {
  auto r = std::make_unique<Run>();
  const BlockPorts ports({{"feed", {&feed}}}, {{"vapour", {&r->vapour}}, {"residue", {&r->residue}}});
  const BlockContext context{ps_set(), Basis::continuous, b.name, celsius(20.0), r->warnings};
  b.model->compute(context, ports, r->resources);
  return r;
}

// kg per basis hour of polystyrene, densified (no bulk density needed).
Stream polymer_feed(double kg_per_h, double T_K = 298.15) {
  Stream s(ps_set());
  s.set_mass(Phase::solid, ps_set().require("polystyrene"), kilograms(kg_per_h));
  s.set_temperature(kelvin(T_K));
  return s;
}

// One channel to styrene with a temperature-independent rate (E = 0), so
// that k is known exactly: k = 1e-3 1/s. A 100 L reactor half full of a
// 1000 kg/m3 melt holds 50 kg.
const std::string one_channel =
    "reactor_volume: \"100 L\"\nfill_fraction: 0.5\nmelt_density: \"1000 kg/m3\"\n"
    "reactor_temperature: \"500 degC\"\n"
    "kinetics: {channels: [{product: styrene, pre_exponential: \"1e-3 1/s\", activation_energy: \"0 kJ/mol\"}]}\n"
    "heater_power: \"30 kW\"\nvessel_mass: \"100 kg\"\nvessel_material: stainless\ninsulation: mineral_wool\n";

}  // namespace

TEST_CASE("continuous pyrolysis: mixed-flow conversion follows the first-order design equation") {
  // Source: Levenspiel, Chemical Reaction Engineering, 3rd ed., ch. 5, mixed
  // flow reactor, first order: k tau = X / (1 - X), so X = k tau / (1 + k tau).
  for (const double k : {1e-4, 2.5e-3, 0.33}) {
    for (const double tau : {1.0, 600.0, 5000.0, 3.6e4}) {
      const double X = units::mixed_flow_conversion(from_si<RateConstant>(k), seconds(tau));
      CAPTURE(k);
      CAPTURE(tau);
      CHECK(X == doctest::Approx(k * tau / (1.0 + k * tau)).epsilon(1e-15));
      // The design equation solved back for tau.
      CHECK(X / (k * (1.0 - X)) == doctest::Approx(tau).epsilon(1e-9));
      // A mixed-flow reactor converts less than a plug-flow (or batch)
      // reactor of the same mean time, 1 - exp(-k tau) (Levenspiel ch. 5).
      CHECK(X < units::isothermal_conversion(from_si<RateConstant>(k), seconds(tau)));
    }
  }
  CHECK(units::mixed_flow_conversion(from_si<RateConstant>(1e-3), seconds(0.0)) == 0.0);

  // The block: 36 kg/h = 0.01 kg/s into a 50 kg holdup, tau = 5000 s,
  // k tau = 5, X = 5/6 (the design equation above).
  auto b = build_clean(one_channel + "yields: kinetics\n");
  auto r = run(*b, polymer_feed(36.0));
  CHECK(r->figure("melt_holdup_kg") == doctest::Approx(50.0).epsilon(1e-14));
  CHECK(r->figure("residence_time") == doctest::Approx(5000.0).epsilon(1e-14));
  CHECK(r->figure("damkohler_number") == doctest::Approx(5.0).epsilon(1e-14));
  CHECK(r->figure("conversion") == doctest::Approx(5.0 / 6.0).epsilon(1e-14));
  const double styrene = to_si(r->vapour.mass(Phase::vapour, ps_set().require("styrene")));
  CHECK(styrene == doctest::Approx(36.0 * 5.0 / 6.0).epsilon(1e-13));
  // The unconverted polymer leaves with the residue.
  const double left = to_si(r->residue.mass(Phase::solid, ps_set().require("polystyrene")));
  CHECK(left == doctest::Approx(36.0 / 6.0).epsilon(1e-13));

  // The built-in polystyrene set at 500 degC, where its channels sum to the
  // overall rate k = 2e13 exp(-204 kJ/mol / (R T)) they were fitted to.
  // Source: Westerhout et al., Ind. Eng. Chem. Res. 36 (1997) 1955 (from
  // memory), the values of the built-in set; CODATA 2018 gas constant.
  auto builtin = build_clean(
      "reactor_volume: \"200 L\"\nfill_fraction: 0.4\nmelt_density: \"850 kg/m3\"\nreactor_temperature: \"500 degC\"\n"
      "heater_power: \"15 kW\"\nvessel_mass: \"260 kg\"\nvessel_material: stainless\ninsulation: mineral_wool\n");
  auto rb = run(*builtin, polymer_feed(15.0));
  const double k500 = 2.0e13 * std::exp(-204.0e3 / (8.314462618 * 773.15));
  const double tau500 = 0.2 * 0.4 * 850.0 / (15.0 / 3600.0);
  CHECK(rb->figure("rate_constant_at_set_point") == doctest::Approx(k500).epsilon(1e-10));
  CHECK(rb->figure("residence_time") == doctest::Approx(tau500).epsilon(1e-12));
  // 1 - X = 1 / (1 + k tau): the unconverted share, sharper than X near 1.
  CHECK(1.0 - rb->figure("conversion") == doctest::Approx(1.0 / (1.0 + k500 * tau500)).epsilon(1e-9));
}

TEST_CASE("continuous pyrolysis: the hourly energy balance matches a hand calculation from formation enthalpies") {
  auto b = build_clean(one_channel + "yields: kinetics\n");
  const Stream feed = polymer_feed(36.0);
  auto r = run(*b, feed);

  const Component& sty = *builtin_library().find("styrene");
  const Component& ps = *builtin_library().find("polystyrene");
  REQUIRE(sty.ideal_gas_heat_capacity.has_value());
  REQUIRE(ps.solid_heat_capacity.has_value());
  REQUIRE(ps.polymer->melt_heat_capacity.has_value());
  // Source: hand calculation from the data of data/components.yaml (styrene:
  // formation enthalpy, ideal-gas cp, Watson dHv at 25 degC; polystyrene:
  // heat of polymerization, glass and melt cp on either side of Tg), the cp
  // integrals by scipy.integrate.quad. Per kg converted to styrene vapour:
  //   q_c = n [int cp_ig dT + dHv(298.15) - dH_polymerization]
  // per kg left unconverted, the polymer heated to 500 degC:
  //   q_u = n [int_298.15^Tg cp_glass dT + int_Tg^773.15 cp_melt dT]
  const double Tg = ps.polymer->glass_transition_temperature->value;
  std::ostringstream script;
  script.precision(17);
  auto poly = [&](const std::vector<double>& c) {
    script << "lambda T: sum(a * T**i for i, a in enumerate([";
    for (double x : c) script << x << ",";
    script << "]))";
  };
  script << "from scipy.integrate import quad\nf = ";
  poly(sty.ideal_gas_heat_capacity->coefficients);
  script << "\ng = ";
  poly(ps.solid_heat_capacity->coefficients);
  script << "\nm = ";
  poly(ps.polymer->melt_heat_capacity->coefficients);
  script << "\nprint(quad(f, 298.15, 773.15, epsabs=1e-10, epsrel=1e-13)[0])\n"
         << "print(quad(g, 298.15, " << Tg << ", epsabs=1e-10, epsrel=1e-13)[0] + quad(m, " << Tg
         << ", 773.15, epsabs=1e-10, epsrel=1e-13)[0])\n";
  const auto reference = testing::python_numbers(script.str());
  REQUIRE(reference.size() == 2);
  const double Tb = sty.normal_boiling_point->value, Tc = sty.critical_temperature->value;
  const double dHv298 = sty.enthalpy_of_vaporization_at_nbp->value * std::pow((Tc - 298.15) / (Tc - Tb), sty.watson_exponent);
  const double dH_pol = ps.polymer->heat_of_polymerization.value;
  // IUPAC 2021 conventional atomic weights, C8H8 repeat unit.
  const double n = 1.0 / (8 * 12.011e-3 + 8 * 1.008e-3);
  const double X = 5.0 / 6.0;
  const double expected = 36.0 * n * (X * (reference[0] + dHv298 - dH_pol) + (1.0 - X) * reference[1]);
  MESSAGE("hand calculation: " << expected << " J per hour for 36 kg/h");

  // The quad integrals and the data are good to far better than 1e-9.
  CHECK(r->resources.process_heat_J == doctest::Approx(expected).epsilon(1e-9));
  CHECK(r->figure("reaction_heat_298K") == doctest::Approx(-36.0 * X * n * dH_pol).epsilon(1e-9));
  CHECK(r->figure("vaporization_heat_298K") == doctest::Approx(36.0 * X * n * dHv298).epsilon(1e-9));
  CHECK(std::abs(r->figure("sensible_heat_feed_to_298K")) < 1e-6);

  // The steady heater: streams plus wall loss, no heat-up. The wall: a
  // cylinder of height 1.5 D holding 100 L, A = 2 pi D^2, under 50 mm of
  // mineral wool, U = 1 / (0.05 / 0.04 + 1 / 8) W/(m2 K) (the vessel
  // model's stated values, units/vessel_heating.hpp; from memory).
  const double D = std::cbrt(0.1 / (0.375 * std::numbers::pi));
  const double UA = 2.0 * std::numbers::pi * D * D / (0.05 / 0.04 + 1.0 / 8.0);
  const double loss_W = UA * (773.15 - 293.15);
  CHECK(r->figure("loss_at_set_point") == doctest::Approx(loss_W).epsilon(1e-12));
  CHECK(r->figure("heater_power_drawn") == doctest::Approx(expected / 3600.0 + loss_W).epsilon(1e-9));
  CHECK(r->resources.electricity_J == doctest::Approx(expected + loss_W * 3600.0).epsilon(1e-9));
  CHECK(r->resources.duration_s == 0.0);

  const auto balance = close_balance({&feed}, {&r->vapour, &r->residue}, r->resources.process_heat_J);
  CHECK(balance.mass_relative_error < 1e-14);
  CHECK(balance.energy_relative_error < 1e-12);

  // Equipment for the capital estimate, and the cautions of a hot,
  // continuously fed reactor.
  REQUIRE(r->resources.equipment.size() == 2);
  CHECK(r->resources.equipment[0].size == doctest::Approx(0.1).epsilon(1e-15));
  CHECK(r->resources.equipment[1].size == doctest::Approx(30e3).epsilon(1e-15));
  const auto& cautions = r->resources.cautions;
  CHECK(std::any_of(cautions.begin(), cautions.end(),
                    [](const std::string& c) { return c.find("continuously fed") != std::string::npos; }));
  CHECK(std::any_of(cautions.begin(), cautions.end(),
                    [](const std::string& c) { return c.find("inert atmosphere") != std::string::npos; }));

  // A heater that cannot hold the set-point is refused with the power needed.
  auto small = build_clean(one_channel.substr(0, one_channel.find("heater_power")) +
                           "heater_power: \"2 kW\"\nvessel_mass: \"100 kg\"\nvessel_material: stainless\n"
                           "insulation: mineral_wool\n");
  CHECK_THROWS_WITH_AS(run(*small, feed), doctest::Contains("in continuous operation"), ModelError);
}

TEST_CASE("continuous pyrolysis: the built-in kinetics close every element through char and hydrogen") {
  auto b = build_clean(
      "reactor_volume: \"200 L\"\nfill_fraction: 0.4\nmelt_density: \"850 kg/m3\"\nreactor_temperature: \"500 degC\"\n"
      "inert_gas_flow: \"5 L/min\"\n"
      "heater_power: \"15 kW\"\nvessel_mass: \"260 kg\"\nvessel_material: stainless\ninsulation: mineral_wool\n");
  const Stream feed = polymer_feed(15.0, 293.15);
  auto r = run(*b, feed);
  // The purge nitrogen enters at 25 degC (zero enthalpy) and is part of
  // the vapour; it is an inlet of the balance as a stream would be.
  Stream purge(ps_set());
  purge.set_mass(Phase::vapour, ps_set().require("nitrogen"), kilograms(r->figure("nitrogen_purge_kg")));
  purge.set_temperature(kelvin(298.15));
  const auto balance = close_balance({&feed, &purge}, {&r->vapour, &r->residue}, r->resources.process_heat_J);
  CHECK(balance.mass_relative_error < 1e-14);
  CHECK(balance.energy_relative_error < 1e-12);
  REQUIRE_FALSE(balance.element_relative_error.empty());
  for (const auto& [element, gap] : balance.element_relative_error) {
    CAPTURE(element);
    CHECK(gap < 1e-12);
  }
  // 5 L/min at 0 degC and 1 atm is 0.3 m3 per hour: 0.3 x 101325 / (R
  // 273.15) mol of N2 at 28.0134 g/mol (CODATA 2018 R; IUPAC atomic weight).
  CHECK(r->figure("nitrogen_purge_kg") ==
        doctest::Approx(0.3 * 101325.0 / (8.314462618 * 273.15) * 28.0134e-3).epsilon(1e-4));
  // The built-in slates close C and H within 0.05 % of the mass
  // (docs/blocks-pyrolysis.md): char and hydrogen move by equal and
  // opposite amounts of at most that, so the sum of both stays below 0.1 %.
  CHECK(r->figure("element_closure_adjustment_fraction") > 0.0);
  CHECK(r->figure("element_closure_adjustment_fraction") < 1e-3);
  CHECK(r->figure("element_closure_char_kg") == doctest::Approx(-r->figure("element_closure_hydrogen_kg")).epsilon(1e-9));
  CHECK(r->figure("monomer_yield") > 0.6);
  CHECK(r->figure("monomer_yield") < 0.8);
}

TEST_CASE("continuous pyrolysis: more throughput means a shorter residence time and a lower conversion") {
  auto b = build_clean(one_channel);
  auto slow = run(*b, polymer_feed(18.0));
  auto fast = run(*b, polymer_feed(36.0));
  // Same holdup, twice the feed: half the residence time (tau = M / F).
  CHECK(fast->figure("residence_time") == doctest::Approx(0.5 * slow->figure("residence_time")).epsilon(1e-14));
  CHECK(fast->figure("conversion") < slow->figure("conversion"));
  // Source: Levenspiel ch. 5 as above: k tau = 10 and 5.
  CHECK(slow->figure("conversion") == doctest::Approx(10.0 / 11.0).epsilon(1e-14));
  CHECK(fast->figure("conversion") == doctest::Approx(5.0 / 6.0).epsilon(1e-14));
  // The unconverted polymer grows faster than the feed.
  CHECK(fast->figure("unconverted_polymer_kg") > 2.0 * slow->figure("unconverted_polymer_kg"));
  // Below 90 % converted the block says how much polymer leaves unconverted.
  CHECK(fast->warned("leaves unconverted"));
  CHECK_FALSE(slow->warned("leaves unconverted"));

  // A given residence time holds whatever the feed rate, as long as the
  // melt fits: 3000 s at 36 kg/h is 30 kg, 30 L of a 1000 kg/m3 melt.
  auto given = build_clean(one_channel + "residence_time: \"50 min\"\n");
  auto g = run(*given, polymer_feed(36.0));
  CHECK(g->figure("residence_time") == doctest::Approx(3000.0).epsilon(1e-14));
  CHECK(g->figure("melt_holdup_kg") == doctest::Approx(30.0).epsilon(1e-14));
  CHECK(g->figure("conversion") == doctest::Approx(3.0 / 4.0).epsilon(1e-14));
  // At 72 kg/h the same time needs 60 L, more than the 50 L the reactor holds.
  CHECK_THROWS_WITH_AS(run(*given, polymer_feed(72.0)), doctest::Contains("more than the 50 L"), ModelError);
}

TEST_CASE("continuous pyrolysis: keys of the other basis are refused by name") {
  auto held = build(one_channel + "hold_time: \"30 min\"\n");
  CHECK(held->has_error_containing("'blocks.reactor.hold_time' applies only to basis: batch"));
  auto neither = build(
      "reactor_volume: \"100 L\"\nreactor_temperature: \"500 degC\"\nheater_power: \"30 kW\"\nvessel_mass: \"100 kg\"\n");
  CHECK(neither->has_error_containing("missing 'blocks.reactor.melt_density' or 'blocks.reactor.residence_time'"));
  auto batch = build(one_channel + "hold_time: \"30 min\"\n", Basis::batch);
  CHECK(batch->has_error_containing("'blocks.reactor.melt_density' applies only to basis: continuous"));
  auto negative = build(one_channel + "residence_time: \"-5 min\"\n");
  CHECK(negative->has_error_containing("'blocks.reactor.residence_time' must be positive"));
}
