#include "units/shortcut_distillation.hpp"

#include <Eigen/Dense>
#include <algorithm>
#include <boost/math/tools/toms748_solve.hpp>
#include <cmath>
#include <cstdint>
#include <limits>
#include <memory>
#include <optional>
#include <sstream>
#include <string>

#include "flowsheet/diagnostics.hpp"
#include "flowsheet/yaml_reader.hpp"
#include "units/block_helpers.hpp"
#include "units/block_registry.hpp"

namespace unchain::units {

namespace {

using Index = Eigen::Index;

constexpr int max_fenske_iterations = 200;
constexpr double volatility_tolerance = 1e-12;
// Below this key relative volatility the split is hard: many stages, high
// reflux, and the shortcut is sensitive to the data. Source: common practice.
constexpr double hard_split_volatility = 1.2;
// Gilliland's correlation rests on data between these abscissae (Gilliland,
// Ind. Eng. Chem. 32 (1940) 1220; from memory).
constexpr double gilliland_lowest_X = 0.01;
constexpr double gilliland_highest_X = 0.9;
// The shortcut's constant relative volatility is taken as acceptable while
// top and bottom differ by less than this fraction. Source: common practice.
constexpr double volatility_spread_limit = 0.15;

// d_i / b_i = exp(log_ratio), split without overflow; the smaller share is
// computed and the larger is the rest.
void split_by_log_ratio(double feed, double log_ratio, double& d, double& b) {
  if (log_ratio > 0.0) {
    b = feed / (1.0 + std::exp(log_ratio));
    d = feed - b;
  } else {
    d = feed / (1.0 + std::exp(-log_ratio));
    b = feed - d;
  }
}

// K-values of the top stage: its vapour is the distillate at its dew point;
// the liquid there, in equilibrium with it, sets the activity coefficients.
Eigen::VectorXd top_stage_k_values(const KValueModel& model, const Eigen::VectorXd& y, Temperature T) {
  Eigen::VectorXd x = y;
  Eigen::VectorXd K = model.k_values(x, T);
  for (int pass = 0; pass < 20; ++pass) {
    Eigen::VectorXd next = Eigen::VectorXd::Zero(y.size());
    for (Index i = 0; i < y.size(); ++i)
      if (y[i] > 0.0 && K[i] > 0.0) next[i] = y[i] / K[i];
    next /= next.sum();
    const double change = (next - x).cwiseAbs().maxCoeff();
    x = next;
    K = model.k_values(x, T);
    if (change < 1e-14) break;
  }
  return K;
}

// Underwood's roots: sum_i alpha_i z_i / (alpha_i - theta) = 1 - q, one in
// each interval between consecutive volatilities from the heavy key's to
// the light key's. The left side rises from -inf to +inf across each
// interval, so each root is bracketed.
std::vector<double> underwood_roots(const Eigen::VectorXd& alpha, const Eigen::VectorXd& z, double q,
                                    double alpha_heavy, double alpha_light) {
  std::vector<double> poles;
  for (Index i = 0; i < alpha.size(); ++i)
    if (z[i] > 0.0 && alpha[i] >= alpha_heavy && alpha[i] <= alpha_light) poles.push_back(alpha[i]);
  std::sort(poles.begin(), poles.end());
  poles.erase(std::unique(poles.begin(), poles.end(), [](double a, double b) { return std::abs(a - b) <= 1e-12 * b; }),
              poles.end());
  auto phi = [&](double theta) {
    double sum = 0.0;
    for (Index i = 0; i < alpha.size(); ++i)
      if (z[i] > 0.0) sum += alpha[i] * z[i] / (alpha[i] - theta);
    return sum - (1.0 - q);
  };
  std::vector<double> roots;
  for (std::size_t j = 0; j + 1 < poles.size(); ++j) {
    const double a = poles[j], b = poles[j + 1];
    double gap = 1e-9 * (b - a);
    double low = a + gap, high = b - gap;
    for (int shrink = 0; shrink < 6 && !(phi(low) < 0.0 && phi(high) > 0.0); ++shrink) {
      gap *= 1e-3;
      low = a + gap;
      high = b - gap;
    }
    if (!(phi(low) < 0.0 && phi(high) > 0.0))
      throw ConvergenceError("Underwood: no root found between relative volatilities " + format_number(a) + " and " +
                             format_number(b));
    std::uintmax_t iterations = 200;
    const auto bracket = boost::math::tools::toms748_solve(phi, low, high, phi(low), phi(high),
                                                           boost::math::tools::eps_tolerance<double>(52), iterations);
    roots.push_back(0.5 * (bracket.first + bracket.second));
  }
  return roots;
}

}  // namespace

double eduljee_gilliland(double X) { return 0.75 * (1.0 - std::pow(std::clamp(X, 0.0, 1.0), 0.5668)); }

ShortcutDesign design_shortcut_column(const KValueModel& model, const Eigen::VectorXd& f,
                                      const ShortcutSpecification& spec) {
  const Index n = f.size();
  const auto lk = static_cast<Index>(spec.light_key);
  const auto hk = static_cast<Index>(spec.heavy_key);
  if (lk == hk) throw ModelError("the light and heavy keys must be different components");
  if (!(f[lk] > 0.0) || !(f[hk] > 0.0)) throw ModelError("both keys must be in the feed");
  for (double r : {spec.light_key_recovery, spec.heavy_key_recovery})
    if (!(r > 0.0 && r < 1.0)) throw ModelError("key recoveries must lie strictly between 0 and 1");
  const double F = f.sum();
  const Eigen::VectorXd z = f / F;

  ShortcutDesign design;
  Eigen::VectorXd d = Eigen::VectorXd::Zero(n), b = Eigen::VectorXd::Zero(n);
  d[lk] = spec.light_key_recovery * f[lk];
  b[lk] = f[lk] - d[lk];
  b[hk] = spec.heavy_key_recovery * f[hk];
  d[hk] = f[hk] - b[hk];
  // First estimate of the non-keys from the feed's bubble point: lighter
  // than the light key overhead, heavier than the heavy key to the bottoms.
  const StageEquilibrium feed_bubble = model.bubble_point(z, std::nullopt);
  if (!(feed_bubble.K[lk] > feed_bubble.K[hk]))
    throw ModelError("the light key is not more volatile than the heavy key at the feed's bubble point");
  for (Index i = 0; i < n; ++i) {
    if (i == lk || i == hk || !(f[i] > 0.0)) continue;
    if (feed_bubble.K[i] >= feed_bubble.K[lk])
      d[i] = f[i];
    else if (feed_bubble.K[i] <= feed_bubble.K[hk])
      d[i] = 0.0;
    else
      d[i] = 0.5 * f[i];
    b[i] = f[i] - d[i];
  }

  // Fenske at total reflux, with the volatilities of the top and bottom
  // that the non-key distribution in turn sets.
  Eigen::VectorXd alpha = Eigen::VectorXd::Zero(n);
  // Each Fenske pass starts its dew and bubble points from the last pass:
  // the compositions move little between passes. The first starts from the
  // feed's bubble point, which lies between the two (without a start the
  // dew point is found by a bracketing search, several times the work).
  std::optional<Temperature> top_guess = feed_bubble.temperature, bottom_guess = feed_bubble.temperature;
  for (int iteration = 1;; ++iteration) {
    if (iteration > max_fenske_iterations)
      throw ConvergenceError("Fenske: the relative volatilities did not settle with the product compositions");
    const Eigen::VectorXd x_D = d / d.sum();
    const Eigen::VectorXd x_B = b / b.sum();
    design.top_temperature = model.dew_point(x_D, top_guess);
    top_guess = design.top_temperature;
    const Eigen::VectorXd K_top = top_stage_k_values(model, x_D, design.top_temperature);
    const StageEquilibrium bottom = model.bubble_point(x_B, bottom_guess);
    bottom_guess = bottom.temperature;
    design.bottom_temperature = bottom.temperature;
    Eigen::VectorXd next = Eigen::VectorXd::Zero(n);
    for (Index i = 0; i < n; ++i)
      if (f[i] > 0.0 && K_top[i] > 0.0 && bottom.K[i] > 0.0)
        next[i] = std::sqrt((K_top[i] / K_top[hk]) * (bottom.K[i] / bottom.K[hk]));
    if (!(next[lk] > 1.0))
      throw ModelError(
          "the light key is not more volatile than the heavy key at the column's top and bottom (alpha = " +
          format_number(next[lk], 4) + ")");
    const double change = (next - alpha).cwiseAbs().maxCoeff() / next.maxCoeff();
    alpha = next;
    design.key_relative_volatility_top = K_top[lk] / K_top[hk];
    design.key_relative_volatility_bottom = bottom.K[lk] / bottom.K[hk];
    design.minimum_stages = std::log((d[lk] / b[lk]) * (b[hk] / d[hk])) / std::log(alpha[lk]);
    const double log_heavy_ratio = std::log(d[hk] / b[hk]);
    for (Index i = 0; i < n; ++i) {
      if (i == lk || i == hk || !(f[i] > 0.0)) continue;
      if (!(alpha[i] > 0.0)) {
        d[i] = 0.0;
        b[i] = f[i];
        continue;
      }
      split_by_log_ratio(f[i], design.minimum_stages * std::log(alpha[i]) + log_heavy_ratio, d[i], b[i]);
    }
    design.fenske_iterations = iteration;
    if (change < volatility_tolerance) break;
  }
  design.relative_volatility = alpha;
  design.key_relative_volatility = alpha[lk];
  design.distillate = d;
  design.bottoms = b;
  design.distillate_temperature = model.bubble_point(d / d.sum(), design.top_temperature).temperature;

  // Underwood. Components whose volatility lies between the keys'
  // distribute at minimum reflux; with m roots their distillate amounts and
  // V_min come from the m equations sum_i alpha_i d_i / (alpha_i - theta_j)
  // = V_min (linear). The others keep their Fenske distribution.
  design.underwood_roots = underwood_roots(alpha, z, spec.feed_condition, alpha[hk], alpha[lk]);
  std::vector<Index> between;
  for (Index i = 0; i < n; ++i)
    if (i != lk && i != hk && z[i] > 0.0 && alpha[i] > alpha[hk] && alpha[i] < alpha[lk]) between.push_back(i);
  // Two components of the same volatility between the keys share a root:
  // then they keep their Fenske distribution and one root gives V_min.
  if (between.size() + 1 != design.underwood_roots.size()) {
    between.clear();
    design.underwood_roots.resize(1);
    design.distributing_components_outside_feed = true;
  }
  const auto m = static_cast<Index>(design.underwood_roots.size());
  Eigen::MatrixXd A = Eigen::MatrixXd::Zero(m, m);
  Eigen::VectorXd rhs = Eigen::VectorXd::Zero(m);
  for (Index j = 0; j < m; ++j) {
    const double theta = design.underwood_roots[static_cast<std::size_t>(j)];
    for (Index i = 0; i < n; ++i) {
      if (!(f[i] > 0.0) || std::find(between.begin(), between.end(), i) != between.end()) continue;
      rhs[j] -= alpha[i] * d[i] / (alpha[i] - theta);
    }
    for (std::size_t k = 0; k < between.size(); ++k) {
      const Index i = between[k];
      A(j, static_cast<Index>(k)) = alpha[i] / (alpha[i] - theta);
    }
    A(j, m - 1) = -1.0;  // the unknown V_min
  }
  const Eigen::VectorXd solution = A.fullPivLu().solve(rhs);
  const double V_min = solution[m - 1];
  double D_min = 0.0;
  for (Index i = 0; i < n; ++i)
    if (f[i] > 0.0 && std::find(between.begin(), between.end(), i) == between.end()) D_min += d[i];
  for (std::size_t k = 0; k < between.size(); ++k) {
    const double d_k = solution[static_cast<Index>(k)];
    if (d_k < 0.0 || d_k > f[between[k]]) design.distributing_components_outside_feed = true;
    D_min += d_k;
  }
  design.minimum_reflux = V_min / D_min - 1.0;

  // Gilliland (Eduljee's form) at R = ratio x R_min.
  design.reflux_ratio = spec.reflux_to_minimum_ratio * std::max(design.minimum_reflux, 0.0);
  const double R = design.reflux_ratio, R_min = std::max(design.minimum_reflux, 0.0);
  design.gilliland_abscissa = (R - R_min) / (R + 1.0);
  const double Y = eduljee_gilliland(design.gilliland_abscissa);
  design.stages = (design.minimum_stages + Y) / (1.0 - Y);

  // Kirkbride: N_R / N_S = [(B/D) (z_HK/z_LK) (x_B,LK / x_D,HK)^2]^0.206.
  const double D = d.sum(), B = b.sum();
  const double ratio = std::pow((B / D) * (z[hk] / z[lk]) * std::pow((b[lk] / B) / (d[hk] / D), 2.0), 0.206);
  design.rectifying_stages = design.stages * ratio / (1.0 + ratio);
  design.feed_stage = static_cast<int>(std::lround(design.rectifying_stages)) + 1;
  return design;
}

namespace {

struct TargetSpec {
  std::size_t component = 0;
  double purity = 0.0;
};

struct ColumnSpec {
  ShortcutSpecification shortcut;
  std::optional<Pressure> pressure;
  std::optional<TargetSpec> target;
  HeatSupply supply;
};

double mass_fraction(const Eigen::VectorXd& moles, const Eigen::VectorXd& M, std::size_t i) {
  const Eigen::VectorXd kg = moles.cwiseProduct(M);
  return kg[static_cast<Index>(i)] / kg.sum();
}

class ContinuousDistillation final : public BlockModel {
 public:
  explicit ContinuousDistillation(ColumnSpec spec) : spec_(std::move(spec)) {}

