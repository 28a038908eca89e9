// The scale ladder (costs/scale_ladder.hpp) against hand calculations: feed
// amounts and scaled parameters multiply exactly, the six-tenths rule gives
// the capital of an item at each size, the vessel wall area grows as
// V^(2/3), and labour follows its rule. Fixture: tests/cli/scale_mix_heat.yaml.

#include <doctest/doctest.h>

#include <cmath>
#include <numbers>
#include <string>

#include "costs/scale_ladder.hpp"
#include "flowsheet/unit_parser.hpp"
#include "flowsheet/yaml_reader.hpp"
#include "units/vessel_heating.hpp"

using namespace unchain;
using namespace unchain::costs;

namespace {

const std::string fixture = std::string(UNCHAIN_SOURCE_DIR) + "/tests/cli/scale_mix_heat.yaml";

const Override* find_override(const std::vector<Override>& list, const std::string& path) {
  for (const auto& o : list)
    if (o.path == path) return &o;
  return nullptr;
}

double number_of(const std::string& text) { return std::stod(text); }

const ScaleRung& rung_at(const ScaleLadder& l, double factor) {
  for (const auto& r : l.rungs)
    if (r.factor == factor) return r;
  FAIL("no rung at factor " << factor);
  return l.rungs.front();
}

bool has_error(const DiagnosticList& list, const std::string& text) {
  for (const auto& d : list.all())
    if (d.severity == Severity::error && d.to_string().find(text) != std::string::npos) return true;
  return false;
}

std::string all_messages(const DiagnosticList& list) {
  std::string text;
  for (const auto& d : list.all()) text += d.to_string() + "\n";
  return text;
}

const char* reactor_case = R"yaml(case: {title: t, basis: batch}
components: [polystyrene]
feeds:
  foam: {solid: {polystyrene: "1.5 kg"}, vapour: {}}
blocks:
  reactor: {type: pyrolysis, reactor_volume: "1 L", heater_power: "450 W", vessel_mass: "0.45 kg"}
scale:
  factors: [1, 8]
  scaled_parameters:
    - {path: blocks.reactor.reactor_volume}
    - {path: blocks.reactor.heater_power, exponent: 1}
    - {path: blocks.reactor.vessel_mass}
)yaml";

}  // namespace

TEST_CASE("scaled quantity texts keep the unit and multiply the number exactly") {
  const SourceLocation here{"test.yaml", 1, 1};
  CHECK(scaled_quantity_text("1.5 kg", 2.0, here, "k") == "3 kg");
  CHECK(scaled_quantity_text("0.10 kg", 10.0, here, "k") == "1 kg");
  CHECK(scaled_quantity_text(" 30 min ", 1.0, here, "k") == "30 min");
  CHECK(scaled_quantity_text("4", 0.5, here, "k") == "2");
  // The number reads back as the very double that was computed.
  const double expected = 0.45 * std::pow(7.0, 2.0 / 3.0);
  CHECK(number_of(scaled_quantity_text("0.45 kg", std::pow(7.0, 2.0 / 3.0), here, "k")) == expected);
  CHECK_THROWS_AS((void)scaled_quantity_text("wegstein", 2.0, here, "solver.method"), InputError);
}

TEST_CASE("default exponents follow the quantity a path names") {
  // common practice: capacity grows with volume; heater rating with the
  // charge's heat capacity (volume); wall area and wall mass as V^(2/3).
  CHECK(*default_scale_exponent("blocks.reactor.reactor_volume") == 1.0);
  CHECK(*default_scale_exponent("blocks.dryer.heater_power") == 1.0);
  CHECK(*default_scale_exponent("blocks.dryer.outer_area") == doctest::Approx(2.0 / 3.0));
  CHECK(*default_scale_exponent("blocks.reactor.vessel_mass") == doctest::Approx(2.0 / 3.0));
  CHECK_FALSE(default_scale_exponent("blocks.still.reflux_ratio").has_value());
}

