#pragma once
// Test-only blocks and components for the case loader, solver and balance
// tests. The real unit operations live in units/ and are tested there;
// these blocks are deliberately simple so that every result can be solved
// by hand. The component data below are invented for tests (round numbers
// near those of methane, styrene and nitrogen) and must not be used for
// anything else.

#include <algorithm>
#include <cmath>
#include <map>
#include <memory>
#include <string>
#include <utility>
#include <vector>

#include "flowsheet/case.hpp"
#include "flowsheet/yaml_reader.hpp"

namespace unchain::testing {

// Three permanent gases, so that the enthalpy of every phase is the
// ideal-gas enthalpy (no latent heat) and needs only cp and dHf.
inline const char* test_components_yaml() {
  return R"yaml(components: [test_light, test_heavy, test_inert]
component_data:
  - id: test_light
    kind: gas
    formula: {C: 1, H: 4}
    enthalpy_of_formation_ideal_gas: {value: "-74.6 kJ/mol", source: "invented for tests"}
    ideal_gas_heat_capacity: {equation: polynomial, unit: "J/(mol K)", coefficients: [35.0],
                              range: ["200 K", "1500 K"], source: "invented for tests"}
  - id: test_heavy
    kind: gas
    formula: {C: 8, H: 8}
    enthalpy_of_formation_ideal_gas: {value: "147.4 kJ/mol", source: "invented for tests"}
    ideal_gas_heat_capacity: {equation: polynomial, unit: "J/(mol K)", coefficients: [120.0],
                              range: ["200 K", "1500 K"], source: "invented for tests"}
  - id: test_inert
    kind: gas
    formula: {N: 2}
    enthalpy_of_formation_ideal_gas: {value: "0 kJ/mol", source: "invented for tests"}
    ideal_gas_heat_capacity: {equation: polynomial, unit: "J/(mol K)", coefficients: [29.1],
                              range: ["200 K", "1500 K"], source: "invented for tests"}
)yaml";
}

inline double enthalpy_J(const Stream& s) { return to_si(s.enthalpy()); }

// Sums its inlets. The outlet is at `temperature` when given, else at the
// mass-weighted mean inlet temperature; the heat that takes is reported as
// process heat, so the block's energy balance closes by construction.
class TestMixer final : public BlockModel {
 public:
  explicit TestMixer(std::optional<Temperature> temperature) : temperature_(temperature) {}
  std::vector<PortSpec> inlet_ports() const override { return {{"feeds", true, true, "streams to mix"}}; }
  std::vector<PortSpec> outlet_ports() const override { return {{"product", true, false, "mixed stream"}}; }
  void compute(const BlockContext&, const BlockPorts& ports, BlockResources& resources) const override {
    Stream& out = ports.outlet("product");
    double mass = 0.0, mass_T = 0.0, h_in = 0.0;
    double pressure = ports.inlet("feeds").pressure().value();
    for (const Stream* in : ports.inlets("feeds")) {
      out.add_contents(*in);
      mass += in->total_mass().value();
      mass_T += in->total_mass().value() * in_kelvin(in->temperature());
      h_in += enthalpy_J(*in);
      pressure = std::min(pressure, in->pressure().value());
    }
    const double T = temperature_ ? in_kelvin(*temperature_)
                                  : (mass > 0.0 ? mass_T / mass : in_kelvin(ports.inlet("feeds").temperature()));
    out.set_temperature(kelvin(T));
    out.set_pressure(pascal(pressure));
    resources.process_heat_J = enthalpy_J(out) - h_in;
  }

 private:
  std::optional<Temperature> temperature_;
};

// Divides its feed: `fraction_to_first` of every component goes to `first`.
class TestSplitter final : public BlockModel {
 public:
  explicit TestSplitter(double fraction) : fraction_(fraction) {}
  std::vector<PortSpec> inlet_ports() const override { return {{"feed", true, false, "stream to divide"}}; }
  std::vector<PortSpec> outlet_ports() const override {
    return {{"first", true, false, "the fraction"}, {"second", true, false, "the rest"}};
  }
  void compute(const BlockContext&, const BlockPorts& ports, BlockResources&) const override {
    const Stream& in = ports.inlet("feed");
    ports.outlet("first") = in.scaled(fraction_);
    ports.outlet("second") = in.scaled(1.0 - fraction_);
  }

 private:
  double fraction_;
};

// Sends a fixed fraction (recovery) of each component to `top`, the rest to
// `bottom`, phases kept, temperature and pressure unchanged.
class TestSeparator final : public BlockModel {
 public:
  explicit TestSeparator(std::vector<double> recovery) : recovery_(std::move(recovery)) {}
  std::vector<PortSpec> inlet_ports() const override { return {{"feed", true, false, "stream to separate"}}; }
  std::vector<PortSpec> outlet_ports() const override {
    return {{"top", true, false, "recovered part"}, {"bottom", true, false, "the rest"}};
  }
  void compute(const BlockContext&, const BlockPorts& ports, BlockResources&) const override {
    const Stream& in = ports.inlet("feed");
    Stream& top = ports.outlet("top");
    Stream& bottom = ports.outlet("bottom");
    top = in;
    bottom = in;
    for (Phase phase : all_phases)
      for (std::size_t i = 0; i < recovery_.size(); ++i) {
        const double m = in.mass(phase, i).value();
        top.set_mass(phase, i, kilograms(recovery_[i] * m));
        bottom.set_mass(phase, i, kilograms(m - recovery_[i] * m));
      }
  }

 private:
  std::vector<double> recovery_;
};

