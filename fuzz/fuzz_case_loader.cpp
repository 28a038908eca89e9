// libFuzzer target: bytes -> YAML -> case -> solve -> finite check -> costs
// -> results JSON, the path every `unchain run` takes.
//
// The project's own exceptions (InputError, UnitError, ModelError,
// ConvergenceError, UsageError, OutputFileError) are the expected answer to
// bad input and count as success. Anything else is a finding: another
// exception escapes this function and libFuzzer reports it as a crash
// (uncaught exception -> abort), as it does a sanitizer report, a leak, an
// input slower than -timeout, or a non-finite number in a result that
// find_non_finite_values let through to the JSON (checked here: abort).
//
// Effort is capped through the case's own documented limits only: the
// recycle loops get at most max_solver_iterations iterations (the
// solver.max_iterations key, docs/case-format.md), and a batch still gets at
// most max_still_stages theoretical stages, at most max_still_steps_per_cut
// Rayleigh steps per cut and no reflux search for a purity target (its
// stages, integration_steps and target_purity keys, docs/block-reference.md).
// Every block still runs. Why: under the sanitizers and the coverage
// instrumentation the column is 25 to 40 times slower than in a release
// build, and a shipped six-stage still with its reflux search takes 2 to 5 s
// there, over the 1 s limit that is meant to catch hangs. The shipped cases
// run at full size under the sanitizers in the test suite
// (scripts/sanitizer_tests.sh).
//
// Run with scripts/fuzz.sh.

#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <exception>
#include <optional>
#include <string>
#include <string_view>

#include "app/atomic_file.hpp"
#include "app/exit_codes.hpp"
#include "app/costs_json.hpp"
#include "app/results_json.hpp"
#include "costs/batch_economics.hpp"
#include "flowsheet/case.hpp"
#include "flowsheet/diagnostics.hpp"
#include "flowsheet/finite_check.hpp"
#include "flowsheet/solver.hpp"
#include "flowsheet/unit_parser.hpp"
#include "flowsheet/yaml_reader.hpp"
#include "units/block_registry.hpp"

namespace {

constexpr int max_solver_iterations = 20;
constexpr double max_still_stages = 1;
constexpr double max_still_steps_per_cut = 200;

// A number written in a scalar, or nothing when the scalar is not one (the
// loader then reports it in its own words).
std::optional<double> scalar_number(const YAML::Node& node) {
  if (!node.IsScalar()) return std::nullopt;
  try {
    std::size_t used = 0;
    const double value = std::stod(node.Scalar(), &used);
    if (used != node.Scalar().size()) return std::nullopt;
    return value;
  } catch (const std::exception&) {
    return std::nullopt;
  }
}

void cap_key(YAML::Node block, const char* key, double cap) {
  const YAML::Node value = block[key];
  if (!value.IsDefined()) return;
  const std::optional<double> given = scalar_number(value);
  if (given && *given > cap) block[key] = cap;
}

// Applies the batch-still caps described at the top of this file. Only
// well-formed blocks are touched; anything else is left to the loader.
void cap_still_effort(YAML::Node root) {
  if (!root.IsMap()) return;
  YAML::Node blocks = root["blocks"];
  if (!blocks.IsMap()) return;
  for (auto entry : blocks) {
    YAML::Node block = entry.second;
    if (!block.IsMap()) continue;
    const YAML::Node type = block["type"];
    if (!type.IsScalar() || type.Scalar() != "batch_distillation") continue;
    cap_key(block, "stages", max_still_stages);
    cap_key(block, "integration_steps", max_still_steps_per_cut);
    if (block["target_purity"].IsDefined()) block.remove("target_purity");
  }
}
// The input poses as a case in cases/, so that `prices: {file: prices/...}`
// in a seed finds the shared price list as it does for the shipped cases.
const std::string& case_file_name() {
  static const std::string name = std::string(UNCHAIN_SOURCE_DIR) + "/cases/fuzz_input.yaml";
  return name;
}

void solve_and_report(std::string_view text) {
  using namespace unchain;
  const YamlDocument document = parse_yaml_text(text, case_file_name());
  cap_still_effort(document.root);
  Case c = load_case(document, units::builtin_blocks());
  c.solver.max_iterations = std::min(c.solver.max_iterations, max_solver_iterations);
  const SolveResult result = solve(c);
  if (!find_non_finite_values(c, result).empty()) return;  // refused, as `unchain run` does (exit 3)
  const costs::CostReport report = costs::evaluate_case_costs(c, result);
  app::Json json = app::results_to_json(c, result, {});
  json["kpis"] = app::kpis_to_json(report);
  json["costs"] = app::costs_to_json(c, report);
  // Past the finite check, a NaN here is a bug of the costs or the writer:
  // require_finite_json throws std::logic_error, which is a finding.
  app::require_finite_json(json);
  (void)json.dump(2);
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string_view text(reinterpret_cast<const char*>(data), size);
  try {
    solve_and_report(text);
  } catch (const unchain::InputError&) {
  } catch (const unchain::UnitError&) {
  } catch (const unchain::ModelError&) {
  } catch (const unchain::ConvergenceError&) {
  } catch (const unchain::app::UsageError&) {
  } catch (const unchain::app::OutputFileError&) {
  }
  // Any other exception propagates: libFuzzer aborts and saves the input.
  return 0;
}