TEST_CASE("scale overrides: feeds times f, parameters times f^n, exactly") {
  const YAML::Node doc = YAML::Load(reactor_case);
  DiagnosticList diagnostics;
  const ScaleSettings s = read_scale_settings(doc, "reactor.yaml", diagnostics);
  REQUIRE_FALSE(diagnostics.has_errors());
  REQUIRE(s.scaled_parameters.size() == 3);
  CHECK(s.scaled_parameters[2].exponent == doctest::Approx(2.0 / 3.0));
  const auto o = scale_overrides(doc, "reactor.yaml", s, 8.0, 0.0);
  // Hand calculation: 1.5 kg x 8 = 12 kg; 1 L x 8^1 = 8 L; 450 W x 8 = 3600 W;
  // 0.45 kg x 8^(2/3) = 0.45 x 4 = 1.8 kg.
  REQUIRE(find_override(o, "feeds.foam.solid.polystyrene"));
  CHECK(find_override(o, "feeds.foam.solid.polystyrene")->value == "12 kg");
  CHECK(find_override(o, "blocks.reactor.reactor_volume")->value == "8 L");
  CHECK(find_override(o, "blocks.reactor.heater_power")->value == "3600 W");
  CHECK(number_of(find_override(o, "blocks.reactor.vessel_mass")->value) ==
        doctest::Approx(1.8).epsilon(1e-14));
  CHECK(find_override(o, "prices.labour_hours_per_batch") == nullptr);  // no prices section, no labour
}

TEST_CASE("the vessel wall area of a scaled volume grows as V^(2/3)") {
  const YAML::Node doc = YAML::Load(reactor_case);
  DiagnosticList diagnostics;
  const ScaleSettings s = read_scale_settings(doc, "reactor.yaml", diagnostics);
  auto area_at = [&](double factor) {
    const auto o = scale_overrides(doc, "reactor.yaml", s, factor, 0.0);
    YAML::Node vessel(YAML::NodeType::Map);
    vessel["heater_power"] = find_override(o, "blocks.reactor.heater_power")->value;
    vessel["vessel_volume"] = find_override(o, "blocks.reactor.reactor_volume")->value;
    vessel["vessel_mass"] = find_override(o, "blocks.reactor.vessel_mass")->value;
    DiagnosticList local;
    MappingReader reader(vessel, "reactor.yaml", "blocks.reactor", local);
    const auto design = units::read_vessel_design(reader);
    REQUIRE_MESSAGE(!local.has_errors(), all_messages(local));
    return to_si(design.outer_area);
  };
  // Hand calculation for a closed cylinder of height 1.5 D (units/vessel_heating.hpp):
  // D = (V / (0.375 pi))^(1/3), A = 2 pi D^2. For V = 1 L: D = 0.094683 m, A = 0.056328 m2.
  const double D = std::cbrt(1e-3 / (0.375 * std::numbers::pi));
  CHECK(area_at(1.0) == doctest::Approx(2.0 * std::numbers::pi * D * D).epsilon(1e-12));
  CHECK(area_at(1.0) == doctest::Approx(0.056328).epsilon(1e-5));
  // 8^(2/3) = 4 and 1000^(2/3) = 100 exactly.
  CHECK(area_at(8.0) / area_at(1.0) == doctest::Approx(4.0).epsilon(1e-12));
  CHECK(area_at(1000.0) / area_at(1.0) == doctest::Approx(100.0).epsilon(1e-12));
}

TEST_CASE("scale section errors name the file, line, column and key") {
  const YAML::Node doc = YAML::Load(R"yaml(case: {title: t, basis: batch}
feeds:
  foam: {solid: {polystyrene: "1 kg"}}
blocks:
  reactor: {type: pyrolysis, reactor_volume: "1 L"}
scale:
  factors: [1, -10, ten]
  feeds: [fom]
  scaled_parameters:
    - {path: blocks.reactor.reactor_volum, exponent: 1}
    - {path: blocks.reactor.reactor_volume, exponnt: 1}
    - {path: blocks.reactor.type, exponent: 1}
  labour: {exponent: 0.25}
  continuous_above: 100
  factor_list: [1]
)yaml");
  DiagnosticList d;
  (void)read_scale_settings(doc, "case.yaml", d);
  INFO(all_messages(d));
  CHECK(has_error(d, "case.yaml:7:16: error: 'scale.factors[1]' must be a positive number"));
  CHECK(has_error(d, "'scale.factors[2]' must be a positive number (found 'ten')"));
  CHECK(has_error(d, "case.yaml:8:11: error: 'scale.feeds[0]': 'fom' is not a feed of the case (did you mean 'foam'?)"));
  CHECK(has_error(d, "case.yaml:10:14: error: 'scale.scaled_parameters[0].path': no key 'reactor_volum' in "
                     "'blocks.reactor' (did you mean 'reactor_volume'?)"));
  CHECK(has_error(d, "exponnt"));
  CHECK(has_error(d, "case.yaml:12:14: error: 'scale.scaled_parameters[2].path': the value at 'blocks.reactor.type' "
                     "cannot be scaled"));
  CHECK(has_error(d, "go together"));
  CHECK(has_error(d, "factor_list"));
}

