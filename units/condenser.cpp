#include "units/condenser.hpp"

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

// Specific heat capacity of liquid water, 4.18 kJ/(kg K) between 10 and
// 40 degC within 0.2 % (common practice).
constexpr double cooling_water_cp_J_per_kg_K = 4180.0;

// Typical overall coefficients of condensers against water (Sinnott,
// Coulson & Richardson's Chemical Engineering Design vol. 6, Table 12.1,
// from memory): organic vapours 700-1000, with some non-condensables
// 500-700, vacuum condensers 200-500 W/(m2 K). Outside this wider band a
// value is probably a slip.
constexpr double typical_U_low = 100.0;
constexpr double typical_U_high = 1500.0;

struct CondenserSettings {
  Temperature outlet_temperature = kelvin(293.15);
  std::optional<Pressure> pressure;  // the feed's pressure when not given
  Temperature coolant_inlet_temperature = celsius(15.0);
  TemperatureDifference coolant_temperature_rise = kelvin_difference(10.0);
  HeatTransferCoefficient overall_heat_transfer_coefficient = from_si<HeatTransferCoefficient>(300.0);
  std::optional<Time> duration;
};

class Condenser final : public BlockModel {
 public:
  explicit Condenser(CondenserSettings settings) : s_(settings) {}

  [[nodiscard]] std::vector<PortSpec> inlet_ports() const override {
    return {single_port("feed", "vapour to be condensed, possibly with permanent gas")};
  }
  [[nodiscard]] std::vector<PortSpec> outlet_ports() const override {
    return {single_port("condensate", "the condensed liquid (with any solids carried over)"),
            single_port("vent", "gas and vapour not condensed")};
  }

  void compute(const BlockContext& context, const BlockPorts& ports, BlockResources& resources) const override {
    const Stream& feed = ports.inlet("feed");
    const Pressure P = s_.pressure.value_or(feed.pressure());
    const Temperature T_out = s_.outlet_temperature;
    Stream& condensate = ports.outlet("condensate");
    Stream& vent = ports.outlet("vent");
    condensate = empty_like(feed, T_out, P);
    vent = empty_like(feed, T_out, P);
    if (s_.duration) resources.duration_s = to_si(*s_.duration);
    if (feed.is_empty()) return;

    const Energy H_in = feed.enthalpy(&context.warnings);
    const Stream cooled = flash_stream(feed, T_out, P, &context.warnings);
    vent.phase_masses(Phase::vapour) = cooled.phase_masses(Phase::vapour);
    condensate.phase_masses(Phase::liquid) = cooled.phase_masses(Phase::liquid);
    condensate.phase_masses(Phase::solid) = cooled.phase_masses(Phase::solid);
    const Energy H_out = condensate.enthalpy(&context.warnings) + vent.enthalpy(&context.warnings);
    const double removed = to_si(H_in - H_out);
    if (removed < 0.0 && !is_negligible_duty(H_in - H_out, H_in, H_out))
      throw ModelError("condenser '" + context.block_name + "' would have to add " + format_number(-removed) +
                       " J: feed at " + format_celsius(feed.temperature()) + ", outlet " + format_celsius(T_out) +
                       " (a condenser only removes heat)");
    const double Q = std::max(0.0, removed);
    resources.process_heat_J = -removed;
    resources.cooling_J = Q;

    const double water_kg = Q / (cooling_water_cp_J_per_kg_K * to_si(s_.coolant_temperature_rise));
    resources.materials.push_back({"cooling water", "cooling_water", water_kg, "kg"});

    resources.add_figure("cooling_duty", Q, "J", "heat removed from the process stream");
    resources.add_figure("condensate_temperature", in_kelvin(T_out), "K", "temperature of condensate and vent");
    resources.add_figure("cooling_water_mass", water_kg, "kg", "cooling water for the duty at the stated rise");
    add_vent_losses(feed, vent, resources);
    size_area(context, feed, P, Q, resources);

    const std::string caution =
        flammable_vapour_caution("The vent of condenser '" + context.block_name + "'", flammable_vapours(vent));
    if (!caution.empty()) resources.cautions.push_back(caution);
  }

 private:
  CondenserSettings s_;

  static void add_vent_losses(const Stream& feed, const Stream& vent, BlockResources& resources) {
    const Eigen::VectorXd fed = feed.component_masses();
    const Eigen::VectorXd lost = vent.component_masses();
    for (std::size_t i = 0; i < feed.size(); ++i) {
      const auto k = static_cast<Eigen::Index>(i);
      const Component& c = feed.components()[i];
      if (!c.can_vaporize() || fed[k] <= 0.0) continue;
      resources.add_figure("vent_loss_fraction_" + c.id, lost[k] / fed[k], "-",
                           "share of the " + c.id + " fed that leaves by the vent");
    }
  }