  [[nodiscard]] std::vector<PortSpec> inlet_ports() const override { return {single_port("feed", "the column feed")}; }
  [[nodiscard]] std::vector<PortSpec> outlet_ports() const override {
    return {single_port("distillate", "overhead product from the total condenser"),
            single_port("bottoms", "product from the reboiler")};
  }

  void compute(const BlockContext& context, const BlockPorts& ports, BlockResources& resources) const override;

 private:
  ColumnSpec spec_;
};

void ContinuousDistillation::compute(const BlockContext& context, const BlockPorts& ports,
                                     BlockResources& resources) const {
  const ComponentSet& components = context.components;
  const std::string& block = context.block_name;
  const std::size_t n = components.size();
  const auto size = static_cast<Index>(n);
  const Stream& feed = ports.inlet("feed");
  const Pressure P = spec_.pressure ? *spec_.pressure : feed.pressure();
  const ShortcutSpecification& s = spec_.shortcut;
  if (feed.is_empty()) {  // a tear stream on the first pass
    ports.outlet("distillate") = empty_like(feed, feed.temperature(), P);
    ports.outlet("bottoms") = empty_like(feed, feed.temperature(), P);
    return;
  }

  const Eigen::VectorXd feed_kg = feed.component_masses();
  Eigen::VectorXd M(size), volatile_moles = Eigen::VectorXd::Zero(size), gas_kg = Eigen::VectorXd::Zero(size);
  Stream heavy(components);  // polymers and solids: to the bottoms as they are
  for (std::size_t i = 0; i < n; ++i) {
    const auto k = static_cast<Index>(i);
    M[k] = components[i].molar_mass;
    switch (components[i].kind) {
      case ComponentKind::volatile_liquid:
        volatile_moles[k] = feed_kg[k] / M[k];
        break;
      case ComponentKind::gas:
        gas_kg[k] = feed_kg[k];
        break;
      case ComponentKind::polymer:
      case ComponentKind::solid:
        heavy.phase_masses(Phase::solid)[k] = feed.phase_masses(Phase::solid)[k];
        heavy.phase_masses(Phase::liquid)[k] = feed.phase_masses(Phase::liquid)[k];
        break;
    }
  }
  if (gas_kg.sum() > 0.0)
    context.warnings.add("continuous column '" + block +
                         "': permanent gas in the feed leaves from the condenser as vapour with the distillate");
  if (heavy.total_mass().value() > 0.0)
    context.warnings.add("continuous column '" + block +
                         "': polymer or solids in the feed go to the bottoms; they foul a reboiler");
  if (context.basis == Basis::batch)
    context.warnings.add("continuous column '" + block + "' on a batch basis: its figures are per batch of feed");

  const ModifiedRaoultKValues model(components, P);
  const ShortcutDesign design = design_shortcut_column(model, volatile_moles, s);
  const Component& light = components[s.light_key];
  const Component& heavy_key = components[s.heavy_key];

  // Products: saturated liquids, the distillate at its bubble point (the
  // reflux temperature of a total condenser), the bottoms at theirs.
  Stream& distillate = ports.outlet("distillate");
  Stream& bottoms = ports.outlet("bottoms");
  const Eigen::VectorXd distillate_kg = design.distillate.cwiseProduct(M);
  distillate = Stream(components);
  distillate.phase_masses(Phase::liquid) = distillate_kg;
  distillate.phase_masses(Phase::vapour) = gas_kg;
  set_state(distillate, design.distillate_temperature, P);
  bottoms = heavy;
  // The bottoms take the volatile feed less the distillate, so the mass
  // balance closes to rounding.
  Eigen::VectorXd volatile_kg = Eigen::VectorXd::Zero(size);
  for (std::size_t i = 0; i < n; ++i)
    if (components[i].kind == ComponentKind::volatile_liquid)
      volatile_kg[static_cast<Index>(i)] = feed_kg[static_cast<Index>(i)];
  bottoms.phase_masses(Phase::liquid) += (volatile_kg - distillate_kg).cwiseMax(0.0);
  set_state(bottoms, design.bottom_temperature, P);

  // Energy: condenser from the vapour at the top to the saturated liquid,
  // the reboiler from the block's balance, so process heat = H_out - H_in.
  const double R = design.reflux_ratio;
  const double H_vapour_top =
      to_si(phase_enthalpy(components, distillate_kg, Phase::vapour, design.top_temperature, &context.warnings));
  const double H_liquid_reflux =
      to_si(phase_enthalpy(components, distillate_kg, Phase::liquid, design.distillate_temperature, &context.warnings));
  const double gas_cooling = to_si(phase_enthalpy(components, gas_kg, Phase::vapour, design.top_temperature)) -
                             to_si(phase_enthalpy(components, gas_kg, Phase::vapour, design.distillate_temperature));
  const double Q_condenser = (R + 1.0) * (H_vapour_top - H_liquid_reflux) + gas_cooling;
  const double H_in = to_si(feed.enthalpy(&context.warnings));
  const double H_out = to_si(distillate.enthalpy(&context.warnings)) + to_si(bottoms.enthalpy(&context.warnings));
  const double Q_reboiler = H_out - H_in + Q_condenser;
  book_heat_duty(resources, joules(Q_reboiler), spec_.supply);
  book_heat_duty(resources, joules(-Q_condenser), spec_.supply);

  const double lk_purity = mass_fraction(design.distillate, M, s.light_key);
  const double hk_purity = mass_fraction(design.bottoms, M, s.heavy_key);

  resources.add_figure("key_relative_volatility", design.key_relative_volatility, "-",
                       light.id + " over " + heavy_key.id + ", geometric mean of top and bottom");
  resources.add_figure("minimum_stages", design.minimum_stages, "-", "Fenske, equilibrium stages incl. the reboiler");
  resources.add_figure("minimum_reflux_ratio", design.minimum_reflux, "-", "Underwood");
  resources.add_figure("reflux_ratio", R, "-", "operating reflux ratio L/D");
  resources.add_figure("stages", design.stages, "-", "Gilliland (Eduljee), equilibrium stages incl. the reboiler");
  resources.add_figure("feed_stage", design.feed_stage, "-", "Kirkbride, counted from the top stage");
  resources.add_figure("rectifying_stages", design.rectifying_stages, "-", "stages above the feed (Kirkbride)");
  resources.add_figure("top_temperature", in_kelvin(design.top_temperature), "K", "dew point of the overhead vapour");
  resources.add_figure("distillate_temperature", in_kelvin(design.distillate_temperature), "K",
                       "bubble point of the distillate and reflux");
  resources.add_figure("bottom_temperature", in_kelvin(design.bottom_temperature), "K", "bubble point of the bottoms");
  resources.add_figure("condenser_duty", Q_condenser, "J", "heat removed in the total condenser");
  resources.add_figure("reboiler_duty", Q_reboiler, "J", "heat put into the reboiler");
  resources.add_figure("light_key_purity", lk_purity, "-", "mass fraction of " + light.id + " in the distillate");
  resources.add_figure("heavy_key_purity", hk_purity, "-", "mass fraction of " + heavy_key.id + " in the bottoms");
  for (std::size_t i = 0; i < n; ++i) {
    const auto k = static_cast<Index>(i);
    if (!(volatile_moles[k] > 0.0)) continue;
    resources.add_figure("relative_volatility_" + components[i].id, design.relative_volatility[k], "-",
                         components[i].id + " over the heavy key " + heavy_key.id);
  }

  std::ostringstream key_text;
  key_text.precision(3);
  key_text << design.key_relative_volatility;
  if (design.key_relative_volatility < hard_split_volatility)
    context.warnings.add("continuous column '" + block + "': hard split, " + light.id + " over " + heavy_key.id +
                         " has alpha = " + key_text.str() +
                         " (ethylbenzene over styrene is about 1.3 to 1.4, higher under vacuum; common practice): "
                         "many stages and high reflux; verify the vapour-pressure data you rely on");
  // Fenske and Underwood take the volatilities as constant through the
  // column; a large change from top to bottom makes the shortcut rough.
  const double spread = std::max(design.key_relative_volatility_top, design.key_relative_volatility_bottom) /
                        std::min(design.key_relative_volatility_top, design.key_relative_volatility_bottom);
  if (spread > 1.0 + volatility_spread_limit)
    context.warnings.add("continuous column '" + block + "': the key relative volatility changes from " +
                         format_number(design.key_relative_volatility_bottom, 3) + " at the bottom to " +
                         format_number(design.key_relative_volatility_top, 3) +
                         " at the top; the shortcut assumes it constant and is rough here (a stage-by-stage "
                         "calculation is better)");
  if (design.gilliland_abscissa < gilliland_lowest_X || design.gilliland_abscissa > gilliland_highest_X)
    context.warnings.add("continuous column '" + block + "': Gilliland correlation used at X = " +
                         format_number(design.gilliland_abscissa, 3) + ", outside the range of its data (" +
                         format_number(gilliland_lowest_X) + " to " + format_number(gilliland_highest_X) + ")");
  if (design.minimum_reflux <= 0.0)
    context.warnings.add("continuous column '" + block +
                         "': Underwood gives no positive minimum reflux for this split; the stage count rests on the "
                         "Fenske minimum alone");
  if (design.distributing_components_outside_feed)
    context.warnings.add("continuous column '" + block +
                         "': Underwood's distribution of a component between the keys falls outside 0 to its feed; "
                         "the minimum reflux is approximate");

  // What the target purity takes: the other key's recovery is raised (for
  // the light key's purity in the distillate, the heavy key's recovery to
  // the bottoms; and the other way round) until the product reaches it.
  if (spec_.target) {
    const bool light_target = spec_.target->component == s.light_key;
    const double p = spec_.target->purity;
    const double reached = light_target ? lk_purity : hk_purity;
    auto purity_with = [&](double u, ShortcutDesign* out) {
      ShortcutSpecification trial = s;
      (light_target ? trial.heavy_key_recovery : trial.light_key_recovery) = 1.0 - std::pow(10.0, -u);
      ShortcutDesign d = design_shortcut_column(model, volatile_moles, trial);
      const double purity =
          light_target ? mass_fraction(d.distillate, M, s.light_key) : mass_fraction(d.bottoms, M, s.heavy_key);
      if (out != nullptr) *out = d;
      return purity;
    };
    const double start_recovery = light_target ? s.heavy_key_recovery : s.light_key_recovery;
    double low = -std::log10(1.0 - start_recovery), high = 9.0;
    const std::string product = light_target ? "distillate" : "bottoms";
    if (reached >= p) {
      resources.add_figure("stages_for_target_purity", design.stages, "-",
                           "the target purity is met at the specified recoveries");
    } else if (purity_with(high, nullptr) < p) {
      // The largest impurity of the product is what limits it.
      const Eigen::VectorXd product_kg = (light_target ? design.distillate : design.bottoms).cwiseProduct(M);
      Index worst = -1;
      for (Index i = 0; i < size; ++i)
        if (i != static_cast<Index>(spec_.target->component) && (worst < 0 || product_kg[i] > product_kg[worst]))
          worst = i;
      context.warnings.add("continuous column '" + block + "': " + components[spec_.target->component].id +
                           " cannot reach " + format_number(100.0 * p, 4) + " % in the " + product +
                           " by a sharper split of the keys: the other components that go with it, mostly " +
                           components[static_cast<std::size_t>(worst)].id +
                           ", limit the purity; they need a column of their own");
    } else {
      for (int i = 0; i < 60; ++i) {
        const double mid = 0.5 * (low + high);
        (purity_with(mid, nullptr) >= p ? high : low) = mid;
      }
      ShortcutDesign at_target;
      (void)purity_with(high, &at_target);
      resources.add_figure("stages_for_target_purity", at_target.stages, "-",
                           "Gilliland stages with which the " + product + " reaches the target purity");
      resources.add_figure(light_target ? "heavy_key_recovery_for_target" : "light_key_recovery_for_target",
                           1.0 - std::pow(10.0, -high), "-",
                           "the other key's recovery that the target purity asks for");
    }
  }

  // Equipment: the column by stages, exchangers by duty rate.
  resources.equipment.push_back({"distillation column", "column", "stages", design.stages, "-"});
  if (auto rate = duty_rate(joules(Q_condenser), context.basis, std::nullopt))
    resources.equipment.push_back({"column condenser", "condenser", "power", to_si(*rate), "W"});
  if (auto rate = duty_rate(joules(Q_reboiler), context.basis, std::nullopt))
    resources.equipment.push_back({"column reboiler", "heater", "power", to_si(*rate), "W"});

  resources.cautions.push_back(
      "The column holds flammable vapour: vent the condenser to a safe place, keep ignition sources away, and mind "
      "the hot surfaces of the reboiler.");
  for (std::size_t i = 0; i < n; ++i) {
    if (!(volatile_moles[static_cast<Index>(i)] > 0.0) || components[i].id != "styrene") continue;
    resources.cautions.push_back(
        "Hot styrene polymerises by itself, and the reaction can run away: dose an inhibitor to the feed and reflux, "
        "run the column under vacuum so that the bottoms stay below about 100-120 degC, and store the product cool "
        "and inhibited (common practice).");
    if (in_kelvin(design.bottom_temperature) > 393.15)
      context.warnings.add("continuous column '" + block + "': the bottoms reach " +
                           format_celsius(design.bottom_temperature) +
                           " with styrene in the column, above about 120 degC; lower the pressure");
  }
}

// ---- reading the parameters ------------------------------------------------------------------

std::string key_path(const MappingReader& parameters, std::string_view key) {
  return parameters.path().empty() ? std::string(key) : parameters.path() + "." + std::string(key);
}

std::optional<double> recovery(MappingReader& parameters, std::string_view key) {
  if (!parameters.has(key)) {
    parameters.accept(key);
    parameters.error({}, "missing required key '" + key_path(parameters, key) + "' (expected a fraction such as 0.99)");
    return std::nullopt;
  }
  auto value = parameters.optional_number_in(key, 0.0, 1.0);
  if (value && (*value <= 0.0 || *value >= 1.0)) {
    parameters.error(key, "'" + key_path(parameters, key) + "' must lie strictly between 0 and 1");
    return std::nullopt;
  }
  return value;
}

std::unique_ptr<BlockModel> make_continuous_distillation(MappingReader& parameters, const BlockSetup& setup) {
  ColumnSpec spec;
  const auto light = read_component(parameters, "light_key", setup.components);
  const auto heavy = read_component(parameters, "heavy_key", setup.components);
  for (auto [key, index] : {std::pair{"light_key", light}, std::pair{"heavy_key", heavy}}) {
    if (index && setup.components[*index].kind != ComponentKind::volatile_liquid)
      parameters.error(key,
                       "'" + key_path(parameters, key) + "': '" + setup.components[*index].id + "' does not distil");
  }
  if (light && heavy && *light == *heavy)
    parameters.error("heavy_key", "'" + key_path(parameters, "heavy_key") + "' must differ from the light key");
  if (light) spec.shortcut.light_key = *light;
  if (heavy) spec.shortcut.heavy_key = *heavy;
  spec.shortcut.light_key_recovery = recovery(parameters, "light_key_recovery").value_or(0.99);
  spec.shortcut.heavy_key_recovery = recovery(parameters, "heavy_key_recovery").value_or(0.99);
  spec.pressure = parameters.optional_quantity<Pressure>("pressure");
  if (spec.pressure && !(to_si(*spec.pressure) > 0.0)) {
    parameters.error("pressure", "'" + key_path(parameters, "pressure") + "' must be an absolute pressure above zero");
    spec.pressure.reset();
  }
  spec.shortcut.reflux_to_minimum_ratio = parameters.number_in("reflux_to_minimum_ratio", 1.3, 1.0, 10.0);
  if (spec.shortcut.reflux_to_minimum_ratio <= 1.0)
    parameters.error("reflux_to_minimum_ratio", "'" + key_path(parameters, "reflux_to_minimum_ratio") +
                                                    "' must be above 1 (at 1 the column needs infinitely many stages)");
  spec.shortcut.feed_condition = parameters.number_in("feed_condition", 1.0, -2.0, 3.0);
  spec.supply = read_heat_supply(parameters);
  const auto target = read_component(parameters, "target_component", setup.components, false);
  const auto purity = parameters.optional_number_in("target_purity", 0.0, 1.0);
  if (target || purity) {
    if (!target || !purity) {
      parameters.error({}, "'" + key_path(parameters, "target_component") + "' and '" +
                               key_path(parameters, "target_purity") + "' go together");
    } else if (*target != spec.shortcut.light_key && *target != spec.shortcut.heavy_key) {
      parameters.error("target_component", "'" + key_path(parameters, "target_component") +
                                               "' must be the light key (purity in the distillate) or the heavy key "
                                               "(purity in the bottoms)");
    } else if (*purity <= 0.0 || *purity >= 1.0) {
      parameters.error("target_purity", "'" + key_path(parameters, "target_purity") + "' must lie between 0 and 1");
    } else {
      spec.target = TargetSpec{*target, *purity};
    }
  }
  parameters.finish();
  return std::make_unique<ContinuousDistillation>(std::move(spec));
}

}  // namespace

void register_continuous_distillation(BlockRegistry& registry) {
  registry.add({"continuous_distillation",
                "continuous column by the Fenske-Underwood-Gilliland shortcut with Kirkbride's feed stage",
                make_continuous_distillation});
}

}  // namespace unchain::units
