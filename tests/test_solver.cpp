// The sequential-modular solver: calculation order, tear selection,
// Wegstein and direct substitution on a recycle loop solved by hand,
// failure reports, and solving one case on several threads.

#include <doctest/doctest.h>

#include <cmath>
#include <cstdio>
#include <string>
#include <thread>

#include "flowsheet/flowsheet_graph.hpp"
#include "flowsheet/solver.hpp"
#include "flowsheet/wegstein.hpp"
#include "tests/test_support.hpp"

using namespace unchain;
using namespace unchain::testing;

namespace {

std::string header() {
  return "# Test case (invented scenario)\ncase:\n  title: \"Solver test\"\n  basis: batch\n" +
         std::string(test_components_yaml());
}

// fresh -> mixer -> separator -> bottoms (product)
//                       | top
//                   splitter -> purge (product)
//                       | recycle (fraction r of top) back to the mixer
constexpr double light_feed = 1.0, heavy_feed = 2.0;          // kg
constexpr double light_recovery = 0.9, heavy_recovery = 0.2;  // s, to top
constexpr double recycle_fraction = 0.6;                      // r

std::string recycle_case(const std::string& solver = "") {
  return header() + R"yaml(feeds:
  fresh:
    temperature: "300 K"
    vapour: {test_light: "1 kg", test_heavy: "2 kg"}
blocks:
  mixer:
    type: test_mixer
    inlets: {feeds: [fresh, recycle]}
    outlets: {product: mixed}
  separator:
    type: test_separator
    inlets: {feed: mixed}
    outlets: {top: top, bottom: bottoms}
    recovery_to_top: {test_light: 0.9, test_heavy: 0.2}
  splitter:
    type: test_splitter_fraction
    inlets: {feed: top}
    outlets: {first: recycle, second: purge}
    fraction_to_first: 0.6
)yaml" + solver;
}

// Hand solution of the recycle loop, per component with feed f, recovery
// to top s and recycle fraction r:
//   mixed M = f + R, top = s M, recycle R = r s M = r s (f + R)
//   => R = f r s / (1 - r s),  M = f / (1 - r s)
//   bottoms = (1 - s) M = (1 - s) f / (1 - r s)
//   purge = (1 - r) s M = (1 - r) s f / (1 - r s)
// and bottoms + purge = f (1 - s + s - r s) / (1 - r s) = f: mass closes.
double recycle_of(double f, double s, double r) { return f * r * s / (1.0 - r * s); }
double bottoms_of(double f, double s, double r) { return (1.0 - s) * f / (1.0 - r * s); }
double purge_of(double f, double s, double r) { return (1.0 - r) * s * f / (1.0 - r * s); }

double vapour_kg(const SolveResult& result, const Case& c, const std::string& stream, const std::string& component) {
  return to_si(result.streams[*c.stream_index(stream)].mass(Phase::vapour, *c.components->index_of(component)));
}

// Direct substitution from a zero recycle: R_k+1 = r s (f + R_k), so after
// k passes the estimate is x_k = R (1 - (r s)^(k-1)) and the pass returns
// g_k = R (1 - (r s)^k). The scaled residual |g - x| / x is
//   (r s)^(k-1) (1 - r s) / (1 - (r s)^(k-1))  for k >= 2,
// and the loop converges at the first k where that is below the tolerance
// (pass 1 starts from nothing and its residual is huge). The slowest
// component (largest r s) decides.
int direct_substitution_passes(double rs, double tolerance) {
  for (int k = 2; k < 1000; ++k) {
    const double p = std::pow(rs, k - 1);
    if (p * (1.0 - rs) / (1.0 - p) < tolerance) return k;
  }
  return -1;
}

}  // namespace

