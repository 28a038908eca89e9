#include "units/size_reduction.hpp"

#include <memory>
#include <optional>

#include "units/block_helpers.hpp"
#include "units/block_registry.hpp"

namespace unchain::units {

namespace {

// Order of magnitude for plastics granulators and shredders (common
// practice); outside this the value is very likely a unit slip.
constexpr double plausible_specific_energy_low_J_per_kg = 5.0 * 3600.0;     // 5 kWh/t
constexpr double plausible_specific_energy_high_J_per_kg = 500.0 * 3600.0;  // 500 kWh/t

struct SizeReductionSettings {
  SpecificEnergy specific_energy = from_si<SpecificEnergy>(0.0);
  double drive_efficiency = 0.85;
  Density product_bulk_density = from_si<Density>(0.0);
  double fines_fraction = 0.01;
  std::optional<MassFlow> throughput;
};

class SizeReduction final : public BlockModel {
 public:
  explicit SizeReduction(SizeReductionSettings s) : s_(s) {}

  [[nodiscard]] std::vector<PortSpec> inlet_ports() const override {
    return {single_port("feed", "foam or scrap to be ground")};
  }
  [[nodiscard]] std::vector<PortSpec> outlet_ports() const override {
    return {single_port("product", "the regrind"), single_port("dust", "fines lost as dust"),
            optional_port("vent", "air expelled from the foam (stays with the product when not connected)")};
  }

  void compute(const BlockContext& context, const BlockPorts& ports, BlockResources& resources) const override {
    const Stream& feed = ports.inlet("feed");
    const std::string who = "size_reduction '" + context.block_name + "'";
    Stream& product = ports.outlet("product");
    Stream& dust = ports.outlet("dust");
    product = empty_like(feed, feed.temperature(), feed.pressure());
    dust = empty_like(feed, feed.temperature(), feed.pressure());
    const bool has_vent = ports.has_outlet("vent");
    Stream* vent = has_vent ? &ports.outlet("vent") : nullptr;
    if (vent != nullptr) *vent = empty_like(feed, feed.temperature(), feed.pressure());

    // Fines come from the solids only; liquid (moisture) stays with the
    // product; the air goes to the vent when there is one.
    const Eigen::VectorXd& solids = feed.phase_masses(Phase::solid);
    dust.phase_masses(Phase::solid) = s_.fines_fraction * solids;
    product.phase_masses(Phase::solid) = solids - dust.phase_masses(Phase::solid);
    product.phase_masses(Phase::liquid) = feed.phase_masses(Phase::liquid);
    if (vent != nullptr) vent->phase_masses(Phase::vapour) = feed.phase_masses(Phase::vapour);
    else product.phase_masses(Phase::vapour) = feed.phase_masses(Phase::vapour);
    product.set_bulk_density(s_.product_bulk_density);

    const double ground_kg = to_si(feed.phase_total(Phase::solid));
    if (ground_kg <= 0.0) context.warnings.add(who + ": the feed has no solids to grind");

    // Solid density of the solids mix (no voids), to check the bulk density.
    Stream solids_only = empty_like(feed, feed.temperature(), feed.pressure());
    solids_only.phase_masses(Phase::solid) = solids;
    const double solid_volume = ground_kg > 0.0 ? to_si(solids_only.condensed_volume(&context.warnings)) : 0.0;
    if (solid_volume > 0.0 && to_si(s_.product_bulk_density) > ground_kg / solid_volume)
      context.warnings.add(who + ": product_bulk_density " + format_number(to_si(s_.product_bulk_density), 4) +
                           " kg/m3 is above the solid density of the polymer (" +
                           format_number(ground_kg / solid_volume, 4) + " kg/m3): check the value");

    // Electricity: E = e m / eta. The work ends as heat to the room (the
    // regrind warms a few kelvin and cools again): no work to the streams.
    const double e = to_si(s_.specific_energy);
    const double electricity = e * ground_kg / s_.drive_efficiency;
    resources.electricity_J = electricity;
    resources.work_to_streams_J = 0.0;
    resources.process_heat_J = 0.0;
    resources.heat_source = "electric";

    if (context.basis == Basis::batch) {
      if (s_.throughput) {
        resources.duration_s = ground_kg / to_si(*s_.throughput);
        const double motor = e * to_si(*s_.throughput) / s_.drive_efficiency;
        resources.equipment.push_back({"grinder", "grinder", "power", motor, "W"});
        resources.add_figure("motor_power", motor, "W", "drive power at the rated throughput, e x throughput / eta");
      }
    } else {
      // kg per hour on a continuous basis: the power follows from the feed.
      const double feed_rate = ground_kg / 3600.0;
      double rated = feed_rate;
      if (s_.throughput) {
        rated = to_si(*s_.throughput);
        if (feed_rate > rated * (1.0 + 1e-9))
          context.warnings.add(who + ": the feed (" + format_number(feed_rate * 3600.0, 4) +
                               " kg/h) exceeds the stated throughput (" + format_number(rated * 3600.0, 4) + " kg/h)");
      }
      const double motor = e * rated / s_.drive_efficiency;
      resources.equipment.push_back({"grinder", "grinder", "power", motor, "W"});
      resources.add_figure("motor_power", motor, "W", "drive power, e x throughput / eta");
    }

    if (e < plausible_specific_energy_low_J_per_kg || e > plausible_specific_energy_high_J_per_kg)
      context.warnings.add(who + ": specific_energy of " + format_number(e / 3600.0, 4) +
                           " kWh/t is outside the usual 5-500 kWh/t of plastics granulators and shredders: check "
                           "the value and its unit");

    resources.add_figure("mass_ground", ground_kg, "kg", "solids fed to the grinder");
    resources.add_figure("dust_mass", to_si(dust.total_mass()), "kg", "fines lost as dust");
    resources.add_figure("electricity_per_mass", ground_kg > 0.0 ? electricity / ground_kg : 0.0, "J/kg",
                         "electricity per kg ground, e / eta");
    std::optional<double> volume_before;
    if (auto bulk = feed.bulk_density(); bulk && ground_kg > 0.0) {
      volume_before = ground_kg / to_si(*bulk);
    } else if (ground_kg > 0.0) {
      context.warnings.add(who + ": the feed has no bulk density: the volume before grinding and the volume "
                                 "reduction ratio are not reported");
    }
    const double product_solids = to_si(product.phase_total(Phase::solid));
    const double volume_after = product_solids / to_si(s_.product_bulk_density);
    if (volume_before) resources.add_figure("volume_before", *volume_before, "m3", "bulk volume of the feed");
    resources.add_figure("volume_after", volume_after, "m3", "bulk volume of the regrind");
    if (volume_before && volume_after > 0.0)
      resources.add_figure("volume_reduction_ratio", *volume_before / volume_after, "-",
                           "bulk volume before / after");

    resources.cautions.push_back(
        "Grinding polymer makes combustible dust: extract it at the source, keep dust layers from building up, "
        "bond and earth the machine, and keep ignition sources away (dust explosion hazard).");
    resources.cautions.push_back(
        "Granulators and shredders are loud: hearing protection and a noise assessment are usually needed.");
    resources.cautions.push_back(
        "Cutting rotors must be guarded and interlocked; never reach into the feed throat of a running or "
        "coasting machine; lock out before clearing a jam.");
  }

