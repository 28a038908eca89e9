#include "units/heater.hpp"

#include <algorithm>
#include <cmath>
#include <memory>
#include <optional>
#include <string>

#include "flowsheet/thermo/phase_equilibrium.hpp"
#include "units/block_helpers.hpp"
#include "units/block_registry.hpp"

namespace unchain::units {

namespace {

enum class Direction { heating, cooling };

struct HeaterSettings {
  Direction direction = Direction::heating;
  std::optional<Temperature> outlet_temperature;
  std::optional<Energy> duty;  // heat added (heater) or removed (cooler), >= 0, per basis
  OutletPressure pressure;
  HeatSupply supply;           // heater only
  std::optional<Time> duration;
};

class HeatExchangeBlock final : public BlockModel {
 public:
  explicit HeatExchangeBlock(HeaterSettings settings) : s_(std::move(settings)) {}

  [[nodiscard]] std::vector<PortSpec> inlet_ports() const override {
    return {single_port("feed", heating() ? "stream to be heated" : "stream to be cooled")};
  }
  [[nodiscard]] std::vector<PortSpec> outlet_ports() const override {
    return {single_port("product", heating() ? "the heated stream" : "the cooled stream")};
  }

  void compute(const BlockContext& context, const BlockPorts& ports, BlockResources& resources) const override {
    const Stream& feed = ports.inlet("feed");
    Stream& product = ports.outlet("product");
    Pressure P = feed.pressure();
    try {
      P = s_.pressure.at_outlet(feed.pressure());
    } catch (const ModelError& e) {
      throw ModelError(kind() + " '" + context.block_name + "': " + e.what());
    }
    if (s_.duration) resources.duration_s = to_si(*s_.duration);

    if (feed.is_empty()) {
      if (s_.duty)
        throw ModelError(kind() + " '" + context.block_name + "' has a duty of " + format_number(to_si(*s_.duty)) +
                         " J but no feed to take it");
      product = empty_like(feed, s_.outlet_temperature.value_or(feed.temperature()), P);
      return;
    }

    const Energy H_in = feed.enthalpy(&context.warnings);
    Energy Q = joules(0.0);  // net heat into the stream
    if (s_.outlet_temperature) {
      product = flash_stream(feed, *s_.outlet_temperature, P, &context.warnings);
      Q = product.enthalpy(&context.warnings) - H_in;
    } else {
      Q = heating() ? *s_.duty : -*s_.duty;
      product = flash_stream_at_duty(feed, Q, P, &context.warnings);
    }
    const Energy H_out = product.enthalpy(&context.warnings);
    check_direction(context, feed, product, Q, H_in, H_out);

    if (heating()) {
      if (to_si(Q) > 0.0) book_heat_duty(resources, Q, s_.supply);
      else resources.process_heat_J += to_si(Q);  // zero within round-off
    } else {
      resources.process_heat_J += to_si(Q);
      resources.cooling_J += std::max(0.0, -to_si(Q));
    }

    const double duty = std::abs(to_si(Q));
    resources.add_figure("duty", duty, "J", heating() ? "heat added to the stream" : "heat removed from the stream");
    resources.add_figure("outlet_temperature", in_kelvin(product.temperature()), "K", "temperature of the product");
    resources.add_figure("outlet_vapour_mass_fraction",
                         to_si(product.phase_total(Phase::vapour)) / to_si(product.total_mass()), "-",
                         "share of the product mass in the vapour");
    if (auto rate = duty_rate(joules(duty), context.basis, s_.duration))
      resources.equipment.push_back({kind(), kind(), "power", to_si(*rate), "W"});
    else
      resources.equipment.push_back({kind(), kind(), "duty", duty, "J"});
  }

 private:
  HeaterSettings s_;

  [[nodiscard]] bool heating() const { return s_.direction == Direction::heating; }
  [[nodiscard]] std::string kind() const { return heating() ? "heater" : "cooler"; }

  // A heater that would have to remove heat, or a cooler that would have
  // to add it, is a mistake in the flowsheet, not something to book.
  void check_direction(const BlockContext& context, const Stream& feed, const Stream& product, Energy Q, Energy H_in,
                       Energy H_out) const {
    if (is_negligible_duty(Q, H_in, H_out)) return;
    const bool wrong = heating() ? to_si(Q) < 0.0 : to_si(Q) > 0.0;
    if (!wrong) return;
    throw ModelError(kind() + " '" + context.block_name + "' would have to " + (heating() ? "remove" : "add") + " " +
                     format_number(std::abs(to_si(Q))) + " J: inlet " + format_celsius(feed.temperature()) +
                     ", outlet " + format_celsius(product.temperature()) + " (use a " +
                     (heating() ? "cooler" : "heater") + ")");
  }
};

std::unique_ptr<BlockModel> make_heat_exchange_block(MappingReader& parameters, const BlockSetup& setup,
                                                     Direction direction) {
  HeaterSettings s;
  s.direction = direction;
  s.outlet_temperature = parameters.optional_quantity<Temperature>("outlet_temperature");
  s.duty = read_energy_per_basis(parameters, "duty", setup.basis);
  const bool has_temperature = parameters.has("outlet_temperature");
  const bool has_duty = parameters.has("duty");
  if (has_temperature && has_duty)
    parameters.error("duty", "give either 'outlet_temperature' or 'duty', not both");
  else if (!has_temperature && !has_duty)
    parameters.error({}, "missing required key '" + parameters.path() +
                             ".outlet_temperature' or '.duty' (expected a temperature such as \"80 degC\" or an "
                             "energy such as \"2 kWh\")");
  if (s.duty && to_si(*s.duty) < 0.0) {
    parameters.error("duty", "'" + parameters.path() + ".duty' must not be negative (" +
                                 (direction == Direction::heating ? "a heater's duty is the heat added; use a cooler"
                                                                  : "a cooler's duty is the heat removed; use a heater") +
                                 ")");
    s.duty.reset();
  }
  if (has_temperature && has_duty) s.duty.reset();
  if (!s.outlet_temperature && !s.duty) s.duty = joules(0.0);
  s.pressure = read_outlet_pressure(parameters);
  if (direction == Direction::heating) s.supply = read_heat_supply(parameters);
  s.duration = read_duration(parameters);
  parameters.finish();
  return std::make_unique<HeatExchangeBlock>(std::move(s));
}

}  // namespace

void register_heater(BlockRegistry& registry) {
  registry.add({"heater", "heats a stream to a temperature or by a duty (electric or fuel)",
                [](MappingReader& p, const BlockSetup& s) { return make_heat_exchange_block(p, s, Direction::heating); }});
  registry.add({"cooler", "cools a stream to a temperature or by a duty (heat to the cooling utility)",
                [](MappingReader& p, const BlockSetup& s) { return make_heat_exchange_block(p, s, Direction::cooling); }});
}

}  // namespace unchain::units
