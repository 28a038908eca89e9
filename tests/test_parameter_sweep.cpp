// Parameter sweeps (costs/parameter_sweep.hpp): value lists, the grid, and
// a sweep of the fixture tests/cli/scale_mix_heat.yaml against a hand
// calculation of the heater duty.

#include <doctest/doctest.h>

#include <string>

#include "costs/parameter_sweep.hpp"

using namespace unchain;
using namespace unchain::costs;

namespace {
const std::string fixture = std::string(UNCHAIN_SOURCE_DIR) + "/tests/cli/scale_mix_heat.yaml";

std::string message_of(const InputError& e) {
  std::string text;
  for (const auto& d : e.diagnostics()) text += d.to_string();
  return text;
}
}  // namespace

TEST_CASE("sweep settings: value lists, single values and YAML lists") {
  const SweepSetting a = parse_sweep_setting("blocks.warm.outlet_temperature=40 degC, 50 degC,60 degC");
  CHECK(a.path == "blocks.warm.outlet_temperature");
  CHECK(a.values == std::vector<std::string>{"40 degC", "50 degC", "60 degC"});
  CHECK(a.is_swept());
  const SweepSetting b = parse_sweep_setting("blocks.still.reflux_ratio=4");
  CHECK_FALSE(b.is_swept());
  const SweepSetting c = parse_sweep_setting("solver.tear_streams=[a, b]");
  CHECK(c.values == std::vector<std::string>{"[a, b]"});  // one YAML list, not two values

  try {
    (void)parse_sweep_setting("blocks.warm.outlet_temperature=40 degC,,60 degC");
    FAIL("an empty value was accepted");
  } catch (const InputError& e) {
    CHECK(message_of(e).find("empty value in the list") != std::string::npos);
    CHECK(message_of(e).find("blocks.warm.outlet_temperature") != std::string::npos);
  }
  CHECK_THROWS_AS((void)parse_sweep_setting("blocks.warm.outlet_temperature=40 degC,"), InputError);
  CHECK_THROWS_AS((void)parse_sweep_setting("no_equals_sign"), InputError);
}

TEST_CASE("sweep values of one dimension only") {
  CHECK_NOTHROW(check_sweep_values(parse_sweep_setting("p=450 degC,723.15 K,900 degF")));
  CHECK_NOTHROW(check_sweep_values(parse_sweep_setting("p=2,4,6")));
  CHECK_NOTHROW(check_sweep_values(parse_sweep_setting("p=wegstein,direct_substitution")));
  try {
    check_sweep_values(parse_sweep_setting("blocks.reactor.reactor_temperature=450 degC,2 kg"));
    FAIL("a mix of dimensions was accepted");
  } catch (const InputError& e) {
    CHECK(message_of(e).find("'450 degC'") != std::string::npos);
    CHECK(message_of(e).find("'2 kg'") != std::string::npos);
  }
  CHECK_THROWS_AS(check_sweep_values(parse_sweep_setting("p=450 degC,hot")), InputError);
}

TEST_CASE("the grid of two swept parameters, first varying slowest") {
  const std::vector<SweepSetting> settings{parse_sweep_setting("a=1,2"), parse_sweep_setting("fixed=7"),
                                           parse_sweep_setting("b=x,y,z")};
  const auto points = sweep_points(settings);
  REQUIRE(points.size() == 6);
  // Every point carries the single value as an ordinary override first.
  for (const auto& p : points) {
    REQUIRE(p.size() == 3);
    CHECK(p[0].path == "fixed");
    CHECK(p[0].value == "7");
  }
  CHECK(points[0][1].value == "1");
  CHECK(points[0][2].value == "x");
  CHECK(points[2][2].value == "z");
  CHECK(points[3][1].value == "2");
  CHECK(points[3][2].value == "x");
  const std::vector<SweepSetting> three{parse_sweep_setting("a=1,2"), parse_sweep_setting("b=1,2"),
                                        parse_sweep_setting("c=1,2")};
  CHECK_THROWS_AS((void)sweep_points(three), InputError);
}

TEST_CASE("a sweep of the heater outlet temperature, with a failed point kept in its row") {
  const PreparedCase prepared(fixture);
  const SweepResult r =
      run_sweep(prepared, {parse_sweep_setting("blocks.warm.outlet_temperature=45 degC,55 degC,5 degC")});
  REQUIRE(r.points.size() == 3);
  CHECK(r.swept_paths == std::vector<std::string>{"blocks.warm.outlet_temperature"});
  REQUIRE_MESSAGE(r.points[0].status == StudyPointStatus::solved, r.points[0].error);
  REQUIRE_MESSAGE(r.points[1].status == StudyPointStatus::solved, r.points[1].error);
  CHECK(r.points[2].status == StudyPointStatus::bad_input);
  CHECK_FALSE(r.points[2].error.empty());
  CHECK_FALSE(r.points[2].figures.has_value());
  CHECK(r.solved_count() == 2);

  // Hand calculation: 10 K more on 2 kg water and 1 kg acetone takes
  // 2 x 4.18 + 1 x 2.16 = 10.52 kJ/K x 10 K = 0.105 MJ, over 1 kg of acetone
  // (electric heater, all of it purchased). cp of liquid water 4.18 kJ/(kg K)
  // and of liquid acetone 2.16 kJ/(kg K) near 50 degC (from memory); the
  // model's own cp and mixing may differ by a few per cent.
  const double e45 = *r.points[0].figures->value("energy_per_kg_monomer");
  const double e55 = *r.points[1].figures->value("energy_per_kg_monomer");
  CHECK(e55 - e45 == doctest::Approx(0.1052).epsilon(0.04));
}
