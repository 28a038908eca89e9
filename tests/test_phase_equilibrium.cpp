// Vapour-liquid equilibrium: Rachford-Rice, bubble and dew points, the
// isothermal flash and the flash at a given duty.

#include <doctest/doctest.h>

#include <cmath>
#include <initializer_list>
#include <limits>
#include <string>
#include <thread>
#include <vector>

#include "flowsheet/component_library.hpp"
#include "flowsheet/diagnostics.hpp"
#include "flowsheet/pure_properties.hpp"
#include "flowsheet/stream.hpp"
#include "flowsheet/thermo/phase_equilibrium.hpp"

namespace {

using namespace unchain;

ComponentSet set_of(const std::vector<std::string>& ids) {
  DiagnosticList diagnostics;
  ComponentSet set = make_component_set(builtin_library(), ids, {}, diagnostics);
  diagnostics.throw_if_errors();
  return set;
}

Eigen::VectorXd vec(std::initializer_list<double> values) {
  Eigen::VectorXd v(static_cast<Eigen::Index>(values.size()));
  Eigen::Index i = 0;
  for (double value : values) v[i++] = value;
  return v;
}

const Pressure one_atmosphere = pascal(standard_atmosphere_Pa);

// Feed masses (kg) of a fluid mixture given by mole fractions, 1 mol total.
Eigen::VectorXd masses_of_moles(const ComponentSet& set, const Eigen::VectorXd& moles) {
  Eigen::VectorXd kg = moles;
  for (std::size_t i = 0; i < set.size(); ++i) kg[static_cast<Eigen::Index>(i)] *= set[i].molar_mass;
  return kg;
}

void check_mass_conserved(const Eigen::VectorXd& feed, const FlashResult& r) {
  for (Eigen::Index i = 0; i < feed.size(); ++i) {
    CAPTURE(i);
    CHECK(r.liquid_kg[i] >= 0.0);
    CHECK(r.vapour_kg[i] >= 0.0);
    CHECK(std::abs(r.liquid_kg[i] + r.vapour_kg[i] - feed[i]) <= 1e-12 * feed.sum());
  }
  CHECK(std::abs(r.liquid_kg.sum() + r.vapour_kg.sum() - feed.sum()) <= 1e-12 * feed.sum());
}

}  // namespace

TEST_CASE("rachford_rice: worked textbook example") {
  // Source: Seader, Henley and Roper, Separation Process Principles, 3rd
  // ed., Example 4.1 (from memory): 100 kmol/h of 10, 20, 30, 40 mol %
  // propane, n-butane, n-pentane, n-hexane at 200 degF and 50 psia, with
  // K = 4.2, 1.75, 0.74, 0.34 from the DePriester charts; stated answer
  // V/F = 0.1219. Tolerance: half a unit in the last figure stated.
  const Eigen::VectorXd z = vec({0.10, 0.20, 0.30, 0.40});
  const Eigen::VectorXd K = vec({4.2, 1.75, 0.74, 0.34});
  const double V = solve_rachford_rice(z, K);
  CHECK(std::abs(V - 0.1219) <= 0.00005);
  // The phases it implies close: sum x = sum y = 1 (to rounding).
  double sum_x = 0.0, sum_y = 0.0;
  for (Eigen::Index i = 0; i < 4; ++i) {
    sum_x += z[i] / (1.0 + V * (K[i] - 1.0));
    sum_y += K[i] * z[i] / (1.0 + V * (K[i] - 1.0));
  }
  CHECK(sum_x == doctest::Approx(1.0).epsilon(1e-14));
  CHECK(sum_y == doctest::Approx(1.0).epsilon(1e-14));
}

TEST_CASE("rachford_rice: binary case with a closed form") {
  // Two components: V = -(z1 (K1 - 1) + z2 (K2 - 1)) / ((K1 - 1)(K2 - 1)).
  // z = (0.5, 0.5), K = (2, 0.5): V = -(0.5 - 0.25) / (-0.5) = 0.5.
  CHECK(solve_rachford_rice(vec({0.5, 0.5}), vec({2.0, 0.5})) == doctest::Approx(0.5).epsilon(1e-14));
  // z = (0.3, 0.7), K = (3, 0.4): V = -(0.6 - 0.42) / (2 * -0.6) = 0.15.
  CHECK(solve_rachford_rice(vec({0.3, 0.7}), vec({3.0, 0.4})) == doctest::Approx(0.15).epsilon(1e-13));
  // Unnormalised feed is normalised first.
  CHECK(solve_rachford_rice(vec({3.0, 7.0}), vec({3.0, 0.4})) == doctest::Approx(0.15).epsilon(1e-13));
}

