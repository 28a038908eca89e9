// One-at-a-time sensitivity: each bar's low and high outputs equal separate
// evaluations with those overrides; bars are sorted by swing.

#include <doctest/doctest.h>

#include <algorithm>
#include <filesystem>
#include <fstream>
#include <string>

#include "costs/sensitivity.hpp"

using namespace unchain;
using namespace unchain::costs;

namespace {

const std::string heat_case = std::string(UNCHAIN_SOURCE_DIR) + "/tests/cli/study_heat.yaml";

std::string case_with_sensitivity(const std::string& name, const std::string& section) {
  std::ifstream in(heat_case);
  std::string text((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  text = text.substr(0, text.find("sensitivity:"));
  const auto path = std::filesystem::temp_directory_path() / ("unchain_test_tornado_" + name + ".yaml");
  std::ofstream(path) << text << section;
  return path.string();
}

}  // namespace

TEST_CASE("sensitivity: tornado bars match separate evaluations and are sorted by swing") {
  const PreparedCase prepared(heat_case);
  const auto parameters = read_sensitivity_parameters(prepared);
  REQUIRE(parameters.size() == 3);
  CHECK(parameters[0].label == "Labour rate");
  CHECK(parameters[1].label == "prices.electricity");  // no label: the path
  const auto r = run_sensitivity(prepared, parameters, 2);
  REQUIRE_FALSE(r.tornadoes.empty());
  const Tornado& t = r.tornadoes.front();
  CHECK(t.key == "net_cost_per_kg_monomer");
  CHECK(t.base == prepared.evaluate().value("net_cost_per_kg_monomer"));
  REQUIRE(t.bars.size() == 3);
  for (const auto& bar : t.bars) {
    const auto& p = r.parameters[bar.parameter];
    CHECK(bar.low_output == prepared.evaluate({{p.path, p.low}}).value(t.key));
    CHECK(bar.high_output == prepared.evaluate({{p.path, p.high}}).value(t.key));
  }
  for (std::size_t i = 1; i < t.bars.size(); ++i) CHECK(t.bars[i - 1].swing >= t.bars[i].swing);
  // The labour rate dominates: 0.5 h x (40 - 20) USD/h over 1 kg of monomer = 10 USD/kg (hand arithmetic).
  CHECK(r.parameters[t.bars.front().parameter].path == "prices.labour_rate");
  CHECK(t.bars.front().swing == doctest::Approx(10.0).epsilon(1e-12));
  // Every figure is kept for the report.
  CHECK(r.low.size() == 3);
  CHECK(r.high[0].figures.size() == r.base.figures.size());
}

TEST_CASE("sensitivity: a bad section is an input error naming the place") {
  auto error_of = [](const std::string& path) {
    try {
      const PreparedCase prepared(path);
      (void)read_sensitivity_parameters(prepared);
    } catch (const InputError& e) {
      std::string all;
      for (const auto& d : e.diagnostics()) all += d.to_string() + "\n";
      return all;
    }
    return std::string("no error");
  };
  const auto path_text = error_of(case_with_sensitivity("path", R"(sensitivity:
  parameters:
    - {path: blocks.warm.outlet_temperture, low: "40 degC", high: "80 degC"}
)"));
  std::ifstream in(heat_case);
  std::string text((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  text = text.substr(0, text.find("sensitivity:"));
  const auto line = std::count(text.begin(), text.end(), '\n') + 3;  // the third line of the section
  CHECK(path_text.find(":" + std::to_string(line) + ":") != std::string::npos);
  CHECK(path_text.find("error: 'sensitivity.parameters[0].path'") != std::string::npos);
  CHECK(path_text.find("did you mean 'outlet_temperature'") != std::string::npos);
  const auto unit_text = error_of(case_with_sensitivity("unit", R"(sensitivity:
  parameters:
    - {path: blocks.warm.outlet_temperature, low: "40 degC", high: "80 kg"}
)"));
  CHECK(unit_text.find("'sensitivity.parameters[0].high'") != std::string::npos);
  const auto missing_text = error_of(case_with_sensitivity("missing", R"(sensitivity:
  parameters:
    - {path: blocks.warm.outlet_temperature, low: "40 degC"}
)"));
  CHECK(missing_text.find("missing required key 'sensitivity.parameters[0].high'") != std::string::npos);
}

TEST_CASE("sensitivity: a value the case refuses names the parameter and the value") {
  const auto path = case_with_sensitivity("refused", R"(sensitivity:
  parameters:
    - {path: prices.labour_rate, low: "20 kg", high: "40 kg"}
)");
  const PreparedCase prepared(path);
  const auto parameters = read_sensitivity_parameters(prepared);
  CHECK_THROWS_WITH_AS(run_sensitivity(prepared, parameters, 1),
                       doctest::Contains("sensitivity of 'prices.labour_rate' at its low value '20 kg'"), InputError);
}
