// The batch pyrolysis block and its parts: lumped first-order kinetics,
// yield tables, element closure, the charge by bulk density and the energy
// balance, each against an analytic solution or a hand calculation.

#include <doctest/doctest.h>

#include <yaml-cpp/yaml.h>

#include <algorithm>
#include <cmath>
#include <map>
#include <memory>
#include <sstream>
#include <string>
#include <vector>

#include "flowsheet/balance.hpp"
#include "flowsheet/block_model.hpp"
#include "flowsheet/component_library.hpp"
#include "flowsheet/elements.hpp"
#include "flowsheet/pure_properties.hpp"
#include "flowsheet/stream.hpp"
#include "flowsheet/yaml_reader.hpp"
#include "python_reference.hpp"
#include "units/block_registry.hpp"
#include "units/element_closure.hpp"
#include "units/pyrolysis.hpp"
#include "units/pyrolysis_kinetics.hpp"
#include "units/vessel_heating.hpp"
#include "units/yield_table.hpp"

using namespace unchain;
using units::RateConstant;

namespace {

const std::vector<std::string> ps_ids = {"polystyrene", "styrene",        "toluene",        "ethylbenzene",
                                         "alpha_methylstyrene", "benzene", "styrene_dimer", "styrene_trimer",
                                         "methane",     "ethylene",       "hydrogen",       "char",
                                         "nitrogen",    "acetone",        "water"};
const std::vector<std::string> pmma_ids = {"poly_methyl_methacrylate", "methyl_methacrylate", "methane", "hydrogen",
                                           "char", "water", "nitrogen"};

ComponentSet make_set(const std::vector<std::string>& ids) {
  DiagnosticList diagnostics;
  ComponentSet s = make_component_set(builtin_library(), ids, {}, diagnostics);
  diagnostics.throw_if_errors();
  return s;
}

const ComponentSet& ps_set() {
  static const ComponentSet set = make_set(ps_ids);
  return set;
}
const ComponentSet& pmma_set() {
  static const ComponentSet set = make_set(pmma_ids);
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

struct BuiltBlock {
  DiagnosticList diagnostics;
  std::unique_ptr<BlockModel> model;
  const ComponentSet* components = nullptr;
  std::string name = "reactor";

  [[nodiscard]] bool has_error_containing(const std::string& text) const {
    return std::any_of(diagnostics.all().begin(), diagnostics.all().end(), [&](const Diagnostic& d) {
      return d.severity == Severity::error && d.message.find(text) != std::string::npos;
    });
  }
};

std::unique_ptr<BuiltBlock> build(const std::string& yaml, const ComponentSet& cs = ps_set(),
                                  Basis basis = Basis::batch) {
  auto block = std::make_unique<BuiltBlock>();
  block->components = &cs;
  const YAML::Node node = YAML::Load(yaml);
  MappingReader parameters(node, "test.yaml", "blocks.reactor", block->diagnostics);
  parameters.accept("type");
  block->model = registry().create("pyrolysis", parameters, BlockSetup{cs, basis, block->name, "USD"});
  return block;
}

std::unique_ptr<BuiltBlock> build_clean(const std::string& yaml, const ComponentSet& cs = ps_set()) {
  auto block = build(yaml, cs);
  for (const auto& d : block->diagnostics.all()) INFO(d.to_string());
  REQUIRE_FALSE(block->diagnostics.has_errors());
  REQUIRE(block->model != nullptr);
  return block;
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

std::unique_ptr<Run> run(const BuiltBlock& block, const Stream& feed, const Stream* inert = nullptr) {
  auto r = std::make_unique<Run>();
  std::map<std::string, std::vector<const Stream*>> inlets{{"feed", {&feed}}};
  if (inert != nullptr) inlets["inert_gas"] = {inert};
  const BlockPorts ports(inlets, {{"vapour", {&r->vapour}}, {"residue", {&r->residue}}});
  const BlockContext context{*block.components, Basis::batch, block.name, celsius(20.0), r->warnings};
  block.model->compute(context, ports, r->resources);
  return r;
}

Stream polymer_feed(const ComponentSet& cs, const std::string& polymer, double kg, double bulk_kg_per_m3,
                    double T_K = 298.15) {
  Stream s(cs);
  s.set_mass(Phase::solid, cs.require(polymer), kilograms(kg));
  s.set_temperature(kelvin(T_K));
  s.set_bulk_density(from_si<Density>(bulk_kg_per_m3));
  return s;
}

// A stainless reactor with a mineral-wool jacket (invented for tests).
const std::string vessel_keys =
    "heater_power: \"3 kW\"\nvessel_mass: \"8 kg\"\nvessel_material: stainless\ninsulation: mineral_wool\n";


}  // namespace

// ---- kinetics --------------------------------------------------------------------

TEST_CASE("pyrolysis kinetics: conversion at constant temperature follows X = 1 - exp(-k t)") {
  const units::KineticSet& kinetics = units::default_polystyrene_kinetics();
  const Temperature T = celsius(450.0);
  const double k = to_si(kinetics.total_rate_constant(T));
  const std::vector<double> s = kinetics.selectivities(T);
  for (double t : {5.0, 30.0, 120.0, 600.0}) {
    CAPTURE(t);
    const auto result = units::integrate_conversion(kinetics, [&](Time) { return T; }, seconds(t));
    // Source: analytic solution of dm/dt = -k m at constant k; the
    // integrator's tolerances (1e-13 abs, 1e-11 rel) allow far less than 1e-9.
    const double exact = 1.0 - std::exp(-k * t);
    CHECK(result.conversion == doctest::Approx(exact).epsilon(1e-9));
    CHECK(units::isothermal_conversion(from_si<RateConstant>(k), seconds(t)) == doctest::Approx(exact).epsilon(1e-14));
    // Each channel makes k_j / k of what converts.
    for (std::size_t j = 0; j < s.size(); ++j) CHECK(result.product_yields[j] == doctest::Approx(s[j] * exact).epsilon(1e-9));
  }
  // Source: analytic, t = ln((1 - X1) / (1 - X2)) / k.
  CHECK(to_si(units::time_between_conversions(from_si<RateConstant>(0.02), 0.5, 0.99)) ==
        doctest::Approx(std::log(0.5 / 0.01) / 0.02).epsilon(1e-14));
  CHECK(to_si(units::time_between_conversions(from_si<RateConstant>(0.02), 0.995, 0.99)) == 0.0);
}

TEST_CASE("pyrolysis kinetics: very fast kinetics over a heat-up integrate quickly and convert fully") {
  // Found by fuzzing: an activation energy of 92 kJ/mol with A = 5e12 1/s
  // gives k near 6e5 1/s at 420 degC; integrating x' = -k x with an explicit
  // stepper took minutes. Two channels split 25:1 at every temperature
  // (same activation energy), so their yields must stand 25:1.
  units::KineticSet kinetics;
  kinetics.channels.push_back({"styrene", from_si<RateConstant>(5e12), from_si<MolarEnergy>(92e3)});
  kinetics.channels.push_back({"char", from_si<RateConstant>(2e11), from_si<MolarEnergy>(92e3)});
  const auto C = from_si<units::HeatCapacity>(1500.0);
  const auto power = from_si<Power>(450.0);
  const auto UA = from_si<ThermalConductance>(0.3);
  const Temperature T0 = celsius(20.0), Ta = celsius(20.0), Tset = celsius(420.0);
  const Time t_end = units::lumped_heat_up_time(C, power, UA, T0, Tset, Ta);
  auto history = [&](Time t) { return units::lumped_temperature_at(C, power, UA, T0, Ta, t); };
  const auto result = units::integrate_conversion(kinetics, history, t_end);
  // Source: X = 1 - exp(-integral k dt); the integral here is above 1e6, so
  // X is 1 to double precision, and the yields sum to X.
  CHECK(result.conversion == doctest::Approx(1.0).epsilon(1e-12));
  CHECK(result.product_yields[0] + result.product_yields[1] == doctest::Approx(1.0).epsilon(1e-9));
  CHECK(result.product_yields[0] / result.product_yields[1] == doctest::Approx(25.0).epsilon(1e-9));
}

TEST_CASE("pyrolysis kinetics: conversion over a heat-up history matches an independent quadrature") {
  const units::KineticSet& kinetics = units::default_polystyrene_kinetics();
  // A lumped heat-up (vessel model) from 25 to 430 degC, invented figures,
  // stopping while the polymer is half converted.
  const auto C = from_si<units::HeatCapacity>(6000.0);
  const auto power = from_si<Power>(2500.0);
  const auto UA = from_si<ThermalConductance>(0.4);
  const Temperature T0 = celsius(25.0), Ta = celsius(20.0), Tset = celsius(430.0);
  const Time t_end = units::lumped_heat_up_time(C, power, UA, T0, Tset, Ta);
  auto history = [&](Time t) { return units::lumped_temperature_at(C, power, UA, T0, Ta, t); };
  const auto result = units::integrate_conversion(kinetics, history, t_end);

  // Source: X = 1 - exp(-integral k(T(t)) dt), the integral by composite
  // Simpson with 200000 intervals (error well below 1e-9 for this smooth
  // integrand).
  const int n = 200000;
  const double h = to_si(t_end) / n;
  double integral = 0.0;
  for (int i = 0; i <= n; ++i) {
    const double w = (i == 0 || i == n) ? 1.0 : (i % 2 == 1 ? 4.0 : 2.0);
    integral += w * to_si(kinetics.total_rate_constant(history(seconds(i * h))));
  }
  integral *= h / 3.0;
  const double expected = 1.0 - std::exp(-integral);
  // The history must stop partway for the check to mean something.
  CHECK(expected > 0.1);
  CHECK(expected < 0.9);
  CHECK(result.conversion == doctest::Approx(expected).epsilon(1e-8));
  double made = 0.0;
  for (double y : result.product_yields) made += y;
  CHECK(made == doctest::Approx(result.conversion).epsilon(1e-10));  // mass conserved along the history
}

TEST_CASE("pyrolysis kinetics: the built-in set reproduces the slates and the overall rate it was fitted to") {
  const units::KineticSet& kinetics = units::default_polystyrene_kinetics();
  const auto& overall = units::polystyrene_overall_rate();
  for (const auto& slate : units::polystyrene_product_slates()) {
    CAPTURE(in_celsius(slate.temperature));
    const std::vector<double> s = kinetics.selectivities(slate.temperature);
    REQUIRE(s.size() == slate.fractions.size());
    double sum = 0.0;
    for (std::size_t j = 0; j < s.size(); ++j) {
      CAPTURE(slate.fractions[j].first);
      CHECK(kinetics.channels[j].product == slate.fractions[j].first);
      // Source: Liu, Qian & Wang, Fuel Process. Technol. 63 (2000) 45 (from
      // memory, as tabulated in pyrolysis_kinetics.cpp); the fit is exact.
      CHECK(s[j] == doctest::Approx(slate.fractions[j].second).epsilon(1e-12));
      sum += slate.fractions[j].second;
    }
    CHECK(sum == doctest::Approx(1.0).epsilon(1e-12));
    // Source: Westerhout et al., Ind. Eng. Chem. Res. 36 (1997) 1955, first
    // order, E = 204 kJ/mol, k0 = 2e13 1/s (from memory); exact at the fit temperatures.
    const double k_overall = to_si(overall.pre_exponential) *
                             std::exp(-to_si(overall.activation_energy) /
                                      (gas_constant_J_per_mol_K * in_kelvin(slate.temperature)));
    CHECK(to_si(kinetics.total_rate_constant(slate.temperature)) == doctest::Approx(k_overall).epsilon(1e-12));
  }
  // Source: common practice - the first-order TGA peak of polystyrene at
  // 10 K/min lies near 400-430 degC. With E/(R Tp^2) beta = k(Tp) the set's
  // peak must fall in that band.
  const double beta = 10.0 / 60.0;
  double lo = 600.0, hi = 800.0;
  for (int i = 0; i < 200; ++i) {
    const double Tp = 0.5 * (lo + hi);
    const double lhs = to_si(overall.activation_energy) / (gas_constant_J_per_mol_K * Tp * Tp) * beta;
    (to_si(kinetics.total_rate_constant(kelvin(Tp))) < lhs ? lo : hi) = Tp;
  }
  CHECK(lo - 273.15 > 400.0);
  CHECK(lo - 273.15 < 430.0);
}

// ---- yield tables ------------------------------------------------------------------

TEST_CASE("pyrolysis yield table: linear interpolation, normalization and the extrapolation limit") {
  const units::YieldTable table({celsius(450.0), celsius(500.0), celsius(550.0)}, {"styrene", "char"},
                                {{0.60, 0.70, 0.80}, {0.40, 0.30, 0.20}});
  Warnings warnings;
  // Source: hand calculation, linear interpolation halfway between rows.
  auto y = table.at(celsius(475.0), "test", warnings);
  CHECK(y[0] == doctest::Approx(0.65).epsilon(1e-14));
  CHECK(y[1] == doctest::Approx(0.35).epsilon(1e-14));
  y = table.at(celsius(530.0), "test", warnings);
  CHECK(y[0] == doctest::Approx(0.76).epsilon(1e-14));
  CHECK(warnings.size() == 0);
  // 5 K beyond the 100 K span: extrapolated along the end segment, with a warning.
  y = table.at(celsius(555.0), "test", warnings);
  CHECK(y[0] == doctest::Approx(0.81).epsilon(1e-14));
  CHECK(warnings.size() == 1);
  CHECK(warnings.messages().front().find("extrapolated") != std::string::npos);
  // 15 K beyond: more than 10 % of the span, refused.
  CHECK_THROWS_AS((void)table.at(celsius(565.0), "test", warnings), ModelError);
  CHECK_THROWS_AS((void)table.at(celsius(435.0), "test", warnings), ModelError);

  // Fractions summing to 0.99 are accepted and normalized.
  const units::YieldTable loose({celsius(450.0), celsius(550.0)}, {"styrene", "char"}, {{0.60, 0.70}, {0.39, 0.30}});
  y = loose.at(celsius(450.0), "test", warnings);
  CHECK(y[0] == doctest::Approx(0.60 / 0.99).epsilon(1e-14));
  CHECK(y[0] + y[1] == doctest::Approx(1.0).epsilon(1e-14));
  // Off by more than 0.02: refused.
  CHECK_THROWS_AS(units::YieldTable({celsius(450.0), celsius(550.0)}, {"styrene", "char"}, {{0.60, 0.70}, {0.37, 0.30}}),
                  std::invalid_argument);
  CHECK_THROWS_AS(units::YieldTable({celsius(500.0), celsius(450.0)}, {"styrene"}, {{1.0, 1.0}}), std::invalid_argument);
}

TEST_CASE("pyrolysis yield table read from a case: products checked, sums checked at their place") {
  DiagnosticList diagnostics;
  const std::string text =
      "yield_table:\n"
      "  temperatures: [\"450 degC\", \"550 degC\"]\n"
      "  styrene: [0.70, 0.80]\n"
      "  stryene_dimer: [0.20, 0.15]\n"
      "  char: [0.10, 0.05]\n";
  MappingReader reader(YAML::Load(text), "case.yaml", "blocks.reactor", diagnostics);
  CHECK_FALSE(units::read_yield_table(reader, "yield_table", ps_set()).has_value());
  REQUIRE(diagnostics.has_errors());
  const Diagnostic& d = diagnostics.all().front();
  CHECK(d.message.find("'stryene_dimer' is not among the case's components") != std::string::npos);
  CHECK(d.message.find("did you mean 'styrene_dimer'") != std::string::npos);
  CHECK(d.where.line == 4);

  DiagnosticList sums;
  MappingReader bad(YAML::Load("yield_table:\n  temperatures: [\"450 degC\", \"550 degC\"]\n  styrene: [0.70, 0.80]\n"
                               "  char: [0.10, 0.05]\n"),
                    "case.yaml", "blocks.reactor", sums);
  CHECK_FALSE(units::read_yield_table(bad, "yield_table", ps_set()).has_value());
  REQUIRE(sums.has_errors());
  CHECK(sums.all().front().message.find("sum to 0.8") != std::string::npos);
  CHECK(sums.all().front().where.line == 2);  // the table mapping
}

// ---- element closure ---------------------------------------------------------------------

TEST_CASE("pyrolysis element closure: char and hydrogen close C and H exactly, by the hand-calculated amounts") {
  const ComponentSet& cs = ps_set();
  Eigen::VectorXd y = Eigen::VectorXd::Zero(static_cast<Eigen::Index>(cs.size()));
  auto set = [&](const char* id, double w) { y[static_cast<Eigen::Index>(cs.require(id))] = w; };
  set("styrene", 0.85);
  set("toluene", 0.03);
  set("ethylbenzene", 0.03);
  set("methane", 0.01);
  set("char", 0.075);
  set("hydrogen", 0.005);
  const std::size_t ps = cs.require("polystyrene");
  const auto closure = units::close_element_balance(cs, ps, y, {cs.require("char"), cs.require("hydrogen")}, 0.05);

  // Source: hand calculation with IUPAC 2021 conventional atomic weights
  // (C 12.011, H 1.008): H mass fraction of C_aH_b is 1.008 b / (12.011 a + 1.008 b).
  auto h_fraction = [](double a, double b) { return 1.008 * b / (12.011 * a + 1.008 * b); };
  const double h_made = 0.85 * h_fraction(8, 8) + 0.03 * h_fraction(7, 8) + 0.03 * h_fraction(8, 10) +
                        0.01 * h_fraction(1, 4) + 0.005;
  const double excess_h = h_made - h_fraction(8, 8);
  // Hydrogen is pure H and char pure C, so hydrogen falls by the excess H
  // and char rises by as much (the mass total is kept).
  CHECK(closure.adjustment[static_cast<Eigen::Index>(cs.require("hydrogen"))] == doctest::Approx(-excess_h).epsilon(1e-9));
  CHECK(closure.adjustment[static_cast<Eigen::Index>(cs.require("char"))] == doctest::Approx(excess_h).epsilon(1e-9));
  CHECK(closure.total_adjustment == doctest::Approx(2.0 * excess_h).epsilon(1e-9));
  CHECK(closure.yields.sum() == doctest::Approx(1.0).epsilon(1e-14));
  // Closed to round-off: the C and H of the products equal the polymer's.
  const auto made = units::element_masses_of(cs, closure.yields);
  CHECK(std::abs(made.at("C") - 8 * 12.011 / (8 * 12.011 + 8 * 1.008)) < 1e-12);
  CHECK(std::abs(made.at("H") - h_fraction(8, 8)) < 1e-12);
  for (const auto& [element, gap] : closure.imbalance_after) CHECK(std::abs(gap) < 1e-12);

  // The adjustment (0.28 % here) above the limit: refused.
  CHECK_THROWS_AS(units::close_element_balance(cs, ps, y, {cs.require("char"), cs.require("hydrogen")}, 0.001),
                  ModelError);
  // Too little hydrogen to give up the excess H (0.2 % of the mass against
  // 0.05 % of hydrogen): a negative amount, refused.
  set("styrene", 0.80);
  set("toluene", 0.0);
  set("ethylbenzene", 0.10);
  set("methane", 0.03);
  set("char", 0.0695);
  set("hydrogen", 0.0005);
  CHECK_THROWS_WITH_AS(units::close_element_balance(cs, ps, y, {cs.require("char"), cs.require("hydrogen")}, 0.05),
                       doctest::Contains("negative amount of hydrogen"), ModelError);
}

TEST_CASE("pyrolysis element closure: oxygen needs an oxygen-bearing closure species") {
  const ComponentSet& cs = pmma_set();
  Eigen::VectorXd y = Eigen::VectorXd::Zero(static_cast<Eigen::Index>(cs.size()));
  y[static_cast<Eigen::Index>(cs.require("methyl_methacrylate"))] = 0.95;
  y[static_cast<Eigen::Index>(cs.require("methane"))] = 0.006;
  y[static_cast<Eigen::Index>(cs.require("char"))] = 0.025;
  y[static_cast<Eigen::Index>(cs.require("water"))] = 0.018;
  y[static_cast<Eigen::Index>(cs.require("hydrogen"))] = 0.001;
  const std::size_t pmma = cs.require("poly_methyl_methacrylate");
  CHECK_THROWS_WITH_AS(units::close_element_balance(cs, pmma, y, {cs.require("char"), cs.require("hydrogen")}, 0.05),
                       doctest::Contains("O balance"), ModelError);
  // With water the three elements close.
  const auto closure = units::close_element_balance(
      cs, pmma, y, {cs.require("char"), cs.require("hydrogen"), cs.require("water")}, 0.5);
  for (const auto& [element, gap] : closure.imbalance_after) {
    CAPTURE(element);
    CHECK(std::abs(gap) < 1e-12);
  }
}

// ---- the block ------------------------------------------------------------------------------

TEST_CASE("pyrolysis block: 1 kg of polystyrene at 25 degC to styrene vapour at 500 degC matches a hand calculation") {
  auto block = build_clean(
      "reactor_volume: \"10 L\"\nreactor_temperature: \"500 degC\"\nhold_time: \"1 h\"\n"
      "heat_up_conversion: neglect\n"
      "yield_table: {temperatures: [\"450 degC\", \"550 degC\"], styrene: [1, 1]}\n" +
      vessel_keys);
  const Stream feed = polymer_feed(ps_set(), "polystyrene", 1.0, 300.0);
  auto r = run(*block, feed);

  const Component& sty = *builtin_library().find("styrene");
  const Component& ps = *builtin_library().find("polystyrene");
  REQUIRE(sty.ideal_gas_heat_capacity.has_value());
  // Source: hand calculation from the data of data/components.yaml (styrene:
  // NIST formation enthalpy, Reid-Prausnitz-Poling ideal-gas cp, Watson
  // scaling of dHv from Tb; polystyrene: Polymer Handbook heat of
  // polymerization), the cp integral by scipy.integrate.quad:
  //   dHf(PS) = dHf(styrene, g) - dHv(298.15 K) + dH_polymerization
  //   Q = n [dHf(styrene, g) + int cp_ig dT - dHf(PS)] = n [int cp_ig dT + dHv(298.15) - dH_pol]
  std::ostringstream script;
  script.precision(17);
  script << "from scipy.integrate import quad\nc = [";
  for (double c : sty.ideal_gas_heat_capacity->coefficients) script << c << ",";
  script << "]\nprint(quad(lambda T: sum(a * T**i for i, a in enumerate(c)), 298.15, 773.15, epsabs=1e-10, "
            "epsrel=1e-13)[0])\n";
  const auto reference = testing::python_numbers(script.str());
  REQUIRE(reference.size() == 1);
  const double cp_integral = reference[0];
  const double Tb = sty.normal_boiling_point->value, Tc = sty.critical_temperature->value;
  const double dHv298 = sty.enthalpy_of_vaporization_at_nbp->value * std::pow((Tc - 298.15) / (Tc - Tb), sty.watson_exponent);
  const double dH_pol = ps.polymer->heat_of_polymerization.value;
  // IUPAC 2021 conventional atomic weights, C8H8 repeat unit.
  const double n = 1.0 / (8 * 12.011e-3 + 8 * 1.008e-3);
  const double expected = n * (cp_integral + dHv298 - dH_pol);
  MESSAGE("hand calculation: " << expected << " J for 1 kg (" << n * cp_integral << " sensible, " << n * dHv298
                               << " vaporization, " << -n * dH_pol << " depolymerization)");

  // The quad integral and the data are good to far better than 1e-9.
  CHECK(r->resources.process_heat_J == doctest::Approx(expected).epsilon(1e-9));
  CHECK(r->figure("reaction_heat_298K") == doctest::Approx(-n * dH_pol).epsilon(1e-9));
  CHECK(r->figure("vaporization_heat_298K") == doctest::Approx(n * dHv298).epsilon(1e-9));
  CHECK(r->figure("sensible_heat_products") == doctest::Approx(n * cp_integral).epsilon(1e-9));
  CHECK(std::abs(r->figure("sensible_heat_feed_to_298K")) < 1e-6);
  CHECK(r->figure("conversion") == 1.0);  // exp(-0.33 1/s x 3600 s) underflows
  CHECK(to_si(r->vapour.mass(Phase::vapour, ps_set().require("styrene"))) == doctest::Approx(1.0).epsilon(1e-12));
  CHECK(in_celsius(r->vapour.temperature()) == doctest::Approx(500.0).epsilon(1e-12));
  CHECK(r->figure("runs_per_batch") == 1.0);  // 10 L x 0.5 x 300 kg/m3 = 1.5 kg >= 1 kg

  // The block's own balance, as the solver computes it.
  const auto balance = close_balance({&feed}, {&r->vapour, &r->residue}, r->resources.process_heat_J);
  CHECK(balance.mass_relative_error < 1e-14);
  CHECK(balance.energy_relative_error < 1e-12);
  for (const auto& [element, gap] : balance.element_relative_error) {
    CAPTURE(element);
    CHECK(gap < 1e-12);
  }
  // The heater gives the process heat, the vessel's sensible heat and the
  // wall loss, nothing else (vessel model, units/vessel_heating.hpp).
  CHECK(r->figure("heater_energy") ==
        doctest::Approx(r->resources.process_heat_J + r->figure("heat_to_vessel") + r->figure("heat_lost_through_wall"))
            .epsilon(1e-9));
  CHECK(r->resources.electricity_J == doctest::Approx(r->figure("heater_energy")).epsilon(1e-15));
  // 8 kg of stainless at 477 J/(kg K) from 25 to 500 degC.
  CHECK(r->figure("heat_to_vessel") == doctest::Approx(8.0 * 477.0 * 475.0).epsilon(1e-12));
}

TEST_CASE("pyrolysis block: the bulk density sets the charge per run and the number of runs") {
  // 2 kg of polystyrene with 0.1 kg of residual acetone, a 10 L reactor
  // filled to 0.5. Source: hand calculation, capacity = V f rho_bulk,
  // runs = ceil(2.1 kg / capacity):
  //   loose foam, 18 kg/m3:   0.09 kg per run  -> 24 runs (23.3)
  //   densified, 300 kg/m3:   1.5 kg per run   -> 2 runs
  const std::string yaml = "reactor_volume: \"10 L\"\nreactor_temperature: \"500 degC\"\ntarget_conversion: 0.99\n" +
                           vessel_keys;
  auto block = build_clean(yaml);
  auto feed_at = [&](double bulk) {
    Stream feed = polymer_feed(ps_set(), "polystyrene", 2.0, bulk);
    feed.set_mass(Phase::liquid, ps_set().require("acetone"), kilograms(0.1));
    return feed;
  };
  const Stream foam = feed_at(18.0);
  const Stream densified = feed_at(300.0);
  auto loose = run(*block, foam);
  auto dense = run(*block, densified);
  CHECK(loose->figure("bulk_density_used") == doctest::Approx(18.0));
  CHECK(loose->figure("charge_capacity_kg") == doctest::Approx(0.09).epsilon(1e-12));
  CHECK(loose->figure("runs_per_batch") == 24.0);
  CHECK(loose->figure("charge_per_run_kg") == doctest::Approx(2.1 / 24.0).epsilon(1e-12));
  CHECK(dense->figure("charge_capacity_kg") == doctest::Approx(1.5).epsilon(1e-12));
  CHECK(dense->figure("runs_per_batch") == 2.0);
  CHECK(dense->figure("charge_per_run_kg") == doctest::Approx(1.05).epsilon(1e-12));
  CHECK(dense->figure("polymer_per_run_kg") == doctest::Approx(1.0).epsilon(1e-12));
  // The less dense feed heats the vessel twelve times as often: more heat, more time.
  CHECK(loose->figure("heat_to_vessel") == doctest::Approx(12.0 * dense->figure("heat_to_vessel")).epsilon(1e-12));
  CHECK(loose->figure("heater_energy") > 2.0 * dense->figure("heater_energy"));
  CHECK(loose->resources.duration_s > 2.0 * dense->resources.duration_s);
  // The residual solvent leaves with the vapour.
  CHECK(to_si(dense->vapour.mass(Phase::vapour, ps_set().require("acetone"))) == doctest::Approx(0.1).epsilon(1e-14));
  for (const auto* r : {loose.get(), dense.get()}) {
    const Stream& in = r == loose.get() ? foam : densified;
    const auto balance = close_balance({&in}, {&r->vapour, &r->residue}, r->resources.process_heat_J);
    CHECK(balance.mass_relative_error < 1e-14);
    CHECK(balance.energy_relative_error < 1e-12);
    for (const auto& [element, gap] : balance.element_relative_error) CHECK(gap < 1e-12);
    CHECK(r->figure("conversion") >= 0.99 - 1e-12);
  }

  // No bulk density anywhere: refused, asking for it.
  Stream bare = polymer_feed(ps_set(), "polystyrene", 2.0, 300.0);
  bare.set_bulk_density(std::nullopt);
  CHECK_THROWS_WITH_AS(run(*block, bare), doctest::Contains("bulk density"), ModelError);
  // The block's feed_bulk_density stands in for a feed without one.
  auto with_density = build_clean(yaml + "feed_bulk_density: \"150 kg/m3\"\n");
  auto r = run(*with_density, bare);
  CHECK(r->figure("charge_capacity_kg") == doctest::Approx(0.75).epsilon(1e-12));
  CHECK(r->figure("runs_per_batch") == 3.0);
}

TEST_CASE("pyrolysis block: built-in kinetics with the heat-up integrated") {
  auto block = build_clean("reactor_volume: \"10 L\"\nreactor_temperature: \"550 degC\"\ntarget_conversion: 0.999\n"
                           "residue_discharge_temperature: \"60 degC\"\ncool_down_time: \"2 h\"\n"
                           "turnaround_time: \"30 min\"\n" + vessel_keys);
  const Stream feed = polymer_feed(ps_set(), "polystyrene", 1.2, 300.0);
  auto r = run(*block, feed);
  const double X = r->figure("conversion");
  CHECK(X >= 0.999 - 1e-12);
  CHECK(r->figure("conversion_during_heat_up") > 0.0);
  CHECK(r->figure("conversion_during_heat_up") <= X);
  // The unconverted polymer stays in the residue.
  CHECK(to_si(r->residue.mass(Phase::solid, ps_set().require("polystyrene"))) ==
        doctest::Approx((1.0 - X) * 1.2).epsilon(1e-9));
  CHECK(in_celsius(r->residue.temperature()) == doctest::Approx(60.0));
  // Source: common practice for these lumped kinetics - the closure of a
  // slate built to nearly close C and H moves far less than 1 % of the charge.
  CHECK(r->figure("element_closure_adjustment_fraction") < 0.01);
  // Times add up: heat-up, set-point, cool-down and turnaround per run.
  CHECK(r->figure("run_duration") ==
        doctest::Approx(r->figure("heat_up_time") + r->figure("time_at_set_point") + 7200.0 + 1800.0).epsilon(1e-12));
  CHECK(r->resources.duration_s == doctest::Approx(r->figure("run_duration") * r->figure("runs_per_batch")));
  // The heater gives the process heat at the reactor temperature (the
  // residue cools afterwards on its own), the vessel's heat and the loss.
  CHECK(r->figure("residue_cooling") > 0.0);
  CHECK(r->figure("heater_energy") ==
        doctest::Approx(r->resources.process_heat_J + r->figure("residue_cooling") + r->figure("heat_to_vessel") +
                        r->figure("heat_lost_through_wall"))
            .epsilon(1e-9));
  CHECK(r->figure("sensible_heat_feed_to_298K") + r->figure("reaction_heat_298K") +
            r->figure("vaporization_heat_298K") + r->figure("sensible_heat_products") ==
        doctest::Approx(r->resources.process_heat_J + r->figure("residue_cooling")).epsilon(1e-12));
  const auto balance = close_balance({&feed}, {&r->vapour, &r->residue}, r->resources.process_heat_J);
  CHECK(balance.mass_relative_error < 1e-14);
  CHECK(balance.energy_relative_error < 1e-12);
  for (const auto& [element, gap] : balance.element_relative_error) CHECK(gap < 1e-12);
  // Fired instead of electric: the same heat, drawn through the burner efficiency.
  auto fired = build_clean("reactor_volume: \"10 L\"\nreactor_temperature: \"550 degC\"\ntarget_conversion: 0.999\n"
                           "residue_discharge_temperature: \"60 degC\"\nheat_source: fuel\nburner_efficiency: 0.6\n" +
                           vessel_keys);
  auto rf = run(*fired, feed);
  CHECK(rf->resources.heat_source == "fuel");
  CHECK(rf->resources.electricity_J == 0.0);
  CHECK(rf->resources.heat_drawn_J == doctest::Approx(r->figure("heater_energy") / 0.6).epsilon(1e-12));
  CHECK(r->figure("monomer_yield") > 0.3);
  CHECK(r->figure("monomer_yield") < 0.8);
  CHECK_FALSE(r->resources.cautions.empty());
}

TEST_CASE("pyrolysis block: nitrogen purge from inert_gas_flow or from an inert_gas inlet") {
  const std::string yaml = "reactor_volume: \"10 L\"\nreactor_temperature: \"500 degC\"\ntarget_conversion: 0.99\n"
                           "inert_gas_flow: \"0.5 L/min\"\n" + vessel_keys;
  auto block = build_clean(yaml);
  const Stream feed = polymer_feed(ps_set(), "polystyrene", 1.0, 300.0);
  auto r = run(*block, feed);
  // Source: ideal gas at 0 degC and 1 atm, n = P V / (R T), M(N2) = 2 x 14.007 g/mol
  // (IUPAC 2021), over the hot time of each run (heat-up and set-point).
  const double hot_time = r->figure("heat_up_time") + r->figure("time_at_set_point");
  const double expected_kg = 101325.0 * (0.5e-3 / 60.0) * hot_time / (8.314462618 * 273.15) * 2 * 14.007e-3;
  const double n2 = to_si(r->vapour.mass(Phase::vapour, ps_set().require("nitrogen")));
  CHECK(n2 == doctest::Approx(expected_kg).epsilon(1e-9));
  REQUIRE(r->resources.materials.size() == 1);
  CHECK(r->resources.materials[0].kind == "inert_gas");
  CHECK(r->resources.materials[0].amount == doctest::Approx(n2).epsilon(1e-12));
  // The purge enters at 25 degC (zero enthalpy): the energy balance over the
  // ports closes; its mass comes from outside the ports.
  const auto balance = close_balance({&feed}, {&r->vapour, &r->residue}, r->resources.process_heat_J);
  CHECK(balance.energy_relative_error < 1e-12);
  CHECK(balance.mass_out_kg - balance.mass_in_kg == doctest::Approx(n2).epsilon(1e-9));

  // With an inert_gas inlet the stream itself is the purge.
  auto with_inlet = build_clean("reactor_volume: \"10 L\"\nreactor_temperature: \"500 degC\"\ntarget_conversion: 0.99\n" +
                                vessel_keys);
  Stream nitrogen(ps_set());
  nitrogen.set_mass(Phase::vapour, ps_set().require("nitrogen"), kilograms(0.02));
  nitrogen.set_temperature(celsius(20.0));
  auto r2 = run(*with_inlet, feed, &nitrogen);
  CHECK(to_si(r2->vapour.mass(Phase::vapour, ps_set().require("nitrogen"))) == doctest::Approx(0.02).epsilon(1e-14));
  CHECK(r2->resources.materials.empty());
  const auto balance2 = close_balance({&feed, &nitrogen}, {&r2->vapour, &r2->residue}, r2->resources.process_heat_J);
  CHECK(balance2.mass_relative_error < 1e-14);
  CHECK(balance2.energy_relative_error < 1e-12);
  // Source: ideal-gas cp of N2 about 29.1-31 J/(mol K) from 20 to 500 degC
  // (common practice): the purge heating is 0.02 kg / 28 g/mol x ~14.4 kJ/mol.
  CHECK(r2->figure("inert_gas_heating") == doctest::Approx(0.02 / 0.0280134 * 14.4e3).epsilon(0.03));

  // A flow without nitrogen among the components: refused.
  const ComponentSet no_n2 = make_set({"polystyrene", "styrene", "toluene", "ethylbenzene", "alpha_methylstyrene",
                                       "benzene", "styrene_dimer", "styrene_trimer", "methane", "ethylene",
                                       "hydrogen", "char"});
  auto block3 = build_clean(yaml, no_n2);
  const Stream feed3 = polymer_feed(no_n2, "polystyrene", 1.0, 300.0);
  CHECK_THROWS_WITH_AS(run(*block3, feed3), doctest::Contains("'nitrogen' is not among"), ModelError);
}

TEST_CASE("pyrolysis block: poly(methyl methacrylate) from case data only") {
  // Invented scenario: PMMA scrap with a yield table and a one-channel rate
  // given in the case; no polystyrene anywhere in the component set.
  auto block = build_clean(
      "reactor_volume: \"5 L\"\nreactor_temperature: \"450 degC\"\nhold_time: \"10 min\"\n"
      "heat_up_conversion: neglect\n"
      "kinetics: {channels: [{product: methyl_methacrylate, pre_exponential: \"1e13 1/s\", "
      "activation_energy: \"220 kJ/mol\"}], source: \"invented for the test\"}\n"
      "yield_table:\n"
      "  temperatures: [\"400 degC\", \"500 degC\"]\n"
      "  methyl_methacrylate: [0.95, 0.93]\n"
      "  methane: [0.006, 0.008]\n"
      "  char: [0.025, 0.035]\n"
      "  water: [0.018, 0.025]\n"
      "  hydrogen: [0.001, 0.002]\n"
      "closure_species: [char, hydrogen, water]\n" +
          vessel_keys,
      pmma_set());
  const Stream feed = polymer_feed(pmma_set(), "poly_methyl_methacrylate", 1.0, 600.0);
  auto r = run(*block, feed);
  // Source: analytic first order at 723.15 K, k = 1e13 exp(-220000 / (R T)), t = 600 s.
  const double k = 1e13 * std::exp(-220e3 / (8.314462618 * 723.15));
  const double X = 1.0 - std::exp(-k * 600.0);
  CHECK(r->figure("conversion") == doctest::Approx(X).epsilon(1e-12));
  CHECK(r->figure("rate_constant_at_set_point") == doctest::Approx(k).epsilon(1e-12));
  CHECK(to_si(r->residue.mass(Phase::solid, pmma_set().require("poly_methyl_methacrylate"))) ==
        doctest::Approx(1.0 - X).epsilon(1e-12));
  // The monomer: the table halfway (0.94), closure touches only char, hydrogen, water.
  CHECK(to_si(r->vapour.mass(Phase::vapour, pmma_set().require("methyl_methacrylate"))) ==
        doctest::Approx(0.94 * X).epsilon(1e-12));
  CHECK(r->figure("monomer_yield") == doctest::Approx(0.94 * X).epsilon(1e-12));
  const auto balance = close_balance({&feed}, {&r->vapour, &r->residue}, r->resources.process_heat_J);
  CHECK(balance.mass_relative_error < 1e-14);
  CHECK(balance.energy_relative_error < 1e-12);
  REQUIRE(balance.element_relative_error.count("O") == 1);
  for (const auto& [element, gap] : balance.element_relative_error) {
    CAPTURE(element);
    CHECK(gap < 1e-12);
  }
  CHECK(r->figure("reaction_heat_298K") > 0.0);  // depolymerization is endothermic
}

TEST_CASE("pyrolysis block: input errors name the key and what was expected") {
  const std::string base = "reactor_volume: \"10 L\"\ntarget_conversion: 0.99\n" + vessel_keys;
  auto hot = build(base + "reactor_temperature: \"950 degC\"\n");
  CHECK(hot->has_error_containing("expected 300 to 900 degC"));
  // Errors point at the value in the file: line 7 here (two keys, four vessel keys, then it).
  const Diagnostic* at = nullptr;
  for (const auto& d : hot->diagnostics.all())
    if (d.message.find("900 degC") != std::string::npos) at = &d;
  REQUIRE(at != nullptr);
  CHECK(at->where.file == "test.yaml");
  CHECK(at->where.line == 7);
  CHECK(at->where.column == 22);
  // The vessel model's reader keeps the place of its keys too.
  auto plastic = build("reactor_volume: \"10 L\"\ntarget_conversion: 0.99\nreactor_temperature: \"500 degC\"\n"
                       "heater_power: \"3 kW\"\nvessel_mass: \"8 kg\"\nvessel_material: plastik\n");
  const Diagnostic* material = nullptr;
  for (const auto& d : plastic->diagnostics.all())
    if (d.message.find("unknown material") != std::string::npos) material = &d;
  REQUIRE(material != nullptr);
  CHECK(material->where.line == 6);
  auto both = build(base + "reactor_temperature: \"500 degC\"\nhold_time: \"1 h\"\n");
  CHECK(both->has_error_containing("not both"));
  auto unknown = build(base + "reactor_temperature: \"500 degC\"\nreactor_temprature: \"500 degC\"\n");
  CHECK(unknown->has_error_containing("did you mean 'reactor_temperature'"));
  auto continuous = build(base + "reactor_temperature: \"500 degC\"\n", ps_set(), Basis::continuous);
  // A continuous case runs the stirred-reactor mode, where the batch keys are refused by name.
  CHECK(continuous->has_error_containing("'blocks.reactor.target_conversion' applies only to basis: batch"));
  auto no_heater = build("reactor_volume: \"10 L\"\ntarget_conversion: 0.99\nreactor_temperature: \"500 degC\"\n"
                         "vessel_mass: \"8 kg\"\n");
  CHECK(no_heater->has_error_containing("heater_power"));
  auto far_table = build(base + "reactor_temperature: \"600 degC\"\n"
                                "yield_table: {temperatures: [\"450 degC\", \"500 degC\"], styrene: [1, 1]}\n");
  CHECK(far_table->has_error_containing("outside the yield table"));

  auto conflicting = build(base + "reactor_temperature: \"500 degC\"\nyields: kinetics\n"
                                  "yield_table: {temperatures: [\"450 degC\", \"550 degC\"], styrene: [1, 1]}\n");
  CHECK(conflicting->has_error_containing("but yields is kinetics"));
  auto nested = build_clean(base + "reactor_temperature: \"500 degC\"\n"
                                   "yields: {table: {temperatures: [\"450 degC\", \"550 degC\"], styrene: [1, 1]}}\n");
  auto rn = run(*nested, polymer_feed(ps_set(), "polystyrene", 1.0, 300.0));
  CHECK(to_si(rn->vapour.mass(Phase::vapour, ps_set().require("styrene"))) ==
        doctest::Approx(rn->figure("conversion")).epsilon(1e-12));

  // A built-in product missing from the case: named.
  const ComponentSet no_ams = make_set({"polystyrene", "styrene", "toluene", "ethylbenzene", "benzene",
                                        "styrene_dimer", "styrene_trimer", "methane", "ethylene", "hydrogen", "char"});
  auto missing = build(base + "reactor_temperature: \"500 degC\"\n", no_ams);
  CHECK(missing->has_error_containing("product 'alpha_methylstyrene' is not among the case's components"));
  // No built-in kinetics for PMMA.
  auto pmma = build(base + "reactor_temperature: \"450 degC\"\n"
                           "yield_table: {temperatures: [\"400 degC\", \"500 degC\"], methyl_methacrylate: [1, 1]}\n",
                    pmma_set());
  CHECK(pmma->has_error_containing("no built-in kinetic set for 'poly_methyl_methacrylate'"));

  // Outside the usual range: a warning, not an error.
  auto warm = build_clean(base + "reactor_temperature: \"650 degC\"\n");
  const Stream feed = polymer_feed(ps_set(), "polystyrene", 1.0, 300.0);
  auto r = run(*warm, feed);
  CHECK(r->warned("outside the usual range of pyrolysis"));
}

TEST_CASE("pyrolysis block: an element closure beyond its limit is refused") {
  // Styrene 0.80, methane 0.05, hydrogen 0.02, char 0.13: the products carry
  // 1.7 % of the mass as excess H, so the closure must move about 3.4 % of the charge.
  const std::string yaml =
      "reactor_volume: \"10 L\"\nreactor_temperature: \"500 degC\"\nhold_time: \"1 h\"\nheat_up_conversion: neglect\n"
      "yield_table: {temperatures: [\"450 degC\", \"550 degC\"], styrene: [0.80, 0.80], methane: [0.05, 0.05], "
      "hydrogen: [0.02, 0.02], char: [0.13, 0.13]}\n" + vessel_keys;
  const Stream feed = polymer_feed(ps_set(), "polystyrene", 1.0, 300.0);
  auto tight = build_clean(yaml + "element_closure_limit: 0.02\n");
  CHECK_THROWS_WITH_AS(run(*tight, feed), doctest::Contains("more than the limit"), ModelError);
  auto loose = build_clean(yaml);
  auto r = run(*loose, feed);
  // Source: hand calculation - excess H = 0.80 w_H(C8H8) + 0.05 w_H(CH4) + 0.02 - w_H(C8H8);
  // the hydrogen falls by it and char rises by it.
  auto h_fraction = [](double a, double b) { return 1.008 * b / (12.011 * a + 1.008 * b); };
  const double excess = 0.80 * h_fraction(8, 8) + 0.05 * h_fraction(1, 4) + 0.02 - h_fraction(8, 8);
  CHECK(r->figure("element_closure_adjustment_fraction") == doctest::Approx(2.0 * excess).epsilon(1e-9));
  CHECK(r->figure("element_closure_char_kg") == doctest::Approx(excess).epsilon(1e-9));
  CHECK(r->warned("closing the element balance"));
  const auto balance = close_balance({&feed}, {&r->vapour, &r->residue}, r->resources.process_heat_J);
  for (const auto& [element, gap] : balance.element_relative_error) CHECK(gap < 1e-12);
}