 private:
  SizeReductionSettings s_;
};

std::string path_in(const MappingReader& parameters, std::string_view key) {
  return parameters.path().empty() ? std::string(key) : parameters.path() + "." + std::string(key);
}

std::unique_ptr<BlockModel> make_size_reduction(MappingReader& parameters, const BlockSetup&) {
  SizeReductionSettings s;
  s.specific_energy = parameters.quantity<SpecificEnergy>("specific_energy");
  const double e = to_si(s.specific_energy);
  if (parameters.has("specific_energy")) {
    if (!(e > 0.0)) {
      parameters.error("specific_energy", "'" + path_in(parameters, "specific_energy") +
                                              "' must be positive (expected an energy per mass such as \"60 kWh/t\")");
    }
  }
  s.drive_efficiency = parameters.number_in("drive_efficiency", 0.85, 0.05, 1.0);
  s.product_bulk_density = parameters.quantity<Density>("product_bulk_density");
  if (parameters.has("product_bulk_density") && !(to_si(s.product_bulk_density) > 0.0))
    parameters.error("product_bulk_density", "'" + path_in(parameters, "product_bulk_density") + "' must be positive");
  s.fines_fraction = parameters.number_in("fines_fraction", 0.01, 0.0, 0.999);
  s.throughput = parameters.optional_quantity<MassFlow>("throughput");
  if (s.throughput && !(to_si(*s.throughput) > 0.0)) {
    parameters.error("throughput", "'" + path_in(parameters, "throughput") + "' must be positive (such as \"20 kg/h\")");
    s.throughput.reset();
  }
  parameters.finish();
  return std::make_unique<SizeReduction>(s);
}

}  // namespace

void register_size_reduction(BlockRegistry& registry) {
  registry.add({"size_reduction",
                "grinds or shreds foam; electricity from the specific energy, fines lost as dust",
                make_size_reduction});
}

}  // namespace unchain::units
