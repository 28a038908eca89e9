// Bubble and dew points and the isothermal flash by modified Raoult's law.
// The iterations run without a warnings sink; the converged state is then
// evaluated once more with it, so that only the answer's correlations
// report being out of range, not every trial point of the search.

#include "flowsheet/thermo/phase_equilibrium.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <sstream>
#include <string>

#include "flowsheet/diagnostics.hpp"
#include "flowsheet/thermo/activity.hpp"
#include "flowsheet/thermo/vle_support.hpp"

namespace unchain {

namespace {

using Index = Eigen::Index;

// Successive substitution on the activity coefficients stops when no
// ln gamma changes by more than this between iterations.
constexpr double ln_gamma_tolerance = 1e-13;
constexpr int max_gamma_iterations = 500;
// After this many plain iterations, halve each step (slow but sure for
// strongly non-ideal liquids).
constexpr int undamped_iterations = 50;

std::string pressure_text(double P_Pa) {
  std::ostringstream s;
  s.precision(6);
  s << P_Pa / 1000.0 << " kPa";
  return s.str();
}

std::string temperature_text(double T_K) {
  std::ostringstream s;
  s.precision(6);
  s << T_K << " K";
  return s.str();
}

void require_positive_pressure(double P_Pa, const std::string& what) {
  if (!(P_Pa > 0.0) || !std::isfinite(P_Pa)) throw ModelError(what + ": pressure must be positive");
}

// The bubble point needs every component to be condensable.
void require_no_gas(const ComponentSet& components, const Eigen::VectorXd& x, const std::string& what) {
  for (std::size_t i = 0; i < components.size(); ++i) {
    if (components[i].kind == ComponentKind::gas && x[static_cast<Index>(i)] > 0.0)
      throw ModelError(what + ": no bubble point exists, the liquid holds '" + components[i].id +
                       "', a permanent gas taken as non-condensable");
  }
}

bool has_volatile(const ComponentSet& components, const Eigen::VectorXd& fractions) {
  for (std::size_t i = 0; i < components.size(); ++i)
    if (components[i].kind == ComponentKind::volatile_liquid && fractions[static_cast<Index>(i)] > 0.0) return true;
  return false;
}

// Bracket for a bubble or dew temperature from the pure components'
// saturation temperatures at P (the answer lies between them for an ideal
// solution; the search widens the bracket for azeotropes and gases).
std::pair<double, double> saturation_bracket(const ComponentSet& components, const Eigen::VectorXd& fractions,
                                             double P_Pa) {
  double low = std::numeric_limits<double>::infinity();
  double high = -low;
  for (std::size_t i = 0; i < components.size(); ++i) {
    if (components[i].kind != ComponentKind::volatile_liquid || fractions[static_cast<Index>(i)] <= 0.0) continue;
    const double T = vle::saturation_temperature_K(components[i], P_Pa);
    low = std::min(low, T);
    high = std::max(high, T);
  }
  return {low - 1.0, high + 1.0};
}

// sum x_i gamma_i Psat_i over the volatiles, at fixed liquid composition.
double bubble_pressure_Pa(const ComponentSet& components, const Eigen::VectorXd& x, double T_K, Warnings* warnings) {
  const Eigen::VectorXd gamma = activity_coefficients(components, x, kelvin(T_K), warnings);
  double P = 0.0;
  for (std::size_t i = 0; i < components.size(); ++i) {
    const auto ii = static_cast<Index>(i);
    if (components[i].kind != ComponentKind::volatile_liquid || x[ii] == 0.0) continue;
    P += x[ii] * gamma[ii] * vle::saturation_pressure_Pa(components[i], T_K, warnings);
  }
  return P;
}

struct DewState {
  double pressure_Pa = 0.0;
  Eigen::VectorXd x;  // the liquid in equilibrium with the dew-point vapour
};

// P_dew = 1 / sum_i y_i / (gamma_i(x) Psat_i), x_i = y_i P / (gamma_i Psat_i),
// by successive substitution on gamma. Permanent gases stay in the vapour
// and only lower the volatiles' partial pressures.
DewState dew_state(const ComponentSet& components, const Eigen::VectorXd& y, double T_K, Warnings* warnings) {
  const std::size_t n = components.size();
  Eigen::VectorXd psat = Eigen::VectorXd::Zero(static_cast<Index>(n));
  for (std::size_t i = 0; i < n; ++i) {
    const auto ii = static_cast<Index>(i);
    if (components[i].kind != ComponentKind::volatile_liquid || y[ii] == 0.0) continue;
    psat[ii] = vle::saturation_pressure_Pa(components[i], T_K, nullptr);
    if (psat[ii] <= 0.0) {  // a component with no vapour pressure here condenses at any pressure
      DewState state{0.0, Eigen::VectorXd::Zero(static_cast<Index>(n))};
      state.x[ii] = 1.0;
      return state;
    }
  }
  // The vectors of the iteration are allocated once, here.
  Eigen::VectorXd ln_gamma = Eigen::VectorXd::Zero(static_cast<Index>(n));
  Eigen::VectorXd gamma(static_cast<Index>(n));
  Eigen::VectorXd next(static_cast<Index>(n));
  DewState state;
  state.x.resize(static_cast<Index>(n));
  for (int iteration = 0; iteration < max_gamma_iterations; ++iteration) {
    double inverse_P = 0.0;
    for (std::size_t i = 0; i < n; ++i) {
      const auto ii = static_cast<Index>(i);
      if (psat[ii] > 0.0) inverse_P += y[ii] / (std::exp(ln_gamma[ii]) * psat[ii]);
    }
    state.pressure_Pa = 1.0 / inverse_P;
    state.x.setZero();
    for (std::size_t i = 0; i < n; ++i) {
      const auto ii = static_cast<Index>(i);
      if (psat[ii] > 0.0) state.x[ii] = y[ii] * state.pressure_Pa / (std::exp(ln_gamma[ii]) * psat[ii]);
    }
    activity_coefficients(components, state.x, T_K, gamma, nullptr);
    next = gamma.array().log();
    const double change = (next - ln_gamma).cwiseAbs().maxCoeff();
    if (iteration < undamped_iterations) ln_gamma = next;
    else ln_gamma = 0.5 * (next + ln_gamma);
    if (change < ln_gamma_tolerance) {
      if (warnings != nullptr) {  // the converged state, once more, with the sink
        (void)activity_coefficients(components, state.x, kelvin(T_K), warnings);
        for (std::size_t i = 0; i < n; ++i)
          if (psat[static_cast<Index>(i)] > 0.0) (void)vle::saturation_pressure_Pa(components[i], T_K, warnings);
      }
      return state;
    }
  }
  throw ConvergenceError("dew point at " + temperature_text(T_K) +
                         ": activity coefficients did not converge by successive substitution");
}

}  // namespace

Temperature bubble_temperature(const ComponentSet& components, const Eigen::VectorXd& x_in, Pressure P,
                               Warnings* warnings) {
  const double P_Pa = to_si(P);
  const std::string what = "bubble point at " + pressure_text(P_Pa);
  require_positive_pressure(P_Pa, what);
  const Eigen::VectorXd x = vle::fluid_mole_fractions(components, x_in, what);
  require_no_gas(components, x, what);
  if (!has_volatile(components, x)) throw ModelError(what + ": the liquid holds no volatile component");
  const auto [low, high] = saturation_bracket(components, x, P_Pa);
  const auto root = vle::increasing_temperature_root(
      [&](double T_K) { return bubble_pressure_Pa(components, x, T_K, nullptr) / P_Pa - 1.0; }, low, high, what);
  const double T_K = root.middle();
  if (warnings != nullptr) (void)bubble_pressure_Pa(components, x, T_K, warnings);
  return kelvin(T_K);
}

Temperature dew_temperature(const ComponentSet& components, const Eigen::VectorXd& y_in, Pressure P,
                            Warnings* warnings) {
  const double P_Pa = to_si(P);
  const std::string what = "dew point at " + pressure_text(P_Pa);
  require_positive_pressure(P_Pa, what);
  const Eigen::VectorXd y = vle::fluid_mole_fractions(components, y_in, what);
  if (!has_volatile(components, y))
    throw ModelError(what + ": no dew point exists, the vapour holds only permanent gases");
  const auto [low, high] = saturation_bracket(components, y, P_Pa);
  const auto root = vle::increasing_temperature_root(
      [&](double T_K) { return dew_state(components, y, T_K, nullptr).pressure_Pa / P_Pa - 1.0; }, low, high, what);
  const double T_K = root.middle();
  if (warnings != nullptr) (void)dew_state(components, y, T_K, warnings);
  return kelvin(T_K);
}

Pressure bubble_pressure(const ComponentSet& components, const Eigen::VectorXd& x_in, Temperature T,
                         Warnings* warnings) {
  const double T_K = in_kelvin(T);
  const std::string what = "bubble pressure at " + temperature_text(T_K);
  const Eigen::VectorXd x = vle::fluid_mole_fractions(components, x_in, what);
  require_no_gas(components, x, what);
  if (!has_volatile(components, x)) throw ModelError(what + ": the liquid holds no volatile component");
  return pascal(bubble_pressure_Pa(components, x, T_K, warnings));
}

Pressure dew_pressure(const ComponentSet& components, const Eigen::VectorXd& y_in, Temperature T,
                      Warnings* warnings) {
  const double T_K = in_kelvin(T);
  const std::string what = "dew pressure at " + temperature_text(T_K);
  const Eigen::VectorXd y = vle::fluid_mole_fractions(components, y_in, what);
  if (!has_volatile(components, y))
    throw ModelError(what + ": no dew point exists, the vapour holds only permanent gases");
  const DewState state = dew_state(components, y, T_K, warnings);
  if (!(state.pressure_Pa > 0.0))
    throw ModelError(what + ": a component has no vapour pressure at this temperature (below its Antoine pole)");
  return pascal(state.pressure_Pa);
}

FlashResult isothermal_flash(const ComponentSet& components, const Eigen::VectorXd& feed_kg, Temperature T,
                             Pressure P, Warnings* warnings) {
  const std::size_t n = components.size();
  const auto size = static_cast<Index>(n);
  const double T_K = in_kelvin(T);
  const double P_Pa = to_si(P);
  // Written out only for a message: a flash at duty runs this flash many
  // times, and formatting the numbers would cost more than the flash.
  auto what = [&] { return "flash at " + temperature_text(T_K) + " and " + pressure_text(P_Pa); };
  if (!(P_Pa > 0.0) || !std::isfinite(P_Pa)) require_positive_pressure(P_Pa, what());
  if (feed_kg.size() != size)
    throw std::invalid_argument(what() + ": " + std::to_string(feed_kg.size()) + " feed masses for " +
                                std::to_string(n) + " components");

  FlashResult result;
  result.x = Eigen::VectorXd::Zero(size);
  result.y = Eigen::VectorXd::Zero(size);
  result.K = Eigen::VectorXd::Zero(size);
  result.liquid_kg = Eigen::VectorXd::Zero(size);
  result.vapour_kg = Eigen::VectorXd::Zero(size);

  // Fluid feed in moles; polymers and solids are left out.
  Eigen::VectorXd moles = Eigen::VectorXd::Zero(size);
  for (std::size_t i = 0; i < n; ++i) {
    const auto ii = static_cast<Index>(i);
    if (!(feed_kg[ii] >= 0.0) || !std::isfinite(feed_kg[ii]))
      throw std::invalid_argument(what() + ": feed mass of '" + components[i].id + "' is negative or not a number");
    if (vle::is_fluid(components[i])) moles[ii] = feed_kg[ii] / components[i].molar_mass;
  }
  const double total_moles = moles.sum();
  if (!(total_moles > 0.0)) return result;  // nothing to flash
  const Eigen::VectorXd z = moles / total_moles;

  // Outer loop: gamma from the liquid composition, K from gamma, V and x
  // from Rachford-Rice; repeat until gamma stops changing.
  Eigen::VectorXd ln_gamma = activity_coefficients(components, z, T, nullptr).array().log();
  Eigen::VectorXd K;
  double V = 0.0;
  Eigen::VectorXd x = z;
  Eigen::VectorXd gamma(size);  // the iteration's vectors, allocated once
  Eigen::VectorXd next(size);
  bool converged = false;
  for (int iteration = 1; iteration <= max_gamma_iterations && !converged; ++iteration) {
    result.iterations = iteration;
    K = vle::k_values(components, ln_gamma.array().exp().matrix(), T_K, P_Pa, nullptr);
    V = solve_rachford_rice(z, K);
    for (Index i = 0; i < size; ++i) {
      if (z[i] == 0.0 || std::isinf(K[i])) x[i] = 0.0;
      else x[i] = z[i] / (1.0 + V * (K[i] - 1.0));
    }
    const double sum_x = x.sum();
    // An all-gas feed has no liquid, and nothing for gamma to depend on.
    if (!(sum_x > 0.0)) {
      x.setZero();
      converged = true;
      break;
    }
    x /= sum_x;
    activity_coefficients(components, x, T_K, gamma, nullptr);
    next = gamma.array().log();
    const double change = (next - ln_gamma).cwiseAbs().maxCoeff();
    if (iteration <= undamped_iterations) ln_gamma = next;
    else ln_gamma = 0.5 * (next + ln_gamma);
    converged = change < ln_gamma_tolerance;
  }
  if (!converged) throw ConvergenceError(what() + ": activity coefficients did not converge");
  if (warnings != nullptr) {
    if (x.sum() > 0.0) (void)activity_coefficients(components, x, T, warnings);
    (void)vle::k_values(components, ln_gamma.array().exp().matrix(), T_K, P_Pa, warnings);
  }

  // Split each component. The smaller share is computed and the larger is
  // the feed less it, so the mass balance closes to rounding.
  for (std::size_t i = 0; i < n; ++i) {
    const auto ii = static_cast<Index>(i);
    if (moles[ii] == 0.0) continue;
    const double M = components[i].molar_mass;
    if (std::isinf(K[ii])) {
      result.vapour_kg[ii] = feed_kg[ii];
      continue;
    }
    const double denominator = 1.0 + V * (K[ii] - 1.0);
    const double liquid_moles = moles[ii] * (1.0 - V) / denominator;
    const double vapour_moles = moles[ii] * V * K[ii] / denominator;
    if (liquid_moles <= vapour_moles) {
      result.liquid_kg[ii] = std::clamp(liquid_moles * M, 0.0, feed_kg[ii]);
      result.vapour_kg[ii] = feed_kg[ii] - result.liquid_kg[ii];
    } else {
      result.vapour_kg[ii] = std::clamp(vapour_moles * M, 0.0, feed_kg[ii]);
      result.liquid_kg[ii] = feed_kg[ii] - result.vapour_kg[ii];
    }
  }

  // Compositions: of the phases present, and of the incipient phase at a
  // bubble or dew point (y = K x at V = 0, x = y / K at V = 1).
  result.vapour_fraction = V;
  result.x = x;
  for (Index i = 0; i < size; ++i) {
    if (z[i] == 0.0) continue;
    if (std::isinf(K[i])) result.y[i] = V > 0.0 ? z[i] / V : 0.0;
    else result.y[i] = K[i] * z[i] / (1.0 + V * (K[i] - 1.0));
  }
  if (const double sum_y = result.y.sum(); sum_y > 0.0) result.y /= sum_y;
  for (Index i = 0; i < size; ++i) result.K[i] = std::isinf(K[i]) ? non_condensable_K : K[i];
  return result;
}

Stream flash_stream(const Stream& feed, Temperature T, Pressure P, Warnings* warnings) {
  Stream out = feed;
  out.set_temperature(T);
  out.set_pressure(P);
  if (!feed.has_components()) return out;  // a stream never filled: nothing to split
  const ComponentSet& components = feed.components();
  const std::size_t n = components.size();
  Eigen::VectorXd fluid_kg = Eigen::VectorXd::Zero(static_cast<Index>(n));
  for (std::size_t i = 0; i < n; ++i) {
    const auto ii = static_cast<Index>(i);
    const Component& c = components[i];
    if (vle::is_fluid(c)) {
      for (Phase phase : all_phases) {
        fluid_kg[ii] += feed.phase_masses(phase)[ii];
        out.phase_masses(phase)[ii] = 0.0;
      }
    } else if (feed.phase_masses(Phase::vapour)[ii] != 0.0) {
      throw ModelError("flash: '" + c.id + "' (" + kind_name(c.kind) + ") is in the vapour of the feed, "
                       "which it cannot be");
    }
  }
  const FlashResult split = isothermal_flash(components, fluid_kg, T, P, warnings);
  out.phase_masses(Phase::liquid) += split.liquid_kg;
  out.phase_masses(Phase::vapour) += split.vapour_kg;
  return out;
}

}  // namespace unchain