TEST_CASE("rachford_rice: sub-cooled, superheated, K equal to 1 and limits") {
  CHECK(solve_rachford_rice(vec({0.4, 0.6}), vec({0.5, 0.2})) == 0.0);  // every K < 1: all liquid
  CHECK(solve_rachford_rice(vec({0.4, 0.6}), vec({1.5, 3.0})) == 1.0);  // every K > 1: all vapour
  CHECK(solve_rachford_rice(vec({0.4, 0.6}), vec({1.0, 1.0})) == 0.0);  // any V solves; 0 by convention
  // At the bubble point (sum z K = 1) and at the dew point (sum z / K = 1).
  CHECK(solve_rachford_rice(vec({0.5, 0.5}), vec({1.5, 0.5})) == doctest::Approx(0.0).epsilon(1e-14));
  CHECK(solve_rachford_rice(vec({0.5, 0.5}), vec({2.0, 2.0 / 3.0})) == doctest::Approx(1.0).epsilon(1e-14));
  // A non-condensable (K = infinity) with z = 0.5 and a volatile with
  // K = 0.2: 0.5 / V = 0.4 / (1 - 0.8 V), so V = 0.625.
  CHECK(solve_rachford_rice(vec({0.5, 0.5}), vec({std::numeric_limits<double>::infinity(), 0.2})) ==
        doctest::Approx(0.625).epsilon(1e-13));
  CHECK(solve_rachford_rice(vec({0.5, 0.5}), vec({non_condensable_K, 0.2})) == doctest::Approx(0.625).epsilon(1e-13));
  // Gas and an involatile only: the split is fixed.
  CHECK(solve_rachford_rice(vec({0.3, 0.7}), vec({non_condensable_K, 0.0})) == doctest::Approx(0.3).epsilon(1e-15));
  CHECK_THROWS_AS(solve_rachford_rice(vec({0.5, 0.5}), vec({1.0})), std::invalid_argument);
  CHECK_THROWS_AS(solve_rachford_rice(vec({0.0, 0.0}), vec({1.0, 2.0})), std::invalid_argument);
}

TEST_CASE("bubble_temperature: benzene-toluene, an ideal pair") {
  const ComponentSet set = set_of({"benzene", "toluene"});
  // Source: McCabe, Smith and Harriott, Unit Operations of Chemical
  // Engineering, benzene-toluene equilibrium at 1 atm (from memory):
  // x_benzene = 0.5 boils at about 92.2 degC with y_benzene about 0.72.
  // Tolerance 1 K: the table is read to a few tenths and Raoult's law is
  // good for this pair to about 0.5 K.
  const Temperature T = bubble_temperature(set, vec({0.5, 0.5}), one_atmosphere);
  CHECK(std::abs(in_celsius(T) - 92.2) <= 1.0);
  const FlashResult r = isothermal_flash(set, masses_of_moles(set, vec({0.5, 0.5})), T, one_atmosphere);
  CHECK(std::abs(r.y[0] - 0.72) <= 0.02);
}

TEST_CASE("bubble_temperature: acetone-water by NRTL") {
  const ComponentSet set = set_of({"acetone", "water"});
  // Source: Gmehling and Onken, Vapor-Liquid Equilibrium Data Collection,
  // DECHEMA Chemistry Data Series I/1, acetone-water at 760 mmHg (from
  // memory): x_acetone = 0.5 boils near 60 degC. Tolerance 2 K: the
  // isobaric data sets scatter by about 1 K and the value is recalled.
  Warnings warnings;
  const Temperature T = bubble_temperature(set, vec({0.5, 0.5}), one_atmosphere, &warnings);
  CHECK(std::abs(in_celsius(T) - 60.0) <= 2.0);
  // Strong positive deviation: the bubble point is far below the ideal
  // one (about 71 degC by Raoult's law for these Antoine sets).
  const ComponentSet ideal = [] {
    DiagnosticList d;
    ComponentSet full = make_component_set(builtin_library(), {"acetone", "water"}, {}, d);
    return ComponentSet(full.components(), {}, {});
  }();
  CHECK(in_celsius(bubble_temperature(ideal, vec({0.5, 0.5}), one_atmosphere)) > in_celsius(T) + 5.0);
  // Only the converged point is checked against the ranges: no warning
  // here, although the search passes temperatures outside them.
  CHECK(warnings.size() == 0);
  // Under vacuum the bubble point falls below the pair's fitted range.
  Warnings cold;
  const Temperature T_vacuum = bubble_temperature(set, vec({0.5, 0.5}), pascal(20000.0), &cold);
  CHECK(in_kelvin(T_vacuum) < set.nrtl_pairs()[0].range.low_K);
  bool pair_warned = false;
  for (const auto& m : cold.messages()) pair_warned = pair_warned || m.find("NRTL") != std::string::npos;
  CHECK(pair_warned);
}

