// Mass, element and energy balance closure, per block and overall.

#include <doctest/doctest.h>

#include <cmath>
#include <string>

#include "flowsheet/balance.hpp"
#include "flowsheet/solver.hpp"
#include "tests/test_support.hpp"

using namespace unchain;
using namespace unchain::testing;

namespace {

// Source: IUPAC CIAAW conventional atomic weights (C 12.011, H 1.008 g/mol),
// the values the element table uses; the formulas are those of the test
// components (CH4 and C8H8).
constexpr double carbon = 12.011e-3, hydrogen = 1.008e-3;       // kg/mol
constexpr double light_molar_mass = carbon + 4 * hydrogen;      // CH4
constexpr double heavy_molar_mass = 8 * carbon + 8 * hydrogen;  // C8H8

std::string header() {
  return "# Test case (invented scenario)\ncase:\n  title: \"Balance test\"\n  basis: batch\n" +
         std::string(test_components_yaml());
}

std::string recycle_case() {
  return header() + R"yaml(feeds:
  fresh:
    temperature: "300 K"
    vapour: {test_light: "1 kg", test_heavy: "2 kg", test_inert: "0.5 kg"}
  second:
    temperature: "350 K"
    vapour: {test_heavy: "0.25 kg"}
blocks:
  mixer:
    type: test_mixer
    inlets: {feeds: [fresh, second, recycle]}
    outlets: {product: mixed}
  separator:
    type: test_separator
    inlets: {feed: mixed}
    outlets: {top: top, bottom: bottoms}
    recovery_to_top: {test_light: 0.9, test_heavy: 0.2, test_inert: 0.99}
  splitter:
    type: test_splitter_fraction
    inlets: {feed: top}
    outlets: {first: recycle, second: purge}
    fraction_to_first: 0.6
)yaml";
}

}  // namespace

TEST_CASE("balance: closure of streams by hand") {
  const Case c = load_test_case(recycle_case());
  const ComponentSet& set = *c.components;
  Stream in(set), out(set);
  in.set_mass(Phase::vapour, 0, kilograms(1.0));   // test_light
  in.set_mass(Phase::vapour, 1, kilograms(2.0));   // test_heavy
  in.set_temperature(kelvin(298.15));
  out = in;
  out.set_temperature(kelvin(398.15));
  // Heat to warm by 100 K at constant cp (35 and 120 J/(mol K), the test data).
  const double heat = (1.0 / light_molar_mass * 35.0 + 2.0 / heavy_molar_mass * 120.0) * 100.0;

  const BalanceClosure closed = close_balance({&in}, {&out}, heat);
  CHECK(closed.mass_in_kg == doctest::Approx(3.0).epsilon(1e-15));
  CHECK(closed.mass_relative_error == 0.0);
  CHECK(closed.element_relative_error.size() == 2);  // C and H only
  CHECK(closed.element_relative_error.at("C") < 1e-15);
  CHECK(closed.element_relative_error.at("H") < 1e-15);
  // At 298.15 K the enthalpy is the formation enthalpy alone.
  const double h_in = 1.0 / light_molar_mass * -74.6e3 + 2.0 / heavy_molar_mass * 147.4e3;
  CHECK(closed.enthalpy_in_J == doctest::Approx(h_in).epsilon(1e-12));
  CHECK(closed.enthalpy_out_J == doctest::Approx(h_in + heat).epsilon(1e-12));
  CHECK(closed.energy_relative_error < 1e-12);

  // 1 % less heat than the warming takes: the gap over the largest term.
  const BalanceClosure short_of_heat = close_balance({&in}, {&out}, 0.99 * heat);
  const double largest = std::max({std::abs(h_in), std::abs(h_in + heat), 0.99 * heat});
  CHECK(short_of_heat.energy_relative_error == doctest::Approx(0.01 * heat / largest).epsilon(1e-9));

  // 1 % of the mass lost.
  const Stream lossy = out.scaled(0.99);
  const BalanceClosure lost = close_balance({&in}, {&lossy}, heat);
  CHECK(lost.mass_relative_error == doctest::Approx(0.01).epsilon(1e-12));
  CHECK(lost.element_relative_error.at("C") == doctest::Approx(0.01).epsilon(1e-12));

  // Nothing in and nothing out closes exactly.
  const BalanceClosure empty = close_balance({}, {}, 0.0);
  CHECK(empty.mass_relative_error == 0.0);
  CHECK(empty.energy_relative_error == 0.0);
}

