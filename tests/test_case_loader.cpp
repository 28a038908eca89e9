// Case loading: the schema of docs/case-format.md, the flowsheet rules
// (one source and one destination per stream), error messages with their
// place in the file, and --set overrides.

#include <doctest/doctest.h>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <string>

#include "flowsheet/case.hpp"
#include "tests/test_support.hpp"

using namespace unchain;
using namespace unchain::testing;

namespace {

std::string header(const std::string& basis = "batch") {
  return "# Test case (invented scenario)\ncase:\n  title: \"Loader test\"\n  basis: " + basis +
         "\n  currency: EUR\n" + test_components_yaml();
}

// feed -> mixer -> separator -> top, bottoms
std::string simple_case(const std::string& basis = "batch", const std::string& amount = "1.5 kg") {
  return header(basis) + R"yaml(feeds:
  fresh:
    temperature: "30 degC"
    pressure: "2 bar"
    bulk_density: "18 kg/m3"
    vapour: {test_light: ")yaml" + amount + R"yaml(", test_heavy: "0.5 kg"}
blocks:
  mixer:
    type: test_mixer
    inlets: [fresh]
    outlets: {product: mixed}
  separator:
    type: test_separator
    inlets: {feed: mixed}
    outlets: {top: top, bottom: bottoms}
    recovery_to_top: {test_light: 0.9}
prices: {anything: "is not read here"}
report: {also: reserved}
)yaml";
}

// Asserts that loading fails with a message containing `text` at the
// position of `needle` in the case text (line and column).
void check_error_at(const std::string& text, const std::string& message, const std::string& needle) {
  const auto errors = input_errors_of([&] { (void)load_test_case(text); });
  REQUIRE_MESSAGE(!errors.empty(), "expected an InputError mentioning: " << message);
  const Diagnostic* d = find_diagnostic(errors, message);
  REQUIRE_MESSAGE(d != nullptr, "no diagnostic mentions '" << message << "'; got: " << errors.front().to_string());
  const auto [line, column] = position_of(text, needle);
  REQUIRE(line > 0);
  CHECK(d->where.file == "test.yaml");
  CHECK(d->where.line == line);
  CHECK(d->where.column == column);
}

std::string replaced(std::string text, const std::string& from, const std::string& to) {
  const auto at = text.find(from);
  REQUIRE_MESSAGE(at != std::string::npos, "test text lacks '" << from << "'");
  return text.replace(at, from.size(), to);
}

}  // namespace

TEST_CASE("case loader: a valid case gives components, streams with their ends, and feed contents") {
  const Case c = load_test_case(simple_case());
  CHECK(c.title == "Loader test");
  CHECK(c.basis == Basis::batch);
  CHECK(c.currency == "EUR");
  CHECK(in_kelvin(c.ambient_temperature) == doctest::Approx(293.15).epsilon(1e-12));  // default 20 degC
  REQUIRE(c.components->size() == 3);
  CHECK((*c.components)[1].id == "test_heavy");
  REQUIRE(c.blocks.size() == 2);
  CHECK(c.blocks[0].name == "mixer");
  CHECK(c.blocks[1].type == "test_separator");

  // Streams in order of first mention: the feed, then block connections.
  REQUIRE(c.streams.size() == 4);
  const auto fresh = c.stream_index("fresh");
  const auto mixed = c.stream_index("mixed");
  const auto bottoms = c.stream_index("bottoms");
  REQUIRE(fresh);
  REQUIRE(mixed);
  REQUIRE(bottoms);
  CHECK(*fresh == 0);
  CHECK(c.streams[*fresh].is_feed);
  CHECK_FALSE(c.streams[*fresh].source.has_value());
  CHECK(c.streams[*fresh].destination == c.block_index("mixer"));
  CHECK(c.streams[*fresh].destination_role == "feeds");
  CHECK(c.streams[*mixed].source == c.block_index("mixer"));
  CHECK(c.streams[*mixed].destination == c.block_index("separator"));
  CHECK(c.streams[*mixed].destination_role == "feed");
  CHECK_FALSE(c.streams[*bottoms].destination.has_value());  // a product
  CHECK(c.blocks[1].outlets.at("bottom") == std::vector<std::size_t>{*bottoms});
  CHECK_FALSE(c.block_index("nothing").has_value());

  const Stream& feed = c.streams[*fresh].initial;
  CHECK(in_kelvin(feed.temperature()) == doctest::Approx(303.15).epsilon(1e-12));
  CHECK(to_si(feed.pressure()) == doctest::Approx(2e5).epsilon(1e-12));
  REQUIRE(feed.bulk_density().has_value());
  CHECK(to_si(*feed.bulk_density()) == doctest::Approx(18.0));
  CHECK(to_si(feed.mass(Phase::vapour, 0)) == doctest::Approx(1.5).epsilon(1e-14));
  CHECK(to_si(feed.mass(Phase::vapour, 1)) == doctest::Approx(0.5).epsilon(1e-14));
  CHECK(to_si(feed.phase_total(Phase::solid)) == 0.0);
  // Defaults of the solver settings.
  CHECK(c.solver.method == ConvergenceMethod::wegstein);
  CHECK(c.solver.tolerance == 1e-10);
  CHECK(c.solver.max_iterations == 200);
  CHECK(c.warnings.empty());
  // The whole document is kept for the costing layer.
  CHECK(c.document["prices"]["anything"].as<std::string>() == "is not read here");
}

