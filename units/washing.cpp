#include "units/washing.hpp"

#include <algorithm>
#include <boost/math/tools/toms748_solve.hpp>
#include <cmath>
#include <cstdint>
#include <map>
#include <memory>
#include <optional>
#include <sstream>
#include <string>
#include <vector>

#include "flowsheet/diagnostics.hpp"
#include "flowsheet/pure_properties.hpp"
#include "flowsheet/yaml_reader.hpp"
#include "units/block_helpers.hpp"
#include "units/block_registry.hpp"

namespace unchain::units {

double theoretical_oxygen_demand_per_mass(const ElementCounts& formula, std::string* ignored) {
  auto count = [&](const char* symbol) {
    auto it = formula.find(symbol);
    return it == formula.end() ? 0.0 : it->second;
  };
  const double c = count("C");
  if (!(c > 0.0)) return 0.0;
  const double h = count("H"), o = count("O"), n = count("N");
  const double x = count("F") + count("Cl") + count("Br") + count("I");
  if (ignored != nullptr) {
    ignored->clear();
    for (const auto& [symbol, amount] : formula) {
      if (symbol == "C" || symbol == "H" || symbol == "O" || symbol == "N" || symbol == "F" || symbol == "Cl" ||
          symbol == "Br" || symbol == "I" || amount == 0.0)
        continue;
      *ignored += (ignored->empty() ? "" : ", ") + symbol;
    }
  }
  const double oxygen_moles = c + (h - 3.0 * n - x) / 4.0 - o / 2.0;
  const double oxygen_molar_mass = 2.0 * standard_atomic_weight("O").value();
  return std::max(oxygen_moles, 0.0) * oxygen_molar_mass / molar_mass_of(formula);
}

namespace {

using Index = Eigen::Index;

// Above this partition coefficient the estimate from the water solubility
// is rough (the solute is far from dilute in the water): the user should
// give a measured value.
constexpr double rough_partition_above = 0.05;
// Water solubility data more than this away from the wash temperature are
// flagged: solubilities of aromatics change by tens of percent over it.
constexpr double solubility_temperature_window_K = 25.0;
// Constant partition coefficients hold for dilute solutes; beyond a few
// percent in the water they drift. Source: common practice.
constexpr double dilute_limit = 0.05;

struct WashSpec {
  std::size_t water = 0;  // index of water in the component set
  int washes = 1;
  double water_to_organic_ratio = 1.0;
  bool ratio_given = false;
  std::map<std::size_t, double> partition_given;
  double water_entrainment = 0.005;
  double water_solubility_in_organic = 0.0;
  std::optional<Temperature> temperature;
  std::optional<Temperature> wash_water_temperature;
  HeatSupply supply;
};

// The two liquid phases of one wash, kg per component.
struct WashSplit {
  Eigen::VectorXd organic;  // organic phase with the aqueous phase it carries along
  Eigen::VectorXd aqueous;  // the aqueous phase drained off
};

// One equilibrium stage. Solutes split so that their mass fractions obey
// w_i / A = K_i o_i / O, with A and O the masses of the two phases:
//   o_i = m_i / (1 + K_i r),  r = A / O,
// and r found from its own definition (a bracketed root, so the phase
// masses are the actual ones, not the feed ratio). Water dissolves in the
// organic phase up to its solubility; the rest is the aqueous phase, of
// which `entrainment` kg per kg of organic phase is carried along.
WashSplit wash_stage(const Eigen::VectorXd& m, const Eigen::VectorXd& K, std::size_t water, double water_solubility,
                     double entrainment) {
  const auto w = static_cast<Index>(water);
  const Index n = m.size();
  const double dissolved_per_organic = water_solubility / (1.0 - water_solubility);
  Eigen::VectorXd o(n), a(n);
  double O = 0.0, A = 0.0;
  auto split = [&](double r) {
    double organic_solutes = 0.0, aqueous_solutes = 0.0;
    for (Index i = 0; i < n; ++i) {
      if (i == w) continue;
      const double Kr = K[i] * r;
      // The smaller share is computed, the larger is the rest: the
      // balance closes to rounding.
      if (Kr <= 1.0) {
        o[i] = m[i] / (1.0 + Kr);
        a[i] = m[i] - o[i];
      } else {
        a[i] = m[i] * Kr / (1.0 + Kr);
        o[i] = m[i] - a[i];
      }
      organic_solutes += o[i];
      aqueous_solutes += a[i];
    }
    o[w] = std::min(dissolved_per_organic * organic_solutes, m[w]);
    a[w] = m[w] - o[w];
    O = organic_solutes + o[w];
    A = aqueous_solutes + a[w];
  };
  split(0.0);
  if (!(A > 0.0) || !(a[w] > 0.0))
    throw ModelError(
        "washing: the water dissolves entirely in the organic phase; no aqueous phase forms (use more "
        "water per wash)");
  if (!(O > 0.0)) throw ModelError("washing: the feed holds no organic phase");
  auto g = [&](double r) {
    split(r);
    if (!(O > 0.0)) return -r;  // the organic phase is gone: r is past the root
    return A / O - r;
  };
  double high = std::max(1.0, 2.0 * g(0.0));
  double g_high = g(high);
  for (int doubling = 0; g_high > 0.0; ++doubling) {
    if (doubling > 80)
      throw ModelError(
          "washing: the organic phase dissolves in the water; the partition coefficients are too high "
          "for a water wash");
    high *= 2.0;
    g_high = g(high);
  }
  std::uintmax_t iterations = 200;
  const auto bracket = boost::math::tools::toms748_solve(g, 0.0, high, g(0.0), g_high,
                                                         boost::math::tools::eps_tolerance<double>(50), iterations);
  split(0.5 * (bracket.first + bracket.second));

  const double carried = entrainment * O;
  if (carried >= A) throw ModelError("washing: the water entrainment takes the whole aqueous phase");
  const double f = carried / A;
  WashSplit out;
  out.organic = o + f * a;
  out.aqueous = a - f * a;
  return out;
}

class Washing final : public BlockModel {
 public:
  explicit Washing(WashSpec spec) : spec_(std::move(spec)) {}