TEST_CASE("solver: a recycle loop converges to the hand-solved answer") {
  const Case c = load_test_case(recycle_case());
  const SolveResult result = solve(c);
  CHECK(result.converged);
  REQUIRE(result.loops.size() == 1);
  CHECK(result.loops[0].tear_streams == std::vector<std::string>{"recycle"});
  CHECK(result.loops[0].blocks == std::vector<std::string>{"mixer", "separator", "splitter"});
  CHECK(result.calculation_order == std::vector<std::string>{"mixer", "separator", "splitter"});

  const double r = recycle_fraction;
  // Tolerance 1e-9 relative: the loop converges to 1e-10 on the scaled change.
  CHECK(vapour_kg(result, c, "recycle", "test_light") ==
        doctest::Approx(recycle_of(light_feed, light_recovery, r)).epsilon(1e-9));
  CHECK(vapour_kg(result, c, "recycle", "test_heavy") ==
        doctest::Approx(recycle_of(heavy_feed, heavy_recovery, r)).epsilon(1e-9));
  CHECK(vapour_kg(result, c, "bottoms", "test_light") ==
        doctest::Approx(bottoms_of(light_feed, light_recovery, r)).epsilon(1e-9));
  CHECK(vapour_kg(result, c, "bottoms", "test_heavy") ==
        doctest::Approx(bottoms_of(heavy_feed, heavy_recovery, r)).epsilon(1e-9));
  CHECK(vapour_kg(result, c, "purge", "test_light") ==
        doctest::Approx(purge_of(light_feed, light_recovery, r)).epsilon(1e-9));
  CHECK(vapour_kg(result, c, "purge", "test_heavy") ==
        doctest::Approx(purge_of(heavy_feed, heavy_recovery, r)).epsilon(1e-9));
  CHECK(vapour_kg(result, c, "mixed", "test_light") == doctest::Approx(1.0 / (1.0 - r * 0.9)).epsilon(1e-9));
  // Every stream ends at the feed temperature: mixing like with like.
  CHECK(in_kelvin(result.streams[*c.stream_index("purge")].temperature()) == doctest::Approx(300.0).epsilon(1e-12));
  REQUIRE(result.blocks.size() == 3);
  CHECK(result.blocks[0].name == "mixer");
  CHECK(result.blocks[0].type == "test_mixer");
}

TEST_CASE("solver: Wegstein needs fewer passes than direct substitution on the recycle loop") {
  const SolveResult wegstein = solve(load_test_case(recycle_case()));
  const SolveResult direct = solve(load_test_case(recycle_case("solver: {method: direct_substitution}\n")));
  // Each component's recycle is linear in the estimate (g = r s (f + x)),
  // so the secant step of Wegstein lands on the fixed point: pass 1 is a
  // direct step from zero, pass 2 the exact secant step, pass 3 confirms.
  CHECK(wegstein.iterations == 3);
  // Direct substitution: the light component (r s = 0.54) is slowest.
  const int expected = direct_substitution_passes(recycle_fraction * light_recovery, 1e-10);
  CHECK(expected == 38);  // 0.54^37 * 0.46 / (1 - 0.54^37) = 5.8e-11, one pass earlier 1.07e-10
  CHECK(direct.iterations == expected);
  CHECK(wegstein.iterations < direct.iterations);
  // Both reach the same answer.
  const Case c = load_test_case(recycle_case());
  CHECK(vapour_kg(direct, c, "recycle", "test_light") ==
        doctest::Approx(vapour_kg(wegstein, c, "recycle", "test_light")).epsilon(1e-9));
  // The residual history shows the direct substitution falling by r s per pass.
  const auto& h = direct.loops[0].residual_history;
  REQUIRE(h.size() == 38);
  const double rs = recycle_fraction * light_recovery;
  const double predicted_10 = std::pow(rs, 9) * (1 - rs) / (1 - std::pow(rs, 9));
  CHECK(h[9] == doctest::Approx(predicted_10).epsilon(1e-9));
}

TEST_CASE("wegstein: the secant step solves a linear map and the bounds hold") {
  // g(x) = 2 + 0.5 x, fixed point x = 4.
  auto g = [](const Eigen::VectorXd& x) { return Eigen::VectorXd((2.0 + 0.5 * x.array()).matrix()); };
  WegsteinAccelerator a(-5.0, 0.9, true);
  const Eigen::VectorXd scale = Eigen::VectorXd::Ones(1);
  const Eigen::VectorXd lower = Eigen::VectorXd::Zero(1);
  Eigen::VectorXd x = Eigen::VectorXd::Zero(1);
  Eigen::VectorXd next = a.next(x, g(x), scale, lower, 1.0);  // first step: direct substitution
  CHECK(next[0] == doctest::Approx(2.0).epsilon(1e-15));
  next = a.next(next, g(next), scale, lower, 0.5);  // s = 0.5, q = -1: exact
  CHECK(next[0] == doctest::Approx(4.0).epsilon(1e-14));
  CHECK(a.accelerated_steps() == 1);

  // g(x) = 10 - 3 x has s = -3, q = 0.75; the bound q_max = 0.5 limits it.
  auto h = [](const Eigen::VectorXd& x) { return Eigen::VectorXd((10.0 - 3.0 * x.array()).matrix()); };
  WegsteinAccelerator bounded(-5.0, 0.5, true);
  Eigen::VectorXd y = Eigen::VectorXd::Constant(1, 1.0);
  Eigen::VectorXd y1 = bounded.next(y, h(y), scale, lower, 1.0);  // 7
  Eigen::VectorXd y2 = bounded.next(y1, h(y1), scale, lower, 0.5);
  // x = 0.5 * 7 + 0.5 * (10 - 21) = -2, clamped to the lower bound 0.
  CHECK(y2[0] == 0.0);

  // Residual growing twice in a row switches to direct substitution.
  WegsteinAccelerator growing(-5.0, 0.9, true);
  Eigen::VectorXd z = Eigen::VectorXd::Constant(1, 1.0);
  z = growing.next(z, g(z), scale, lower, 1.0);
  z = growing.next(z, g(z), scale, lower, 2.0);
  CHECK_FALSE(growing.fell_back());
  z = growing.next(z, g(z), scale, lower, 3.0);
  CHECK(growing.fell_back());
  const Eigen::VectorXd after = growing.next(z, g(z), scale, lower, 1.0);
  CHECK(after[0] == doctest::Approx(g(z)[0]).epsilon(1e-15));
}

