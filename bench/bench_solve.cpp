// Time to load and to solve each shipped case. Run:
//   build/bench/unchain_bench --benchmark_filter=solve
// The continuous pilot case is also the unit of work of the Monte Carlo
// runs (100,000 solves each), so it has its own entries with a budget of
// well under 1 ms per solve:
//   build/bench/unchain_bench --benchmark_filter=pilot
#include <benchmark/benchmark.h>

#include <algorithm>
#include <filesystem>
#include <string>
#include <vector>

#include "costs/batch_economics.hpp"
#include "flowsheet/case.hpp"
#include "flowsheet/solver.hpp"
#include "units/block_registry.hpp"

namespace {

std::vector<std::string> shipped_cases() {
  std::vector<std::string> files;
  for (const auto& entry : std::filesystem::directory_iterator(std::string(UNCHAIN_SOURCE_DIR) + "/cases"))
    if (entry.path().extension() == ".yaml") files.push_back(entry.path().string());
  std::sort(files.begin(), files.end());
  return files;
}

void solve_case(benchmark::State& state, const std::string& file) {
  const unchain::Case c = unchain::load_case_file(file, unchain::units::builtin_blocks());
  for (auto _ : state) {
    unchain::SolveResult result = unchain::solve(c);
    benchmark::DoNotOptimize(result);
  }
}

void load_case(benchmark::State& state, const std::string& file) {
  for (auto _ : state) {
    unchain::Case c = unchain::load_case_file(file, unchain::units::builtin_blocks());
    benchmark::DoNotOptimize(c);
  }
}

void solve_and_cost_case(benchmark::State& state, const std::string& file) {
  const unchain::Case c = unchain::load_case_file(file, unchain::units::builtin_blocks());
  for (auto _ : state) {
    const unchain::SolveResult result = unchain::solve(c);
    unchain::costs::CostReport report = unchain::costs::evaluate_case_costs(c, result);
    benchmark::DoNotOptimize(report);
  }
}

const bool registered = [] {
  for (const auto& file : shipped_cases()) {
    const std::string name = std::filesystem::path(file).stem().string();
    benchmark::RegisterBenchmark(("solve/" + name).c_str(), solve_case, file)->Unit(benchmark::kMicrosecond);
    benchmark::RegisterBenchmark(("load/" + name).c_str(), load_case, file)->Unit(benchmark::kMicrosecond);
    benchmark::RegisterBenchmark(("solve_and_cost/" + name).c_str(), solve_and_cost_case, file)
        ->Unit(benchmark::kMicrosecond);
  }
  // The Monte Carlo unit: one solve, and one solve with its costs, of the
  // continuous pilot case (budget: well under 1 ms each).
  const std::string pilot = std::string(UNCHAIN_SOURCE_DIR) + "/cases/pilot_acetone_continuous.yaml";
  if (std::filesystem::exists(pilot)) {
    benchmark::RegisterBenchmark("pilot/solve", solve_case, pilot)->Unit(benchmark::kMicrosecond);
    benchmark::RegisterBenchmark("pilot/solve_and_cost", solve_and_cost_case, pilot)->Unit(benchmark::kMicrosecond);
  }
  return true;
}();

}  // namespace

BENCHMARK_MAIN();
