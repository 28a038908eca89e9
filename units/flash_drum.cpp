#include "units/flash_drum.hpp"

#include <memory>
#include <optional>

#include "flowsheet/thermo/phase_equilibrium.hpp"
#include "units/block_helpers.hpp"
#include "units/block_registry.hpp"

namespace unchain::units {

namespace {

struct FlashSettings {
  Temperature temperature = kelvin(298.15);
  std::optional<Pressure> pressure;  // the feed's pressure when not given
  HeatSupply supply;
};

class FlashDrum final : public BlockModel {
 public:
  explicit FlashDrum(FlashSettings settings) : s_(settings) {}

  [[nodiscard]] std::vector<PortSpec> inlet_ports() const override {
    return {single_port("feed", "stream to be flashed")};
  }
  [[nodiscard]] std::vector<PortSpec> outlet_ports() const override {
    return {single_port("vapour", "the vapour at the drum temperature and pressure"),
            single_port("liquid", "the liquid, with any solids")};
  }

  void compute(const BlockContext& context, const BlockPorts& ports, BlockResources& resources) const override {
    const Stream& feed = ports.inlet("feed");
    const Pressure P = s_.pressure.value_or(feed.pressure());
    Stream& vapour = ports.outlet("vapour");
    Stream& liquid = ports.outlet("liquid");
    vapour = empty_like(feed, s_.temperature, P);
    liquid = empty_like(feed, s_.temperature, P);
    if (feed.is_empty()) return;

    const Energy H_in = feed.enthalpy(&context.warnings);
    const Stream flashed = flash_stream(feed, s_.temperature, P, &context.warnings);
    vapour.phase_masses(Phase::vapour) = flashed.phase_masses(Phase::vapour);
    liquid.phase_masses(Phase::liquid) = flashed.phase_masses(Phase::liquid);
    liquid.phase_masses(Phase::solid) = flashed.phase_masses(Phase::solid);
    liquid.set_bulk_density(feed.bulk_density());
    const Energy Q = vapour.enthalpy(&context.warnings) + liquid.enthalpy(&context.warnings) - H_in;
    book_heat_duty(resources, Q, s_.supply);

    const double fluid_moles = vapour.component_moles().sum() + fluid_liquid_moles(liquid);
    resources.add_figure("vapour_mole_fraction", fluid_moles > 0.0 ? vapour.component_moles().sum() / fluid_moles : 0.0,
                         "-", "moles of vapour per mole of fluid feed");
    resources.add_figure("vapour_mass", to_si(vapour.total_mass()), "kg", "mass of the vapour product per basis");
    resources.add_figure("duty", to_si(Q), "J", "heat put into the drum (negative when removed)");
  }

 private:
  FlashSettings s_;

  // Moles in the liquid product leaving out polymers and solids, which
  // take no part in the vapour-liquid split.
  static double fluid_liquid_moles(const Stream& liquid) {
    const Eigen::VectorXd& m = liquid.phase_masses(Phase::liquid);
    double n = 0.0;
    for (std::size_t i = 0; i < liquid.size(); ++i) {
      const Component& c = liquid.components()[i];
      if (!c.is_condensed_only()) n += m[static_cast<Eigen::Index>(i)] / c.molar_mass;
    }
    return n;
  }
};

std::unique_ptr<BlockModel> make_flash_drum(MappingReader& parameters, const BlockSetup&) {
  FlashSettings s;
  s.temperature = parameters.quantity<Temperature>("temperature");
  s.pressure = parameters.optional_quantity<Pressure>("pressure");
  if (s.pressure && to_si(*s.pressure) <= 0.0) {
    parameters.error("pressure", "'" + parameters.path() + ".pressure' must be positive (expected an absolute pressure)");
    s.pressure.reset();
  }
  s.supply = read_heat_supply(parameters);
  parameters.finish();
  return std::make_unique<FlashDrum>(s);
}

}  // namespace

void register_flash_drum(BlockRegistry& registry) {
  registry.add({"flash", "separates vapour from liquid at a set temperature and pressure", make_flash_drum});
}

}  // namespace unchain::units