TEST_CASE("case loader: a continuous case stores flows in kg per hour") {
  // 1 kg/s = 3600 kg/h (definition of the hour).
  const std::string text = replaced(simple_case("continuous", "0.25 kg/s"), "\"0.5 kg\"", "\"30 kg/h\"");
  const Case flows = load_test_case(text);
  CHECK(flows.basis == Basis::continuous);
  const Stream& feed = flows.streams[0].initial;
  CHECK(to_si(feed.mass(Phase::vapour, 0)) == doctest::Approx(900.0).epsilon(1e-14));
  CHECK(to_si(feed.mass(Phase::vapour, 1)) == doctest::Approx(30.0).epsilon(1e-14));
}

TEST_CASE("case loader: an amount per batch in a continuous case is refused with a hint") {
  // simple_case has test_heavy: "0.5 kg" which is a mass, not a flow.
  const std::string text = simple_case("continuous", "1 kg/h");
  const auto errors = input_errors_of([&] { (void)load_test_case(text); });
  const Diagnostic* d = find_diagnostic(errors, "feeds.fresh.vapour.test_heavy");
  REQUIRE(d != nullptr);
  CHECK(d->message.find("expected mass flow (kg/s), found mass (kg)") != std::string::npos);
  CHECK(d->message.find("a continuous case takes flows such as \"1.5 kg/h\"") != std::string::npos);
}

TEST_CASE("case loader: the solver section is read") {
  const std::string text = simple_case() + R"yaml(solver:
  method: direct_substitution
  tolerance: 1e-8
  max_iterations: 50
  wegstein_q_min: -3
  wegstein_q_max: 0.5
)yaml";
  const Case c = load_test_case(text);
  CHECK(c.solver.method == ConvergenceMethod::direct_substitution);
  CHECK(c.solver.tolerance == 1e-8);
  CHECK(c.solver.max_iterations == 50);
  CHECK(c.solver.wegstein_q_min == -3.0);
  CHECK(c.solver.wegstein_q_max == 0.5);
}

TEST_CASE("case loader: a stream with two sources is an error at its second mention") {
  const std::string text = replaced(simple_case(), "outlets: {top: top, bottom: bottoms}",
                                    "outlets: {top: mixed, bottom: bottoms}");
  check_error_at(text, "stream 'mixed' has two sources: block 'mixer' (outlet 'product') and block 'separator' "
                       "(outlet 'top')",
                 "mixed, bottom");
  // A feed that is also a block outlet.
  const std::string feed_twice = replaced(simple_case(), "outlets: {product: mixed}", "outlets: {product: fresh}");
  const auto errors = input_errors_of([&] { (void)load_test_case(feed_twice); });
  CHECK(mentions(errors, "stream 'fresh' has two sources: a feed (test.yaml:"));
}