TEST_CASE("flowsheet graph: components in calculation order and the fewest tears") {
  // Blocks 0..3: 3 -> 1 -> 2, and 0 on its own. Order: 0, 3, 1, 2.
  const FlowsheetGraph line(4, {{10, 3, 1}, {11, 1, 2}});
  const auto order = line.components_in_order();
  REQUIRE(order.size() == 4);
  CHECK(order[0] == std::vector<std::size_t>{0});
  CHECK(order[1] == std::vector<std::size_t>{3});
  CHECK(order[2] == std::vector<std::size_t>{1});
  CHECK(order[3] == std::vector<std::size_t>{2});

  // Two cycles sharing the edge 0->1 (stream 0): 0->1->0 and 0->1->2->0.
  // One tear suffices; tearing each back edge (streams 1 and 3) would use two.
  const FlowsheetGraph shared(3, {{0, 0, 1}, {1, 1, 0}, {2, 1, 2}, {3, 2, 0}});
  const auto sccs = shared.components_in_order();
  REQUIRE(sccs.size() == 1);
  CHECK(shared.fewest_tears(sccs[0]) == std::vector<std::size_t>{0});
  CHECK(shared.order_without(sccs[0], {0}) == std::vector<std::size_t>{1, 2, 0});
  CHECK(shared.has_cycle(sccs[0], {1}));
  CHECK_FALSE(shared.has_cycle(sccs[0], {1, 3}));

  // Two cycles with no stream in common, A<->B and B<->C: two tears needed.
  const FlowsheetGraph chain(3, {{0, 0, 1}, {1, 1, 0}, {2, 1, 2}, {3, 2, 1}});
  const auto tears = chain.fewest_tears({0, 1, 2});
  CHECK(tears.size() == 2);
  CHECK_FALSE(chain.has_cycle({0, 1, 2}, tears));

  // A self-loop is a loop of one block, torn at itself.
  const FlowsheetGraph self(1, {{5, 0, 0}});
  CHECK(self.internal_streams({0}) == std::vector<std::size_t>{5});
  CHECK(self.fewest_tears({0}) == std::vector<std::size_t>{5});
}

TEST_CASE("flowsheet graph: above the exhaustive limit the greedy tears still break every cycle") {
  // A ring of 12 blocks with a chord from every block back two places:
  // 24 internal streams, beyond the 20 of the exhaustive search.
  std::vector<StreamEdge> edges;
  const std::size_t n = 12;
  for (std::size_t i = 0; i < n; ++i) {
    edges.push_back({edges.size(), i, (i + 1) % n});
    edges.push_back({edges.size(), i, (i + n - 2) % n});
  }
  const FlowsheetGraph ring(n, edges);
  std::vector<std::size_t> all(n);
  for (std::size_t i = 0; i < n; ++i) all[i] = i;
  REQUIRE(ring.internal_streams(all).size() > max_exhaustive_tear_candidates);
  const auto tears = ring.fewest_tears(all);
  CHECK(tears == ring.greedy_tears(all));
  CHECK_FALSE(ring.has_cycle(all, tears));
  // Pruned: putting back any one tear closes a cycle again.
  for (std::size_t i = 0; i < tears.size(); ++i) {
    auto fewer = tears;
    fewer.erase(fewer.begin() + static_cast<std::ptrdiff_t>(i));
    CHECK(ring.has_cycle(all, fewer));
  }
}

