// The washing block: cross-current water wash with equilibrium stages, and
// the theoretical oxygen demand of the aqueous waste.

#include <doctest/doctest.h>
#include <yaml-cpp/yaml.h>

#include <algorithm>
#include <cmath>
#include <memory>
#include <string>
#include <vector>

#include "flowsheet/balance.hpp"
#include "flowsheet/block_model.hpp"
#include "flowsheet/component_library.hpp"
#include "flowsheet/stream.hpp"
#include "flowsheet/yaml_reader.hpp"
#include "python_reference.hpp"
#include "units/block_registry.hpp"
#include "units/washing.hpp"

using namespace unchain;
using namespace unchain::units;

namespace {

const ComponentSet& wash_components() {
  static const ComponentSet set = [] {
    DiagnosticList diagnostics;
    ComponentSet s = make_component_set(builtin_library(),
                                        {"toluene", "styrene", "ethyl_acetate", "acetone", "water", "char", "methane"},
                                        {}, diagnostics);
    diagnostics.throw_if_errors();
    return s;
  }();
  return set;
}

Eigen::Index at(const char* id) { return static_cast<Eigen::Index>(wash_components().require(id)); }

struct BuiltWash {
  DiagnosticList diagnostics;
  std::unique_ptr<BlockModel> model;
};

std::unique_ptr<BuiltWash> build_wash(const std::string& yaml) {
  BlockRegistry registry;
  register_washing(registry);
  auto built = std::make_unique<BuiltWash>();
  const YAML::Node node = YAML::Load(yaml);
  MappingReader parameters(node, "test.yaml", "blocks.wash", built->diagnostics);
  built->model = registry.create("washing", parameters, BlockSetup{wash_components(), Basis::batch, "wash", "USD"});
  for (const auto& d : built->diagnostics.all()) INFO(d.to_string());
  return built;
}

struct WashRun {
  Stream washed, aqueous;
  BlockResources resources;
  Warnings warnings;
};

std::unique_ptr<WashRun> run_wash(const BlockModel& model, const Stream& organic, const Stream* water = nullptr) {
  auto run = std::make_unique<WashRun>();
  run->washed = Stream(wash_components());
  run->aqueous = Stream(wash_components());
  std::map<std::string, std::vector<const Stream*>> inlets{{"organic", {&organic}}};
  if (water != nullptr) inlets["water"] = {water};
  const BlockPorts ports(inlets, {{"washed_organic", {&run->washed}}, {"aqueous_waste", {&run->aqueous}}});
  const std::string name = "wash";
  const BlockContext context{wash_components(), Basis::batch, name, celsius(20.0), run->warnings};
  model.compute(context, ports, run->resources);
  return run;
}

Stream liquid(std::initializer_list<std::pair<const char*, double>> masses, double T_celsius = 25.0) {
  Stream s(wash_components());
  for (const auto& [id, kg] : masses) s.set_mass(Phase::liquid, static_cast<std::size_t>(at(id)), kilograms(kg));
  s.set_temperature(celsius(T_celsius));
  return s;
}

double figure(const BlockResources& r, const std::string& key) {
  const BlockFigure* f = r.figure(key);
  REQUIRE_MESSAGE(f != nullptr, key);
  return f->value;
}

bool any_warning(const Warnings& warnings, const std::string& text) {
  const auto all = warnings.messages();
  return std::any_of(all.begin(), all.end(), [&](const std::string& m) { return m.find(text) != std::string::npos; });
}

}  // namespace

TEST_CASE("theoretical oxygen demand from the formula") {
  // Source: stoichiometry, hand calculation. Acetone C3H6O:
  // c + h/4 - o/2 = 3 + 1.5 - 0.5 = 4 mol O2 per mol; 4 x 32.00 / 58.08 =
  // 2.204 g O2 per g. Tolerance: the 4 digits of the hand value.
  const Component& acetone = wash_components()[static_cast<std::size_t>(at("acetone"))];
  CHECK(theoretical_oxygen_demand_per_mass(acetone.formula) == doctest::Approx(2.204).epsilon(5e-4));
  // Toluene C7H8: 7 + 2 = 9 mol O2 per mol; 9 x 32.00 / 92.14 = 3.126 g/g.
  const Component& toluene = wash_components()[static_cast<std::size_t>(at("toluene"))];
  CHECK(theoretical_oxygen_demand_per_mass(toluene.formula) == doctest::Approx(3.126).epsilon(5e-4));
  // Glycine C2H5NO2 with nitrogen to ammonia: 2 + (5 - 3)/4 - 1 = 1.5 mol
  // O2 per mol; 1.5 x 32.00 / 75.07 = 0.6394 g/g.
  CHECK(theoretical_oxygen_demand_per_mass({{"C", 2}, {"H", 5}, {"N", 1}, {"O", 2}}) ==
        doctest::Approx(0.6394).epsilon(5e-4));
  // No carbon, no organic oxygen demand.
  CHECK(theoretical_oxygen_demand_per_mass({{"H", 2}, {"O", 1}}) == 0.0);
  std::string ignored;
  (void)theoretical_oxygen_demand_per_mass({{"C", 4}, {"H", 4}, {"S", 1}}, &ignored);
  CHECK(ignored == "S");
}

