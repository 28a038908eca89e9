// The sequential-modular solver: runs blocks in the order of the block
// graph's strongly connected components and converges each recycle loop on
// its tear streams. Everything a solve changes lives in a SolveState local
// to solve(), so one Case can be solved on many threads at once.
// Equations and criteria: docs/solver.md.

#include "flowsheet/solver.hpp"

#include <algorithm>
#include <cmath>
#include <sstream>

#include "flowsheet/flowsheet_graph.hpp"
#include "flowsheet/wegstein.hpp"

namespace unchain {

namespace {

std::string describe_block(const BlockInstance& block) { return "block '" + block.name + "' (" + block.type + ")"; }

std::string quoted_list(const std::vector<std::string>& names) {
  std::string out;
  for (const auto& n : names) out += (out.empty() ? "'" : ", '") + n + "'";
  return out;
}

// What one block saw and produced in its latest run, for its balance.
struct BlockRun {
  std::vector<Stream> inlets;
  std::vector<Stream> outlets;
  BlockResources resources;
};

// Packing of tear streams into one vector of iteration variables: per
// stream, the component masses of each phase, then temperature and
// pressure.
class TearVariables {
 public:
  TearVariables(std::size_t component_count, std::size_t stream_count)
      : components_(component_count), per_stream_(3 * component_count + 2), size_(per_stream_ * stream_count) {}

  [[nodiscard]] Eigen::Index size() const { return static_cast<Eigen::Index>(size_); }

  [[nodiscard]] Eigen::VectorXd pack(const std::vector<const Stream*>& streams) const {
    Eigen::VectorXd x(size());
    for (std::size_t s = 0; s < streams.size(); ++s) {
      const Eigen::Index base = offset(s);
      Eigen::Index k = base;
      for (Phase phase : all_phases)
        for (Eigen::Index i = 0; i < static_cast<Eigen::Index>(components_); ++i)
          x[k++] = streams[s]->phase_masses(phase)[i];
      x[k++] = in_kelvin(streams[s]->temperature());
      x[k] = to_si(streams[s]->pressure());
    }
    return x;
  }

  void unpack(const Eigen::VectorXd& x, std::size_t s, Stream& stream) const {
    Eigen::Index k = offset(s);
    for (Phase phase : all_phases)
      for (Eigen::Index i = 0; i < static_cast<Eigen::Index>(components_); ++i)
        stream.phase_masses(phase)[i] = x[k++];
    stream.set_temperature(kelvin(x[k++]));
    stream.set_pressure(pascal(x[k]));
  }

  // Residual scale: the magnitude of each variable, floored so that an
  // absent component (0 kg) is judged in absolute terms.
  [[nodiscard]] Eigen::VectorXd scale(const Eigen::VectorXd& x, double mass_floor_kg) const {
    Eigen::VectorXd out(size());
    for (Eigen::Index k = 0; k < size(); ++k)
      out[k] = std::max(std::abs(x[k]), is_mass(k) ? mass_floor_kg : 1.0);  // 1 K, 1 Pa
    return out;
  }

  // Masses stay non-negative; temperature and pressure stay positive.
  [[nodiscard]] Eigen::VectorXd lower_bounds() const {
    Eigen::VectorXd out(size());
    for (Eigen::Index k = 0; k < size(); ++k) out[k] = is_mass(k) ? 0.0 : 1e-3;
    return out;
  }

  [[nodiscard]] std::string describe(Eigen::Index k, const std::vector<std::string>& stream_names,
                                     const ComponentSet& components) const {
    const auto s = static_cast<std::size_t>(k) / per_stream_;
    const auto within = static_cast<std::size_t>(k) % per_stream_;
    const std::string stream = "stream '" + stream_names[s] + "'";
    if (within == 3 * components_) return stream + " temperature";
    if (within == 3 * components_ + 1) return stream + " pressure";
    return stream + " " + phase_name(all_phases[within / components_]) + " " + components[within % components_].id;
  }

 private:
  std::size_t components_;
  std::size_t per_stream_;
  std::size_t size_;

  [[nodiscard]] Eigen::Index offset(std::size_t s) const { return static_cast<Eigen::Index>(s * per_stream_); }
  [[nodiscard]] bool is_mass(Eigen::Index k) const {
    return static_cast<std::size_t>(k) % per_stream_ < 3 * components_;
  }
};

class SolveState {
 public:
  explicit SolveState(const Case& c) : case_(c), runs_(c.blocks.size()) {
    if (!c.components) throw ModelError("the case has no component set");
    streams_.reserve(c.streams.size());
    double feed_kg = 0.0;
    for (const auto& info : c.streams) {
      if (info.initial.has_components()) {
        streams_.push_back(info.initial);
      } else {
        Stream empty(*c.components);
        empty.set_temperature(c.ambient_temperature);
        streams_.push_back(std::move(empty));
      }
      if (info.is_feed) feed_kg += to_si(streams_.back().total_mass());
    }
    // 1e-9 of the throughput, and never below 1e-9 kg: a trace component
    // below this is converged in absolute rather than relative terms.
    mass_floor_kg_ = 1e-9 * std::max(1.0, feed_kg);
  }

