// The check that refuses a NaN or an infinity anywhere in a result
// (flowsheet/finite_check.hpp): a solved recycle-free case is clean, and a
// crafted result with one non-finite value per place is reported with the
// block (or feed) and the quantity named.

#include <doctest/doctest.h>

#include <limits>
#include <string>
#include <vector>

#include "flowsheet/finite_check.hpp"
#include "flowsheet/solver.hpp"
#include "tests/test_support.hpp"

using namespace unchain;
using namespace unchain::testing;

namespace {

// feed -> mixer -> separator -> top, bottom (products)
std::string small_case() {
  return "# Test case (invented scenario)\ncase:\n  title: \"Finite check test\"\n  basis: batch\n" +
         std::string(test_components_yaml()) + R"yaml(feeds:
  fresh:
    temperature: "300 K"
    vapour: {test_light: "1 kg", test_heavy: "2 kg"}
blocks:
  mix:
    type: test_mixer
    inlets: {feeds: [fresh]}
    outlets: {product: mixed}
  separate:
    type: test_separator
    inlets: {feed: mixed}
    outlets: {top: top, bottom: bottoms}
    recovery_to_top: {test_light: 0.9, test_heavy: 0.2}
)yaml";
}

constexpr double not_a_number = std::numeric_limits<double>::quiet_NaN();
constexpr double infinity = std::numeric_limits<double>::infinity();

bool holds(const std::vector<std::string>& messages, const std::string& text) {
  for (const auto& m : messages)
    if (m == text) return true;
  return false;
}

}  // namespace

TEST_CASE("a finite result passes the finite check") {
  const Case c = load_test_case(small_case());
  const SolveResult result = solve(c);
  CHECK(find_non_finite_values(c, result).empty());
}

TEST_CASE("a NaN or an infinity in a result is named with its block and quantity") {
  const Case c = load_test_case(small_case());
  SolveResult result = solve(c);
  const std::size_t top = *c.stream_index("top");
  const std::size_t mixed = *c.stream_index("mixed");
  const std::size_t fresh = *c.stream_index("fresh");
  const std::size_t separate = *c.block_index("separate");

  SUBCASE("outlet temperature") {
    result.streams[top].set_temperature(kelvin(not_a_number));
    const auto messages = find_non_finite_values(c, result);
    REQUIRE(messages.size() == 1);
    CHECK(messages[0] == "block 'separate': outlet 'top' temperature is not finite");
  }
  SUBCASE("an amount in an outlet named other than its port") {
    result.streams[mixed].set_mass(Phase::vapour, 0, kilograms(infinity));
    const auto messages = find_non_finite_values(c, result);
    REQUIRE(messages.size() == 1);
    CHECK(messages[0] == "block 'mix': outlet 'product' (stream 'mixed') amount of test_light (vapour) is not finite");
  }
  SUBCASE("a feed pressure") {
    result.streams[fresh].set_pressure(pascal(-infinity));
    const auto messages = find_non_finite_values(c, result);
    REQUIRE(messages.size() == 1);
    CHECK(messages[0] == "feed 'fresh' pressure is not finite");
  }
  SUBCASE("a block's resources, figures and balance, all reported") {
    BlockResources& r = result.blocks[separate].resources;
    r.heat_drawn_J = not_a_number;
    r.add_figure("top_fraction", infinity, "-", "crafted for the test");
    result.blocks[separate].balance.energy_relative_error = not_a_number;
    result.overall.mass_out_kg = not_a_number;
    const auto messages = find_non_finite_values(c, result);
    CHECK(messages.size() == 4);
    CHECK(holds(messages, "block 'separate': heat drawn is not finite"));
    CHECK(holds(messages, "block 'separate': figure 'top_fraction' is not finite"));
    CHECK(holds(messages, "block 'separate': energy balance error is not finite"));
    CHECK(holds(messages, "the overall balance: mass out is not finite"));
  }
}