TEST_CASE("case loader: an undefined stream is an error with a suggestion") {
  const std::string text = replaced(simple_case(), "inlets: {feed: mixed}", "inlets: {feed: mixd}");
  check_error_at(text,
                 "undefined stream 'mixd': inlet 'feed' of block 'separator' is neither a feed nor an outlet of any "
                 "block (did you mean 'mixed'?)",
                 "mixd");
}

TEST_CASE("case loader: a block missing a required inlet is an error at the block") {
  const std::string text = replaced(simple_case(), "    inlets: {feed: mixed}\n", "");
  check_error_at(text, "block 'separator' (test_separator) is missing its required inlet 'feed' (stream to separate)",
                 "separator:");
}

TEST_CASE("case loader: an unknown block type is an error with a suggestion") {
  const std::string text = replaced(simple_case(), "type: test_separator", "type: test_seperator");
  check_error_at(text, "'blocks.separator.type': unknown block type 'test_seperator' (did you mean 'test_separator'?)",
                 "test_seperator");
  // The streams of the refused block raise no further errors.
  const auto errors = input_errors_of([&] { (void)load_test_case(text); });
  CHECK(errors.size() == 1);
}

TEST_CASE("case loader: unknown keys and roles are errors with suggestions") {
  check_error_at(replaced(simple_case(), "recovery_to_top:", "recovery_to_tpo:"),
                 "unknown key 'blocks.separator.recovery_to_tpo' (did you mean 'recovery_to_top'?)",
                 "recovery_to_tpo");
  check_error_at(replaced(simple_case(), "    pressure: \"2 bar\"", "    presure: \"2 bar\""),
                 "unknown key 'feeds.fresh.presure' (did you mean 'pressure'?)", "presure");
  check_error_at(replaced(simple_case(), "prices:", "pricse:"), "unknown key 'pricse' (did you mean 'prices'?)",
                 "pricse");
  check_error_at(replaced(simple_case(), "{top: top, bottom: bottoms}", "{top: top, botom: bottoms}"),
                 "'blocks.separator.outlets': unknown outlet role 'botom' of block type 'test_separator' (did you "
                 "mean 'bottom'?)",
                 "botom");
}

TEST_CASE("case loader: a negative amount is an error") {
  check_error_at(simple_case("batch", "-1 kg"),
                 "'feeds.fresh.vapour.test_light': amount must not be negative (expected at least 0 kg, found \"-1 kg\")",
                 "\"-1 kg\"");
}

TEST_CASE("case loader: a value of the wrong dimension is an error naming both dimensions") {
  check_error_at(replaced(simple_case(), "\"30 degC\"", "\"1 kg\""),
                 "'feeds.fresh.temperature': wrong dimension (expected temperature (K), found mass (kg) from unit \"kg\")",
                 "\"1 kg\"");
}

TEST_CASE("case loader: a stream consumed by two blocks is an error") {
  const std::string text = replaced(simple_case(), "inlets: {feed: mixed}", "inlets: {feed: fresh}");
  const auto errors = input_errors_of([&] { (void)load_test_case(text); });
  CHECK(mentions(errors, "stream 'fresh' is consumed twice: by block 'mixer' (inlet 'feeds') and by block "
                         "'separator' (inlet 'feed')"));
}

TEST_CASE("case loader: several mistakes are reported in one InputError") {
  std::string text = replaced(simple_case("batch", "-2 kg"), "type: test_mixer", "type: test_mixxer");
  text = replaced(text, "title:", "titel:");
  const auto errors = input_errors_of([&] { (void)load_test_case(text); });
  CHECK(errors.size() == 4);  // titel unknown, title missing, negative amount, unknown type
  CHECK(mentions(errors, "unknown key 'case.titel' (did you mean 'title'?)"));
  CHECK(mentions(errors, "missing required key 'case.title'"));
  CHECK(mentions(errors, "amount must not be negative"));
  CHECK(mentions(errors, "unknown block type 'test_mixxer' (did you mean 'test_mixer'?)"));
}

