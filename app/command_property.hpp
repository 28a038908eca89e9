#pragma once
// `unchain property`: the pure-component properties of one component at a
// temperature and pressure, each with its unit, correlation and source.

#include <CLI/CLI.hpp>

#include <iosfwd>
#include <optional>
#include <type_traits>
#include <string>
#include <vector>

#include "app/exit_codes.hpp"
#include "app/results_json.hpp"
#include "flowsheet/component.hpp"
#include "flowsheet/unit_parser.hpp"

namespace unchain::app {

struct PropertyOptions {
  std::string component;
  std::string temperature;
  std::string pressure = "1 atm";
  bool json = false;
};

CLI::App* add_property_command(CLI::App& parent, PropertyOptions& options);
int run_property_command(const PropertyOptions& options, std::ostream& out, std::ostream& err);

// One evaluated property: a value in SI, or the reason there is none.
struct PropertyValue {
  std::string key;            // snake_case, for JSON
  std::string label;          // for the text table
  std::optional<double> si_value;
  std::string si_unit;        // "Pa", "K", "J/(mol K)", "J/mol", "kg/m3"
  std::string display;        // the value in report units, e.g. "101.3 kPa"
  std::string method;         // "Antoine", "Watson scaling from the normal boiling point"
  std::string source;
  std::string note;           // "no data", or why the value is missing
};

// Evaluates the properties of `c` at T and P; correlations used outside
// their range are reported to `warnings`.
std::vector<PropertyValue> evaluate_properties(const Component& c, Temperature T, Pressure P, Warnings& warnings);

// Looks up a component of the built-in library; an unknown id is a
// UsageError with the closest id suggested.
const Component& find_builtin_component(const std::string& id);

// Reads "number unit" text given to a command-line option; a bad unit or
// dimension is a UsageError naming the option.
template <class Q>
Q parse_option_quantity(const std::string& option, const std::string& text) {
  try {
    return parse_as<Q>(text);
  } catch (const UnitError& e) {
    throw UsageError(option + " \"" + text + "\": " + e.what() + "; write a number and a unit, such as " +
                     (std::is_same_v<Q, Temperature> ? "\"145 degC\"" : "\"101.325 kPa\""));
  }
}

}  // namespace unchain::app
