// Block size_reduction: grinding foam, built from YAML as a case gives it.

#include <doctest/doctest.h>

#include <yaml-cpp/yaml.h>

#include <algorithm>
#include <memory>
#include <string>

#include "flowsheet/balance.hpp"
#include "flowsheet/block_model.hpp"
#include "flowsheet/component_library.hpp"
#include "flowsheet/yaml_reader.hpp"
#include "units/block_registry.hpp"
#include "units/size_reduction.hpp"

using namespace unchain;

namespace {

const ComponentSet& grinding_components() {
  static const ComponentSet set = [] {
    DiagnosticList diagnostics;
    ComponentSet s = make_component_set(builtin_library(), {"polystyrene", "nitrogen", "oxygen"}, {}, diagnostics);
    diagnostics.throw_if_errors();
    return s;
  }();
  return set;
}

const units::BlockRegistry& registry() {
  static const units::BlockRegistry r = [] {
    units::BlockRegistry reg;
    units::register_size_reduction(reg);
    return reg;
  }();
  return r;
}

std::unique_ptr<BlockModel> build(const std::string& yaml, DiagnosticList& diagnostics, Basis basis = Basis::batch) {
  MappingReader parameters(YAML::Load(yaml), "test.yaml", "blocks.grinder", diagnostics);
  return registry().create("size_reduction", parameters, BlockSetup{grinding_components(), basis, "grinder", "USD"});
}

// 1 kg of EPS foam at 18 kg/m3 and 20 degC, optionally with its air.
Stream foam(double air_kg = 0.0) {
  const ComponentSet& c = grinding_components();
  Stream s(c);
  s.set_mass(Phase::solid, c.require("polystyrene"), kilograms(1.0));
  s.set_mass(Phase::vapour, c.require("nitrogen"), kilograms(0.79 * air_kg));
  s.set_mass(Phase::vapour, c.require("oxygen"), kilograms(0.21 * air_kg));
  s.set_temperature(celsius(20.0));
  s.set_bulk_density(from_si<Density>(18.0));
  return s;
}

struct Ground {
  Stream product, dust, vent;
  BlockResources resources;
  Warnings warnings;
};

std::unique_ptr<Ground> grind(const BlockModel& model, const Stream& feed, bool with_vent, Basis basis = Basis::batch) {
  auto g = std::make_unique<Ground>();
  const ComponentSet& c = grinding_components();
  g->product = Stream(c);
  g->dust = Stream(c);
  g->vent = Stream(c);
  std::map<std::string, std::vector<Stream*>> outlets{{"product", {&g->product}}, {"dust", {&g->dust}}};
  if (with_vent) outlets["vent"] = {&g->vent};
  const BlockPorts ports({{"feed", {&feed}}}, outlets);
  const std::string name = "grinder";
  const BlockContext context{c, basis, name, celsius(20.0), g->warnings};
  model.compute(context, ports, g->resources);
  return g;
}

bool warned(const Warnings& w, const std::string& text) {
  const auto all = w.messages();
  return std::any_of(all.begin(), all.end(), [&](const std::string& m) { return m.find(text) != std::string::npos; });
}

}  // namespace

TEST_CASE("size reduction: electricity, dust, volumes and duration by hand") {
  DiagnosticList diagnostics;
  auto model = build(
      "specific_energy: \"60 kWh/t\"\ndrive_efficiency: 0.85\nproduct_bulk_density: \"80 kg/m3\"\n"
      "fines_fraction: 0.01\nthroughput: \"20 kg/h\"\n",
      diagnostics);
  for (const auto& d : diagnostics.all()) INFO(d.to_string());
  REQUIRE_FALSE(diagnostics.has_errors());
  REQUIRE(model != nullptr);
  const Stream feed = foam();
  auto g = grind(*model, feed, false);
  const BlockResources& r = g->resources;

  // Hand calculation: 60 kWh/t = 216 J/g = 216 kJ/kg; E = 216 kJ/kg x 1 kg / 0.85
  // = 254.1176 kJ. Dust 1 % of 1 kg = 10 g. Volumes: 1 kg / 18 kg/m3 = 55.556 L
  // before, 0.99 kg / 80 kg/m3 = 12.375 L after, ratio 4.4893. Duration
  // 1 kg / (20 kg/h) = 3 min; motor 216 kJ/kg x 20/3600 kg/s / 0.85 = 1411.76 W.
  CHECK(r.electricity_J == doctest::Approx(216e3 / 0.85).epsilon(1e-12));
  CHECK(r.work_to_streams_J == 0.0);
  CHECK(r.process_heat_J == 0.0);
  CHECK(to_si(g->dust.total_mass()) == doctest::Approx(0.01).epsilon(1e-12));
  CHECK(to_si(g->product.total_mass()) == doctest::Approx(0.99).epsilon(1e-12));
  REQUIRE(r.figure("volume_before") != nullptr);
  CHECK(r.figure("volume_before")->value == doctest::Approx(1.0 / 18.0).epsilon(1e-12));
  CHECK(r.figure("volume_after")->value == doctest::Approx(0.99 / 80.0).epsilon(1e-12));
  CHECK(r.figure("volume_reduction_ratio")->value == doctest::Approx(80.0 / 18.0 / 0.99).epsilon(1e-12));
  CHECK(r.figure("dust_mass")->value == doctest::Approx(0.01).epsilon(1e-12));
  CHECK(r.duration_s == doctest::Approx(180.0).epsilon(1e-12));
  REQUIRE(r.equipment.size() == 1);
  CHECK(r.equipment[0].size == doctest::Approx(216e3 * 20.0 / 3600.0 / 0.85).epsilon(1e-12));
  REQUIRE(g->product.bulk_density().has_value());
  CHECK(to_si(*g->product.bulk_density()) == doctest::Approx(80.0));
  CHECK(in_kelvin(g->product.temperature()) == doctest::Approx(293.15));
  CHECK(r.cautions.size() == 3);
  CHECK(g->warnings.size() == 0);

  // Mass and energy close (balance.cpp): the streams only split.
  const BalanceClosure closure = close_balance({&feed}, {&g->product, &g->dust}, r.process_heat_J + r.work_to_streams_J);
  CHECK(closure.mass_relative_error <= 1e-12);
  CHECK(closure.energy_relative_error <= 1e-12);
}