TEST_CASE("case loader: components must be known, and feed components must be listed") {
  const std::string text = replaced(simple_case(), "components: [test_light, test_heavy, test_inert]",
                                    "components: [test_light, test_hevy, test_inert]");
  const auto errors = input_errors_of([&] { (void)load_test_case(text); });
  CHECK(mentions(errors, "unknown component 'test_hevy' (did you mean 'test_heavy'?)"));
  // test_heavy is then used by the feed without being listed.
  CHECK(mentions(errors, "'feeds.fresh.vapour.test_heavy': component 'test_heavy' is not in the case's components list"));
}

TEST_CASE("case loader: a feed going nowhere is a warning, not an error") {
  const std::string text = replaced(simple_case(), "feeds:\n", "feeds:\n  spare:\n    vapour: {test_inert: \"1 kg\"}\n");
  const Case c = load_test_case(text);
  REQUIRE(c.warnings.size() == 1);
  CHECK(c.warnings[0].message == "feed 'spare' is not an inlet of any block; it passes straight to the products");
}

TEST_CASE("overrides: a feed amount and a block parameter are changed before loading") {
  const std::string text = simple_case();
  const Case c = load_test_case(text, {parse_override("feeds.fresh.vapour.test_light=4 kg"),
                                       parse_override("blocks.separator.recovery_to_top.test_heavy = 0.25"),
                                       parse_override("case.description=Changed on the command line")});
  CHECK(to_si(c.streams[0].initial.mass(Phase::vapour, 0)) == doctest::Approx(4.0).epsilon(1e-14));
  CHECK(c.description == "Changed on the command line");  // the final key may be new
  CHECK(c.document["blocks"]["separator"]["recovery_to_top"]["test_heavy"].as<std::string>() == "0.25");
}

TEST_CASE("overrides: a path whose parent does not exist names the closest key") {
  YamlDocument doc = parse_yaml_text(simple_case(), "test.yaml");
  const auto errors = input_errors_of(
      [&] { apply_overrides(doc.root, {parse_override("blocks.separatr.recovery_to_top.test_light=0.5")}); });
  REQUIRE(errors.size() == 1);
  CHECK(errors[0].message ==
        "--set 'blocks.separatr.recovery_to_top.test_light': no key 'separatr' in 'blocks' (existing keys: mixer, "
        "separator) (did you mean 'separator'?)");
  CHECK(errors[0].where.file == "command line");

  const auto list_errors = input_errors_of([&] { apply_overrides(doc.root, {parse_override("components.7=x")}); });
  REQUIRE(list_errors.size() == 1);
  CHECK(list_errors[0].message ==
        "--set 'components.7': 'components' is a list of 3 items (expected an index from 0 to 3, found '7')");

  // A misspelt final key is caught by the loader's unknown-key check.
  const auto typo = input_errors_of([&] { (void)load_test_case(simple_case(), {parse_override("case.titl=x")}); });
  CHECK(mentions(typo, "unknown key 'case.titl' (did you mean 'title'?)"));
  // A new section is not created: its parent must exist.
  const auto missing_parent =
      input_errors_of([&] { apply_overrides(doc.root, {parse_override("solver.max_iterations=7")}); });
  REQUIRE(missing_parent.size() == 1);
  CHECK(missing_parent[0].message.find("no key 'solver' in the document") != std::string::npos);

  CHECK_THROWS_AS((void)parse_override("no equals sign"), InputError);
  const Override o = parse_override("case.title=A = B");
  CHECK(o.path == "case.title");
  CHECK(o.value == "A = B");
}

TEST_CASE("overrides: the tree walk does not disturb other keys") {
  YamlDocument doc = parse_yaml_text(simple_case(), "test.yaml");
  apply_overrides(doc.root, {parse_override("feeds.fresh.temperature=40 degC")});
  CHECK(doc.root["feeds"]["fresh"]["temperature"].as<std::string>() == "40 degC");
  CHECK(doc.root["feeds"]["fresh"]["pressure"].as<std::string>() == "2 bar");
  CHECK(doc.root["blocks"]["mixer"]["type"].as<std::string>() == "test_mixer");
  CHECK(doc.root["feeds"].size() == 1);
  apply_overrides(doc.root, {parse_override("components.0=test_heavy")});
  CHECK(doc.root["components"][0].as<std::string>() == "test_heavy");
  CHECK(doc.root["components"][1].as<std::string>() == "test_heavy");
  CHECK(doc.root["components"].size() == 3);
}