  void run_step(const CalculationStep& step, LoopReport* report) {
    if (!step.is_loop()) {
      for (std::size_t b : step.blocks) run_block(b);
      return;
    }
    converge_loop(step, *report);
  }

  SolveResult finish(std::vector<LoopReport> loops, const std::vector<CalculationStep>& steps) {
    SolveResult result;
    result.converged = true;
    result.loops = std::move(loops);
    for (const auto& step : steps)
      for (std::size_t b : step.blocks) result.calculation_order.push_back(case_.blocks[b].name);
    for (const auto& loop : result.loops) {
      result.iterations += loop.iterations;
      result.tear_streams.insert(result.tear_streams.end(), loop.tear_streams.begin(), loop.tear_streams.end());
    }

    double heat_and_work = 0.0;
    result.blocks.reserve(case_.blocks.size());
    for (std::size_t b = 0; b < case_.blocks.size(); ++b) {
      const BlockInstance& block = case_.blocks[b];
      const BlockRun& run = runs_[b];
      BlockResult r{block.name, block.type, run.resources, {}};
      const double q = run.resources.process_heat_J + run.resources.work_to_streams_J;
      heat_and_work += q;
      try {
        r.balance = close_balance(pointers(run.inlets), pointers(run.outlets), q, &warnings_);
      } catch (const ModelError& e) {
        throw ModelError(describe_block(block) + ": " + e.what());
      }
      result.blocks.push_back(std::move(r));
    }

    std::vector<const Stream*> feeds, products;
    for (std::size_t s = 0; s < case_.streams.size(); ++s) {
      if (case_.streams[s].is_feed) feeds.push_back(&streams_[s]);
      if (!case_.streams[s].destination) products.push_back(&streams_[s]);
    }
    result.overall = close_balance(feeds, products, heat_and_work, &warnings_);

    for (const auto& d : case_.warnings) result.warnings.push_back(d.to_string());
    for (auto& w : warnings_.messages()) result.warnings.push_back(std::move(w));
    result.streams = std::move(streams_);
    return result;
  }

 private:
  const Case& case_;
  std::vector<Stream> streams_;
  std::vector<BlockRun> runs_;
  Warnings warnings_;
  double mass_floor_kg_ = 1e-9;

  static std::vector<const Stream*> pointers(const std::vector<Stream>& streams) {
    std::vector<const Stream*> out;
    for (const auto& s : streams) out.push_back(&s);
    return out;
  }

  void run_block(std::size_t b) {
    const BlockInstance& block = case_.blocks[b];
    if (!block.model) throw ModelError(describe_block(block) + ": the block has no model");
    BlockRun run;
    // Copies: the block sees the streams as they are now even when one of
    // its outlets is also its inlet (a self-loop); the copies are kept for
    // the block's balance.
    std::size_t inlet_count = 0, outlet_count = 0;
    for (const auto& [role, list] : block.inlets) inlet_count += list.size();
    for (const auto& [role, list] : block.outlets) outlet_count += list.size();
    run.inlets.reserve(inlet_count);
    run.outlets.reserve(outlet_count);
    std::map<std::string, std::vector<const Stream*>> inlets;
    std::map<std::string, std::vector<Stream*>> outlets;
    std::vector<std::pair<std::string, std::size_t>> outlet_streams;  // role, stream index
    for (const auto& [role, list] : block.inlets)
      for (std::size_t s : list) {
        run.inlets.push_back(streams_[s]);
        inlets[role].push_back(&run.inlets.back());
      }
    for (const auto& [role, list] : block.outlets)
      for (std::size_t s : list) {
        run.outlets.emplace_back(*case_.components);
        outlets[role].push_back(&run.outlets.back());
        outlet_streams.emplace_back(role, s);
      }

    const BlockPorts ports(std::move(inlets), std::move(outlets));
    const BlockContext context{*case_.components, case_.basis, block.name, case_.ambient_temperature, warnings_};
    try {
      block.model->compute(context, ports, run.resources);
    } catch (const ModelError& e) {
      throw ModelError(describe_block(block) + ": " + e.what());
    }
    for (std::size_t k = 0; k < run.outlets.size(); ++k)
      check_outlet(block, outlet_streams[k].first, case_.streams[outlet_streams[k].second].name, run.outlets[k]);
    for (std::size_t k = 0; k < run.outlets.size(); ++k) streams_[outlet_streams[k].second] = run.outlets[k];
    runs_[b] = std::move(run);
  }

