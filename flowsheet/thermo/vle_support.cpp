#include "flowsheet/thermo/vle_support.hpp"

#include <boost/math/tools/toms748_solve.hpp>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <limits>
#include <sstream>
#include <stdexcept>

#include "flowsheet/diagnostics.hpp"
#include "flowsheet/pure_properties.hpp"

namespace unchain::vle {

namespace {

using Index = Eigen::Index;

double clamp_to_search(double T_K) {
  return std::clamp(T_K, lowest_search_temperature_K, highest_search_temperature_K);
}

[[noreturn]] void no_root(const std::string& what, const char* side) {
  std::ostringstream message;
  message << what << " lies " << side << " the temperatures searched (" << lowest_search_temperature_K << " to "
          << highest_search_temperature_K << " K)";
  throw ModelError(message.str());
}

void check_finite(double value, const std::string& what, double T_K) {
  if (std::isfinite(value)) return;
  std::ostringstream message;
  message << what << ": the model gives no finite value at " << T_K << " K";
  throw ModelError(message.str());
}

}  // namespace

double saturation_pressure_Pa(const Component& c, double T_K, Warnings* warnings) {
  if (c.vapour_pressure) {
    const AntoineCorrelation& a = *c.vapour_pressure;
    const double t = a.temperature_in_celsius ? T_K - 273.15 : T_K;
    // Below the pole of log10 P = A - B/(C + t) the form turns over; the
    // true vapour pressure there is negligible.
    if (a.C + t <= 0.0) return 0.0;
  }
  return to_si(vapour_pressure(c, kelvin(T_K), warnings));  // throws when there is no data
}

double saturation_temperature_K(const Component& c, double P_Pa) {
  if (!c.vapour_pressure) return in_kelvin(saturation_temperature(c, pascal(P_Pa)));  // throws: no data
  const AntoineCorrelation& a = *c.vapour_pressure;
  // log10(P/u) at or above A: the correlation never reaches P.
  if (std::log10(P_Pa / a.pressure_unit_Pa) >= a.A) return highest_search_temperature_K;
  const double T_K = a.temperature_K(P_Pa);
  if (!std::isfinite(T_K)) return highest_search_temperature_K;
  return clamp_to_search(T_K);
}

Eigen::VectorXd k_values(const ComponentSet& components, const Eigen::VectorXd& gamma, double T_K, double P_Pa,
                         Warnings* warnings) {
  const std::size_t n = components.size();
  Eigen::VectorXd K = Eigen::VectorXd::Zero(static_cast<Index>(n));
  for (std::size_t i = 0; i < n; ++i) {
    const Component& c = components[i];
    const auto ii = static_cast<Index>(i);
    switch (c.kind) {
      case ComponentKind::gas: K[ii] = std::numeric_limits<double>::infinity(); break;
      case ComponentKind::volatile_liquid:
        K[ii] = gamma[ii] * saturation_pressure_Pa(c, T_K, warnings) / P_Pa;
        break;
      case ComponentKind::polymer:
      case ComponentKind::solid: break;
    }
  }
  return K;
}

Eigen::VectorXd fluid_mole_fractions(const ComponentSet& components, const Eigen::VectorXd& fractions,
                                     const std::string& what) {
  const std::size_t n = components.size();
  if (static_cast<std::size_t>(fractions.size()) != n)
    throw std::invalid_argument(what + ": " + std::to_string(fractions.size()) + " mole fractions for " +
                                std::to_string(n) + " components");
  double total = 0.0;
  for (std::size_t i = 0; i < n; ++i) {
    const double v = fractions[static_cast<Index>(i)];
    if (!(v >= 0.0) || !std::isfinite(v))
      throw std::invalid_argument(what + ": mole fraction of '" + components[i].id + "' is negative or not a number");
    if (v > 0.0 && !is_fluid(components[i]))
      throw ModelError(what + ": '" + components[i].id + "' (" + kind_name(components[i].kind) +
                       ") takes no part in vapour-liquid equilibrium; pass the fluid mixture only");
    total += v;
  }
  if (!(total > 0.0)) throw ModelError(what + ": the mixture is empty");
  return fractions / total;
}

Bracket increasing_temperature_root(const std::function<double(double)>& f, double low, double high,
                                    const std::string& what) {
  const double first_low = clamp_to_search(std::min(low, high));
  high = clamp_to_search(std::max(low, high));
  low = first_low;
  double f_low = f(low);
  check_finite(f_low, what, low);
  double step = 5.0;
  while (f_low > 0.0) {
    if (low <= lowest_search_temperature_K) no_root(what, "below");
    high = low;  // f(high) > 0 now: still a valid upper end
    low = std::max(lowest_search_temperature_K, low - step);
    step *= 2.0;
    f_low = f(low);
    check_finite(f_low, what, low);
  }
  double f_high = f(high);
  check_finite(f_high, what, high);
  step = 5.0;
  while (f_high < 0.0) {
    if (high >= highest_search_temperature_K) no_root(what, "above");
    low = high;
    f_low = f_high;
    high = std::min(highest_search_temperature_K, high + step);
    step *= 2.0;
    f_high = f(high);
    check_finite(f_high, what, high);
  }
  if (f_low == 0.0) return {low, low};
  if (f_high == 0.0) return {high, high};
  std::uintmax_t iterations = 300;
  // 50 of the 53 bits: about 1e-13 K at process temperatures.
  const auto result = boost::math::tools::toms748_solve(f, low, high, f_low, f_high,
                                                        boost::math::tools::eps_tolerance<double>(50), iterations);
  if (iterations >= 300) throw ConvergenceError(what + ": temperature search did not converge");
  return {result.first, result.second};
}

}  // namespace unchain::vle