// An amplifier: loop = feed + gain * returned. With gain > 1 a loop
// through it has no non-negative fixed point, so it cannot converge.
class TestDiverging final : public BlockModel {
 public:
  explicit TestDiverging(double gain) : gain_(gain) {}
  std::vector<PortSpec> inlet_ports() const override {
    return {{"feed", true, false, "fresh material"}, {"returned", true, false, "material coming back"}};
  }
  std::vector<PortSpec> outlet_ports() const override { return {{"loop", true, false, "amplified stream"}}; }
  void compute(const BlockContext&, const BlockPorts& ports, BlockResources&) const override {
    Stream& out = ports.outlet("loop");
    out = ports.inlet("feed");
    out.add_contents(ports.inlet("returned").scaled(gain_));
  }

 private:
  double gain_;
};

// A block with a deliberate fault, for the solver's error handling and the
// balance checks: refuse (throws ModelError), nan_temperature, or
// swap_components (moves all of `from` into `to`, mass for mass, which
// keeps the mass balance and breaks the element balance).
class TestFaulty final : public BlockModel {
 public:
  TestFaulty(std::string fault, std::size_t from, std::size_t to) : fault_(std::move(fault)), from_(from), to_(to) {}
  std::vector<PortSpec> inlet_ports() const override { return {{"feed", true, false, "any stream"}}; }
  std::vector<PortSpec> outlet_ports() const override { return {{"product", true, false, "the faulty result"}}; }
  void compute(const BlockContext&, const BlockPorts& ports, BlockResources&) const override {
    const Stream& in = ports.inlet("feed");
    Stream& out = ports.outlet("product");
    out = in;
    if (fault_ == "refuse") throw ModelError("refuses to run (test fault)");
    if (fault_ == "nan_temperature") out.set_temperature(kelvin(std::nan("")));
    if (fault_ == "swap_components") {
      for (Phase phase : all_phases) {
        out.add_mass(phase, to_, in.mass(phase, from_));
        out.set_mass(phase, from_, kilograms(0.0));
      }
    }
  }

 private:
  std::string fault_;
  std::size_t from_, to_;
};

class TestCatalogue final : public BlockCatalogue {
 public:
  std::vector<std::string> type_names() const override {
    return {"test_diverging", "test_faulty", "test_mixer", "test_separator", "test_splitter_fraction"};
  }

  std::unique_ptr<BlockModel> create(const std::string& type, MappingReader& p,
                                     const BlockSetup& setup) const override {
    std::unique_ptr<BlockModel> model;
    if (type == "test_mixer") {
      model = std::make_unique<TestMixer>(p.optional_quantity<Temperature>("temperature"));
    } else if (type == "test_splitter_fraction") {
      model = std::make_unique<TestSplitter>(p.number_in("fraction_to_first", 0.5, 0.0, 1.0));
    } else if (type == "test_separator") {
      std::vector<double> recovery(setup.components.size(), 0.0);
      if (auto r = p.optional_mapping("recovery_to_top")) {
        for (const auto& item : r->node()) {
          const std::string id = item.first.Scalar();
          const double value = r->number_in(id, 0.0, 0.0, 1.0);
          if (auto i = setup.components.index_of(id)) recovery[*i] = value;
          else r->error(id, "'" + r->path() + "." + id + "': unknown component '" + id + "'");
        }
        r->finish();
      }
      model = std::make_unique<TestSeparator>(recovery);
    } else if (type == "test_diverging") {
      model = std::make_unique<TestDiverging>(p.number("gain", 2.0));
    } else if (type == "test_faulty") {
      const std::string fault = p.text("fault");
      const std::string from = p.text("from", "test_light");
      const std::string to = p.text("to", "test_heavy");
      model = std::make_unique<TestFaulty>(fault, setup.components.index_of(from).value_or(0),
                                           setup.components.index_of(to).value_or(0));
    } else {
      return nullptr;
    }
    p.finish();
    return model;
  }
};

inline const TestCatalogue& test_catalogue() {
  static const TestCatalogue catalogue;
  return catalogue;
}

// No built-in data: the test cases define their own components.
inline const ComponentLibrary& empty_library() {
  static const ComponentLibrary library;
  return library;
}

inline Case load_test_case(const std::string& text, const std::vector<Override>& overrides = {}) {
  YamlDocument document = parse_yaml_text(text, "test.yaml");
  apply_overrides(document.root, overrides);
  return load_case(document, test_catalogue(), empty_library());
}

// 1-based line and column of the first occurrence of `needle` in `text`,
// for asserting where an error points.
inline std::pair<int, int> position_of(const std::string& text, const std::string& needle) {
  const std::size_t at = text.find(needle);
  if (at == std::string::npos) return {0, 0};
  const int line = 1 + static_cast<int>(std::count(text.begin(), text.begin() + static_cast<std::ptrdiff_t>(at), '\n'));
  const std::size_t line_start = text.rfind('\n', at);
  const int column = static_cast<int>(at - (line_start == std::string::npos ? 0 : line_start + 1)) + 1;
  return {line, column};
}

// The text of an InputError's diagnostics, one per line.
template <class F>
std::vector<Diagnostic> input_errors_of(F&& f) {
  try {
    f();
  } catch (const InputError& e) {
    return e.diagnostics();
  }
  return {};
}

inline bool mentions(const std::vector<Diagnostic>& diagnostics, const std::string& text) {
  return std::any_of(diagnostics.begin(), diagnostics.end(),
                     [&](const Diagnostic& d) { return d.message.find(text) != std::string::npos; });
}

inline const Diagnostic* find_diagnostic(const std::vector<Diagnostic>& diagnostics, const std::string& text) {
  for (const auto& d : diagnostics)
    if (d.message.find(text) != std::string::npos) return &d;
  return nullptr;
}

}  // namespace unchain::testing