  [[nodiscard]] std::vector<PortSpec> inlet_ports() const override {
    return {single_port("organic", "the crude organic liquid to wash"),
            optional_port("water", "wash water for all washes together; if absent the block supplies it")};
  }
  [[nodiscard]] std::vector<PortSpec> outlet_ports() const override {
    return {single_port("washed_organic", "the washed organic liquid with the water it carries"),
            single_port("aqueous_waste", "the spent wash water of all washes")};
  }

  void compute(const BlockContext& context, const BlockPorts& ports, BlockResources& resources) const override;

 private:
  WashSpec spec_;

  [[nodiscard]] Eigen::VectorXd partition_coefficients(const ComponentSet& components, const Eigen::VectorXd& present,
                                                       Temperature T, const std::string& block,
                                                       Warnings& warnings) const;
};

Eigen::VectorXd Washing::partition_coefficients(const ComponentSet& components, const Eigen::VectorXd& present,
                                                Temperature T, const std::string& block, Warnings& warnings) const {
  const std::size_t n = components.size();
  Eigen::VectorXd K = Eigen::VectorXd::Zero(static_cast<Index>(n));
  for (std::size_t i = 0; i < n; ++i) {
    const auto k = static_cast<Index>(i);
    const Component& c = components[i];
    if (i == spec_.water) continue;
    if (auto given = spec_.partition_given.find(i); given != spec_.partition_given.end()) {
      K[k] = given->second;
      continue;
    }
    // Polymers, solids and permanent gases stay with the organic phase.
    if (c.kind != ComponentKind::volatile_liquid) continue;
    if (!c.water_solubility) {
      if (present[k] > 0.0)
        warnings.add("washing '" + block + "': " + c.id +
                     " has no water-solubility data; it is taken as insoluble in water (give "
                     "partition_coefficients to change that)");
      continue;
    }
    // K = (mass fraction in water) / (mass fraction in the organic phase),
    // both at saturation: the solubility in water over about 1 for the
    // organic phase (the solute as nearly pure liquid).
    K[k] = c.water_solubility->mass_fraction;
    if (present[k] <= 0.0) continue;
    if (K[k] > rough_partition_above)
      warnings.add("washing '" + block + "': " + c.id + " is " +
                   (K[k] >= 1.0 ? std::string("miscible with water") : "quite soluble in water") +
                   "; its partition coefficient from the water solubility (K = " + format_number(K[k], 3) +
                   ") is a rough estimate, give a measured value in partition_coefficients");
    if (std::abs(in_kelvin(T) - c.water_solubility->temperature_K) > solubility_temperature_window_K)
      warnings.add("washing '" + block + "': the water solubility of " + c.id + " is for " +
                   format_celsius(kelvin(c.water_solubility->temperature_K)) + ", used at " + format_celsius(T));
  }
  return K;
}

double liquid_outlets_enthalpy(const Stream& organic, const Stream& aqueous, double T_K) {
  Stream a = organic, b = aqueous;
  a.set_temperature(kelvin(T_K));
  b.set_temperature(kelvin(T_K));
  return to_si(a.enthalpy()) + to_si(b.enthalpy());
}

void Washing::compute(const BlockContext& context, const BlockPorts& ports, BlockResources& resources) const {
  const ComponentSet& components = context.components;
  const std::string& block = context.block_name;
  const std::size_t n = components.size();
  const auto size = static_cast<Index>(n);
  const auto w = static_cast<Index>(spec_.water);
  const Stream& organic_feed = ports.inlet("organic");
  const bool water_connected = ports.has_inlet("water");
  const Pressure P = organic_feed.pressure();
  Stream& washed = ports.outlet("washed_organic");
  Stream& aqueous = ports.outlet("aqueous_waste");

  // The organic liquid: the feed's liquid, with any condensable vapour
  // taken as condensed (washing is a liquid operation). Solids and
  // permanent gas in the vapour pass through with the washed organic.
  Eigen::VectorXd liquid = organic_feed.phase_masses(Phase::liquid);
  Eigen::VectorXd passing_vapour = Eigen::VectorXd::Zero(size);
  bool condensed_vapour = false;
  for (std::size_t i = 0; i < n; ++i) {
    const auto k = static_cast<Index>(i);
    const double v = organic_feed.phase_masses(Phase::vapour)[k];
    if (v <= 0.0) continue;
    if (components[i].kind == ComponentKind::gas) {
      passing_vapour[k] = v;
    } else {
      liquid[k] += v;
      condensed_vapour = true;
    }
  }
  if (condensed_vapour)
    context.warnings.add("washing '" + block + "': the organic feed carries vapour; it is taken as condensed");
  const double organic_mass = to_si(organic_feed.total_mass());

  // Wash water per wash: the connected stream shared equally, or supplied
  // at the stated ratio to the organic feed.
  Eigen::VectorXd water_per_wash = Eigen::VectorXd::Zero(size);
  double supplied_water_kg = 0.0;
  Temperature supply_T = spec_.wash_water_temperature.value_or(context.ambient_temperature);
  if (water_connected) {
    const Stream& water = ports.inlet("water");
    water_per_wash = water.component_masses() / spec_.washes;
    if (spec_.ratio_given)
      context.warnings.add("washing '" + block +
                           "': a water stream is connected, so it sets the wash water; water_to_organic_ratio is "
                           "not used");
  } else {
    supplied_water_kg = spec_.water_to_organic_ratio * organic_mass * spec_.washes;
    water_per_wash[w] = spec_.water_to_organic_ratio * organic_mass;
  }
  if (!(organic_mass > 0.0)) {
    washed = empty_like(organic_feed, organic_feed.temperature(), P);
    aqueous = empty_like(organic_feed, organic_feed.temperature(), P);
    return;
  }

  const Temperature K_temperature = spec_.temperature.value_or(organic_feed.temperature());
  const Eigen::VectorXd K = partition_coefficients(components, liquid, K_temperature, block, context.warnings);

  Eigen::VectorXd spent = Eigen::VectorXd::Zero(size);
  double most_dissolved = 0.0;  // largest solute mass fraction in an aqueous phase
  for (int wash = 0; wash < spec_.washes; ++wash) {
    const WashSplit split =
        wash_stage(liquid + water_per_wash, K, spec_.water, spec_.water_solubility_in_organic, spec_.water_entrainment);
    liquid = split.organic;
    spent += split.aqueous;
    for (Index i = 0; i < size; ++i)
      if (i != w) most_dissolved = std::max(most_dissolved, split.aqueous[i] / split.aqueous.sum());
  }
  if (most_dissolved > dilute_limit)
    context.warnings.add("washing '" + block + "': a solute reaches " + format_number(100.0 * most_dissolved, 3) +
                         " % by mass in the wash water, beyond the dilute range where constant partition "
                         "coefficients hold (about " +
                         format_number(100.0 * dilute_limit, 2) + " %)");

  washed = Stream(components);
  washed.phase_masses(Phase::liquid) = liquid;
  washed.phase_masses(Phase::solid) = organic_feed.phase_masses(Phase::solid);
  washed.phase_masses(Phase::vapour) = passing_vapour;
  aqueous = Stream(components);
  aqueous.phase_masses(Phase::liquid) = spent;

  // Energy: at the stated temperature, the heat that takes; otherwise
  // adiabatic, at the temperature where the outlets hold the inlets'
  // enthalpy. Water the block supplies comes in at its supply temperature.
  double H_in = to_si(organic_feed.enthalpy(&context.warnings));
  if (water_connected) H_in += to_si(ports.inlet("water").enthalpy(&context.warnings));
  Eigen::VectorXd supplied = Eigen::VectorXd::Zero(size);
  supplied[w] = supplied_water_kg;
  const double H_supplied = to_si(phase_enthalpy(components, supplied, Phase::liquid, supply_T, &context.warnings));
  double T_K = 0.0;
  if (spec_.temperature) {
    T_K = in_kelvin(*spec_.temperature);
  } else {
    const double target = H_in + H_supplied;
    auto f = [&](double T) { return liquid_outlets_enthalpy(washed, aqueous, T) - target; };
    double low = std::min(in_kelvin(organic_feed.temperature()), in_kelvin(supply_T));
    double high = std::max(in_kelvin(organic_feed.temperature()), in_kelvin(supply_T));
    if (water_connected) {
      low = std::min(low, in_kelvin(ports.inlet("water").temperature()));
      high = std::max(high, in_kelvin(ports.inlet("water").temperature()));
    }
    low -= 1.0;
    high += 1.0;
    double f_low = f(low), f_high = f(high);
    for (int widen = 0; f_low > 0.0 && widen < 20; ++widen) f_low = f(low -= 20.0);
    for (int widen = 0; f_high < 0.0 && widen < 20; ++widen) f_high = f(high += 20.0);
    if (f_low > 0.0 || f_high < 0.0) throw ModelError("washing '" + block + "': no adiabatic wash temperature found");
    std::uintmax_t iterations = 200;
    const auto bracket = boost::math::tools::toms748_solve(f, low, high, f_low, f_high,
                                                           boost::math::tools::eps_tolerance<double>(50), iterations);
    T_K = 0.5 * (bracket.first + bracket.second);
  }
  set_state(washed, kelvin(T_K), P);
  set_state(aqueous, kelvin(T_K), P);
  const double H_out = to_si(washed.enthalpy(&context.warnings)) + to_si(aqueous.enthalpy(&context.warnings));
  const double Q = spec_.temperature ? H_out - H_in - H_supplied : 0.0;
  if (spec_.temperature) book_heat_duty(resources, joules(Q), spec_.supply);
  if (components[spec_.water].vapour_pressure && T_K > in_kelvin(saturation_temperature(components[spec_.water], P)))
    context.warnings.add("washing '" + block + "': the wash runs above the boiling point of water at its pressure");

  if (supplied_water_kg > 0.0) {
    resources.materials.push_back({"wash water", "process_water", supplied_water_kg, "kg"});
    resources.add_figure(
        "supplied_water_enthalpy", H_supplied, "J",
        "enthalpy of the wash water the block supplies (not an inlet stream), at " + format_celsius(supply_T));
  }

  // ---- the aqueous waste and its oxygen demand -----------------------------------------
  double thod_kg = 0.0, dissolved_organics_kg = 0.0;
  for (std::size_t i = 0; i < n; ++i) {
    const auto k = static_cast<Index>(i);
    if (k == w || spent[k] <= 0.0) continue;
    std::string ignored;
    const double per_mass = theoretical_oxygen_demand_per_mass(components[i].formula, &ignored);
    if (per_mass <= 0.0) continue;
    thod_kg += spent[k] * per_mass;
    dissolved_organics_kg += spent[k];
    if (!ignored.empty())
      context.warnings.add("washing '" + block + "': the oxygen demand of " + components[i].id + " leaves out " +
                           ignored);
  }
  const double waste_volume = to_si(aqueous.condensed_volume(&context.warnings));
  const double thod_concentration = waste_volume > 0.0 ? thod_kg / waste_volume : 0.0;

  resources.add_figure("number_of_washes", spec_.washes, "-", "cross-current washes, fresh water each");
  resources.add_figure("wash_water_mass", water_per_wash.sum() * spec_.washes, "kg", "wash water, all washes");
  resources.add_figure("wash_temperature", T_K, "K", spec_.temperature ? "as stated" : "adiabatic mixing");
  resources.add_figure("aqueous_waste_mass", spent.sum(), "kg", "spent wash water drained off");
  resources.add_figure("aqueous_waste_volume", waste_volume, "m3", "volume of the spent wash water");
  resources.add_figure("dissolved_organics_mass", dissolved_organics_kg, "kg", "organics lost to the wash water");
  resources.add_figure("aqueous_waste_oxygen_demand", thod_kg, "kg", "theoretical oxygen demand (ThOD), kg O2");
  resources.add_figure("aqueous_waste_oxygen_demand_concentration", thod_concentration, "kg/m3",
                       "ThOD of the aqueous waste (1 kg/m3 = 1000 mg/L)");
  resources.add_figure("water_in_washed_organic", liquid[w], "kg", "water carried on in the washed organic");
  const Eigen::VectorXd fed = organic_feed.component_masses();
  for (std::size_t i = 0; i < n; ++i) {
    const auto k = static_cast<Index>(i);
    if (k == w || K[k] <= 0.0 || fed[k] <= 0.0) continue;
    resources.add_figure("fraction_left_in_organic_" + components[i].id, washed.component_masses()[k] / fed[k], "-",
                         "share of the feed's " + components[i].id + " left in the washed organic");
  }

  // Working volume: the organic and one wash of water.
  Stream one_wash(components);
  one_wash.phase_masses(Phase::liquid) = water_per_wash;
  one_wash.set_temperature(kelvin(T_K));
  const double vessel_volume = to_si(organic_feed.condensed_volume()) + to_si(one_wash.condensed_volume());
  resources.equipment.push_back({"wash vessel", "vessel", "volume", vessel_volume, "m3"});

  std::ostringstream caution;
  caution << "The aqueous waste (" << format_number(spent.sum(), 3) << " kg, "
          << format_number(waste_volume * 1000.0, 3) << " L per basis) carries dissolved organics with a theoretical "
          << "oxygen demand of about " << format_number(thod_concentration * 1000.0, 3)
          << " mg/L: do not pour it down the drain; collect it and dispose of it under local rules.";
  resources.cautions.push_back(caution.str());
  resources.cautions.push_back(
      "The crude oil is flammable and gives off aromatic vapour (styrene, toluene): wash in a ventilated place, away "
      "from ignition sources, with gloves and eye protection.");
}

// ---- reading the parameters ------------------------------------------------------------------

std::string key_path(const MappingReader& parameters, std::string_view key) {
  return parameters.path().empty() ? std::string(key) : parameters.path() + "." + std::string(key);
}

std::unique_ptr<BlockModel> make_washing(MappingReader& parameters, const BlockSetup& setup) {
  WashSpec spec;
  if (auto water = setup.components.index_of("water")) {
    spec.water = *water;
  } else {
    parameters.error({},
                     "'" + parameters.path() + "': washing needs the component 'water' among the case's components");
  }
  const double washes = parameters.number_in("number_of_washes", 1.0, 1.0, 20.0);
  if (washes != std::floor(washes))
    parameters.error("number_of_washes", "'" + key_path(parameters, "number_of_washes") +
                                             "' must be a whole number (found " + format_number(washes) + ")");
  spec.washes = static_cast<int>(washes);
  spec.ratio_given = parameters.has("water_to_organic_ratio");
  // Equal masses of water and oil per wash is the usual starting point.
  // Source: common practice.
  spec.water_to_organic_ratio = parameters.number_in("water_to_organic_ratio", 1.0, 0.01, 100.0);
  // Half a percent of water carried over in the separated organic after
  // settling. Source: common practice.
  spec.water_entrainment = parameters.number_in("water_entrainment", 0.005, 0.0, 0.2);
  spec.water_solubility_in_organic = parameters.number_in("water_solubility_in_organic", 0.0, 0.0, 0.2);
  spec.temperature = parameters.optional_quantity<Temperature>("temperature");
  spec.wash_water_temperature = parameters.optional_quantity<Temperature>("wash_water_temperature");
  spec.supply = read_heat_supply(parameters);
  auto given = parameters.optional_mapping("partition_coefficients");
  if (!given && parameters.has("partition_coefficients"))
    parameters.error("partition_coefficients", "'" + key_path(parameters, "partition_coefficients") +
                                                   "' must be a mapping of component ids to values, such as "
                                                   "{acetone: 0.8}");
  if (given) {
    for (const auto& item : given->node()) {
      const std::string id = item.first.Scalar();
      const auto index = setup.components.index_of(id);
      const auto value = given->optional_number_in(id, 0.0, 1e6);
      if (!index) {
        given->error(id,
                     "'" + given->path() + "." + id + "': component '" + id + "' is not among the case's components");
        continue;
      }
      if (*index == spec.water) {
        given->error(id, "'" + given->path() + "." + id + "': water is the wash liquid, not a solute");
        continue;
      }
      if (value) spec.partition_given[*index] = *value;
    }
    given->finish();
  }
  parameters.finish();
  return std::make_unique<Washing>(std::move(spec));
}

}  // namespace

void register_washing(BlockRegistry& registry) {
  registry.add({"washing",
                "cross-current water wash of an organic liquid, equilibrium stages; reports the aqueous waste and its "
                "oxygen demand",
                make_washing});
}

}  // namespace unchain::units
