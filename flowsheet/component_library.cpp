#include "flowsheet/component_library.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "flowsheet/elements.hpp"
#include "flowsheet/pure_properties.hpp"
#include "flowsheet/yaml_reader.hpp"

namespace unchain {

namespace embedded {
std::string_view components_yaml();
std::string_view binary_pairs_yaml();
}  // namespace embedded

namespace {

const std::vector<std::string>& kind_names() {
  static const std::vector<std::string> names{"volatile", "gas", "polymer", "solid"};
  return names;
}

std::optional<ComponentKind> parse_kind(const std::string& text) {
  if (text == "volatile") return ComponentKind::volatile_liquid;
  if (text == "gas") return ComponentKind::gas;
  if (text == "polymer") return ComponentKind::polymer;
  if (text == "solid") return ComponentKind::solid;
  return std::nullopt;
}

// {value: "418.3 K", source: "..."} read as Q and stored in SI.
template <class Q>
std::optional<SourcedValue> sourced(MappingReader& parent, std::string_view key) {
  auto m = parent.optional_mapping(key);
  if (!m) return std::nullopt;
  SourcedValue out;
  if constexpr (std::is_same_v<Q, double>) {
    out.value = m->number("value");
  } else {
    out.value = to_si(m->quantity<Q>("value"));
  }
  out.source = m->text("source");
  m->finish();
  return out;
}

std::optional<TemperatureRange> read_range(MappingReader& m, std::string_view key) {
  YAML::Node n = m.raw(key);
  if (!n.IsDefined()) {
    m.error({}, "missing required key '" + m.path() + "." + std::string(key) + "' (expected [low, high] temperatures)");
    return std::nullopt;
  }
  if (!n.IsSequence() || n.size() != 2) {
    m.diagnostics().error(location_of(n, m.file()), "'" + m.path() + "." + std::string(key) +
                                                        "' must be a list of two temperatures [low, high]");
    return std::nullopt;
  }
  auto low = read_quantity_node<Temperature>(n[0], m.file(), m.path() + "." + std::string(key), m.diagnostics());
  auto high = read_quantity_node<Temperature>(n[1], m.file(), m.path() + "." + std::string(key), m.diagnostics());
  if (!low || !high) return std::nullopt;
  if (in_kelvin(*high) <= in_kelvin(*low)) {
    m.diagnostics().error(location_of(n, m.file()), "'" + m.path() + "." + std::string(key) +
                                                        "': the upper limit must exceed the lower limit");
    return std::nullopt;
  }
  return TemperatureRange{in_kelvin(*low), in_kelvin(*high)};
}

std::optional<AntoineCorrelation> read_antoine(MappingReader& parent, std::string_view key) {
  auto m = parent.optional_mapping(key);
  if (!m) return std::nullopt;
  AntoineCorrelation out;
  const std::string equation = m->text("equation");
  if (!equation.empty() && equation != "antoine")
    m->error("equation", "'" + m->path() + ".equation': unknown vapour-pressure equation (expected antoine, found " +
                             equation + ")");
  const std::string pressure_unit = m->text("pressure_unit", "mmHg");
  try {
    out.pressure_unit_Pa = to_si(parse_as<Pressure>("1 " + pressure_unit));
  } catch (const UnitError& e) {
    m->error("pressure_unit", "'" + m->path() + ".pressure_unit': " + e.what());
  }
  const std::string temperature_unit = m->text("temperature_unit", "degC");
  if (temperature_unit == "degC") out.temperature_in_celsius = true;
  else if (temperature_unit == "K") out.temperature_in_celsius = false;
  else
    m->error("temperature_unit", "'" + m->path() + ".temperature_unit' must be degC or K (found " + temperature_unit + ")");
  out.A = m->number("A");
  out.B = m->number("B");
  out.C = m->number("C");
  if (auto r = read_range(*m, "range")) out.range = *r;
  out.source = m->text("source");
  m->finish();
  return out;
}

std::optional<HeatCapacityPolynomial> read_polynomial(MappingReader& parent, std::string_view key, double molar_mass) {
  auto m = parent.optional_mapping(key);
  if (!m) return std::nullopt;
  HeatCapacityPolynomial out;
  const std::string equation = m->text("equation");
  if (!equation.empty() && equation != "polynomial")
    m->error("equation", "'" + m->path() + ".equation': unknown heat-capacity equation (expected polynomial, found " +
                             equation + ")");
  const std::string unit = m->text("unit");
  double factor = 1.0;
  if (unit == "R") {
    factor = gas_constant_J_per_mol_K;
  } else if (!unit.empty()) {
    try {
      const ParsedQuantity p = parse_quantity("1 " + unit);
      if (p.dimension == dimension_of<MolarHeatCapacity>()) factor = p.si_value();
      else if (p.dimension == dimension_of<SpecificHeatCapacity>()) factor = p.si_value() * molar_mass;
      else
        m->error("unit", "'" + m->path() + ".unit': expected a heat capacity per mol or per kg, or R (found " +
                             p.dimension.describe() + ")");
    } catch (const UnitError& e) {
      m->error("unit", "'" + m->path() + ".unit': " + e.what());
    }
  }
  YAML::Node list = m->raw("coefficients");
  if (!list.IsSequence() || list.size() == 0) {
    m->error({}, "'" + m->path() + ".coefficients' must be a non-empty list of numbers");
  } else {
    for (const auto& c : list) {
      try {
        out.coefficients.push_back(c.as<double>() * factor);
      } catch (const YAML::Exception&) {
        m->diagnostics().error(location_of(c, m->file()), "'" + m->path() + ".coefficients': expected a number");
      }
    }
  }
  if (auto r = read_range(*m, "range")) out.range = *r;
  out.source = m->text("source");
  m->finish();
  return out;
}

std::optional<HansenParameters> read_hansen(MappingReader& parent) {
  auto m = parent.optional_mapping("hansen");
  if (!m) return std::nullopt;
  HansenParameters out;
  out.dispersion = to_si(m->quantity<SqrtPressure>("dispersion"));
  out.polar = to_si(m->quantity<SqrtPressure>("polar"));
  out.hydrogen_bonding = to_si(m->quantity<SqrtPressure>("hydrogen_bonding"));
  if (auto r = m->optional_quantity<SqrtPressure>("interaction_radius")) out.interaction_radius = to_si(*r);
  out.source = m->text("source");
  m->finish();
  return out;
}

Component read_component(MappingReader& m) {
  Component c;
  c.id = m.text("id");
  c.name = m.text("name", c.id);
  c.cas = m.text("cas", "");
  const std::string kind = m.text("kind");
  if (auto k = parse_kind(kind)) {
    c.kind = *k;
  } else if (!kind.empty()) {
    const std::string suggestion = closest_match(kind, kind_names());
    m.error("kind", "'" + m.path() + ".kind': unknown kind '" + kind + "' (expected volatile, gas, polymer or solid" +
                        (suggestion.empty() ? "" : "; did you mean '" + suggestion + "'?") + ")");
  }
  if (auto f = m.optional_mapping("formula")) {
    for (const auto& item : f->node()) {
      const std::string symbol = item.first.Scalar();
      f->accept(symbol);
      double count = 0.0;
      try {
        count = item.second.as<double>();
      } catch (const YAML::Exception&) {
        m.diagnostics().error(location_of(item.second, m.file()),
                              "'" + f->path() + "." + symbol + "': expected an element count");
        continue;
      }
      if (!standard_atomic_weight(symbol)) {
        m.diagnostics().error(location_of(item.first, m.file()), "'" + f->path() + "': unknown element '" + symbol + "'");
        continue;
      }
      if (!(count > 0.0) || !std::isfinite(count)) {
        m.diagnostics().error(location_of(item.second, m.file()),
                              "'" + f->path() + "." + symbol + "': element count must be positive");
        continue;
      }
      c.formula[symbol] = count;
    }
  } else {
    m.error({}, "missing required key '" + m.path() + ".formula'");
  }
  if (!c.formula.empty()) c.molar_mass = molar_mass_of(c.formula);

  c.normal_boiling_point = sourced<Temperature>(m, "normal_boiling_point");
  c.critical_temperature = sourced<Temperature>(m, "critical_temperature");
  c.critical_pressure = sourced<Pressure>(m, "critical_pressure");
  c.acentric_factor = sourced<double>(m, "acentric_factor");
  c.vapour_pressure = read_antoine(m, "vapour_pressure");
  c.liquid_heat_capacity = read_polynomial(m, "liquid_heat_capacity", c.molar_mass);
  c.ideal_gas_heat_capacity = read_polynomial(m, "ideal_gas_heat_capacity", c.molar_mass);
  c.solid_heat_capacity = read_polynomial(m, "solid_heat_capacity", c.molar_mass);

  auto hf_gas = sourced<MolarEnergy>(m, "enthalpy_of_formation_ideal_gas");
  auto hf_solid = sourced<MolarEnergy>(m, "enthalpy_of_formation_solid");
  if (hf_gas) c.enthalpy_of_formation = *hf_gas;
  if (hf_solid) c.enthalpy_of_formation = *hf_solid;
  c.enthalpy_of_vaporization_at_nbp = sourced<MolarEnergy>(m, "enthalpy_of_vaporization_at_normal_boiling_point");
  c.watson_exponent = m.number_in("watson_exponent", 0.38, 0.1, 1.0);

  if (auto d = m.optional_mapping("liquid_density")) {
    LiquidDensity ld;
    ld.reference_density = to_si(d->quantity<Density>("value"));
    ld.reference_temperature_K = in_kelvin(d->quantity<Temperature>("temperature", kelvin(293.15)));
    ld.expansion_coefficient = to_si(d->quantity<ExpansionCoefficient>("expansion_coefficient",
                                                                         from_si<ExpansionCoefficient>(0.0)));
    ld.source = d->text("source");
    d->finish();
    c.liquid_density = ld;
  }
  c.solid_density = sourced<Density>(m, "solid_density");
  if (auto fp = m.optional_mapping("flash_point")) {
    SourcedValue v;
    v.value = in_kelvin(fp->quantity<Temperature>("value"));
    const std::string method = fp->text("method", "");
    v.source = fp->text("source") + (method.empty() ? "" : " [" + method + "]");
    fp->finish();
    c.flash_point = v;
  }
  if (auto fl = m.optional_mapping("flammability_limits")) {
    FlammabilityLimits limits;
    limits.lower = fl->number_in("lower", 0.0, 1e-6, 1.0);
    limits.upper = fl->number_in("upper", 0.0, 1e-6, 1.0);
    limits.source = fl->text("source");
    if (limits.upper <= limits.lower) fl->error("upper", "'" + fl->path() + "': upper limit must exceed lower limit");
    fl->finish();
    c.flammability_limits = limits;
  }
  if (auto ws = m.optional_mapping("water_solubility")) {
    WaterSolubility s;
    s.mass_fraction = ws->number_in("mass_fraction", 0.0, 0.0, 1.0);
    s.temperature_K = in_kelvin(ws->quantity<Temperature>("temperature", kelvin(298.15)));
    s.source = ws->text("source");
    ws->finish();
    c.water_solubility = s;
  }
  c.hansen = read_hansen(m);

  const bool is_polymer = c.kind == ComponentKind::polymer;
  if (is_polymer) {
    PolymerData p;
    p.monomer = m.text("monomer");
    if (auto hp = m.optional_mapping("heat_of_polymerization")) {
      p.heat_of_polymerization.value = to_si(hp->quantity<MolarEnergy>("value"));
      p.heat_of_polymerization.source = hp->text("source");
      // Descriptive keys: the states and temperature the value refers to.
      const std::string states = hp->text("states", "");
      hp->accept("temperature");
      if (!states.empty()) p.heat_of_polymerization.source += " [" + states + "]";
      hp->finish();
    } else {
      m.error({}, "polymer '" + c.id + "' needs heat_of_polymerization");
    }
    p.glass_transition_temperature = sourced<Temperature>(m, "glass_transition_temperature");
    p.ceiling_temperature = sourced<Temperature>(m, "ceiling_temperature");
    p.melt_heat_capacity = read_polynomial(m, "melt_heat_capacity", c.molar_mass);
    c.polymer = p;
  }
  m.finish();
  return c;
}

}  // namespace

const Component* ComponentLibrary::find(std::string_view id) const {
  for (const auto& c : components_)
    if (c.id == id) return &c;
  return nullptr;
}

std::vector<std::string> ComponentLibrary::ids() const {
  std::vector<std::string> out;
  for (const auto& c : components_) out.push_back(c.id);
  return out;
}

const NrtlPair* ComponentLibrary::find_nrtl(std::string_view a, std::string_view b) const {
  for (const auto& p : nrtl_)
    if ((p.first == a && p.second == b) || (p.first == b && p.second == a)) return &p;
  return nullptr;
}

const FloryHugginsPair* ComponentLibrary::find_flory_huggins(std::string_view polymer, std::string_view solvent) const {
  for (const auto& p : flory_huggins_)
    if (p.polymer == polymer && p.solvent == solvent) return &p;
  return nullptr;
}

void ComponentLibrary::load_components(const YAML::Node& list, const std::string& file, DiagnosticList& diagnostics) {
  if (!list.IsSequence()) {
    diagnostics.error(location_of(list, file), "'components' must be a list of component definitions");
    return;
  }
  std::size_t index = 0;
  for (const auto& item : list) {
    MappingReader m(item, file, "components[" + std::to_string(index++) + "]", diagnostics);
    if (!m.is_valid()) continue;
    Component c = read_component(m);
    if (c.id.empty()) continue;
    auto existing = std::find_if(components_.begin(), components_.end(), [&](const Component& e) { return e.id == c.id; });
    if (existing != components_.end()) *existing = std::move(c);
    else components_.push_back(std::move(c));
  }
  derive_polymer_formation_enthalpies(file, diagnostics);
}

void ComponentLibrary::derive_polymer_formation_enthalpies(const std::string& file, DiagnosticList& diagnostics) {
  for (auto& c : components_) {
    if (!c.polymer) continue;
    const Component* monomer = find(c.polymer->monomer);
    if (monomer == nullptr) {
      diagnostics.error({file, 0, 0}, "polymer '" + c.id + "': monomer '" + c.polymer->monomer + "' is not defined");
      continue;
    }
    // dHf(polymer, condensed) = dHf(monomer, ideal gas) - dHv(monomer, 298.15 K)
    //                           + dH_polymerization(liquid monomer -> polymer)
    try {
      const double latent = to_si(enthalpy_of_vaporization(*monomer, kelvin(reference_temperature_K)));
      c.enthalpy_of_formation.value =
          monomer->enthalpy_of_formation.value - latent + c.polymer->heat_of_polymerization.value;
      c.enthalpy_of_formation.source = "derived: formation enthalpy of " + monomer->id +
                                       " (ideal gas) less its vaporization enthalpy at 298.15 K (Watson), plus the "
                                       "heat of polymerization (" + c.polymer->heat_of_polymerization.source + ")";
    } catch (const ModelError& e) {
      diagnostics.error({file, 0, 0}, "polymer '" + c.id + "': " + e.what());
    }
  }
}

void ComponentLibrary::load_binary_pairs(const YAML::Node& root, const std::string& file, DiagnosticList& diagnostics) {
  MappingReader top(root, file, "", diagnostics);
  if (!top.is_valid()) return;
  YAML::Node models = top.raw("activity_models");
  if (models.IsDefined() && models.IsSequence()) {
    std::size_t index = 0;
    for (const auto& item : models) {
      MappingReader m(item, file, "activity_models[" + std::to_string(index++) + "]", diagnostics);
      if (!m.is_valid()) continue;
      const std::string model = m.text("model");
      if (model != "nrtl") {
        m.error("model", "'" + m.path() + ".model': unknown activity model (expected nrtl, found " + model + ")");
        m.finish();
        continue;
      }
      NrtlPair p;
      YAML::Node comps = m.raw("components");
      YAML::Node a = m.raw("a");
      YAML::Node b = m.raw("b");
      if (!comps.IsSequence() || comps.size() != 2 || !a.IsSequence() || a.size() != 2 || !b.IsSequence() ||
          b.size() != 2) {
        m.error({}, "'" + m.path() + "': nrtl needs components [i, j] and 2x2 matrices a and b");
        m.finish();
        continue;
      }
      p.first = comps[0].Scalar();
      p.second = comps[1].Scalar();
      try {
        p.a12 = a[0][1].as<double>();
        p.a21 = a[1][0].as<double>();
      } catch (const YAML::Exception&) {
        m.error("a", "'" + m.path() + ".a': expected numbers");
      }
      auto read_b = [&](const YAML::Node& n) -> double {
        if (n.IsScalar() && n.Scalar() == "0") return 0.0;
        auto q = read_quantity_node<TemperatureDifference>(n, file, m.path() + ".b", diagnostics);
        return q ? to_si(*q) : 0.0;
      };
      p.b12 = read_b(b[0][1]);
      p.b21 = read_b(b[1][0]);
      p.alpha = m.number_in("alpha", 0.3, 0.05, 1.0);
      if (auto r = read_range(m, "range")) p.range = *r;
      p.source = m.text("source");
      m.finish();
      nrtl_.push_back(std::move(p));
    }
  } else if (models.IsDefined()) {
    top.error("activity_models", "'activity_models' must be a list");
  }
  YAML::Node fh = top.raw("flory_huggins");
  if (fh.IsDefined() && fh.IsSequence()) {
    std::size_t index = 0;
    for (const auto& item : fh) {
      MappingReader m(item, file, "flory_huggins[" + std::to_string(index++) + "]", diagnostics);
      if (!m.is_valid()) continue;
      FloryHugginsPair p;
      p.polymer = m.text("polymer");
      p.solvent = m.text("solvent");
      p.chi = m.number_in("chi", 0.5, -5.0, 10.0);
      p.temperature_K = in_kelvin(m.quantity<Temperature>("temperature", kelvin(298.15)));
      p.source = m.text("source");
      m.finish();
      auto existing = std::find_if(flory_huggins_.begin(), flory_huggins_.end(), [&](const FloryHugginsPair& e) {
        return e.polymer == p.polymer && e.solvent == p.solvent;
      });
      if (existing != flory_huggins_.end()) *existing = std::move(p);
      else flory_huggins_.push_back(std::move(p));
    }
  } else if (fh.IsDefined()) {
    top.error("flory_huggins", "'flory_huggins' must be a list");
  }
  top.finish();
}

const ComponentLibrary& builtin_library() {
  static const ComponentLibrary library = [] {
    ComponentLibrary lib;
    DiagnosticList diagnostics;
    const YamlDocument components = parse_yaml_text(embedded::components_yaml(), "data/components.yaml");
    lib.load_components(components.root["components"], components.file, diagnostics);
    const YamlDocument pairs = parse_yaml_text(embedded::binary_pairs_yaml(), "data/binary_pairs.yaml");
    lib.load_binary_pairs(pairs.root, pairs.file, diagnostics);
    diagnostics.throw_if_errors();
    return lib;
  }();
  return library;
}

ComponentSet::ComponentSet(std::vector<Component> components, std::vector<NrtlPair> nrtl,
                           std::vector<FloryHugginsPair> flory_huggins)
    : components_(std::move(components)), nrtl_(std::move(nrtl)), flory_huggins_(std::move(flory_huggins)) {
  for (std::size_t i = 0; i < components_.size(); ++i)
    if (!components_[i].is_condensed_only()) nrtl_index_.members.push_back(i);
  auto local = [&](const std::string& id) -> std::optional<std::size_t> {
    for (std::size_t a = 0; a < nrtl_index_.members.size(); ++a)
      if (components_[nrtl_index_.members[a]].id == id) return a;
    return std::nullopt;
  };
  std::vector<bool> in_pair(nrtl_index_.members.size(), false);
  for (std::size_t p = 0; p < nrtl_.size(); ++p) {
    const auto i = local(nrtl_[p].first);
    const auto j = local(nrtl_[p].second);
    if (!i || !j || *i == *j) continue;
    nrtl_index_.pairs.push_back({p, *i, *j});
    in_pair[*i] = in_pair[*j] = true;
  }
  for (std::size_t a = 0; a < in_pair.size(); ++a)
    if (in_pair[a]) nrtl_index_.paired.push_back(a);

  for (const Component& c : components_)
    for (const auto& entry : c.formula) element_table_.symbols.push_back(entry.first);
  std::sort(element_table_.symbols.begin(), element_table_.symbols.end());
  auto& symbols = element_table_.symbols;
  symbols.erase(std::unique(symbols.begin(), symbols.end()), symbols.end());
  for (const Component& c : components_) {
    auto& shares = element_table_.by_component.emplace_back();
    for (const auto& [symbol, count] : c.formula) {
      const auto at = std::lower_bound(symbols.begin(), symbols.end(), symbol) - symbols.begin();
      // The loader accepts only known symbols; NaN would surface in the
      // finite check rather than pass unnoticed.
      const double weight = standard_atomic_weight(symbol).value_or(std::numeric_limits<double>::quiet_NaN());
      shares.push_back({static_cast<std::size_t>(at), count * weight});
    }
  }
}

std::optional<std::size_t> ComponentSet::index_of(std::string_view id) const {
  for (std::size_t i = 0; i < components_.size(); ++i)
    if (components_[i].id == id) return i;
  return std::nullopt;
}

std::size_t ComponentSet::require(std::string_view id) const {
  if (auto i = index_of(id)) return *i;
  throw ModelError("component '" + std::string(id) + "' is not among the case's components");
}

const FloryHugginsPair* ComponentSet::find_flory_huggins(std::string_view polymer, std::string_view solvent) const {
  for (const auto& p : flory_huggins_)
    if (p.polymer == polymer && p.solvent == solvent) return &p;
  return nullptr;
}

ComponentSet make_component_set(const ComponentLibrary& library, const std::vector<std::string>& ids,
                                const std::vector<SourceLocation>& where, DiagnosticList& diagnostics) {
  std::vector<Component> chosen;
  for (std::size_t i = 0; i < ids.size(); ++i) {
    const Component* c = library.find(ids[i]);
    const SourceLocation at = i < where.size() ? where[i] : SourceLocation{};
    if (c == nullptr) {
      const std::string suggestion = closest_match(ids[i], library.ids());
      diagnostics.error(at, "unknown component '" + ids[i] + "'" +
                                (suggestion.empty() ? std::string(" (see 'unchain components')")
                                                    : " (did you mean '" + suggestion + "'?)"));
      continue;
    }
    if (std::any_of(chosen.begin(), chosen.end(), [&](const Component& e) { return e.id == c->id; })) {
      diagnostics.error(at, "component '" + ids[i] + "' listed twice");
      continue;
    }
    chosen.push_back(*c);
  }
  auto used = [&](const std::string& id) {
    return std::any_of(chosen.begin(), chosen.end(), [&](const Component& c) { return c.id == id; });
  };
  std::vector<NrtlPair> nrtl;
  for (const auto& p : library.nrtl_pairs())
    if (used(p.first) && used(p.second)) nrtl.push_back(p);
  std::vector<FloryHugginsPair> fh;
  for (const auto& p : library.flory_huggins_pairs())
    if (used(p.polymer) && used(p.solvent)) fh.push_back(p);
  return ComponentSet(std::move(chosen), std::move(nrtl), std::move(fh));
}

}  // namespace unchain