  // Where condensation starts on the hot side: the feed's dew point when
  // the feed is superheated above it, since the desuperheating zone
  // transfers little of the duty; otherwise the feed temperature.
  [[nodiscard]] double hot_side_inlet_K(const BlockContext& context, const Stream& feed, Pressure P) const {
    const double T_feed = in_kelvin(feed.temperature());
    Eigen::VectorXd z = feed.component_moles();
    bool condensable = false;
    for (std::size_t i = 0; i < feed.size(); ++i) {
      const auto k = static_cast<Eigen::Index>(i);
      if (feed.components()[i].is_condensed_only()) z[k] = 0.0;
      else if (feed.components()[i].can_vaporize() && z[k] > 0.0) condensable = true;
    }
    if (!condensable || z.sum() <= 0.0) return T_feed;
    z /= z.sum();
    try {
      const double T_dew = in_kelvin(dew_temperature(context.components, z, P, &context.warnings));
      if (T_dew < T_feed && T_dew > in_kelvin(s_.outlet_temperature)) return T_dew;
    } catch (const ModelError&) {
      // No dew point (nothing condensable at this pressure): the feed temperature stands.
    }
    return T_feed;
  }

  void size_area(const BlockContext& context, const Stream& feed, Pressure P, double Q,
                 BlockResources& resources) const {
    const auto rate = duty_rate(joules(Q), context.basis, s_.duration);
    if (!rate) {
      context.warnings.add("condenser '" + context.block_name +
                           "': no duration given on a batch basis, so the heat-transfer area is not estimated");
      return;
    }
    if (Q <= 0.0) return;
    const double T_hot_in = hot_side_inlet_K(context, feed, P);
    const double T_hot_out = in_kelvin(s_.outlet_temperature);
    const double T_cold_in = in_kelvin(s_.coolant_inlet_temperature);
    const double T_cold_out = T_cold_in + to_si(s_.coolant_temperature_rise);
    // Counter-current: the hot inlet faces the coolant outlet.
    const double dT_hot_end = T_hot_in - T_cold_out;
    const double dT_cold_end = T_hot_out - T_cold_in;
    if (dT_cold_end <= 0.0)
      throw ModelError("condenser '" + context.block_name + "': outlet temperature " + format_celsius(kelvin(T_hot_out)) +
                       " is not above the coolant inlet temperature " + format_celsius(kelvin(T_cold_in)));
    if (dT_hot_end <= 0.0)
      throw ModelError("condenser '" + context.block_name + "': coolant outlet " + format_celsius(kelvin(T_cold_out)) +
                       " is not below the hot-side inlet " + format_celsius(kelvin(T_hot_in)) +
                       " (lower 'coolant_temperature_rise' or the coolant inlet temperature)");
    const double lmtd = std::abs(dT_hot_end - dT_cold_end) < 1e-9 * dT_cold_end
                            ? dT_cold_end
                            : (dT_hot_end - dT_cold_end) / std::log(dT_hot_end / dT_cold_end);
    const double U = to_si(s_.overall_heat_transfer_coefficient);
    const double area = to_si(*rate) / (U * lmtd);
    resources.add_figure("log_mean_temperature_difference", lmtd, "K", "counter-current, condensing zone");
    resources.add_figure("cooling_rate", to_si(*rate), "W", "duty per unit time");
    resources.equipment.push_back({"condenser", "condenser", "area", area, "m2"});
  }
};

std::unique_ptr<BlockModel> make_condenser(MappingReader& parameters, const BlockSetup&) {
  CondenserSettings s;
  s.outlet_temperature = parameters.quantity<Temperature>("outlet_temperature");
  s.pressure = parameters.optional_quantity<Pressure>("pressure");
  if (s.pressure && to_si(*s.pressure) <= 0.0) {
    parameters.error("pressure", "'" + parameters.path() + ".pressure' must be positive (expected an absolute pressure)");
    s.pressure.reset();
  }
  s.coolant_inlet_temperature = parameters.quantity<Temperature>("coolant_inlet_temperature", s.coolant_inlet_temperature);
  s.coolant_temperature_rise =
      parameters.quantity<TemperatureDifference>("coolant_temperature_rise", s.coolant_temperature_rise);
  if (to_si(s.coolant_temperature_rise) <= 0.0) {
    parameters.error("coolant_temperature_rise", "'" + parameters.path() +
                                                     ".coolant_temperature_rise' must be positive (found " +
                                                     format_number(to_si(s.coolant_temperature_rise)) + " K)");
    s.coolant_temperature_rise = kelvin_difference(10.0);
  }
  s.overall_heat_transfer_coefficient = parameters.quantity<HeatTransferCoefficient>(
      "overall_heat_transfer_coefficient", s.overall_heat_transfer_coefficient);
  const double U = to_si(s.overall_heat_transfer_coefficient);
  if (U <= 0.0) {
    parameters.error("overall_heat_transfer_coefficient",
                     "'" + parameters.path() + ".overall_heat_transfer_coefficient' must be positive");
    s.overall_heat_transfer_coefficient = from_si<HeatTransferCoefficient>(300.0);
  } else if (U < typical_U_low || U > typical_U_high) {
    parameters.warning("overall_heat_transfer_coefficient",
                       "'" + parameters.path() + ".overall_heat_transfer_coefficient' of " + format_number(U) +
                           " W/(m2 K) is outside the usual range of condensers against water (" +
                           format_number(typical_U_low) + " to " + format_number(typical_U_high) + " W/(m2 K))");
  }
  s.duration = read_duration(parameters);
  parameters.finish();
  return std::make_unique<Condenser>(s);
}

}  // namespace

void register_condenser(BlockRegistry& registry) {
  registry.add({"condenser", "condenses vapour against cooling water; reports vent losses and area", make_condenser});
}

}  // namespace unchain::units