TEST_CASE("scale ladder of the fixture against hand calculations") {
  const PreparedCase prepared(fixture);
  const ScaleLadder l = run_scale_ladder(prepared, {});
  REQUIRE(l.rungs.size() == 3);
  for (const auto& r : l.rungs) REQUIRE_MESSAGE(r.status == StudyPointStatus::solved, r.error);
  const auto& one = rung_at(l, 1.0);
  const auto& two = rung_at(l, 2.0);
  const auto& ten = rung_at(l, 10.0);

  // A feed doubled doubles the monomer (the acetone of the warm mixture): 1 kg -> 2 kg.
  CHECK(*one.figures->value("monomer_per_basis") == doctest::Approx(1.0).epsilon(1e-12));
  CHECK(*two.figures->value("monomer_per_basis") == doctest::Approx(2.0).epsilon(1e-12));
  CHECK(*ten.figures->value("monomer_per_basis") == doctest::Approx(10.0).epsilon(1e-12));
  // Energy per kg of monomer is intensive: the same at every size (no wall losses here).
  CHECK(*ten.figures->value("energy_per_kg_monomer") ==
        doctest::Approx(*one.figures->value("energy_per_kg_monomer")).epsilon(1e-9));

  // Labour: 2 h x f^0.25; at f = 10, 2 x 1.778279 = 3.556559 h (hand calculation).
  CHECK(*one.labour_hours_per_basis == doctest::Approx(2.0));
  CHECK(*ten.labour_hours_per_basis == doctest::Approx(2.0 * std::pow(10.0, 0.25)).epsilon(1e-12));
  CHECK(*ten.labour_hours_per_basis == doctest::Approx(3.556559).epsilon(1e-6));

  // Annual output: monomer per batch x 200 batches per year.
  CHECK(*ten.annual_monomer_kg == doctest::Approx(2000.0).epsilon(1e-12));
  CHECK(l.notes.empty());
}

TEST_CASE("the capital of the heater at each size follows the six-tenths rule by hand") {
  const PreparedCase prepared(fixture);
  DiagnosticList diagnostics;
  YAML::Node doc = YAML::Clone(prepared.document());
  const ScaleSettings s = read_scale_settings(doc, fixture, diagnostics);
  REQUIRE_FALSE(diagnostics.has_errors());
  auto heater_item = [&](double factor) {
    const Evaluation e = prepared.evaluate_full(scale_overrides(doc, fixture, s, factor, 7200.0));
    for (const auto& item : e.report.capital.items)
      if (item.block == "warm") return item;
    FAIL("no capital item for the heater");
    return CostedItem{};
  };
  const CostedItem one = heater_item(1.0);
  const CostedItem four = heater_item(4.0);
  // Heater rating = duty / duration: the duty grows as f and the duration as
  // f^0.5, so the rating grows as f^0.5: x2 at f = 4.
  CHECK(four.size == doctest::Approx(2.0 * one.size).epsilon(1e-9));
  // Six-tenths rule by hand: C = 1000 USD (P / 1 kW)^0.6, same cost year, installation factor 1.
  CHECK(one.purchased_cost == doctest::Approx(1000.0 * std::pow(one.size / 1000.0, 0.6)).epsilon(1e-9));
  CHECK(four.purchased_cost == doctest::Approx(1000.0 * std::pow(four.size / 1000.0, 0.6)).epsilon(1e-9));
  CHECK(four.purchased_cost / one.purchased_cost == doctest::Approx(std::pow(2.0, 0.6)).epsilon(1e-9));
  CHECK(four.installed_cost == doctest::Approx(four.purchased_cost).epsilon(1e-12));
}

TEST_CASE("a case without a scale section gets the default factors") {
  const YAML::Node doc = YAML::Load(R"yaml(case: {title: t, basis: batch}
blocks:
  dryer: {type: solvent_recovery, outer_area: "0.4 m2"}
  reactor: {type: pyrolysis, reactor_volume: "1 L"}
)yaml");
  DiagnosticList d;
  const ScaleSettings s = read_scale_settings(doc, "case.yaml", d);
  CHECK_FALSE(s.present);
  CHECK(s.factors == std::vector<double>{1.0, 10.0, 100.0});
}