namespace {

// Two recycle loops sharing the streams mixed and top:
//   mixer -> separator -> first_splitter -> return_one -> mixer
//   mixer -> separator -> first_splitter -> second_splitter -> return_two -> mixer
std::string two_loop_case(const std::string& solver = "") {
  return header() + R"yaml(feeds:
  fresh:
    temperature: "300 K"
    vapour: {test_light: "1 kg", test_heavy: "2 kg"}
blocks:
  mixer:
    type: test_mixer
    inlets: {feeds: [fresh, return_one, return_two]}
    outlets: {product: mixed}
  separator:
    type: test_separator
    inlets: {feed: mixed}
    outlets: {top: top, bottom: bottoms}
    recovery_to_top: {test_light: 0.9, test_heavy: 0.2}
  first_splitter:
    type: test_splitter_fraction
    inlets: {feed: top}
    outlets: {first: return_one, second: onward}
    fraction_to_first: 0.5
  second_splitter:
    type: test_splitter_fraction
    inlets: {feed: onward}
    outlets: {first: return_two, second: purge}
    fraction_to_first: 0.5
)yaml" + solver;
}

}  // namespace

TEST_CASE("solver: two loops sharing a stream are broken by one tear") {
  const Case c = load_test_case(two_loop_case());
  const SolveResult result = solve(c);
  REQUIRE(result.loops.size() == 1);
  // The first stream (in file order) that lies on both cycles.
  CHECK(result.tear_streams == std::vector<std::string>{"mixed"});
  CHECK(result.loops[0].blocks == std::vector<std::string>{"separator", "first_splitter", "second_splitter", "mixer"});
  // Of the top, 0.5 returns directly and 0.5 * 0.5 through the second
  // splitter: an overall recycle fraction r = 0.75 for the hand solution.
  const double r = 0.75;
  CHECK(vapour_kg(result, c, "mixed", "test_light") == doctest::Approx(light_feed / (1 - r * 0.9)).epsilon(1e-9));
  CHECK(vapour_kg(result, c, "purge", "test_heavy") ==
        doctest::Approx(purge_of(heavy_feed, heavy_recovery, r)).epsilon(1e-9));
}

TEST_CASE("solver: user-named tears are honoured, and must break every cycle") {
  const Case c = load_test_case(two_loop_case("solver:\n  tear_streams: [return_one, return_two]\n"));
  const SolveResult result = solve(c);
  CHECK(result.tear_streams == std::vector<std::string>{"return_one", "return_two"});
  CHECK(result.loops[0].blocks == std::vector<std::string>{"mixer", "separator", "first_splitter", "second_splitter"});
  CHECK(vapour_kg(result, c, "mixed", "test_light") == doctest::Approx(light_feed / (1 - 0.75 * 0.9)).epsilon(1e-9));

  const std::string text = two_loop_case("solver:\n  tear_streams: [return_one]\n");
  const auto errors = input_errors_of([&] { (void)load_test_case(text); });
  REQUIRE(errors.size() == 1);
  CHECK(errors[0].message ==
        "'solver.tear_streams': the tear streams 'return_one' do not break every cycle of the recycle loop through "
        "blocks 'mixer', 'separator', 'first_splitter', 'second_splitter' (expected also 'return_two', or leave "
        "tear_streams out to choose automatically)");
  const auto [line, column] = position_of(text, "return_one]");
  CHECK(errors[0].where.line == line);
  CHECK(errors[0].where.column == column);

  const auto not_in_loop =
      input_errors_of([&] { (void)load_test_case(two_loop_case("solver:\n  tear_streams: [purge]\n")); });
  REQUIRE(not_in_loop.size() == 1);
  CHECK(not_in_loop[0].message ==
        "'solver.tear_streams': stream 'purge' is a product (expected a stream between two blocks of a recycle loop)");
}

TEST_CASE("solver: an initial estimate of the tear stream is used") {
  // Starting from the answer, Wegstein converges on the first pass.
  const double R_light = recycle_of(light_feed, light_recovery, recycle_fraction);
  const double R_heavy = recycle_of(heavy_feed, heavy_recovery, recycle_fraction);
  char estimate[256];
  std::snprintf(estimate, sizeof estimate,
                "solver:\n  initial_estimates:\n    recycle: {temperature: \"300 K\", vapour: {test_light: \"%.17g kg\", "
                "test_heavy: \"%.17g kg\"}}\n",
                R_light, R_heavy);
  const SolveResult result = solve(load_test_case(recycle_case(estimate)));
  CHECK(result.iterations == 1);
}