TEST_CASE("washing: three cross-current washes of a dilute solute match (1/(1+KW/O))^3") {
  // Source: cross-current extraction with fresh solvent, dilute solute and
  // immiscible liquids: fraction left = (1 / (1 + K W/O))^N (Treybal,
  // Mass-Transfer Operations, 3rd ed., ch. 10, from memory; derivable by
  // hand). K = 0.01, W/O = 1, N = 3: (1/1.01)^3 = 0.970590. The solute is a
  // trace (1e-8 of the oil), so the phase ratio differs from 1 by 1e-8.
  auto built = build_wash(R"(
number_of_washes: 3
water_to_organic_ratio: 1
water_entrainment: 0
partition_coefficients: {toluene: 0, ethyl_acetate: 0.01}
)");
  REQUIRE_FALSE(built->diagnostics.has_errors());
  const Stream oil = liquid({{"toluene", 1.0}, {"ethyl_acetate", 1e-8}});
  auto run = run_wash(*built->model, oil);
  const double left = run->washed.component_masses()[at("ethyl_acetate")] / 1e-8;
  CHECK(left == doctest::Approx(std::pow(1.0 / 1.01, 3)).epsilon(1e-7));
  CHECK(figure(run->resources, "fraction_left_in_organic_ethyl_acetate") == doctest::Approx(left));
  // The block supplied 3 x 1 kg of water, and says so.
  REQUIRE(run->resources.materials.size() == 1);
  CHECK(run->resources.materials[0].kind == "process_water");
  CHECK(run->resources.materials[0].amount == doctest::Approx(3.0 * (1.0 + 1e-8)));
  CHECK(run->aqueous.component_masses()[at("water")] == doctest::Approx(3.0 * (1.0 + 1e-8)));
}

TEST_CASE("washing: a concentrated solute splits by the actual phase masses") {
  // Reference: the same equilibrium stage solved independently with
  // scipy's brentq at test time: o_i = m_i / (1 + K_i r), r = A/O.
  // 1 kg oil (toluene 0.8, ethyl acetate 0.2), K_EA = 0.5, W/O = 1, two
  // washes, no entrainment.
  auto built = build_wash(R"(
number_of_washes: 2
water_to_organic_ratio: 1
water_entrainment: 0
partition_coefficients: {toluene: 0, ethyl_acetate: 0.5}
)");
  REQUIRE_FALSE(built->diagnostics.has_errors());
  auto run = run_wash(*built->model, liquid({{"toluene", 0.8}, {"ethyl_acetate", 0.2}}));
  const auto reference = testing::python_numbers(R"(
from scipy.optimize import brentq
t, e = 0.8, 0.2
for wash in range(2):
    water = 1.0
    def g(r):
        o = e / (1 + 0.5 * r)
        return (water + e - o) / (t + o) - r
    r = brentq(g, 0.0, 100.0, xtol=1e-15)
    e = e / (1 + 0.5 * r)
print(repr(e))
)");
  REQUIRE(reference.size() == 1);
  CHECK(run->washed.component_masses()[at("ethyl_acetate")] == doctest::Approx(reference[0]).epsilon(1e-10));
}

