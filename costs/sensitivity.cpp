#include "costs/sensitivity.hpp"

#include <algorithm>
#include <atomic>
#include <cmath>
#include <exception>
#include <set>
#include <thread>

namespace unchain::costs {

namespace {

std::optional<std::string> scalar_text(MappingReader& m, std::string_view key) {
  const YAML::Node node = m.raw(key);
  if (!node.IsDefined() || node.IsNull()) {
    m.error({}, "missing required key '" + m.path() + "." + std::string(key) + "' (expected a value such as "
                "\"0.15 USD/kWh\" or 0.5)");
    return std::nullopt;
  }
  if (!node.IsScalar()) {
    m.error(key, "'" + m.path() + "." + std::string(key) + "': expected a value such as \"0.15 USD/kWh\" or 0.5");
    return std::nullopt;
  }
  return node.Scalar();
}

}  // namespace

const std::vector<std::string>& tornado_outputs() {
  static const std::vector<std::string> keys{"net_cost_per_kg_monomer", "npv"};
  return keys;
}

std::vector<SensitivityParameter> read_sensitivity_parameters(const PreparedCase& prepared) {
  const YAML::Node& doc = prepared.document();
  const std::string& file = prepared.path();
  if (!doc.IsMap() || !doc["sensitivity"] || doc["sensitivity"].IsNull())
    throw InputError(SourceLocation{file, 0, 0},
                     "the case has no 'sensitivity' section (expected sensitivity: {parameters: [{path, low, high, "
                     "label}]}; see docs/uncertainty.md)");
  DiagnosticList diagnostics;
  MappingReader m(doc["sensitivity"], file, "sensitivity", diagnostics);
  if (!m.is_valid()) diagnostics.throw_if_errors();
  std::vector<SensitivityParameter> out;
  const YAML::Node list = m.raw("parameters");
  if (!list.IsDefined() || list.IsNull()) {
    m.error({}, "missing required key 'sensitivity.parameters' (expected a list of {path, low, high})");
  } else if (!list.IsSequence() || list.size() == 0) {
    diagnostics.error(location_of(list, file), "'sensitivity.parameters' must be a non-empty list of {path, low, high}");
  } else {
    std::set<std::string> paths;
    std::size_t index = 0;
    for (const auto& item : list) {
      MappingReader p(item, file, "sensitivity.parameters[" + std::to_string(index++) + "]", diagnostics);
      if (!p.is_valid()) continue;
      SensitivityParameter s;
      s.where = p.location();
      s.path = p.text("path");
      s.label = p.text("label", s.path);
      bool ok = !s.path.empty();
      if (ok) {
        if (auto missing = missing_case_path(doc, file, s.path)) {
          p.error("path", "'" + p.path() + ".path': " + *missing);
          ok = false;
        } else if (!paths.insert(s.path).second) {
          p.error("path", "'" + p.path() + ".path': '" + s.path + "' is listed twice (expected each path once)");
          ok = false;
        }
      }
      const auto low = scalar_text(p, "low");
      const auto high = scalar_text(p, "high");
      if (low && high) {
        try {
          parse_study_reference(*low);
          try {
            (void)parse_study_value(*high, *low, false);
          } catch (const UnitError& e) {
            p.error("high", "'" + p.path() + ".high': " + e.what());
            ok = false;
          }
        } catch (const UnitError& e) {
          p.error("low", "'" + p.path() + ".low': " + e.what());
          ok = false;
        }
        s.low = *low;
        s.high = *high;
      } else {
        ok = false;
      }
      p.finish();
      if (ok) out.push_back(std::move(s));
    }
  }
  m.finish();
  diagnostics.throw_if_errors();
  return out;
}

SensitivityResult run_sensitivity(const PreparedCase& prepared, const std::vector<SensitivityParameter>& parameters,
                                  unsigned threads) {
  SensitivityResult r;
  r.parameters = parameters;
  r.base = prepared.evaluate();
  const std::size_t n = parameters.size();
  r.low.resize(n);
  r.high.resize(n);

  // 2n independent evaluations; the first error (in parameter order) wins.
  std::vector<std::exception_ptr> errors(2 * n);
  std::atomic<std::size_t> next{0};
  auto work = [&] {
    for (;;) {
      const std::size_t job = next.fetch_add(1);
      if (job >= 2 * n) return;
      const auto& p = parameters[job / 2];
      const bool high = job % 2 == 1;
      try {
        (high ? r.high : r.low)[job / 2] = prepared.evaluate({{p.path, high ? p.high : p.low}});
      } catch (...) {
        errors[job] = std::current_exception();
      }
    }
  };
  if (threads == 0) threads = std::max(1u, std::thread::hardware_concurrency());
  threads = static_cast<unsigned>(std::clamp<std::size_t>(threads, 1, std::max<std::size_t>(1, 2 * n)));
  {
    std::vector<std::jthread> pool;
    for (unsigned t = 1; t < threads; ++t) pool.emplace_back(work);
    work();
  }
  for (std::size_t job = 0; job < 2 * n; ++job) {
    if (!errors[job]) continue;
    const auto& p = parameters[job / 2];
    const std::string what = "sensitivity of '" + p.path + "' at its " + (job % 2 ? "high" : "low") + " value '" +
                             (job % 2 ? p.high : p.low) + "': ";
    try {
      std::rethrow_exception(errors[job]);
    } catch (const InputError& e) {
      std::vector<Diagnostic> d = e.diagnostics();
      for (auto& item : d) item.message = what + item.message;
      throw InputError(std::move(d));
    } catch (const ConvergenceError& e) {
      throw ConvergenceError(what + e.what());
    } catch (const ModelError& e) {
      throw ModelError(what + e.what());
    }
  }

  for (const auto& key : tornado_outputs()) {
    const KeyFigure* base = r.base.find(key);
    if (!base) continue;
    Tornado t;
    t.key = key;
    t.label = base->label;
    t.unit = base->unit;
    t.base = base->value;
    bool any = t.base.has_value();
    for (std::size_t i = 0; i < n; ++i) {
      TornadoBar bar;
      bar.parameter = i;
      bar.low_output = r.low[i].value(key);
      bar.high_output = r.high[i].value(key);
      if (bar.low_output && bar.high_output) bar.swing = std::abs(*bar.high_output - *bar.low_output);
      any = any || bar.low_output || bar.high_output;
      t.bars.push_back(bar);
    }
    if (!any) continue;  // no NPV in this case: no NPV tornado
    std::stable_sort(t.bars.begin(), t.bars.end(),
                     [](const TornadoBar& a, const TornadoBar& b) { return a.swing > b.swing; });
    r.tornadoes.push_back(std::move(t));
  }
  return r;
}

}  // namespace unchain::costs