TEST_CASE("solver: blocks run in stream order, not file order") {
  const std::string text = header() + R"yaml(feeds:
  fresh: {vapour: {test_inert: "1 kg"}}
blocks:
  last:
    type: test_splitter_fraction
    inlets: {feed: middle}
    outlets: {first: a, second: b}
  first:
    type: test_mixer
    inlets: [fresh]
    outlets: [middle]
)yaml";
  const SolveResult result = solve(load_test_case(text));
  CHECK(result.calculation_order == std::vector<std::string>{"first", "last"});
  CHECK(result.loops.empty());
  CHECK(result.iterations == 0);
}

namespace {

std::string diverging_case() {
  return header() + R"yaml(feeds:
  fresh: {vapour: {test_inert: "1 kg"}}
blocks:
  amplifier:
    type: test_diverging
    gain: 3
    inlets: {feed: fresh, returned: back}
    outlets: {loop: amplified}
  splitter:
    type: test_splitter_fraction
    fraction_to_first: 0.9
    inlets: {feed: amplified}
    outlets: {first: back, second: out}
solver: {max_iterations: 50}
)yaml";
}

}  // namespace

TEST_CASE("solver: a loop that cannot converge raises ConvergenceError naming its tear stream") {
  const Case c = load_test_case(diverging_case());
  std::string message;
  try {
    (void)solve(c);
  } catch (const ConvergenceError& e) {
    message = e.what();
  }
  REQUIRE_FALSE(message.empty());
  CHECK(message.find("recycle loop through blocks 'amplifier', 'splitter' did not converge within 50 iterations") !=
        std::string::npos);
  CHECK(message.find("tolerance 1e-10") != std::string::npos);
  CHECK(message.find("tear stream 'back'") != std::string::npos);
  // Damped at q_max = 0.9 the residual falls towards 1.7 without growing,
  // so Wegstein stays on: no fallback is reported.
  CHECK(message.find("fell back") == std::string::npos);
  CHECK(message.find("method wegstein") != std::string::npos);
  CHECK(message.find("residual history (last 20 of 50): 31: ") != std::string::npos);
  CHECK(message.find("50: ") != std::string::npos);
  CHECK(message.find("largest change last in stream 'back' vapour test_inert") != std::string::npos);
}

TEST_CASE("solver: a block's ModelError names the block, and non-finite outlets are caught") {
  const std::string base = header() + R"yaml(feeds:
  fresh: {vapour: {test_light: "1 kg"}}
blocks:
  broken:
    type: test_faulty
    fault: FAULT
    inlets: [fresh]
    outlets: [out]
)yaml";
  auto with_fault = [&](const std::string& fault) {
    std::string text = base;
    return text.replace(text.find("FAULT"), 5, fault);
  };
  CHECK_THROWS_WITH_AS((void)solve(load_test_case(with_fault("refuse"))),
                       "block 'broken' (test_faulty): refuses to run (test fault)", ModelError);
  CHECK_THROWS_WITH_AS((void)solve(load_test_case(with_fault("nan_temperature"))),
                       "block 'broken' (test_faulty): outlet 'product' (stream 'out') has a non-finite temperature",
                       ModelError);
}

TEST_CASE("solver: one case solved on four threads gives identical results") {
  const Case c = load_test_case(two_loop_case());
  const SolveResult reference = solve(c);
  std::vector<SolveResult> results(4);
  std::vector<std::thread> threads;
  for (std::size_t t = 0; t < results.size(); ++t)
    threads.emplace_back([&, t] {
      for (int repeat = 0; repeat < 5; ++repeat) results[t] = solve(c);
    });
  for (auto& t : threads) t.join();
  for (const auto& r : results) {
    CHECK(r.iterations == reference.iterations);
    CHECK(r.loops[0].residual_history == reference.loops[0].residual_history);
    REQUIRE(r.streams.size() == reference.streams.size());
    for (std::size_t s = 0; s < r.streams.size(); ++s) {
      for (Phase phase : all_phases) CHECK(r.streams[s].phase_masses(phase) == reference.streams[s].phase_masses(phase));
      CHECK(in_kelvin(r.streams[s].temperature()) == in_kelvin(reference.streams[s].temperature()));
    }
    CHECK(r.overall.energy_relative_error == reference.overall.energy_relative_error);
  }
}