TEST_CASE("phase_equilibrium: flash is all liquid at the bubble point and all vapour at the dew point") {
  struct Case {
    std::vector<std::string> ids;
    Eigen::VectorXd z;
    double pressure_Pa;
  };
  const std::vector<Case> cases = {
      {{"toluene", "ethylbenzene", "styrene"}, vec({0.2, 0.3, 0.5}), standard_atmosphere_Pa},
      {{"toluene", "ethylbenzene", "styrene"}, vec({0.2, 0.3, 0.5}), 20000.0},  // vacuum distillation
      {{"acetone", "water"}, vec({0.3, 0.7}), standard_atmosphere_Pa},
      {{"acetone", "water"}, vec({0.9, 0.1}), standard_atmosphere_Pa},
  };
  for (const auto& c : cases) {
    const ComponentSet set = set_of(c.ids);
    const Pressure P = pascal(c.pressure_Pa);
    CAPTURE(c.ids[0]);
    CAPTURE(c.pressure_Pa);
    const Temperature Tb = bubble_temperature(set, c.z, P);
    const Temperature Td = dew_temperature(set, c.z, P);
    CHECK(in_kelvin(Td) > in_kelvin(Tb));
    const Eigen::VectorXd feed = masses_of_moles(set, c.z);
    const FlashResult at_bubble = isothermal_flash(set, feed, Tb, P);
    const FlashResult at_dew = isothermal_flash(set, feed, Td, P);
    CHECK(at_bubble.vapour_fraction <= 1e-6);
    CHECK(at_dew.vapour_fraction >= 1.0 - 1e-6);
    check_mass_conserved(feed, at_bubble);
    check_mass_conserved(feed, at_dew);
    // Round trips through the pressure forms.
    CHECK(to_si(bubble_pressure(set, c.z, Tb)) == doctest::Approx(c.pressure_Pa).epsilon(1e-10));
    CHECK(to_si(dew_pressure(set, c.z, Td)) == doctest::Approx(c.pressure_Pa).epsilon(1e-10));
    // Half-way: two phases, y = K x, mass conserved.
    const Temperature middle = kelvin(0.5 * (in_kelvin(Tb) + in_kelvin(Td)));
    const FlashResult r = isothermal_flash(set, feed, middle, P);
    CHECK(r.vapour_fraction > 0.01);
    CHECK(r.vapour_fraction < 0.99);
    check_mass_conserved(feed, r);
    CHECK(r.x.sum() == doctest::Approx(1.0).epsilon(1e-12));
    CHECK(r.y.sum() == doctest::Approx(1.0).epsilon(1e-12));
    for (Eigen::Index i = 0; i < r.x.size(); ++i) CHECK(r.y[i] == doctest::Approx(r.K[i] * r.x[i]).epsilon(1e-9));
  }
}

TEST_CASE("phase_equilibrium: mass is conserved to 1e-12 in a mixed flash with gas and polymer") {
  const ComponentSet set = set_of({"styrene", "toluene", "water", "nitrogen", "acetone", "polystyrene"});
  const Eigen::VectorXd feed = vec({3.7, 0.41, 1.3, 0.027, 0.8, 2.0});  // kg
  for (double T_C : {20.0, 70.0, 95.0, 120.0, 200.0}) {
    CAPTURE(T_C);
    const FlashResult r = isothermal_flash(set, feed, celsius(T_C), one_atmosphere);
    Eigen::VectorXd fluid = feed;
    fluid[5] = 0.0;  // the polymer takes no part
    check_mass_conserved(fluid, r);
    CHECK(r.liquid_kg[5] == 0.0);
    CHECK(r.vapour_kg[5] == 0.0);
    // The permanent gas is non-condensable: all of it in the vapour.
    CHECK(r.liquid_kg[3] == 0.0);
    CHECK(r.vapour_kg[3] == feed[3]);
    CHECK(r.K[3] == non_condensable_K);
    CHECK(r.vapour_fraction > 0.0);
  }
}