TEST_CASE("balance: the recycle case closes per block and overall") {
  const Case c = load_test_case(recycle_case());
  const SolveResult result = solve(c);
  // Overall: two feeds in, bottoms and purge out, the mixer's heat.
  CHECK(result.overall.mass_in_kg == doctest::Approx(3.75).epsilon(1e-14));
  CHECK(result.overall.mass_relative_error < 1e-12);
  CHECK(result.overall.energy_relative_error < 1e-12);
  REQUIRE(result.overall.element_relative_error.size() == 3);  // C, H, N
  for (const auto& [element, error] : result.overall.element_relative_error) {
    CAPTURE(element);
    CHECK(error < 1e-12);
  }
  for (const auto& block : result.blocks) {
    CAPTURE(block.name);
    CHECK(block.balance.mass_relative_error < 1e-12);
    CHECK(block.balance.energy_relative_error < 1e-12);
    for (const auto& [element, error] : block.balance.element_relative_error) CHECK(error < 1e-12);
  }
  // The mixer puts its outlet at the mass-weighted mean temperature. At the
  // fixed point the recycle is at that temperature too, so
  //   T = (3.5 kg * 300 K + 0.25 kg * 350 K) / 3.75 kg
  // and the heat it reports is sum n cp (T - T_inlet) over the two feeds.
  const double T = (3.5 * 300.0 + 0.25 * 350.0) / 3.75;
  constexpr double nitrogen_molar_mass = 2 * 14.007e-3;
  const double fresh_heat_capacity =
      1.0 / light_molar_mass * 35.0 + 2.0 / heavy_molar_mass * 120.0 + 0.5 / nitrogen_molar_mass * 29.1;  // J/K
  const double second_heat_capacity = 0.25 / heavy_molar_mass * 120.0;
  const double mixing_heat = fresh_heat_capacity * (T - 300.0) + second_heat_capacity * (T - 350.0);
  CHECK(in_kelvin(result.streams[*c.stream_index("purge")].temperature()) == doctest::Approx(T).epsilon(1e-12));
  // 1e-6: the heat is a small difference of converged enthalpies.
  CHECK(result.blocks[0].resources.process_heat_J == doctest::Approx(mixing_heat).epsilon(1e-6));
  CHECK(result.overall.heat_and_work_in_J == result.blocks[0].resources.process_heat_J);
}

TEST_CASE("balance: the element balance finds a block that turns one component into another") {
  const std::string text = header() + R"yaml(feeds:
  fresh: {vapour: {test_light: "1 kg", test_inert: "1 kg"}}
blocks:
  broken:
    type: test_faulty
    fault: swap_components
    from: test_light
    to: test_heavy
    inlets: [fresh]
    outlets: [out]
)yaml";
  const SolveResult result = solve(load_test_case(text));
  const BalanceClosure& b = result.blocks[0].balance;
  // Mass for mass, so the mass balance closes...
  CHECK(b.mass_relative_error < 1e-15);
  // ...but 1 kg CH4 holds less carbon and more hydrogen than 1 kg C8H8.
  const double carbon_in = carbon / light_molar_mass;
  const double carbon_out = 8 * carbon / heavy_molar_mass;
  const double hydrogen_in = 4 * hydrogen / light_molar_mass;
  const double hydrogen_out = 8 * hydrogen / heavy_molar_mass;
  CHECK(b.element_relative_error.at("C") == doctest::Approx((carbon_out - carbon_in) / carbon_out).epsilon(1e-9));
  CHECK(b.element_relative_error.at("H") == doctest::Approx((hydrogen_in - hydrogen_out) / hydrogen_in).epsilon(1e-9));
  CHECK(b.element_relative_error.at("H") == doctest::Approx(0.692).epsilon(1e-3));
  CHECK(b.element_relative_error.at("N") < 1e-15);  // the inert passes untouched
  // The overall balance sees the same fault.
  CHECK(result.overall.element_relative_error.at("C") == doctest::Approx(b.element_relative_error.at("C")).epsilon(1e-12));
  CHECK(b.energy_relative_error > 0.1);
}
