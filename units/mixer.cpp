#include "units/mixer.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <memory>
#include <optional>

#include "flowsheet/thermo/phase_equilibrium.hpp"
#include "units/block_helpers.hpp"
#include "units/block_registry.hpp"

namespace unchain::units {

namespace {

class Mixer final : public BlockModel {
 public:
  explicit Mixer(std::optional<Pressure> outlet_pressure) : outlet_pressure_(outlet_pressure) {}

  [[nodiscard]] std::vector<PortSpec> inlet_ports() const override {
    return {list_port("feeds", "streams to be mixed")};
  }
  [[nodiscard]] std::vector<PortSpec> outlet_ports() const override {
    return {single_port("product", "the mixed stream")};
  }

  void compute(const BlockContext& context, const BlockPorts& ports, BlockResources& resources) const override {
    const auto& feeds = ports.inlets("feeds");
    if (feeds.empty()) throw ModelError("mixer '" + context.block_name + "' has no feeds");

    Stream mixed(context.components);
    double lowest_pressure = std::numeric_limits<double>::infinity();
    double enthalpy_in = 0.0;
    double mass_weighted_T = 0.0;
    for (const Stream* feed : feeds) {
      mixed.add_contents(*feed);
      // An empty feed (a tear stream on the first pass) sets no pressure.
      if (feed->is_empty()) continue;
      lowest_pressure = std::min(lowest_pressure, to_si(feed->pressure()));
      enthalpy_in += to_si(feed->enthalpy(&context.warnings));
      mass_weighted_T += to_si(feed->total_mass()) * in_kelvin(feed->temperature());
    }
    if (!std::isfinite(lowest_pressure)) lowest_pressure = to_si(feeds.front()->pressure());
    const Pressure P = outlet_pressure_ ? *outlet_pressure_ : pascal(lowest_pressure);
    if (outlet_pressure_ && to_si(*outlet_pressure_) > lowest_pressure * (1.0 + 1e-12))
      context.warnings.add("mixer '" + context.block_name +
                           "': outlet pressure is above the lowest feed pressure; no compression work is counted");

    Stream& product = ports.outlet("product");
    resources.process_heat_J = 0.0;
    if (mixed.is_empty()) {
      product = empty_like(mixed, feeds.front()->temperature(), P);
      return;
    }
    // The contents at the mass-weighted mean temperature are only a start:
    // the duty that brings them back to the summed feed enthalpy is handed
    // to the flash at duty, which finds the temperature and the phases.
    set_state(mixed, kelvin(mass_weighted_T / to_si(mixed.total_mass())), P);
    const double enthalpy_start = to_si(mixed.enthalpy(&context.warnings));
    product = flash_stream_at_duty(mixed, joules(enthalpy_in - enthalpy_start), P, &context.warnings);
    resources.add_figure("outlet_temperature", in_kelvin(product.temperature()), "K",
                         "temperature of the mixed stream");
  }

 private:
  std::optional<Pressure> outlet_pressure_;
};

std::unique_ptr<BlockModel> make_mixer(MappingReader& parameters, const BlockSetup&) {
  auto outlet_pressure = parameters.optional_quantity<Pressure>("outlet_pressure");
  if (outlet_pressure && to_si(*outlet_pressure) <= 0.0) {
    parameters.error("outlet_pressure", "'" + parameters.path() + ".outlet_pressure' must be positive");
    outlet_pressure.reset();
  }
  parameters.finish();
  return std::make_unique<Mixer>(outlet_pressure);
}

}  // namespace

void register_mixer(BlockRegistry& registry) {
  registry.add({"mixer", "joins feeds adiabatically; outlet at the lowest feed pressure", make_mixer});
}

}  // namespace unchain::units
