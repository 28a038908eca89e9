#include "units/block_helpers.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <sstream>

#include "flowsheet/diagnostics.hpp"
#include "flowsheet/unit_parser.hpp"

namespace unchain::units {

PortSpec single_port(std::string role, std::string description) {
  return PortSpec{std::move(role), true, false, std::move(description)};
}

PortSpec optional_port(std::string role, std::string description) {
  return PortSpec{std::move(role), false, false, std::move(description)};
}

PortSpec list_port(std::string role, std::string description) {
  return PortSpec{std::move(role), true, true, std::move(description)};
}

namespace {

std::vector<std::string> component_ids(const ComponentSet& components) {
  std::vector<std::string> ids;
  for (const auto& c : components.components()) ids.push_back(c.id);
  return ids;
}

std::optional<std::size_t> check_component(const std::string& id, const YAML::Node& node,
                                           const MappingReader& parameters, const std::string& key_path,
                                           const ComponentSet& components) {
  if (auto index = components.index_of(id)) return index;
  const std::string suggestion = closest_match(id, component_ids(components));
  parameters.diagnostics().error(location_of(node, parameters.file()),
                                 "'" + key_path + "': component '" + id + "' is not among the case's components" +
                                     (suggestion.empty() ? std::string() : " (did you mean '" + suggestion + "'?)"));
  return std::nullopt;
}

std::string path_of(const MappingReader& parameters, std::string_view key) {
  return parameters.path().empty() ? std::string(key) : parameters.path() + "." + std::string(key);
}

}  // namespace

std::optional<std::size_t> read_component(MappingReader& parameters, std::string_view key,
                                          const ComponentSet& components, bool required) {
  if (!parameters.has(key)) {
    parameters.accept(key);
    if (required)
      parameters.error({}, "missing required key '" + path_of(parameters, key) + "' (expected a component id)");
    return std::nullopt;
  }
  const YAML::Node node = parameters.raw(key);
  auto id = parameters.optional_text(key);
  if (!id) return std::nullopt;
  return check_component(*id, node, parameters, path_of(parameters, key), components);
}

std::vector<std::size_t> read_component_list(MappingReader& parameters, std::string_view key,
                                             const ComponentSet& components, bool required) {
  std::vector<std::size_t> out;
  const YAML::Node node = parameters.raw(key);
  if (!node.IsDefined() || node.IsNull()) {
    if (required)
      parameters.error({}, "missing required key '" + path_of(parameters, key) + "' (expected a list of component ids)");
    return out;
  }
  if (!node.IsSequence()) {
    parameters.diagnostics().error(location_of(node, parameters.file()),
                                   "'" + path_of(parameters, key) + "' must be a list of component ids");
    return out;
  }
  for (std::size_t i = 0; i < node.size(); ++i) {
    const YAML::Node item = node[i];
    const std::string item_path = path_of(parameters, key) + "[" + std::to_string(i) + "]";
    if (!item.IsScalar()) {
      parameters.diagnostics().error(location_of(item, parameters.file()),
                                     "'" + item_path + "' must be a component id");
      continue;
    }
    if (auto index = check_component(item.Scalar(), item, parameters, item_path, components)) {
      if (std::find(out.begin(), out.end(), *index) != out.end())
        parameters.diagnostics().error(location_of(item, parameters.file()),
                                       "'" + item_path + "': component '" + item.Scalar() + "' listed twice");
      else
        out.push_back(*index);
    }
  }
  return out;
}

Pressure OutletPressure::at_outlet(Pressure inlet) const {
  if (outlet) return *outlet;
  if (!drop) return inlet;
  const Pressure P = inlet - *drop;
  if (to_si(P) <= 0.0)
    throw ModelError("pressure drop of " + format_number(to_si(*drop)) + " Pa leaves no pressure at the outlet (inlet " +
                     format_number(to_si(inlet)) + " Pa)");
  return P;
}

OutletPressure read_outlet_pressure(MappingReader& parameters) {
  OutletPressure out;
  out.outlet = parameters.optional_quantity<Pressure>("outlet_pressure");
  out.drop = parameters.optional_quantity<Pressure>("pressure_drop");
  if (out.outlet && out.drop)
    parameters.error("pressure_drop", "give either 'outlet_pressure' or 'pressure_drop', not both");
  if (out.outlet && to_si(*out.outlet) <= 0.0)
    parameters.error("outlet_pressure", "'" + path_of(parameters, "outlet_pressure") +
                                            "' must be positive (expected an absolute pressure such as \"101.325 kPa\")");
  if (out.drop && to_si(*out.drop) < 0.0)
    parameters.error("pressure_drop", "'" + path_of(parameters, "pressure_drop") + "' must not be negative");
  return out;
}

const char* heat_source_name(HeatSource source) { return source == HeatSource::electric ? "electric" : "fuel"; }

HeatSupply read_heat_supply(MappingReader& parameters) {
  HeatSupply supply;
  const std::string source = parameters.text("heat_source", "electric");
  if (source == "fuel") {
    supply.source = HeatSource::fuel;
  } else if (source != "electric") {
    parameters.error("heat_source", "'" + path_of(parameters, "heat_source") +
                                        "' must be electric or fuel (found \"" + source + "\")");
  }
  // The share of the heat supplied that reaches the stream: losses from
  // the heater's own surfaces. Electric resistance heating turns all of
  // the electricity into heat, hence 1.0. The stack loss of a burner is
  // not counted here: the costing layer turns heat drawn into fuel with
  // its burner efficiency.
  supply.efficiency = parameters.number_in("heater_efficiency", 1.0, 1e-3, 1.0);
  return supply;
}

void book_heat_duty(BlockResources& resources, Energy process_heat, const HeatSupply& supply) {
  const double Q = to_si(process_heat);
  resources.process_heat_J += Q;
  resources.heat_source = heat_source_name(supply.source);
  if (Q > 0.0) {
    const double drawn = Q / supply.efficiency;
    resources.heat_drawn_J += drawn;
    if (supply.source == HeatSource::electric) resources.electricity_J += drawn;
  } else {
    resources.cooling_J += -Q;
  }
}

std::optional<Time> basis_period(Basis basis) {
  if (basis == Basis::continuous) return seconds(3600.0);
  return std::nullopt;
}

namespace {

// Parses a per-basis value: `per_basis` dimension, or (continuous basis
// only) the same per time, which is multiplied by one hour.
std::optional<double> read_per_basis_node(const YAML::Node& node, const MappingReader& parameters,
                                          const std::string& key_path, Basis basis, const Dimension& per_basis,
                                          const Dimension& per_time) {
  auto parsed = detail::parse_node(node, parameters.file(), key_path, parameters.diagnostics());
  if (!parsed) return std::nullopt;
  if (parsed->dimension == per_basis) return parsed->si_value();
  if (basis == Basis::continuous && parsed->dimension == per_time) return parsed->si_value() * 3600.0;
  std::string expected = per_basis.describe() + (basis == Basis::batch ? " per batch" : " per hour");
  if (basis == Basis::continuous) expected += " or " + per_time.describe();
  std::string found = parsed->dimension.describe();
  found += parsed->unit_text.empty() ? std::string(" (a bare number)") : " from unit \"" + parsed->unit_text + "\"";
  parameters.diagnostics().error(location_of(node, parameters.file()),
                                 "'" + key_path + "': wrong dimension (expected " + expected + ", found " + found + ")");
  return std::nullopt;
}

}  // namespace

std::optional<Energy> read_energy_per_basis(MappingReader& parameters, std::string_view key, Basis basis) {
  if (!parameters.has(key)) {
    parameters.accept(key);
    return std::nullopt;
  }
  const YAML::Node node = parameters.raw(key);
  auto value = read_per_basis_node(node, parameters, path_of(parameters, key), basis, dimension_of<Energy>(),
                                   dimension_of<Power>());
  if (!value) return std::nullopt;
  return joules(*value);
}

std::optional<Mass> read_mass_per_basis(const YAML::Node& node, const MappingReader& parameters,
                                        const std::string& key_path, Basis basis) {
  auto value = read_per_basis_node(node, parameters, key_path, basis, dimension_of<Mass>(), dimension_of<MassFlow>());
  if (!value) return std::nullopt;
  return kilograms(*value);
}

std::optional<Time> read_duration(MappingReader& parameters) {
  auto duration = parameters.optional_quantity<Time>("duration");
  if (duration && to_si(*duration) <= 0.0) {
    parameters.error("duration", "'" + path_of(parameters, "duration") + "' must be positive (found " +
                                     format_number(to_si(*duration)) + " s)");
    return std::nullopt;
  }
  return duration;
}

std::optional<Power> duty_rate(Energy duty, Basis basis, std::optional<Time> duration) {
  if (auto period = basis_period(basis)) return duty / *period;
  if (duration) return duty / *duration;
  return std::nullopt;
}

void set_state(Stream& stream, Temperature T, Pressure P) {
  stream.set_temperature(T);
  stream.set_pressure(P);
}

Stream empty_like(const Stream& feed, Temperature T, Pressure P) {
  Stream out(feed.components());
  set_state(out, T, P);
  return out;
}

bool is_negligible_duty(Energy duty, Energy enthalpy_in, Energy enthalpy_out) {
  // Enthalpies relative to the elements are of order 10 MJ/kg; round-off
  // in their difference is far below a part in 1e9 of them.
  const double scale = std::max({std::abs(to_si(enthalpy_in)), std::abs(to_si(enthalpy_out)), 1.0});
  return std::abs(to_si(duty)) <= 1e-9 * scale;
}

std::vector<FlammableVapour> flammable_vapours(const Stream& stream) {
  std::vector<FlammableVapour> out;
  const Eigen::VectorXd y = stream.phase_mole_fractions(Phase::vapour);
  const Eigen::VectorXd& vapour = stream.phase_masses(Phase::vapour);
  for (std::size_t i = 0; i < stream.size(); ++i) {
    const auto k = static_cast<Eigen::Index>(i);
    if (vapour[k] <= 0.0) continue;
    const Component& c = stream.components()[i];
    if (!c.flammability_limits && !c.flash_point) continue;
    FlammableVapour v;
    v.id = c.id;
    v.mole_fraction = y[k];
    if (c.flammability_limits) v.lower_limit = c.flammability_limits->lower;
    out.push_back(v);
  }
  return out;
}

std::string flammable_vapour_caution(const std::string& where, const std::vector<FlammableVapour>& vapours) {
  if (vapours.empty()) return {};
  std::ostringstream text;
  text << where << " carries flammable vapour (";
  for (std::size_t i = 0; i < vapours.size(); ++i) {
    if (i > 0) text << ", ";
    text << vapours[i].id << " " << format_number(100.0 * vapours[i].mole_fraction, 3) << " % by volume";
    if (vapours[i].lower_limit)
      text << ", lower flammability limit " << format_number(100.0 * *vapours[i].lower_limit, 3) << " %";
  }
  text << "): route it to a safe, ventilated discharge away from ignition sources or to an abatement unit; "
          "equipment in its reach must be rated for flammable vapour.";
  return text.str();
}

// snprintf writes what a stream with the same precision writes ("%.1f" is
// fixed with precision 1, "%.*g" the default float field) without a
// stream's set-up: the blocks format their cautions on every solve.
std::string format_celsius(Temperature T) {
  char text[400];  // "%.1f" of the largest double has 309 digits before the point
  std::snprintf(text, sizeof text, "%.1f degC", in_celsius(T));
  return text;
}

std::string format_number(double value, int significant) {
  char text[64];  // "%.*g" stays within about 25 characters up to 17 digits
  std::snprintf(text, sizeof text, "%.*g", std::clamp(significant, 1, 30), value);
  return text;
}

}  // namespace unchain::units