TEST_CASE("size reduction: air to the vent, or with the product") {
  DiagnosticList diagnostics;
  auto model = build("specific_energy: \"60 kWh/t\"\nproduct_bulk_density: \"80 kg/m3\"\n", diagnostics);
  REQUIRE_FALSE(diagnostics.has_errors());
  // 1 kg of foam at 18 kg/m3 holds about 54.6 L of air, 0.066 kg at 20 degC.
  const Stream feed = foam(0.066);
  auto vented = grind(*model, feed, true);
  CHECK(to_si(vented->vent.phase_total(Phase::vapour)) == doctest::Approx(0.066).epsilon(1e-12));
  CHECK(to_si(vented->product.phase_total(Phase::vapour)) == 0.0);
  // Default drive efficiency 0.85 and fines fraction 0.01.
  CHECK(vented->resources.electricity_J == doctest::Approx(216e3 / 0.85).epsilon(1e-12));
  CHECK(to_si(vented->dust.total_mass()) == doctest::Approx(0.01).epsilon(1e-12));
  const BalanceClosure closure = close_balance({&feed}, {&vented->product, &vented->dust, &vented->vent}, 0.0);
  CHECK(closure.mass_relative_error <= 1e-12);
  CHECK(closure.energy_relative_error <= 1e-12);

  auto kept = grind(*model, feed, false);
  CHECK(to_si(kept->product.phase_total(Phase::vapour)) == doctest::Approx(0.066).epsilon(1e-12));
}

TEST_CASE("size reduction: implausible values warn, bad ones are refused") {
  DiagnosticList diagnostics;
  auto model = build("specific_energy: \"600 kWh/t\"\nproduct_bulk_density: \"1200 kg/m3\"\n", diagnostics);
  REQUIRE_FALSE(diagnostics.has_errors());
  auto g = grind(*model, foam(), false);
  CHECK(warned(g->warnings, "outside the usual 5-500 kWh/t"));
  // Source: data/components.yaml, polystyrene solid density 1050 kg/m3.
  CHECK(warned(g->warnings, "above the solid density"));

  DiagnosticList bad;
  (void)build("specific_energy: \"60 kW\"\nproduct_bulk_density: \"80 kg/m3\"\nfines_fraction: 1.5\nspeed: 3\n", bad);
  CHECK(bad.has_errors());
  auto mentions = [&](const std::string& text) {
    return std::any_of(bad.all().begin(), bad.all().end(),
                       [&](const Diagnostic& d) { return d.message.find(text) != std::string::npos; });
  };
  CHECK(mentions("specific_energy"));
  CHECK(mentions("fines_fraction"));
  CHECK(mentions("unknown key 'blocks.grinder.speed'"));
  DiagnosticList missing;
  (void)build("specific_energy: \"60 kWh/t\"\n", missing);
  CHECK(missing.has_errors());
}

TEST_CASE("size reduction on a continuous basis: the motor power from the feed rate") {
  DiagnosticList diagnostics;
  auto model = build("specific_energy: \"50 kWh/t\"\ndrive_efficiency: 0.8\nproduct_bulk_density: \"60 kg/m3\"\n"
                     "throughput: \"0.5 kg/h\"\n",
                     diagnostics, Basis::continuous);
  REQUIRE_FALSE(diagnostics.has_errors());
  // 1 kg/h against a rated 0.5 kg/h warns; the electricity per hour is
  // 180 kJ/kg x 1 kg / 0.8 = 225 kJ; the rated motor 180e3 x 0.5/3600 / 0.8 = 31.25 W.
  auto g = grind(*model, foam(), false, Basis::continuous);
  CHECK(g->resources.electricity_J == doctest::Approx(225e3).epsilon(1e-12));
  CHECK(g->resources.duration_s == 0.0);
  REQUIRE(g->resources.equipment.size() == 1);
  CHECK(g->resources.equipment[0].size == doctest::Approx(31.25).epsilon(1e-12));
  CHECK(warned(g->warnings, "exceeds the stated throughput"));
}
