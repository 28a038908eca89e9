// The cost of a hand-worked batch: a small invented case whose every cost
// line can be worked out on paper.

#include <doctest/doctest.h>

#include "costs/batch_economics.hpp"
#include "flowsheet/case.hpp"
#include "flowsheet/solver.hpp"
#include "units/block_registry.hpp"

using namespace unchain;

namespace {

// 2 kg of water heated from 20 to 80 degC by an electric heater, then split:
// 0.5 kg leaves as "waste_water" (priced as aqueous waste), the rest is the
// "product". Invented prices.
const char* hand_case = R"(
case: {title: hand-worked batch, basis: batch, currency: USD}
components: [water]
feeds:
  water_in: {temperature: "20 degC", pressure: "1 atm", liquid: {water: "2 kg"}}
blocks:
  heater:
    type: heater
    inlets: {feed: water_in}
    outlets: {product: hot_water}
    outlet_temperature: "80 degC"
  split:
    type: splitter
    inlets: {feed: hot_water}
    outlets: {products: [waste_water, product]}
    fractions: [0.25, 0.75]
prices:
  electricity: "0.20 USD/kWh"
  process_water: "4 USD/m3"
  wastewater_disposal: "10 USD/m3"
  labour_rate: "30 USD/h"
  labour_hours_per_batch: "1.5 h"
accounting:
  water_feeds: [water_in]
  wastes:
    - {stream: waste_water, class: aqueous}
)";

}  // namespace

TEST_CASE("cost of a hand-worked batch") {
  const Case c = load_case(parse_yaml_text(hand_case, "hand.yaml"), units::builtin_blocks());
  const SolveResult result = solve(c);
  const costs::CostReport r = costs::evaluate_case_costs(c, result);

  // Hand calculation. Heat: the heater's own duty (m cp dT with the data's
  // liquid heat capacity; about 2 x 4.18 x 60 = 502 kJ), taken from the block
  // so that the test checks the pricing, not the heat capacity:
  const double heat_J = result.blocks[0].resources.process_heat_J;
  CHECK(heat_J == doctest::Approx(2.0 * 4184.0 * 60.0).epsilon(0.01));  // common practice: cp of water 4.18 kJ/(kg K)
  const double electricity_cost = heat_J / 3.6e6 * 0.20;
  const double water_cost = 2.0 / 1000.0 * 4.0;       // 2 kg = 0.002 m3 at 4 USD/m3 = 0.008 USD
  const double labour_cost = 1.5 * 30.0;              // 45 USD
  // Waste: 0.5 kg of water at 80 degC; its condensed volume from the data's
  // liquid density, close to 0.5 L; at 10 USD/m3 about 0.005 USD.
  REQUIRE(r.wastes.size() == 1);
  CHECK(r.wastes[0].mass_kg == doctest::Approx(0.5).epsilon(1e-12));
  CHECK(r.wastes[0].volume_m3 == doctest::Approx(0.5 / 972.0).epsilon(0.02));  // water at 80 degC: 972 kg/m3 (common practice)
  const double waste_cost = r.wastes[0].volume_m3 * 10.0;

  CHECK(r.total_cost == doctest::Approx(electricity_cost + water_cost + labour_cost + waste_cost).epsilon(1e-12));
  CHECK(r.process_water_m3 == doctest::Approx(0.002).epsilon(1e-12));
  CHECK(r.net_cost == doctest::Approx(r.total_cost));
  CHECK(r.missing_prices.empty());
  // Without accounting.monomer there is no per-kilogram figure.
  CHECK_FALSE(r.per_kg(r.net_cost).has_value());
}

TEST_CASE("a cost with no price is listed as missing") {
  std::string text = hand_case;
  text.replace(text.find("  electricity: \"0.20 USD/kWh\"\n"), std::string("  electricity: \"0.20 USD/kWh\"\n").size(), "");
  const Case c = load_case(parse_yaml_text(text, "hand.yaml"), units::builtin_blocks());
  const costs::CostReport r = costs::evaluate_case_costs(c, solve(c));
  REQUIRE(r.missing_prices.size() == 1);
  CHECK(r.missing_prices[0] == "prices.electricity");
}

TEST_CASE("a price in another currency is refused") {
  std::string text = hand_case;
  text.replace(text.find("0.20 USD/kWh"), 12, "0.20 EUR/kWh");
  const Case c = load_case(parse_yaml_text(text, "hand.yaml"), units::builtin_blocks());
  const SolveResult result = solve(c);
  CHECK_THROWS_WITH_AS((void)costs::evaluate_case_costs(c, result),
                       doctest::Contains("wrong currency (expected USD, found EUR)"), InputError);
}