TEST_CASE("dew_temperature: water in nitrogen has the closed-form dew point") {
  // Only water condenses: y_water P = Psat(T_dew), so T_dew = Tsat(0.2 atm).
  const ComponentSet set = set_of({"water", "nitrogen"});
  const Temperature Td = dew_temperature(set, vec({0.2, 0.8}), one_atmosphere);
  const Temperature expected = saturation_temperature(set[0], pascal(0.2 * standard_atmosphere_Pa));
  CHECK(in_kelvin(Td) == doctest::Approx(in_kelvin(expected)).epsilon(1e-11));
  CHECK(to_si(dew_pressure(set, vec({0.2, 0.8}), Td)) == doctest::Approx(standard_atmosphere_Pa).epsilon(1e-11));
}

TEST_CASE("phase_equilibrium: impossible bubble and dew points are model errors") {
  const ComponentSet set = set_of({"water", "nitrogen", "methane", "polystyrene"});
  // Only permanent gases: neither point exists.
  CHECK_THROWS_AS(bubble_temperature(set, vec({0.0, 0.5, 0.5, 0.0}), one_atmosphere), ModelError);
  CHECK_THROWS_AS(dew_temperature(set, vec({0.0, 0.5, 0.5, 0.0}), one_atmosphere), ModelError);
  // A liquid holding a non-condensable gas has no bubble point either.
  CHECK_THROWS_AS(bubble_temperature(set, vec({0.9, 0.1, 0.0, 0.0}), one_atmosphere), ModelError);
  CHECK_THROWS_AS(bubble_pressure(set, vec({0.9, 0.1, 0.0, 0.0}), celsius(50.0)), ModelError);
  // A polymer takes no part.
  CHECK_THROWS_AS(bubble_temperature(set, vec({0.9, 0.0, 0.0, 0.1}), one_atmosphere), ModelError);
  // Pure water is fine: its bubble point is the Antoine boiling point.
  CHECK(in_kelvin(bubble_temperature(set, vec({1.0, 0.0, 0.0, 0.0}), one_atmosphere)) ==
        doctest::Approx(in_kelvin(saturation_temperature(set[0], one_atmosphere))).epsilon(1e-12));
}

TEST_CASE("flash_stream: polymers keep their phase, fluids are split") {
  const ComponentSet set = set_of({"polystyrene", "styrene", "toluene", "nitrogen"});
  Stream feed(set);
  feed.set_mass(Phase::solid, 0, kilograms(1.0));    // undissolved polymer
  feed.set_mass(Phase::liquid, 0, kilograms(0.25));  // dissolved polymer
  feed.set_mass(Phase::liquid, 1, kilograms(2.0));
  feed.set_mass(Phase::vapour, 2, kilograms(0.5));
  feed.set_mass(Phase::vapour, 3, kilograms(0.01));
  feed.set_temperature(celsius(25.0));
  const Stream out = flash_stream(feed, celsius(130.0), pascal(50000.0));
  CHECK(in_celsius(out.temperature()) == doctest::Approx(130.0));
  CHECK(to_si(out.pressure()) == doctest::Approx(50000.0));
  CHECK(to_si(out.mass(Phase::solid, 0)) == 1.0);
  CHECK(to_si(out.mass(Phase::liquid, 0)) == 0.25);
  CHECK(to_si(out.mass(Phase::vapour, 3)) == doctest::Approx(0.01).epsilon(1e-14));
  CHECK(std::abs(to_si(out.total_mass()) - to_si(feed.total_mass())) <= 1e-12 * to_si(feed.total_mass()));
  // 130 degC at 0.5 bar is above both boiling points (about 114 and 89 degC).
  CHECK(to_si(out.phase_total(Phase::vapour)) == doctest::Approx(2.51).epsilon(1e-12));
}