  void check_outlet(const BlockInstance& block, const std::string& role, const std::string& name,
                    const Stream& s) {
    // The description is built only for a message: this runs on every
    // outlet of every block run.
    auto where = [&] { return describe_block(block) + ": outlet '" + role + "' (stream '" + name + "')"; };
    if (!s.has_components() || &s.components() != case_.components.get() || s.size() != case_.components->size())
      throw ModelError(where() + " does not use the case's component set");
    for (Phase phase : all_phases) {
      const Eigen::VectorXd& m = s.phase_masses(phase);
      for (Eigen::Index i = 0; i < m.size(); ++i) {
        if (std::isfinite(m[i]) && m[i] >= 0.0) continue;
        const std::string quantity = std::string(phase_name(phase)) + " mass of " +
                                     (*case_.components)[static_cast<std::size_t>(i)].id;
        if (!std::isfinite(m[i])) throw ModelError(where() + " has a non-finite " + quantity);
        warnings_.add(where() + " has a negative " + quantity + " (" + std::to_string(m[i]) + " kg)");
      }
    }
    const double T = in_kelvin(s.temperature());
    if (!std::isfinite(T)) throw ModelError(where() + " has a non-finite temperature");
    if (T <= 0.0)
      throw ModelError(where() + " has a temperature at or below absolute zero (" + std::to_string(T) + " K)");
    const double P = to_si(s.pressure());
    if (!std::isfinite(P)) throw ModelError(where() + " has a non-finite pressure");
    if (P <= 0.0) throw ModelError(where() + " has a pressure at or below zero (" + std::to_string(P) + " Pa)");
  }

  void converge_loop(const CalculationStep& step, LoopReport& report) {
    const SolverSettings& settings = case_.solver;
    for (std::size_t b : step.blocks) report.blocks.push_back(case_.blocks[b].name);
    for (std::size_t s : step.tear_streams) report.tear_streams.push_back(case_.streams[s].name);
    const TearVariables variables(case_.components->size(), step.tear_streams.size());
    auto tear_values = [&] {
      std::vector<const Stream*> tears;
      for (std::size_t s : step.tear_streams) tears.push_back(&streams_[s]);
      return variables.pack(tears);
    };

    WegsteinAccelerator accelerator(settings.wegstein_q_min, settings.wegstein_q_max,
                                    settings.method == ConvergenceMethod::wegstein);
    const Eigen::VectorXd lower = variables.lower_bounds();
    Eigen::VectorXd x = tear_values();  // the initial estimates
    Eigen::Index worst = 0;
    for (int k = 1; k <= settings.max_iterations; ++k) {
      // The tear streams keep whatever else their source set (bulk
      // density); only the iteration variables are replaced.
      for (std::size_t t = 0; t < step.tear_streams.size(); ++t) variables.unpack(x, t, streams_[step.tear_streams[t]]);
      for (std::size_t b : step.blocks) run_block(b);
      const Eigen::VectorXd g = tear_values();
      const Eigen::VectorXd scale = variables.scale(x, mass_floor_kg_);
      const double residual = scaled_residual(x, g, scale);
      ((g - x).cwiseAbs().cwiseQuotient(scale)).maxCoeff(&worst);
      report.residual_history.push_back(residual);
      report.iterations = k;
      if (residual < settings.tolerance) {
        report.converged = true;
        return;
      }
      x = accelerator.next(x, g, scale, lower, residual);
    }
    throw ConvergenceError(failure_message(step, report, accelerator.fell_back(),
                                           variables.describe(worst, report.tear_streams, *case_.components)));
  }

  std::string failure_message(const CalculationStep& step, const LoopReport& report, bool fell_back,
                              const std::string& worst) const {
    const SolverSettings& settings = case_.solver;
    std::ostringstream out;
    out.precision(3);
    out << "recycle loop through blocks " << quoted_list(report.blocks) << " did not converge within "
        << settings.max_iterations << " iterations (tolerance " << settings.tolerance
        << " on the largest scaled change of a tear variable; method "
        << (settings.method == ConvergenceMethod::wegstein ? "wegstein" : "direct_substitution")
        << (fell_back ? ", fell back to direct substitution after the residual grew twice in a row" : "") << ")"
        << "; tear stream" << (step.tear_streams.size() == 1 ? " " : "s ") << quoted_list(report.tear_streams)
        << "; largest change last in " << worst << "; residual history";
    const std::size_t n = report.residual_history.size();
    const std::size_t shown = std::min<std::size_t>(n, 20);
    if (shown < n) out << " (last " << shown << " of " << n << ")";
    out << ":";
    for (std::size_t i = n - shown; i < n; ++i) out << " " << (i + 1) << ": " << report.residual_history[i] << (i + 1 < n ? "," : "");
    out << ". Check the loop for a block that creates material, give initial estimates of the tear streams, or "
           "raise solver.max_iterations";
    return out.str();
  }
};

}  // namespace

SolveResult solve(const Case& c) {
  const std::vector<CalculationStep> steps = plan_calculation(c);
  SolveState state(c);
  std::vector<LoopReport> loops;
  for (const auto& step : steps) {
    if (step.is_loop()) {
      loops.emplace_back();
      state.run_step(step, &loops.back());
    } else {
      state.run_step(step, nullptr);
    }
  }
  return state.finish(std::move(loops), steps);
}

}  // namespace unchain