TEST_CASE("case loader: short forms of inlets and outlets need a block with one role") {
  const std::string text = replaced(simple_case(), "outlets: {top: top, bottom: bottoms}", "outlets: [top, bottoms]");
  check_error_at(text,
                 "'blocks.separator.outlets': a plain list of streams is allowed only when the block has one outlet "
                 "role (expected a mapping of role to stream; roles: top, bottom)",
                 "[top, bottoms]");
  const std::string two = replaced(simple_case(), "inlets: {feed: mixed}", "inlets: {feed: [mixed, fresh]}");
  const auto errors = input_errors_of([&] { (void)load_test_case(two); });
  CHECK(mentions(errors, "'blocks.separator.inlets.feed': inlet 'feed' takes one stream (found 2)"));
}

TEST_CASE("case loader: an initial estimate of a stream that is not torn draws a warning at the estimate") {
  // A recycle loop torn at 'recycle'; an estimate for 'mixed' is then unused.
  const std::string text = header() + R"yaml(feeds:
  fresh: {vapour: {test_light: "1 kg"}}
blocks:
  mixer:
    type: test_mixer
    inlets: {feeds: [fresh, recycle]}
    outlets: {product: mixed}
  splitter:
    type: test_splitter_fraction
    inlets: {feed: mixed}
    outlets: {first: recycle, second: out}
solver:
  initial_estimates:
    mixed: {vapour: {test_light: "2 kg"}}
)yaml";
  const Case c = load_test_case(text);
  REQUIRE(c.warnings.size() == 1);
  CHECK(c.warnings[0].message ==
        "initial estimate of stream 'mixed' is not used: it is not a tear stream (name it in solver.tear_streams to "
        "tear it)");
  CHECK(c.warnings[0].where.line == position_of(text, "    mixed: {vapour").first);
  // A feed has no estimate.
  const auto errors = input_errors_of([&] { (void)load_test_case(replaced(text, "    mixed: {vapour", "    fresh: {vapour")); });
  CHECK(mentions(errors, "'solver.initial_estimates.fresh': 'fresh' is not a stream between two blocks"));
}

TEST_CASE("case loader: a case file with built-in components loads from disk") {
  const std::string text = R"yaml(# Test case (invented scenario)
case:
  title: "Built-in components"
  basis: batch
components: [polystyrene, acetone, nitrogen]
feeds:
  foam:
    bulk_density: "18 kg/m3"
    solid: {polystyrene: "1.0 kg"}
    vapour: {nitrogen: "0.01 kg"}
blocks:
  mixer:
    type: test_mixer
    inlets: [foam]
    outlets: [product]
)yaml";
  const auto path = std::filesystem::temp_directory_path() / "unchain_test_case_loader_builtin.yaml";
  {
    std::ofstream out(path);
    out << text;
  }
  const Case c = load_case_file(path.string(), test_catalogue(), {parse_override("feeds.foam.solid.polystyrene=2 kg")});
  std::filesystem::remove(path);
  REQUIRE(c.components->size() == 3);
  // Source: IUPAC conventional atomic weights: C3H6O = 3*12.011 + 6*1.008 + 15.999 = 58.080 g/mol.
  CHECK((*c.components)[1].molar_mass == doctest::Approx(58.080e-3).epsilon(1e-6));
  CHECK(to_si(c.streams[0].initial.mass(Phase::solid, 0)) == doctest::Approx(2.0).epsilon(1e-14));
  CHECK(c.file == path.string());

  // A polymer cannot be written in the vapour phase.
  const std::string vapour = replaced(text, "vapour: {nitrogen", "vapour: {polystyrene: \"1 g\", nitrogen");
  const auto errors = input_errors_of([&] { (void)load_case(parse_yaml_text(vapour, "test.yaml"), test_catalogue()); });
  CHECK(mentions(errors, "'feeds.foam.vapour.polystyrene': component 'polystyrene' is a polymer and cannot be in the "
                         "vapour phase"));
}