TEST_CASE("flash_stream_at_duty: energy balance closes and heat raises the temperature") {
  const ComponentSet set = set_of({"acetone", "water", "nitrogen"});
  Stream feed(set);
  feed.set_mass(Phase::liquid, 0, kilograms(0.6));
  feed.set_mass(Phase::liquid, 1, kilograms(1.4));
  feed.set_mass(Phase::vapour, 2, kilograms(0.02));
  feed.set_temperature(celsius(25.0));
  const double H_in = to_si(feed.enthalpy());
  double previous_T = 0.0;
  for (double duty_kJ : {0.0, 100.0, 400.0, 1200.0, 3000.0, 6000.0}) {
    CAPTURE(duty_kJ);
    const Stream out = flash_stream_at_duty(feed, joules(duty_kJ * 1000.0), one_atmosphere);
    const double H_out = to_si(out.enthalpy());
    // Closure well inside the 1e-6 a shipped case needs.
    CHECK(std::abs(H_out - H_in - duty_kJ * 1000.0) <= 1e-9 * std::abs(H_in));
    CHECK(std::abs(to_si(out.total_mass()) - to_si(feed.total_mass())) <= 1e-12 * to_si(feed.total_mass()));
    CHECK(in_kelvin(out.temperature()) > previous_T);
    previous_T = in_kelvin(out.temperature());
  }
}

TEST_CASE("flash_stream_at_duty: a pure liquid boils at its boiling point") {
  const ComponentSet set = set_of({"water"});
  const Component& water = set[0];
  Stream feed(set);
  feed.set_mass(Phase::liquid, 0, kilograms(water.molar_mass));  // 1 mol
  feed.set_temperature(celsius(25.0));
  // Heat to the boiling point, then vaporize 40 % of it: the outlet must
  // sit at the boiling point with 40 % vapour, a state no single
  // temperature of a smooth search gives.
  const Temperature Tb = saturation_temperature(water, one_atmosphere);
  const double sensible = to_si(condensed_molar_enthalpy(water, Tb)) - to_si(condensed_molar_enthalpy(water, celsius(25.0)));
  const double latent = to_si(vapour_molar_enthalpy(water, Tb)) - to_si(condensed_molar_enthalpy(water, Tb));
  const Stream out = flash_stream_at_duty(feed, joules(sensible + 0.4 * latent), one_atmosphere);
  CHECK(in_kelvin(out.temperature()) == doctest::Approx(in_kelvin(Tb)).epsilon(1e-9));
  CHECK(to_si(out.phase_total(Phase::vapour)) / water.molar_mass == doctest::Approx(0.4).epsilon(1e-6));
  CHECK(std::abs(to_si(out.enthalpy()) - to_si(feed.enthalpy()) - sensible - 0.4 * latent) <= 1e-9 * latent);
}

TEST_CASE("flash_stream_at_duty: an impossible duty is a model error") {
  const ComponentSet set = set_of({"toluene"});
  Stream feed(set);
  feed.set_mass(Phase::liquid, 0, kilograms(1.0));
  feed.set_temperature(celsius(25.0));
  // Removing 2 MJ from 1 kg of liquid toluene would take it below 150 K.
  CHECK_THROWS_AS(flash_stream_at_duty(feed, joules(-2e6), one_atmosphere), ModelError);
}

TEST_CASE("phase_equilibrium: concurrent flashes on one component set agree") {
  // No hidden shared state: four threads flashing the same feed on the
  // same set give bit-identical answers, with one warnings sink shared.
  const ComponentSet set = set_of({"acetone", "water", "nitrogen"});
  const Eigen::VectorXd feed = vec({0.6, 1.4, 0.02});
  const FlashResult reference = isothermal_flash(set, feed, celsius(75.0), one_atmosphere);
  Warnings shared;
  std::vector<double> fractions(4, -1.0);
  std::vector<std::thread> threads;
  for (std::size_t t = 0; t < fractions.size(); ++t)
    threads.emplace_back([&, t] {
      for (int repeat = 0; repeat < 20; ++repeat)
        fractions[t] = isothermal_flash(set, feed, celsius(75.0), one_atmosphere, &shared).vapour_fraction;
    });
  for (auto& thread : threads) thread.join();
  CHECK(reference.vapour_fraction > 0.0);
  for (double V : fractions) CHECK(V == reference.vapour_fraction);
}
