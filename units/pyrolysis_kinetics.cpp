#include "units/pyrolysis_kinetics.hpp"

#include <boost/numeric/odeint.hpp>

#include <algorithm>
#include <cmath>
#include <sstream>
#include <stdexcept>

#include "flowsheet/diagnostics.hpp"
#include "flowsheet/yaml_reader.hpp"
#include "units/block_helpers.hpp"

namespace unchain::units {

namespace {

double arrhenius(double A, double E, double T_K) { return A * std::exp(-E / (gas_constant_J_per_mol_K * T_K)); }

std::string key_path(const MappingReader& parameters, std::string_view key) {
  return parameters.path().empty() ? std::string(key) : parameters.path() + "." + std::string(key);
}

}  // namespace

RateConstant KineticChannel::rate_constant(Temperature T) const {
  return from_si<RateConstant>(arrhenius(to_si(pre_exponential), to_si(activation_energy), in_kelvin(T)));
}

RateConstant KineticSet::total_rate_constant(Temperature T) const {
  double k = 0.0;
  for (const auto& c : channels) k += to_si(c.rate_constant(T));
  return from_si<RateConstant>(k);
}

std::vector<double> KineticSet::selectivities(Temperature T) const {
  std::vector<double> s;
  s.reserve(channels.size());
  double total = 0.0;
  for (const auto& c : channels) {
    s.push_back(to_si(c.rate_constant(T)));
    total += s.back();
  }
  if (total > 0.0)
    for (double& v : s) v /= total;
  return s;
}

void KineticSet::check_range(Temperature T, const std::string& who, Warnings& warnings) const {
  const double T_K = in_kelvin(T);
  const bool below = valid_from && T_K < in_kelvin(*valid_from);
  const bool above = valid_to && T_K > in_kelvin(*valid_to);
  if (!below && !above) return;
  std::string range = "stated range";
  if (valid_from && valid_to) range = format_celsius(*valid_from) + " to " + format_celsius(*valid_to);
  warnings.add(who + ": pyrolysis kinetics" + (polymer.empty() ? std::string() : " for " + polymer) + " used at " +
               format_celsius(T) + ", outside its range " + range + " (extrapolated)");
}

std::vector<std::string> KineticSet::products() const {
  std::vector<std::string> out;
  for (const auto& c : channels) out.push_back(c.product);
  return out;
}

// ---- the built-in polystyrene set ---------------------------------------------

const OverallRate& polystyrene_overall_rate() {
  // First-order overall rate of polystyrene thermal degradation.
  static const OverallRate rate{
      from_si<RateConstant>(2.0e13),  // 1/s: Westerhout, Waanders, Kuipers & van Swaaij, Ind. Eng. Chem. Res. 36
                                      // (1997) 1955, first-order fit for PS (from memory; checked here against the
                                      // usual TGA peak of PS near 420 degC at 10 K/min, docs/blocks-pyrolysis.md)
      from_si<MolarEnergy>(204.0e3),  // J/mol: same paper, first-order fit for PS, about 204 kJ/mol (from memory)
      "Westerhout, Waanders, Kuipers & van Swaaij, Ind. Eng. Chem. Res. 36 (1997) 1955, first-order rate of "
      "polystyrene, E = 204 kJ/mol, k0 = 2e13 1/s (from memory)"};
  return rate;
}

const std::array<ProductSlate, 2>& polystyrene_product_slates() {
  // Product slates of polystyrene pyrolysis, mass fractions of the polymer
  // converted. Styrene at 500 and 600 degC: Liu, Qian & Wang, Fuel Process.
  // Technol. 63 (2000) 45, fluidized bed, styrene about 70 % at 500 degC
  // rising to about 77-79 % at 600 degC, dimer and trimer falling and
  // benzene, toluene and gas rising with temperature (from memory). The
  // minor products are rounded recollections of that trend, and char (coke
  // and hydrogen-poor heavy residue, lumped) is chosen within the recalled
  // range so that each slate closes C and H within 0.05 % of the mass
  // (docs/blocks-pyrolysis.md). They sum to 1.
  static const std::string source =
      "Liu, Qian & Wang, Fuel Process. Technol. 63 (2000) 45, fluidized-bed pyrolysis of polystyrene (from memory; "
      "minor products rounded, char set so that C and H nearly close)";
  static const std::array<ProductSlate, 2> slates{{
      {celsius(500.0),
       {
           {"styrene", 0.700},              // Liu et al. (2000), about 70 % at 500 degC (from memory)
           {"toluene", 0.030},              // Liu et al. (2000), a few per cent (from memory)
           {"ethylbenzene", 0.020},         // Liu et al. (2000), 1-3 % (from memory)
           {"alpha_methylstyrene", 0.022},  // Liu et al. (2000), 2-3 % (from memory)
           {"benzene", 0.006},              // Liu et al. (2000), below 1 % at 500 degC (from memory)
           {"styrene_dimer", 0.110},        // Liu et al. (2000), dimer about 10 % (from memory)
           {"styrene_trimer", 0.070},       // Liu et al. (2000), trimer and heavier, several % (from memory)
           {"methane", 0.004},              // Liu et al. (2000), gas below 1 % at 500 degC (from memory)
           {"ethylene", 0.003},             // Liu et al. (2000), as methane (from memory)
           {"hydrogen", 0.0005},            // Liu et al. (2000), traces (from memory)
           {"char", 0.0345},                // set here so that C and H close within 0.05 % (see docs)
       },
       source},
      {celsius(600.0),
       {
           {"styrene", 0.768},              // Liu et al. (2000), maximum near 77-79 % at 600 degC (from memory)
           {"toluene", 0.040},              // Liu et al. (2000), rising with temperature (from memory)
           {"ethylbenzene", 0.016},         // Liu et al. (2000), falling slightly (from memory)
           {"alpha_methylstyrene", 0.022},  // Liu et al. (2000), about constant (from memory)
           {"benzene", 0.014},              // Liu et al. (2000), rising with temperature (from memory)
           {"styrene_dimer", 0.060},        // Liu et al. (2000), falling with temperature (from memory)
           {"styrene_trimer", 0.018},       // Liu et al. (2000), falling with temperature (from memory)
           {"methane", 0.007},              // Liu et al. (2000), gas about 1-2 % at 600 degC (from memory)
           {"ethylene", 0.006},             // Liu et al. (2000), as methane (from memory)
           {"hydrogen", 0.001},             // Liu et al. (2000), traces (from memory)
           {"char", 0.048},                 // set here so that C and H close within 0.05 % (see docs)
       },
       source},
  }};
  return slates;
}

KineticSet fit_parallel_channels(const OverallRate& overall, const ProductSlate& low, const ProductSlate& high) {
  const double T1 = in_kelvin(low.temperature);
  const double T2 = in_kelvin(high.temperature);
  if (!(T2 > T1)) throw std::invalid_argument("fit_parallel_channels: the second slate must be at the higher temperature");
  if (low.fractions.size() != high.fractions.size())
    throw std::invalid_argument("fit_parallel_channels: the slates name different products");
  const double A = to_si(overall.pre_exponential);
  const double E = to_si(overall.activation_energy);
  const double k1 = arrhenius(A, E, T1);
  const double k2 = arrhenius(A, E, T2);
  KineticSet set;
  for (std::size_t j = 0; j < low.fractions.size(); ++j) {
    const auto& [product, w1] = low.fractions[j];
    const auto& [product2, w2] = high.fractions[j];
    if (product != product2) throw std::invalid_argument("fit_parallel_channels: products differ at position " + std::to_string(j));
    if (!(w1 > 0.0) || !(w2 > 0.0))
      throw std::invalid_argument("fit_parallel_channels: product '" + product + "' needs a positive fraction at both temperatures");
    const double kj1 = w1 * k1;
    const double kj2 = w2 * k2;
    const double Ej = gas_constant_J_per_mol_K * std::log(kj2 / kj1) / (1.0 / T1 - 1.0 / T2);
    const double Aj = kj1 * std::exp(Ej / (gas_constant_J_per_mol_K * T1));
    set.channels.push_back({product, from_si<RateConstant>(Aj), from_si<MolarEnergy>(Ej)});
  }
  return set;
}

const KineticSet& default_polystyrene_kinetics() {
  static const KineticSet set = [] {
    const auto& slates = polystyrene_product_slates();
    KineticSet s = fit_parallel_channels(polystyrene_overall_rate(), slates[0], slates[1]);
    s.polymer = "polystyrene";
    // The slates were measured from about 450 to 700 degC; the fit uses 500
    // and 600 degC and is trusted from 450 to 650 degC.
    s.valid_from = celsius(450.0);
    s.valid_to = celsius(650.0);
    s.source = "parallel first-order channels fitted here (docs/blocks-pyrolysis.md) to the overall rate of " +
               polystyrene_overall_rate().source + " and the product slates at 500 and 600 degC of " +
               slates[0].source;
    return s;
  }();
  return set;
}

// ---- conversion ---------------------------------------------------------------------

double isothermal_conversion(RateConstant k, Time t) { return -std::expm1(-to_si(k) * to_si(t)); }

Time time_between_conversions(RateConstant k, double from, double to) {
  if (from >= to) return seconds(0.0);
  if (!(to < 1.0)) throw std::invalid_argument("time_between_conversions: the target conversion must be below 1");
  if (!(to_si(k) > 0.0)) throw std::invalid_argument("time_between_conversions: the rate constant must be positive");
  // ln((1 - from) / (1 - to)) with log1p for conversions near zero.
  return seconds((std::log1p(-from) - std::log1p(-to)) / to_si(k));
}

double mixed_flow_conversion(RateConstant k, Time tau) {
  const double k_tau = to_si(k) * to_si(tau);
  if (!(k_tau > 0.0)) return 0.0;
  // 1 - 1 / (1 + k tau) loses digits for small k tau; this form does not,
  // and it tends to 1 without overflow for large k tau.
  return k_tau / (1.0 + k_tau);
}

HistoryResult integrate_conversion(const KineticSet& kinetics, const std::function<Temperature(Time)>& temperature,
                                   Time duration) {
  namespace odeint = boost::numeric::odeint;
  using State = std::vector<double>;
  const std::size_t n = kinetics.channels.size();
  HistoryResult result;
  result.product_yields.assign(n, 0.0);
  const double t_end = to_si(duration);
  if (!(t_end > 0.0) || n == 0) return result;

  // State: K = integral of the total rate constant over time, then the
  // product of each channel. The unconverted fraction is exp(-K). Written
  // this way the equations are quadratures (no right-hand side depends on
  // its own variable), so fast kinetics are not stiff: integrating the
  // unconverted fraction itself, x' = -k x, with an explicit stepper needs
  // steps of about 1/k, and a case with k near 1e6 1/s took minutes.
  State x(n + 1, 0.0);
  auto system = [&](const State& state, State& dxdt, double t) {
    const Temperature T = temperature(seconds(t));
    const double unconverted = std::exp(-state[0]);
    double k_total = 0.0;
    for (std::size_t j = 0; j < n; ++j) {
      const double kj = to_si(kinetics.channels[j].rate_constant(T));
      dxdt[j + 1] = kj * unconverted;
      k_total += kj;
    }
    dxdt[0] = k_total;
  };
  // Tolerances far below the precision of any kinetic data, so that the
  // integration error never shows next to the data's own uncertainty.
  auto stepper = odeint::make_controlled(1e-13, 1e-11, odeint::runge_kutta_dopri5<State>());
  odeint::integrate_adaptive(stepper, system, x, 0.0, t_end, t_end * 1e-4);
  result.conversion = -std::expm1(-x[0]);
  for (std::size_t j = 0; j < n; ++j) result.product_yields[j] = x[j + 1];
  return result;
}

// ---- reading ------------------------------------------------------------------------------

std::optional<KineticSet> read_kinetic_set(MappingReader& parameters, std::string_view key,
                                           const ComponentSet& components) {
  if (!parameters.has(key)) {
    parameters.accept(key);
    return std::nullopt;
  }
  const YAML::Node node = parameters.raw(key);
  if (!node.IsMap()) {
    parameters.error(key, "'" + key_path(parameters, key) +
                              "' must be a mapping (expected {channels: [{product, pre_exponential, "
                              "activation_energy}, ...]})");
    return std::nullopt;
  }
  MappingReader set_reader = parameters.mapping(key);
  KineticSet set;
  bool ok = true;
  set.source = set_reader.text("source", "given in the case");
  const YAML::Node channels = set_reader.raw("channels");
  if (!channels.IsDefined() || !channels.IsSequence() || channels.size() == 0) {
    set_reader.error({}, "'" + key_path(set_reader, "channels") +
                             "' must be a non-empty list of {product, pre_exponential, activation_energy}");
    ok = false;
  } else {
    for (std::size_t i = 0; i < channels.size(); ++i) {
      MappingReader item(channels[i], parameters.file(), key_path(set_reader, "channels") + "[" + std::to_string(i) + "]",
                         parameters.diagnostics(), parameters.currency());
      if (!item.is_valid()) {
        ok = false;
        continue;
      }
      const auto product = read_component(item, "product", components);
      const auto A = item.optional_quantity<RateConstant>("pre_exponential");
      const auto E = item.optional_quantity<MolarEnergy>("activation_energy");
      if (!item.has("pre_exponential"))
        item.error({}, "missing required key '" + key_path(item, "pre_exponential") + "' (expected a rate such as \"1e13 1/s\")");
      if (!item.has("activation_energy"))
        item.error({}, "missing required key '" + key_path(item, "activation_energy") +
                           "' (expected a molar energy such as \"180 kJ/mol\")");
      if (A && !(to_si(*A) > 0.0)) item.error("pre_exponential", "'" + key_path(item, "pre_exponential") + "' must be positive");
      if (E && to_si(*E) < 0.0) item.error("activation_energy", "'" + key_path(item, "activation_energy") + "' must not be negative");
      item.finish();
      if (!product || !A || !E || !(to_si(*A) > 0.0) || to_si(*E) < 0.0) {
        ok = false;
        continue;
      }
      const std::string& id = components[*product].id;
      for (const auto& c : set.channels)
        if (c.product == id) {
          parameters.diagnostics().error(location_of(channels[i], parameters.file()),
                                         "'" + item.path() + "': product '" + id + "' has two channels");
          ok = false;
        }
      set.channels.push_back({id, *A, *E});
    }
  }
  const YAML::Node range = set_reader.raw("temperature_range");
  if (range.IsDefined()) {
    if (!range.IsSequence() || range.size() != 2) {
      set_reader.error("temperature_range", "'" + key_path(set_reader, "temperature_range") +
                                                "' must be a list of two temperatures such as [\"400 degC\", \"550 degC\"]");
      ok = false;
    } else {
      set.valid_from = read_quantity_node<Temperature>(range[0], parameters.file(),
                                                       key_path(set_reader, "temperature_range") + "[0]",
                                                       parameters.diagnostics());
      set.valid_to = read_quantity_node<Temperature>(range[1], parameters.file(),
                                                     key_path(set_reader, "temperature_range") + "[1]",
                                                     parameters.diagnostics());
      if (!set.valid_from || !set.valid_to) {
        ok = false;
      } else if (!(in_kelvin(*set.valid_to) > in_kelvin(*set.valid_from))) {
        set_reader.error("temperature_range", "'" + key_path(set_reader, "temperature_range") +
                                                  "' must go from the lower to the higher temperature");
        ok = false;
      }
    }
  }
  set_reader.finish();
  if (!ok) return std::nullopt;
  return set;
}

}  // namespace unchain::units
