#include "app/command_components.hpp"

#include <fmt/format.h>

#include <cmath>
#include <ostream>

#include "app/exit_codes.hpp"
#include "app/summary_text.hpp"

namespace unchain::app {

namespace {

Json sourced_json(const std::optional<SourcedValue>& v, const char* unit) {
  if (!v) return nullptr;
  return Json{{"value", v->value}, {"unit", unit}, {"source", v->source}};
}

Json range_json(const TemperatureRange& r) { return Json{{"low_K", r.low_K}, {"high_K", r.high_K}}; }

Json antoine_json(const std::optional<AntoineCorrelation>& a) {
  if (!a) return nullptr;
  return Json{{"equation", "antoine"},
              {"form", "log10(P / pressure_unit) = A - B / (C + T / temperature_unit)"},
              {"A", a->A},
              {"B", a->B},
              {"C", a->C},
              {"pressure_unit_Pa", a->pressure_unit_Pa},
              {"temperature_unit", a->temperature_in_celsius ? "degC" : "K"},
              {"range", range_json(a->range)},
              {"source", a->source}};
}

Json polynomial_json(const std::optional<HeatCapacityPolynomial>& p) {
  if (!p) return nullptr;
  return Json{{"equation", "polynomial"},
              {"form", "cp = sum_i c_i T^i (T in K)"},
              {"coefficients_J_per_mol_K", p->coefficients},
              {"range", range_json(p->range)},
              {"source", p->source}};
}

std::string celsius_text(const std::optional<SourcedValue>& v) {
  return v ? format_fixed(v->value - 273.15, 1) : "-";
}

std::string range_text(const TemperatureRange& r) {
  return format_temperature_range(r.low_K, r.high_K);
}

// Long descriptive names would make the overview table too wide; the full
// name is in the details below it.
std::string short_name(const std::string& name) {
  constexpr std::size_t limit = 32;
  return name.size() <= limit ? name : name.substr(0, limit - 3) + "...";
}

// The pressure unit an Antoine correlation was published in.
std::string pressure_unit_name(double pascal_per_unit) {
  struct Named {
    double Pa;
    const char* name;
  };
  static constexpr Named names[] = {{1.0, "Pa"}, {1e3, "kPa"}, {1e5, "bar"}, {133.322387415, "mmHg"},
                                    {101325.0, "atm"}, {1e6, "MPa"}, {6894.757293168, "psi"}};
  for (const auto& n : names)
    if (std::fabs(pascal_per_unit / n.Pa - 1.0) < 1e-6) return n.name;
  return format_number(pascal_per_unit, 6) + " Pa";
}

std::string polynomial_text(const HeatCapacityPolynomial& p) {
  std::string terms;
  for (std::size_t i = 0; i < p.coefficients.size(); ++i) {
    const double c = p.coefficients[i];
    if (terms.empty()) terms += fmt::format("{:.6g}", c);
    else terms += fmt::format(" {} {:.6g}", c < 0.0 ? "-" : "+", std::fabs(c));
    if (i == 1) terms += " T";
    if (i > 1) terms += fmt::format(" T^{}", i);
  }
  return "cp = " + terms + " J/(mol K), T in K";
}

// One line: "  label  value  [source]".
void detail_line(std::string& out, const std::string& label, const std::string& value, const std::string& source) {
  out += fmt::format("    {:<30} {}\n", label, value);
  if (!source.empty()) out += fmt::format("    {:<30} source: {}\n", "", source);
}

void sourced_line(std::string& out, const std::string& label, const std::optional<SourcedValue>& v,
                  const std::string& value_text) {
  if (!v) return;
  detail_line(out, label, value_text, v->source);
}

std::string component_details(const Component& c) {
  std::string out;
  out += fmt::format("  {} - {} ({}), {}{}\n", c.id, c.name, formula_text(c.formula), kind_name(c.kind),
                     c.cas.empty() ? "" : ", CAS " + c.cas);
  detail_line(out, "molar mass", format_number(c.molar_mass * 1e3, 6) + " g/mol",
              "from the formula and IUPAC standard atomic weights (CIAAW 2021)");
  if (c.normal_boiling_point)
    sourced_line(out, "normal boiling point", c.normal_boiling_point,
                 format_fixed(c.normal_boiling_point->value - 273.15, 2) + " degC");
  if (c.critical_temperature)
    sourced_line(out, "critical temperature", c.critical_temperature,
                 format_fixed(c.critical_temperature->value - 273.15, 2) + " degC");
  if (c.critical_pressure)
    sourced_line(out, "critical pressure", c.critical_pressure,
                 format_number(c.critical_pressure->value / 1e3, 5) + " kPa");
  if (c.acentric_factor) sourced_line(out, "acentric factor", c.acentric_factor, format_number(c.acentric_factor->value));
  if (c.vapour_pressure) {
    const auto& a = *c.vapour_pressure;
    detail_line(out, "vapour pressure (Antoine)",
                fmt::format("log10(P/{}) = {:.6g} - {:.6g} / ({:.6g} + T/{}), {}",
                            pressure_unit_name(a.pressure_unit_Pa), a.A, a.B, a.C,
                            a.temperature_in_celsius ? "degC" : "K", range_text(a.range)),
                a.source);
  }
  auto polynomial_line = [&](const char* label, const std::optional<HeatCapacityPolynomial>& p) {
    if (p) detail_line(out, label, polynomial_text(*p) + ", " + range_text(p->range), p->source);
  };
  polynomial_line("liquid heat capacity", c.liquid_heat_capacity);
  polynomial_line("ideal-gas heat capacity", c.ideal_gas_heat_capacity);
  polynomial_line(c.polymer ? "glass heat capacity" : "solid heat capacity", c.solid_heat_capacity);
  if (c.polymer) polynomial_line("melt heat capacity", c.polymer->melt_heat_capacity);
  detail_line(out,
              c.is_condensed_only() ? "formation enthalpy (condensed)" : "formation enthalpy (ideal gas)",
              format_number(c.enthalpy_of_formation.value / 1e3, 5) + " kJ/mol at 298.15 K",
              c.enthalpy_of_formation.source);
  if (c.enthalpy_of_vaporization_at_nbp)
    sourced_line(out, "vaporization enthalpy at Tb", c.enthalpy_of_vaporization_at_nbp,
                 format_number(c.enthalpy_of_vaporization_at_nbp->value / 1e3, 5) + " kJ/mol (Watson exponent " +
                     format_number(c.watson_exponent, 3) + ")");
  if (c.liquid_density) {
    const auto& d = *c.liquid_density;
    detail_line(out, "liquid density",
                format_number(d.reference_density, 5) + " kg/m3 at " +
                    format_fixed(d.reference_temperature_K - 273.15, 1) + " degC, expansion " +
                    format_number(d.expansion_coefficient, 3) + " 1/K",
                d.source);
  }
  if (c.solid_density) sourced_line(out, "solid density", c.solid_density, format_number(c.solid_density->value, 5) + " kg/m3");
  if (c.flash_point)
    sourced_line(out, "flash point", c.flash_point, format_fixed(c.flash_point->value - 273.15, 1) + " degC");
  if (c.flammability_limits)
    detail_line(out, "flammability limits in air",
                format_number(c.flammability_limits->lower * 100.0, 3) + " to " +
                    format_number(c.flammability_limits->upper * 100.0, 3) + " % by volume",
                c.flammability_limits->source);
  if (c.water_solubility)
    detail_line(out, "solubility in water",
                format_number(c.water_solubility->mass_fraction * 100.0, 3) + " % by mass at " +
                    format_fixed(c.water_solubility->temperature_K - 273.15, 1) + " degC",
                c.water_solubility->source);
  if (c.hansen) {
    const auto& h = *c.hansen;
    std::string text = fmt::format("dD {} dP {} dH {}", format_number(h.dispersion / 1e3, 3),
                                   format_number(h.polar / 1e3, 3), format_number(h.hydrogen_bonding / 1e3, 3));
    if (h.interaction_radius) text += " R0 " + format_number(*h.interaction_radius / 1e3, 3);
    detail_line(out, "Hansen parameters", text + " MPa^0.5", h.source);
  }
  if (c.polymer) {
    const auto& p = *c.polymer;
    detail_line(out, "monomer", p.monomer, "");
    detail_line(out, "heat of polymerization", format_number(p.heat_of_polymerization.value / 1e3, 4) + " kJ/mol",
                p.heat_of_polymerization.source);
    if (p.glass_transition_temperature)
      sourced_line(out, "glass transition", p.glass_transition_temperature,
                   format_fixed(p.glass_transition_temperature->value - 273.15, 1) + " degC");
    if (p.ceiling_temperature)
      sourced_line(out, "ceiling temperature", p.ceiling_temperature,
                   format_fixed(p.ceiling_temperature->value - 273.15, 1) + " degC");
  }
  return out;
}

}  // namespace

Json component_to_json(const Component& c) {
  Json formula = Json::object();
  for (const auto& [element, count] : c.formula) formula[element] = count;
  Json out{{"id", c.id},
           {"name", c.name},
           {"cas", c.cas},
           {"kind", kind_name(c.kind)},
           {"formula", formula},
           {"formula_text", formula_text(c.formula)},
           {"molar_mass", Json{{"value", c.molar_mass * 1e3},
                               {"unit", "g/mol"},
                               {"source", "from the formula and IUPAC standard atomic weights (CIAAW 2021)"}}},
           {"normal_boiling_point", sourced_json(c.normal_boiling_point, "K")},
           {"critical_temperature", sourced_json(c.critical_temperature, "K")},
           {"critical_pressure", sourced_json(c.critical_pressure, "Pa")},
           {"acentric_factor", sourced_json(c.acentric_factor, "1")},
           {"vapour_pressure", antoine_json(c.vapour_pressure)},
           {"liquid_heat_capacity", polynomial_json(c.liquid_heat_capacity)},
           {"ideal_gas_heat_capacity", polynomial_json(c.ideal_gas_heat_capacity)},
           {"solid_heat_capacity", polynomial_json(c.solid_heat_capacity)},
           {"enthalpy_of_formation",
            Json{{"value", c.enthalpy_of_formation.value},
                 {"unit", "J/mol"},
                 {"state", c.is_condensed_only() ? "condensed" : "ideal gas"},
                 {"temperature_K", reference_temperature_K},
                 {"source", c.enthalpy_of_formation.source}}},
           {"enthalpy_of_vaporization_at_normal_boiling_point", sourced_json(c.enthalpy_of_vaporization_at_nbp, "J/mol")},
           {"watson_exponent", c.watson_exponent}};
  out["liquid_density"] = c.liquid_density ? Json{{"value", c.liquid_density->reference_density},
                                                  {"unit", "kg/m3"},
                                                  {"temperature_K", c.liquid_density->reference_temperature_K},
                                                  {"expansion_coefficient_per_K", c.liquid_density->expansion_coefficient},
                                                  {"source", c.liquid_density->source}}
                                           : Json(nullptr);
  out["solid_density"] = sourced_json(c.solid_density, "kg/m3");
  out["flash_point"] = sourced_json(c.flash_point, "K");
  out["flammability_limits"] = c.flammability_limits ? Json{{"lower_volume_fraction", c.flammability_limits->lower},
                                                            {"upper_volume_fraction", c.flammability_limits->upper},
                                                            {"source", c.flammability_limits->source}}
                                                     : Json(nullptr);
  out["water_solubility"] = c.water_solubility ? Json{{"mass_fraction", c.water_solubility->mass_fraction},
                                                      {"temperature_K", c.water_solubility->temperature_K},
                                                      {"source", c.water_solubility->source}}
                                               : Json(nullptr);
  if (c.hansen) {
    Json h{{"dispersion_Pa_half", c.hansen->dispersion},
           {"polar_Pa_half", c.hansen->polar},
           {"hydrogen_bonding_Pa_half", c.hansen->hydrogen_bonding}};
    h["interaction_radius_Pa_half"] = c.hansen->interaction_radius ? Json(*c.hansen->interaction_radius) : Json(nullptr);
    h["source"] = c.hansen->source;
    out["hansen"] = h;
  } else {
    out["hansen"] = nullptr;
  }
  if (c.polymer) {
    const auto& p = *c.polymer;
    Json polymer{{"monomer", p.monomer},
                 {"heat_of_polymerization", Json{{"value", p.heat_of_polymerization.value},
                                                 {"unit", "J/mol"},
                                                 {"source", p.heat_of_polymerization.source}}},
                 {"glass_transition_temperature", sourced_json(p.glass_transition_temperature, "K")},
                 {"ceiling_temperature", sourced_json(p.ceiling_temperature, "K")},
                 {"melt_heat_capacity", polynomial_json(p.melt_heat_capacity)}};
    out["polymer"] = polymer;
  } else {
    out["polymer"] = nullptr;
  }
  return out;
}

Json library_to_json(const ComponentLibrary& library) {
  Json components = Json::array();
  for (const auto& c : library.components()) components.push_back(component_to_json(c));
  Json nrtl = Json::array();
  for (const auto& p : library.nrtl_pairs())
    nrtl.push_back(Json{{"components", {p.first, p.second}},
                        {"form", "tau_ij = a_ij + b_ij / T, G_ij = exp(-alpha tau_ij)"},
                        {"a12", p.a12},
                        {"a21", p.a21},
                        {"b12_K", p.b12},
                        {"b21_K", p.b21},
                        {"alpha", p.alpha},
                        {"range", range_json(p.range)},
                        {"source", p.source}});
  Json chi = Json::array();
  for (const auto& p : library.flory_huggins_pairs())
    chi.push_back(Json{{"polymer", p.polymer},
                       {"solvent", p.solvent},
                       {"chi", p.chi},
                       {"temperature_K", p.temperature_K},
                       {"source", p.source}});
  return Json{{"schema_version", 1}, {"components", components}, {"nrtl_pairs", nrtl}, {"flory_huggins_pairs", chi}};
}

std::string library_text(const ComponentLibrary& library) {
  std::vector<std::vector<std::string>> rows;
  for (const auto& c : library.components()) {
    rows.push_back({c.id, short_name(c.name), formula_text(c.formula), kind_name(c.kind), format_fixed(c.molar_mass * 1e3, 3),
                    celsius_text(c.normal_boiling_point), celsius_text(c.critical_temperature),
                    c.critical_pressure ? format_fixed(c.critical_pressure->value / 1e3, 0) : "-"});
  }
  std::string out = fmt::format("Built-in components ({})\n", library.components().size());
  out += format_table({"id", "name", "formula", "kind", "M g/mol", "Tb degC", "Tc degC", "Pc kPa"}, rows, "llll");
  out += "\nData and sources\n";
  for (const auto& c : library.components()) out += "\n" + component_details(c);
  if (!library.nrtl_pairs().empty() || !library.flory_huggins_pairs().empty()) out += "\nBinary data\n";
  for (const auto& p : library.nrtl_pairs()) {
    out += fmt::format("  NRTL {}-{}: a12 {:.6g}, a21 {:.6g}, b12 {:.6g} K, b21 {:.6g} K, alpha {:.3g}, {}\n", p.first,
                       p.second, p.a12, p.a21, p.b12, p.b21, p.alpha, range_text(p.range));
    out += "    source: " + p.source + "\n";
  }
  for (const auto& p : library.flory_huggins_pairs()) {
    out += fmt::format("  Flory-Huggins {} in {}: chi {:.3g} at {} degC\n", p.polymer, p.solvent, p.chi,
                       format_fixed(p.temperature_K - 273.15, 1));
    out += "    source: " + p.source + "\n";
  }
  return out;
}

CLI::App* add_components_command(CLI::App& parent, ComponentsOptions& options) {
  CLI::App* command = parent.add_subcommand(
      "components", "List the built-in component data (properties, correlations and their sources)");
  command->add_flag("--json", options.json, "Write all component data as JSON to standard output");
  command->footer("Examples:\n  unchain components\n  unchain components --json > components.json");
  return command;
}

int run_components_command(const ComponentsOptions& options, std::ostream& out) {
  const ComponentLibrary& library = builtin_library();
  if (options.json) {
    out << library_to_json(library).dump(2) << "\n";
  } else {
    out << library_text(library);
  }
  return exit_success;
}

}  // namespace unchain::app
