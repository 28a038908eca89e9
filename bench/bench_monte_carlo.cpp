// Monte Carlo throughput on the continuous pilot case (the unit of work of
// an uncertainty study). Run:
//   build/bench/unchain_bench --benchmark_filter=monte_carlo
//   build/bench/unchain_bench --benchmark_filter=evaluate     (where one sample's time goes)
// Targets (docs/uncertainty.md): 100,000 samples of the pilot case in under
// a minute on 2 cores (>= 1670 samples/s); 2 threads >= 1.7x one; time
// linear in the sample count; peak memory flat in the sample count
// (peak_rss_MiB from /proc/self/status: VmHWM).
#include <benchmark/benchmark.h>

#include <fstream>
#include <string>

#include "costs/batch_economics.hpp"
#include "costs/case_study.hpp"
#include "costs/monte_carlo.hpp"
#include "flowsheet/solver.hpp"
#include "units/block_registry.hpp"

namespace {

const std::string pilot_case = std::string(UNCHAIN_SOURCE_DIR) + "/cases/pilot_acetone_continuous.yaml";

// kB from a line of /proc/self/status ("VmHWM:   12345 kB").
double status_MiB(const std::string& key) {
  std::ifstream in("/proc/self/status");
  std::string line;
  while (std::getline(in, line))
    if (line.rfind(key + ":", 0) == 0) return std::stod(line.substr(key.size() + 1)) / 1024.0;
  return 0;
}

// Three inputs of different kinds: a price, a temperature and a ratio. The
// ratio stays below 4.04, above which the fixed acetone supply of the case
// cannot dissolve the foam (those samples fail, as they should).
unchain::costs::UncertaintySettings pilot_settings() {
  using unchain::costs::Distribution;
  unchain::costs::UncertaintySettings s;
  s.seed = 2024;
  s.parameters.push_back({"prices.electricity", "electricity price", "USD/kWh",
                          Distribution::triangular(0.10, 0.16, 0.26), {}});
  s.parameters.push_back({"blocks.dryer.drying_temperature", "drying temperature", "degC",
                          Distribution::normal(120, 4), {}});
  s.parameters.push_back({"blocks.dissolver.solvent_to_polymer_ratio", "solvent ratio", "",
                          Distribution::uniform(3.5, 4.0), {}});
  return s;
}

const unchain::costs::PreparedCase& prepared() {
  static const unchain::costs::PreparedCase p(pilot_case);
  return p;
}

void monte_carlo(benchmark::State& state) {
  const auto settings = pilot_settings();
  unchain::costs::MonteCarloOptions options;
  options.samples = static_cast<std::size_t>(state.range(0));
  options.threads = static_cast<unsigned>(state.range(1));
  std::size_t failed = 0;
  for (auto _ : state) {
    const auto r = unchain::costs::run_monte_carlo(prepared(), settings, options);
    failed += r.failed;
    benchmark::DoNotOptimize(r);
  }
  const double samples = static_cast<double>(state.iterations()) * static_cast<double>(state.range(0));
  state.counters["samples_per_s"] = benchmark::Counter(samples, benchmark::Counter::kIsRate);
  state.counters["failed"] = static_cast<double>(failed);
  state.counters["peak_rss_MiB"] = status_MiB("VmHWM");
  state.counters["rss_MiB"] = status_MiB("VmRSS");
}
BENCHMARK(monte_carlo)
    ->ArgNames({"samples", "threads"})
    ->Args({250, 1})
    ->Args({250, 2})
    ->Args({1000, 1})
    ->Args({1000, 2})
    ->Args({4000, 2})
    ->Unit(benchmark::kMillisecond)
    ->UseRealTime();

// The parts of one sample: a full evaluation, and its load, solve and cost.
void evaluate_full(benchmark::State& state) {
  for (auto _ : state) benchmark::DoNotOptimize(prepared().evaluate({{"prices.electricity", "0.17 USD/kWh"}}));
}
BENCHMARK(evaluate_full)->Unit(benchmark::kMicrosecond);

void evaluate_load_only(benchmark::State& state) {
  const auto document = unchain::load_yaml_file(pilot_case);
  for (auto _ : state) {
    unchain::YamlDocument copy{document.file, YAML::Clone(document.root)};
    unchain::apply_overrides(copy.root, {{"prices.electricity", "0.17 USD/kWh"}});
    benchmark::DoNotOptimize(unchain::load_case(copy, unchain::units::builtin_blocks()));
  }
}
BENCHMARK(evaluate_load_only)->Unit(benchmark::kMicrosecond);

void evaluate_solve_only(benchmark::State& state) {
  const auto c = unchain::load_case_file(pilot_case, unchain::units::builtin_blocks());
  for (auto _ : state) benchmark::DoNotOptimize(unchain::solve(c));
}
BENCHMARK(evaluate_solve_only)->Unit(benchmark::kMicrosecond);

void evaluate_cost_only(benchmark::State& state) {
  const auto c = unchain::load_case_file(pilot_case, unchain::units::builtin_blocks());
  const auto result = unchain::solve(c);
  for (auto _ : state) benchmark::DoNotOptimize(unchain::costs::evaluate_case_costs(c, result));
}
BENCHMARK(evaluate_cost_only)->Unit(benchmark::kMicrosecond);

// The costing as a sample does it: the shared price file read once
// (PreparedCase), not parsed again on every evaluation.
void evaluate_cost_shared_prices(benchmark::State& state) {
  const auto c = unchain::load_case_file(pilot_case, unchain::units::builtin_blocks());
  const auto result = unchain::solve(c);
  const auto prices = unchain::costs::read_shared_price_file(c.document, c.file, c.currency);
  for (auto _ : state)
    benchmark::DoNotOptimize(unchain::costs::evaluate_case_costs(c, result, prices ? &*prices : nullptr));
}
BENCHMARK(evaluate_cost_shared_prices)->Unit(benchmark::kMicrosecond);

}  // namespace
