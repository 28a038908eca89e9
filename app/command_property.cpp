#include "app/command_property.hpp"

#include <fmt/format.h>

#include <cmath>
#include <ostream>

#include "app/summary_text.hpp"
#include "flowsheet/component_library.hpp"
#include "flowsheet/diagnostics.hpp"
#include "flowsheet/pure_properties.hpp"
#include "flowsheet/yaml_reader.hpp"

namespace unchain::app {

namespace {

std::string range_text(const TemperatureRange& r) {
  return "valid " + format_temperature_range(r.low_K, r.high_K);
}

// Runs one property evaluation; a model that refuses (no data, outside
// what the correlation can express) leaves the value empty with a note.
template <class Evaluate>
void evaluate(PropertyValue& p, bool has_data, Evaluate&& compute) {
  if (!has_data) {
    p.note = "no data";
    return;
  }
  try {
    compute(p);
  } catch (const ModelError& e) {
    p.si_value.reset();
    p.note = e.what();
  }
}

}  // namespace

const Component& find_builtin_component(const std::string& id) {
  const ComponentLibrary& library = builtin_library();
  if (const Component* c = library.find(id)) return *c;
  const std::string suggestion = closest_match(id, library.ids());
  std::string message = "unknown component '" + id + "'";
  message += suggestion.empty() ? std::string(" (run 'unchain components' for the list)")
                                : " (did you mean '" + suggestion + "'?)";
  throw UsageError(message);
}

std::vector<PropertyValue> evaluate_properties(const Component& c, Temperature T, Pressure P, Warnings& warnings) {
  std::vector<PropertyValue> out;

  PropertyValue psat{"vapour_pressure", "vapour pressure at T", {}, "Pa", "", "Antoine", "", ""};
  evaluate(psat, c.vapour_pressure.has_value(), [&](PropertyValue& p) {
    p.si_value = to_si(vapour_pressure(c, T, &warnings));
    p.display = format_number(*p.si_value / 1e3, 5) + " kPa";
    p.method = "Antoine, " + range_text(c.vapour_pressure->range);
    p.source = c.vapour_pressure->source;
  });
  out.push_back(psat);

  PropertyValue tsat{"saturation_temperature", "saturation temperature at P", {}, "K", "", "Antoine (inverse)", "", ""};
  evaluate(tsat, c.vapour_pressure.has_value(), [&](PropertyValue& p) {
    const double T_K = in_kelvin(saturation_temperature(c, P, &warnings));
    if (!std::isfinite(T_K) || T_K <= 0.0) throw ModelError("outside what the Antoine correlation can express");
    p.si_value = T_K;
    p.display = format_fixed(T_K - 273.15, 2) + " degC";
    p.method = "Antoine (inverse), " + range_text(c.vapour_pressure->range);
    p.source = c.vapour_pressure->source;
  });
  out.push_back(tsat);

  auto heat_capacity = [&](const char* key, const char* label, const std::optional<HeatCapacityPolynomial>& data,
                           MolarHeatCapacity (*function)(const Component&, Temperature, Warnings*)) {
    PropertyValue cp{key, label, {}, "J/(mol K)", "", "", "", ""};
    evaluate(cp, data.has_value(), [&](PropertyValue& p) {
      p.si_value = to_si(function(c, T, &warnings));
      p.display = format_number(*p.si_value, 4) + " J/(mol K) = " +
                  format_number(*p.si_value / c.molar_mass / 1e3, 4) + " kJ/(kg K)";
      p.method = "polynomial in T, " + range_text(data->range);
      p.source = data->source;
    });
    out.push_back(cp);
  };
  heat_capacity("liquid_heat_capacity", "liquid heat capacity at T", c.liquid_heat_capacity, &liquid_heat_capacity);
  heat_capacity("ideal_gas_heat_capacity", "ideal-gas heat capacity at T", c.ideal_gas_heat_capacity,
                &ideal_gas_heat_capacity);

  PropertyValue hv{"enthalpy_of_vaporization", "enthalpy of vaporization at T", {}, "J/mol", "", "", "", ""};
  const bool has_watson_data = c.enthalpy_of_vaporization_at_nbp && c.normal_boiling_point && c.critical_temperature;
  evaluate(hv, has_watson_data, [&](PropertyValue& p) {
    p.si_value = to_si(enthalpy_of_vaporization(c, T, &warnings));
    p.display = format_number(*p.si_value / 1e3, 4) + " kJ/mol = " +
                format_number(*p.si_value / c.molar_mass / 1e3, 4) + " kJ/kg";
    p.method = fmt::format("Watson scaling from the normal boiling point, exponent {}", format_number(c.watson_exponent, 3));
    p.source = "dHv(Tb): " + c.enthalpy_of_vaporization_at_nbp->source + "; Tb: " + c.normal_boiling_point->source +
               "; Tc: " + c.critical_temperature->source;
    if (in_kelvin(T) >= c.critical_temperature->value) p.note = "zero at and above the critical temperature";
  });
  out.push_back(hv);

  PropertyValue rho{"liquid_density", "liquid density at T", {}, "kg/m3", "", "", "", ""};
  evaluate(rho, c.liquid_density.has_value(), [&](PropertyValue& p) {
    p.si_value = to_si(liquid_density(c, T, &warnings));
    p.display = format_number(*p.si_value, 4) + " kg/m3";
    p.method = "reference density with a constant expansion coefficient";
    p.source = c.liquid_density->source;
  });
  out.push_back(rho);
  return out;
}

CLI::App* add_property_command(CLI::App& parent, PropertyOptions& options) {
  CLI::App* command = parent.add_subcommand(
      "property", "Show the properties of one component at a temperature and pressure, with their sources");
  command->add_option("COMPONENT", options.component, "Component id, as listed by 'unchain components'")
      ->required()
      ->type_name("ID");
  command->add_option("-T,--temperature", options.temperature,
                      "Temperature with its unit: \"145 degC\", \"418.15 K\", \"293 degF\"")
      ->required()
      ->type_name("\"NUMBER UNIT\"");
  command->add_option("-P,--pressure", options.pressure,
                      "Pressure with its unit, for the saturation temperature: \"1 atm\", \"20 kPa\", \"150 mmHg\"")
      ->capture_default_str()
      ->type_name("\"NUMBER UNIT\"");
  command->add_flag("--json", options.json, "Write the values as JSON to standard output");
  command->footer(
      "Example:\n  unchain property styrene --temperature \"145 degC\" --pressure \"1 atm\"\n"
      "Values outside a correlation's validity range are still shown, with a warning.");
  return command;
}

int run_property_command(const PropertyOptions& options, std::ostream& out, std::ostream& err) {
  const Component& c = find_builtin_component(options.component);
  const Temperature T = parse_option_quantity<Temperature>("--temperature", options.temperature);
  const Pressure P = parse_option_quantity<Pressure>("--pressure", options.pressure);
  Warnings warnings;
  const std::vector<PropertyValue> values = evaluate_properties(c, T, P, warnings);
  const std::vector<std::string> messages = warnings.messages();

  if (options.json) {
    Json properties = Json::object();
    for (const auto& v : values) {
      Json entry{{"value", v.si_value ? Json(*v.si_value) : Json(nullptr)},
                 {"unit", v.si_unit},
                 {"method", v.method},
                 {"source", v.source}};
      if (!v.note.empty()) entry["note"] = v.note;
      properties[v.key] = entry;
    }
    Json doc{{"component", c.id},
             {"name", c.name},
             {"molar_mass_g_per_mol", c.molar_mass * 1e3},
             {"temperature_K", in_kelvin(T)},
             {"pressure_Pa", to_si(P)},
             {"properties", properties},
             {"warnings", messages}};
    out << doc.dump(2) << "\n";
    for (const auto& w : messages) err << "warning: " << w << "\n";
    return exit_success;
  }

  const std::string name = c.name == c.id ? std::string() : c.name + ", ";
  out << fmt::format("{} ({}{}) at {} degC ({} K); saturation temperature at {} kPa\n\n", c.id, name,
                     formula_text(c.formula), format_fixed(in_celsius(T), 2), format_fixed(in_kelvin(T), 2),
                     format_number(to_si(P) / 1e3, 6));
  for (const auto& v : values) {
    std::string value = v.si_value ? v.display : "n/a (" + v.note + ")";
    if (v.si_value && !v.note.empty()) value += " (" + v.note + ")";
    out << fmt::format("  {:<31} {}\n", v.label, value);
    if (v.si_value) {
      out << fmt::format("  {:<31} {}\n", "", v.method);
      out << fmt::format("  {:<31} source: {}\n", "", v.source);
    }
  }
  if (!messages.empty()) out << "\n";
  for (const auto& w : messages) out << "warning: " << w << "\n";
  return exit_success;
}

}  // namespace unchain::app
