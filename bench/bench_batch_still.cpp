// The batch still (units/batch_distillation.cpp, units/column_stages.cpp):
// the block alone on each shipped case that has one, and how the cost of
// the Rayleigh integration grows with the number of cuts and of
// components. Run:
//   build/bench/unchain_bench --benchmark_filter=batch_still
// The scaling benchmarks report a fitted complexity (benchmark's oN fit):
// "BigO" near a constant per cut or per component, and a small RMS,
// mean cost growing no worse than linearly.
#include <benchmark/benchmark.h>

#include <algorithm>
#include <filesystem>
#include <string>
#include <vector>

#include "flowsheet/case.hpp"
#include "flowsheet/component_library.hpp"
#include "flowsheet/diagnostics.hpp"
#include "flowsheet/solver.hpp"
#include "units/block_registry.hpp"
#include "units/column_stages.hpp"

namespace {

using namespace unchain;

// The still's feed as the solved case delivers it, then the block alone,
// its reflux search included.
void still_block_of_case(benchmark::State& state, const std::string& file) {
  const Case c = load_case_file(file, units::builtin_blocks());
  const SolveResult solved = solve(c);
  for (const BlockInstance& block : c.blocks) {
    if (block.type != "batch_distillation") continue;
    const Stream& feed = solved.streams[block.inlets.at("feed").front()];
    std::vector<Stream> cuts(block.outlets.at("cuts").size(), Stream(*c.components));
    Stream residue(*c.components);
    std::vector<Stream*> cut_ports;
    for (Stream& s : cuts) cut_ports.push_back(&s);
    const BlockPorts ports({{"feed", {&feed}}}, {{"cuts", cut_ports}, {"residue", {&residue}}});
    for (auto _ : state) {
      Warnings warnings;
      BlockResources resources;
      const BlockContext context{*c.components, c.basis, block.name, c.ambient_temperature, warnings};
      block.model->compute(context, ports, resources);
      benchmark::DoNotOptimize(resources);
    }
    return;
  }
  state.SkipWithError("the case has no batch still");
}

// An invented crude monomer of up to eight volatile components at 13.3 kPa
// under six stages at R = 4; the first `count` components are charged.
const ComponentSet& aromatics() {
  static const ComponentSet set = [] {
    DiagnosticList diagnostics;
    ComponentSet s = make_component_set(builtin_library(),
                                        {"benzene", "toluene", "ethylbenzene", "styrene", "alpha_methylstyrene",
                                         "acetone", "water", "styrene_dimer"},
                                        {}, diagnostics);
    diagnostics.throw_if_errors();
    return s;
  }();
  return set;
}

Eigen::VectorXd charge_of(std::size_t count) {
  // mol; styrene the bulk, the rest a few per cent each.
  const std::vector<double> moles = {0.3, 0.4, 0.5, 8.0, 0.5, 0.4, 0.2, 0.1};
  Eigen::VectorXd charge = Eigen::VectorXd::Zero(static_cast<Eigen::Index>(aromatics().size()));
  for (std::size_t i = 0; i < count; ++i) charge[static_cast<Eigen::Index>(i)] = moles[i];
  if (count < 4) charge[3] = moles[3];  // always some styrene
  return charge;
}

units::BatchStillSettings settings_for(const ComponentSet& set) {
  units::BatchStillSettings settings;
  settings.stages_above_still = 6;
  settings.reflux_ratio = 4.0;
  settings.steps_per_cut = 50;
  settings.molar_masses = Eigen::VectorXd(static_cast<Eigen::Index>(set.size()));
  for (std::size_t i = 0; i < set.size(); ++i) settings.molar_masses[static_cast<Eigen::Index>(i)] = set[i].molar_mass;
  return settings;
}

// The same 70 % of the charge taken off in 1, 2, 4 or 8 equal cuts: the
// steps (steps_per_cut each) grow with the cuts.
void batch_still_cuts(benchmark::State& state) {
  const auto cut_count = static_cast<int>(state.range(0));
  const units::ModifiedRaoultKValues model(aromatics(), pascal(13300.0));
  const units::BatchStillSettings settings = settings_for(aromatics());
  std::vector<units::CutTarget> cuts;
  for (int c = 1; c <= cut_count; ++c)
    cuts.push_back({"cut_" + std::to_string(c), std::nullopt, 0.7 * c / cut_count});
  const Eigen::VectorXd charge = charge_of(5);
  for (auto _ : state) {
    units::BatchStillResult result = units::run_batch_still(model, charge, settings, cuts);
    benchmark::DoNotOptimize(result);
  }
  state.SetComplexityN(cut_count);
}

// Two cuts of a charge of 2 to 8 components.
void batch_still_components(benchmark::State& state) {
  const auto count = static_cast<std::size_t>(state.range(0));
  const units::ModifiedRaoultKValues model(aromatics(), pascal(13300.0));
  const units::BatchStillSettings settings = settings_for(aromatics());
  const std::vector<units::CutTarget> cuts = {{"fore_cut", std::nullopt, 0.2}, {"main", std::nullopt, 0.7}};
  const Eigen::VectorXd charge = charge_of(count);
  for (auto _ : state) {
    units::BatchStillResult result = units::run_batch_still(model, charge, settings, cuts);
    benchmark::DoNotOptimize(result);
  }
  state.SetComplexityN(static_cast<benchmark::IterationCount>(count));
}

const bool registered = [] {
  std::vector<std::string> files;
  for (const auto& entry : std::filesystem::directory_iterator(std::string(UNCHAIN_SOURCE_DIR) + "/cases"))
    if (entry.path().extension() == ".yaml") files.push_back(entry.path().string());
  std::sort(files.begin(), files.end());
  for (const auto& file : files) {
    const Case c = load_case_file(file, units::builtin_blocks());
    const bool has_still = std::any_of(c.blocks.begin(), c.blocks.end(),
                                       [](const BlockInstance& b) { return b.type == "batch_distillation"; });
    if (!has_still) continue;
    const std::string name = std::filesystem::path(file).stem().string();
    benchmark::RegisterBenchmark(("batch_still/block/" + name).c_str(), still_block_of_case, file)
        ->Unit(benchmark::kMillisecond);
  }
  benchmark::RegisterBenchmark("batch_still/cuts", batch_still_cuts)
      ->RangeMultiplier(2)
      ->Range(1, 8)
      ->Unit(benchmark::kMillisecond)
      ->Complexity(benchmark::oN);
  benchmark::RegisterBenchmark("batch_still/components", batch_still_components)
      ->DenseRange(2, 8, 2)
      ->Unit(benchmark::kMillisecond)
      ->Complexity(benchmark::oN);
  return true;
}();

}  // namespace
