// Capital: six-tenths scaling, cost-index escalation, the capital recovery
// factor and the Lang factors.

#include <doctest/doctest.h>

#include "costs/capital.hpp"
#include "costs/cost_index.hpp"
#include "costs/equipment_correlations.hpp"

using namespace unchain::costs;

TEST_CASE("capital recovery factor against compound-interest tables") {
  // Source: standard compound-interest tables, capital recovery factor
  // (A/P, i, n), e.g. Newnan, Eschenbach & Lavelle, Engineering Economic
  // Analysis, Appendix C (from memory); tables give five significant figures.
  CHECK(capital_recovery_factor(0.10, 10) == doctest::Approx(0.16275).epsilon(5e-5));
  CHECK(capital_recovery_factor(0.08, 20) == doctest::Approx(0.10185).epsilon(5e-5));
  CHECK(capital_recovery_factor(0.05, 10) == doctest::Approx(0.12950).epsilon(5e-5));
  CHECK(capital_recovery_factor(0.12, 5) == doctest::Approx(0.27741).epsilon(5e-5));
  // Zero interest: straight repayment.
  CHECK(capital_recovery_factor(0.0, 8) == doctest::Approx(0.125));
}

TEST_CASE("six-tenths rule, worked example") {
  // Source: Towler & Sinnott, Chemical Engineering Design, 2nd ed., sec. 7.3
  // (capacity exponent method), worked example: a plant of 10,000 t/y
  // costing 5 M$ scaled to 30,000 t/y with exponent 0.6 costs 9.66 M$
  // (from memory). Stated to three figures.
  CHECK(scale_cost(5.0e6, 10000, 30000, 0.6) == doctest::Approx(9.66e6).epsilon(5e-3));
  // Doubling at exponent 0.6 multiplies by 2^0.6 = 1.5157 (hand calculation).
  CHECK(scale_cost(1000, 1, 2, 0.6) == doctest::Approx(1515.7).epsilon(1e-4));
  CHECK_THROWS_AS(scale_cost(1000, 0, 2, 0.6), std::invalid_argument);
}

TEST_CASE("cost-index escalation") {
  const CostIndex index = CostIndex::chemical_engineering_plant_cost_index();
  // Source: CEPCI annual averages 2010 = 550.8, 2019 = 607.5 (Chemical
  // Engineering magazine, from memory); escalation = ratio of the indices.
  CHECK(index.escalation(2010, 2019) == doctest::Approx(607.5 / 550.8).epsilon(1e-12));
  CHECK(100000 * index.escalation(2010, 2019) == doctest::Approx(110294).epsilon(1e-5));
  CHECK_THROWS_WITH_AS((void)index.escalation(1990, 2019), doctest::Contains("no cost index value for 1990"),
                       std::out_of_range);
  CostIndex extended = index;
  extended.set(2026, 850.0);
  CHECK(extended.escalation(2023, 2026) == doctest::Approx(850.0 / 797.9));
}

TEST_CASE("Lang factors") {
  // Source: Peters, Timmerhaus & West, Plant Design and Economics for
  // Chemical Engineers, 5th ed., Lang factors (from memory).
  CHECK(lang_factor(PlantType::solid) == doctest::Approx(3.10));
  CHECK(lang_factor(PlantType::solid_fluid) == doctest::Approx(3.63));
  CHECK(lang_factor(PlantType::fluid) == doctest::Approx(4.74));
}

TEST_CASE("published correlation C = a + b S^n and its range") {
  const CostCorrelation* reactor = find_correlation("jacketed_agitated_reactor");
  REQUIRE(reactor != nullptr);
  // Hand calculation from the correlation's own constants: 61,500 + 32,500 x 10^0.8.
  CHECK(reactor->cost(10.0) == doctest::Approx(61500 + 32500 * 6.309573).epsilon(1e-6));
  CHECK(reactor->in_range(10.0));
  CHECK_FALSE(reactor->in_range(0.001));  // a one-litre flask is far below the range
  const CostCorrelation* furnace = find_correlation("cylindrical_furnace");
  REQUIRE(furnace != nullptr);
  // Size is given in W and scaled to MW.
  CHECK(furnace->cost(2e6) == doctest::Approx(80000 + 109000 * 1.741101).epsilon(1e-6));
}