TEST_CASE("washing: balances close with a connected water stream and with supplied water") {
  // Mass closes to rounding (each split computes one share and takes the
  // other as the rest). Energy: adiabatic, so H_out = H_in (+ the supplied
  // water's enthalpy, which is no inlet stream); 1e-9 relative.
  const Stream oil = liquid({{"toluene", 0.1}, {"styrene", 0.85}, {"acetone", 0.05}}, 60.0);
  {
    auto built = build_wash("number_of_washes: 2\n");
    REQUIRE_FALSE(built->diagnostics.has_errors());
    const Stream water = liquid({{"water", 3.0}}, 15.0);
    auto run = run_wash(*built->model, oil, &water);
    const BalanceClosure closure =
        close_balance({&oil, &water}, {&run->washed, &run->aqueous}, run->resources.process_heat_J);
    CHECK(closure.mass_relative_error <= 1e-14);
    CHECK(closure.energy_relative_error <= 1e-9);
    CHECK(run->resources.materials.empty());
    CHECK(any_warning(run->warnings, "acetone is miscible with water"));
    // The wash ends between the two inlet temperatures.
    const double T = figure(run->resources, "wash_temperature") - 273.15;
    CHECK(T > 15.0);
    CHECK(T < 60.0);
    // Entrainment 0.5 %: the washed organic carries about 5 g of water per kg.
    CHECK(figure(run->resources, "water_in_washed_organic") / to_si(run->washed.total_mass()) ==
          doctest::Approx(0.005).epsilon(0.05));
  }
  {
    auto built = build_wash("number_of_washes: 1\nwater_to_organic_ratio: 2\ntemperature: \"30 degC\"\n");
    REQUIRE_FALSE(built->diagnostics.has_errors());
    auto run = run_wash(*built->model, oil);
    const double supplied = figure(run->resources, "supplied_water_enthalpy");
    const double H_in = to_si(oil.enthalpy()) + supplied;
    const double H_out = to_si(run->washed.enthalpy()) + to_si(run->aqueous.enthalpy());
    CHECK(std::abs(H_out - H_in - run->resources.process_heat_J) <= 1e-9 * std::abs(H_in));
    CHECK(to_si(run->washed.total_mass() + run->aqueous.total_mass()) == doctest::Approx(3.0).epsilon(1e-14));
    CHECK(figure(run->resources, "wash_temperature") == doctest::Approx(303.15));
  }
}

TEST_CASE("washing: default partition from the water solubility, and the waste's oxygen demand") {
  // K for styrene is its solubility in water, 0.00031 (the data file);
  // with W/O = 1 one wash leaves 1/(1 + K r) with r = A/O close to 1.
  auto built = build_wash("number_of_washes: 1\nwater_entrainment: 0\n");
  REQUIRE_FALSE(built->diagnostics.has_errors());
  const Stream oil = liquid({{"styrene", 1.0}});
  auto run = run_wash(*built->model, oil);
  const double K = wash_components()[static_cast<std::size_t>(at("styrene"))].water_solubility->mass_fraction;
  const double dissolved = run->aqueous.component_masses()[at("styrene")];
  const double left = run->washed.component_masses()[at("styrene")];
  const double r = to_si(run->aqueous.total_mass()) / to_si(run->washed.total_mass());
  CHECK(dissolved / run->aqueous.total_mass().value() ==
        doctest::Approx(K * left / run->washed.total_mass().value()).epsilon(1e-12));
  CHECK(left == doctest::Approx(1.0 / (1.0 + K * r)).epsilon(1e-12));
  // ThOD of the waste: the dissolved styrene's, C8H8 + 10 O2, over the
  // waste's volume.
  const double per_mass = theoretical_oxygen_demand_per_mass({{"C", 8}, {"H", 8}});
  CHECK(figure(run->resources, "aqueous_waste_oxygen_demand") == doctest::Approx(dissolved * per_mass).epsilon(1e-12));
  CHECK(figure(run->resources, "aqueous_waste_oxygen_demand_concentration") ==
        doctest::Approx(dissolved * per_mass / figure(run->resources, "aqueous_waste_volume")).epsilon(1e-12));
  // Source: styrene saturates water at about 310 mg/L, ThOD 3.07 g/g, so a
  // wash water near saturation has a ThOD near 950 mg/L (hand calculation).
  CHECK(figure(run->resources, "aqueous_waste_oxygen_demand_concentration") == doctest::Approx(0.95).epsilon(0.05));
  CHECK_FALSE(run->resources.cautions.empty());
}

TEST_CASE("washing: bad parameters are reported") {
  auto built = build_wash(R"(
number_of_washes: 2.5
partition_coefficients: {benzene: 0.1, water: 1}
water_entrainment: 0.5
colour: blue
)");
  const auto& all = built->diagnostics.all();
  auto has = [&](const std::string& text) {
    return std::any_of(all.begin(), all.end(),
                       [&](const Diagnostic& d) { return d.message.find(text) != std::string::npos; });
  };
  CHECK(has("must be a whole number"));
  CHECK(has("'benzene' is not among the case's components"));
  CHECK(has("water is the wash liquid"));
  CHECK(has("water_entrainment"));
  CHECK(has("unknown key 'blocks.wash.colour'"));
}
