#include "units/column_stages.hpp"

#include <Eigen/QR>
#include <algorithm>
#include <array>
#include <boost/math/tools/toms748_solve.hpp>
#include <cmath>
#include <cstdint>
#include <functional>
#include <limits>
#include <sstream>
#include <stdexcept>

#include "flowsheet/diagnostics.hpp"
#include "flowsheet/pure_properties.hpp"
#include "flowsheet/thermo/activity.hpp"
#include "flowsheet/thermo/phase_equilibrium.hpp"

namespace unchain::units {

namespace {

using Index = Eigen::Index;

// The stage compositions are converged when no mole fraction changes by
// more than this between two passes of the bubble-point method.
constexpr double composition_tolerance = 1e-13;
constexpr int max_column_iterations = 1000;
// Passes after which the acceleration is used however far the passes are
// from settling (the columns that settle do so well within this).
constexpr int plain_pass_limit = 150;

Eigen::VectorXd normalised(const Eigen::VectorXd& v, const char* what) {
  const double total = v.sum();
  if (!(total > 0.0) || !std::isfinite(total))
    throw ModelError(std::string("column: ") + what + " holds nothing (mole fractions sum to zero)");
  return v / total;
}

double mean_K(Temperature a, Temperature b) { return 0.5 * (in_kelvin(a) + in_kelvin(b)); }

// Antoine, log10(P/u) = A - B/(C + t): the vapour pressure and the slope of
// its logarithm, B ln10 / (C + t)^2. Below the correlation's pole the
// vapour pressure is taken as zero, as the project's equilibrium routines do.
struct Saturation {
  double pressure_Pa = 0.0;
  double log_slope_per_K = 0.0;
};
Saturation antoine(const AntoineCorrelation& a, double T_K) {
  const double t = a.temperature_in_celsius ? T_K - 273.15 : T_K;
  if (a.C + t <= 0.0) return {};
  constexpr double ln10 = 2.302585092994046;
  return {a.pressure_unit_Pa * std::exp(ln10 * (a.A - a.B / (a.C + t))), ln10 * a.B / ((a.C + t) * (a.C + t))};
}

// Anderson acceleration of a fixed-point iteration x -> G(x) (Walker and
// Ni, SIAM J. Numer. Anal. 49 (2011) 1715, "Type II", no damping): the
// next estimate is G(x_k) - dG gamma, gamma minimising
// |f_k - dF gamma| over the differences of the last few residuals
// f = G(x) - x. A residual that grows against the best seen restarts it.
class AndersonMixing {
 public:
  explicit AndersonMixing(Index size) : size_(size) {}

  void reset() {
    count_ = 0;
    have_previous_ = false;
  }

  // From now on mix whatever the residual: for the plain passes that go
  // round in a cycle instead of closing in.
  void mix_from_anywhere() { start_below_ = std::numeric_limits<double>::infinity(); }

  const Eigen::VectorXd& next_estimate(const Eigen::VectorXd& x, const Eigen::VectorXd& g) {
    const Eigen::VectorXd f = g - x;
    const double norm = f.cwiseAbs().maxCoeff();
    if (have_previous_ && norm > restart_growth * best_norm_) reset();
    // Far from the solution the plain passes are safer: extrapolating from
    // them there has sent non-ideal columns (acetone-water) astray.
    if (norm > start_below_) {
      reset();
      estimate_ = g;
      return estimate_;
    }
    if (!have_previous_) {
      best_norm_ = norm;
    } else {
      best_norm_ = std::min(best_norm_, norm);
      if (dF_.cols() == 0) {
        dF_.resize(size_, depth);
        dG_.resize(size_, depth);
      }
      const Index slot = static_cast<Index>(count_ % depth);
      dF_.col(slot) = f - f_previous_;
      dG_.col(slot) = g - g_previous_;
      ++count_;
    }
    f_previous_ = f;
    g_previous_ = g;
    have_previous_ = true;
    estimate_ = g;
    const Index m = static_cast<Index>(std::min<std::size_t>(count_, depth));
    if (m > 0) {
      const Eigen::VectorXd gamma = dF_.leftCols(m).colPivHouseholderQr().solve(f);
      if (gamma.allFinite()) estimate_ -= dG_.leftCols(m) * gamma;
    }
    return estimate_;
  }

 private:
  static constexpr std::size_t depth = 5;
  static constexpr double restart_growth = 10.0;
  Index size_;
  double start_below_ = 1e-3;  // largest change of a mole fraction in a pass
  std::size_t count_ = 0;
  bool have_previous_ = false;
  double best_norm_ = 0.0;
  Eigen::MatrixXd dF_, dG_;
  Eigen::VectorXd f_previous_, g_previous_, estimate_;
};

}  // namespace

// ---- K-value models ------------------------------------------------------------

ModifiedRaoultKValues::ModifiedRaoultKValues(const ComponentSet& components, Pressure pressure)
    : components_(&components), pressure_Pa_(to_si(pressure)) {
  if (!(pressure_Pa_ > 0.0)) throw ModelError("column pressure must be positive");
  // Members and pairs as unchain::activity_coefficients forms them: every
  // component that can be a fluid, at any mole fraction (so the pair set
  // does not depend on the composition), pairs in the order of the set.
  for (std::size_t i = 0; i < components.size(); ++i)
    if (!components[i].is_condensed_only()) liquid_members_.push_back(static_cast<Index>(i));
  auto local = [&](const std::string& id) -> Index {
    for (std::size_t a = 0; a < liquid_members_.size(); ++a)
      if (components[static_cast<std::size_t>(liquid_members_[a])].id == id) return static_cast<Index>(a);
    return -1;
  };
  for (const auto& pair : components.nrtl_pairs()) {
    const Index i = local(pair.first);
    const Index j = local(pair.second);
    if (i < 0 || j < 0 || i == j) continue;
    auto in_pair_set = [&](Index member) {
      const auto at = std::find(paired_members_.begin(), paired_members_.end(), member);
      if (at != paired_members_.end()) return static_cast<Index>(at - paired_members_.begin());
      paired_members_.push_back(member);
      return static_cast<Index>(paired_members_.size() - 1);
    };
    const Index pi = in_pair_set(i);
    const Index pj = in_pair_set(j);
    active_pairs_.push_back({pi, pj, pair.a12, pair.b12, pair.a21, pair.b21, pair.alpha});
  }
}

Eigen::VectorXd ModifiedRaoultKValues::activity(const Eigen::VectorXd& x, double T_K) const {
  const Index n = x.size();
  Eigen::VectorXd gamma = Eigen::VectorXd::Ones(n);
  if (static_cast<std::size_t>(n) != components_->size())
    return activity_coefficients(*components_, x, kelvin(T_K), nullptr);  // throws, saying why
  if (active_pairs_.empty()) return gamma;  // ideal liquid, as activity_coefficients finds
  double total = 0.0;
  for (const Index i : liquid_members_) {
    const double xi = x[i];
    if (!(xi >= 0.0) || !std::isfinite(xi))
      return activity_coefficients(*components_, x, kelvin(T_K), nullptr);  // reports what is wrong
    total += xi;
  }
  if (!(total > 0.0)) return gamma;
  // Renon and Prausnitz (1968), as in flowsheet/thermo/activity.cpp:
  // tau_ij = a_ij + b_ij / T, G_ij = exp(-alpha_ij tau_ij), ideal pairs
  // tau = 0, G = 1; ln gamma_i = S_i / D_i + sum_j x_j G_ij / D_j
  // (tau_ij - S_j / D_j), D_j = sum_k x_k G_kj, S_j = sum_k x_k tau_kj G_kj.
  // Only the few members in a pair (set P) have tau != 0, so the sums are
  // taken over P and the rest in closed form: for j outside P, S_j = 0 and
  // D_j = sum x; for i outside P, ln gamma_i = -sum_{j in P} x_j S_j / D_j^2.
  // Mole fractions are taken over the liquid members (x / total). The
  // working arrays live on the stack for the usual few pairs: this runs
  // some ten times per stage and pass, and heap traffic cost as much as
  // the arithmetic.
  const Index p = static_cast<Index>(paired_members_.size());
  constexpr Index on_stack = 6;
  std::array<double, 2 * on_stack * on_stack + 3 * on_stack> stack_memory{};
  std::vector<double> heap_memory;
  double* memory = stack_memory.data();
  if (p > on_stack) {
    heap_memory.resize(static_cast<std::size_t>(2 * p * p + 3 * p));
    memory = heap_memory.data();
  }
  Eigen::Map<Eigen::MatrixXd> tau(memory, p, p), G(memory + p * p, p, p);
  Eigen::Map<Eigen::VectorXd> xp(memory + 2 * p * p, p), D(memory + 2 * p * p + p, p), S(memory + 2 * p * p + 2 * p, p);
  tau.setZero();
  G.setOnes();
  for (const ActivePair& q : active_pairs_) {
    tau(q.i, q.j) = q.a12 + q.b12 / T_K;
    tau(q.j, q.i) = q.a21 + q.b21 / T_K;
    G(q.i, q.j) = std::exp(-q.alpha * tau(q.i, q.j));
    G(q.j, q.i) = std::exp(-q.alpha * tau(q.j, q.i));
  }
  double x_paired = 0.0;
  for (Index a = 0; a < p; ++a) {
    xp[a] = x[liquid_members_[static_cast<std::size_t>(paired_members_[static_cast<std::size_t>(a)])]] / total;
    x_paired += xp[a];
  }
  const double x_outside = 1.0 - x_paired;
  for (Index j = 0; j < p; ++j) {
    double d = x_outside, s = 0.0;
    for (Index k = 0; k < p; ++k) {
      d += xp[k] * G(k, j);
      s += xp[k] * tau(k, j) * G(k, j);
    }
    D[j] = d;
    S[j] = s;
  }
  double ln_gamma_outside = 0.0;
  for (Index j = 0; j < p; ++j) ln_gamma_outside -= xp[j] * S[j] / (D[j] * D[j]);
  const double gamma_outside = std::exp(ln_gamma_outside);
  for (const Index i : liquid_members_) gamma[i] = gamma_outside;
  for (Index i = 0; i < p; ++i) {
    double ln_gamma = S[i] / D[i];
    for (Index j = 0; j < p; ++j) ln_gamma += xp[j] * G(i, j) / D[j] * (tau(i, j) - S[j] / D[j]);
    gamma[liquid_members_[static_cast<std::size_t>(paired_members_[static_cast<std::size_t>(i)])]] =
        std::exp(ln_gamma);
  }
  return gamma;
}

Temperature ModifiedRaoultKValues::bubble_temperature(const Eigen::VectorXd& x) const {
  return unchain::bubble_temperature(*components_, x, pascal(pressure_Pa_), nullptr);
}

Temperature ModifiedRaoultKValues::dew_temperature(const Eigen::VectorXd& y) const {
  return unchain::dew_temperature(*components_, y, pascal(pressure_Pa_), nullptr);
}

Eigen::VectorXd ModifiedRaoultKValues::k_values(const Eigen::VectorXd& x, Temperature T) const {
  const Eigen::VectorXd gamma = activity(x, in_kelvin(T));
  Eigen::VectorXd K = Eigen::VectorXd::Zero(x.size());
  for (std::size_t i = 0; i < components_->size(); ++i) {
    const Component& c = (*components_)[i];
    if (c.kind != ComponentKind::volatile_liquid) continue;
    if (!c.vapour_pressure) (void)vapour_pressure(c, T, nullptr);  // throws, naming the component
    const auto k = static_cast<Index>(i);
    K[k] = gamma[k] * antoine(*c.vapour_pressure, in_kelvin(T)).pressure_Pa / pressure_Pa_;
  }
  return K;
}

StageEquilibrium ModifiedRaoultKValues::bubble_point(const Eigen::VectorXd& x_in,
                                                     std::optional<Temperature> guess) const {
  const ComponentSet& components = *components_;
  const std::size_t n = components.size();
  const double x_total = x_in.sum();
  bool usable = x_total > 0.0;
  for (std::size_t i = 0; i < n && usable; ++i) {
    const Component& c = components[i];
    const double xi = x_in[static_cast<Index>(i)];
    if (xi > 0.0 && (c.kind != ComponentKind::volatile_liquid || !c.vapour_pressure)) usable = false;
  }
  auto fallback = [&] { return KValueModel::bubble_point(x_in, guess); };
  if (!usable) return fallback();  // let the project's routine report what is wrong
  const Eigen::VectorXd x = x_in / x_total;

  Eigen::VectorXd psat = Eigen::VectorXd::Zero(x.size());
  Eigen::VectorXd slope = Eigen::VectorXd::Zero(x.size());
  // The Newton steps need the vapour pressures of the components present
  // only; the K-values returned cover every volatile component.
  std::vector<Index> present;
  for (std::size_t i = 0; i < n; ++i)
    if (x[static_cast<Index>(i)] > 0.0) present.push_back(static_cast<Index>(i));
  auto saturation_of = [&](Index k, double T_K) {
    const Component& c = components[static_cast<std::size_t>(k)];
    const Saturation s = c.kind == ComponentKind::volatile_liquid && c.vapour_pressure
                             ? antoine(*c.vapour_pressure, T_K)
                             : Saturation{};
    psat[k] = s.pressure_Pa;
    slope[k] = s.log_slope_per_K;
  };
  auto saturation = [&](double T_K) {
    for (const Index k : present) saturation_of(k, T_K);
  };
  double T_K = 0.0;
  if (guess) {
    T_K = in_kelvin(*guess);
  } else {
    for (std::size_t i = 0; i < n; ++i)
      if (x[static_cast<Index>(i)] > 0.0)
        T_K += x[static_cast<Index>(i)] * in_kelvin(saturation_temperature(components[i], pascal(pressure_Pa_)));
  }
  Eigen::VectorXd gamma;
  constexpr int max_newton_steps = 60;
  constexpr double temperature_tolerance_K = 1e-10;
  for (int step = 0; step < max_newton_steps; ++step) {
    if (!(T_K > 100.0) || !std::isfinite(T_K)) return fallback();
    gamma = activity(x, T_K);
    saturation(T_K);
    double sum = 0.0, derivative = 0.0;
    for (const Index k : present) {
      const double term = x[k] * gamma[k] * psat[k];
      sum += term;
      derivative += term * slope[k];
    }
    if (!(sum > 0.0) || !(derivative > 0.0)) return fallback();
    // gamma's own temperature dependence is left out of the slope: the
    // iteration still converges to the root, only less than quadratically.
    const double change = std::clamp(-std::log(sum / pressure_Pa_) * sum / derivative, -25.0, 25.0);
    T_K += change;
    if (std::abs(change) < temperature_tolerance_K) {
      gamma = activity(x, T_K);
      for (Index k = 0; k < x.size(); ++k) saturation_of(k, T_K);
      StageEquilibrium e;
      e.temperature = kelvin(T_K);
      e.K = Eigen::VectorXd::Zero(x.size());
      for (Index k = 0; k < x.size(); ++k) e.K[k] = gamma[k] * psat[k] / pressure_Pa_;
      return e;
    }
  }
  return fallback();
}

Temperature ModifiedRaoultKValues::dew_point(const Eigen::VectorXd& y_in, std::optional<Temperature> guess) const {
  const ComponentSet& components = *components_;
  const auto n = static_cast<Index>(components.size());
  auto fallback = [&] { return dew_temperature(y_in); };
  const double y_total = y_in.size() == n ? y_in.sum() : 0.0;
  if (!guess || !(y_total > 0.0)) return fallback();
  for (Index i = 0; i < n; ++i) {
    const Component& c = components[static_cast<std::size_t>(i)];
    if (y_in[i] != 0.0 && (!(y_in[i] > 0.0) || c.kind != ComponentKind::volatile_liquid || !c.vapour_pressure))
      return fallback();  // let the project's routine handle or report it
  }
  const Eigen::VectorXd y = y_in / y_total;
  Eigen::VectorXd gamma = Eigen::VectorXd::Ones(n);
  Eigen::VectorXd x = Eigen::VectorXd::Zero(n);
  double T_K = in_kelvin(*guess);
  // Successive substitution on gamma, as unchain::dew_temperature does at
  // each trial temperature (undamped first, then damped by half), with a
  // Newton step on T between substitutions.
  constexpr int max_steps = 200;
  constexpr int undamped_steps = 50;
  constexpr double temperature_tolerance_K = 1e-10;
  constexpr double ln_gamma_tolerance = 1e-13;
  for (int step = 0; step < max_steps; ++step) {
    if (!(T_K > 100.0) || !std::isfinite(T_K)) return fallback();
    double inverse_P = 0.0, slope = 0.0;
    for (Index i = 0; i < n; ++i) {
      x[i] = 0.0;
      if (y[i] == 0.0) continue;
      const Saturation s = antoine(*components[static_cast<std::size_t>(i)].vapour_pressure, T_K);
      if (!(s.pressure_Pa > 0.0)) return fallback();
      x[i] = y[i] / (gamma[i] * s.pressure_Pa);
      inverse_P += x[i];
      slope += x[i] * s.log_slope_per_K;
    }
    x /= inverse_P;  // the dew liquid, x_i = y_i P_dew / (gamma_i Psat_i)
    slope /= inverse_P;
    if (!(slope > 0.0)) return fallback();
    // ln P_dew = -ln sum y_i / (gamma_i Psat_i); its slope in T, gamma held,
    // is sum x_i d ln Psat_i / dT.
    const double change = std::clamp(std::log(pressure_Pa_ * inverse_P) / slope, -25.0, 25.0);
    const Eigen::VectorXd next = activity(x, T_K);
    double gamma_change = 0.0;
    for (Index i = 0; i < n; ++i)
      if (y[i] != 0.0) gamma_change = std::max(gamma_change, std::abs(std::log(next[i] / gamma[i])));
    if (step < undamped_steps) {
      gamma = next;
    } else {
      for (Index i = 0; i < n; ++i) gamma[i] = std::exp(0.5 * (std::log(next[i]) + std::log(gamma[i])));
    }
    T_K += change;
    if (std::abs(change) < temperature_tolerance_K && gamma_change < ln_gamma_tolerance) return kelvin(T_K);
  }
  return fallback();
}

ConstantRelativeVolatility::ConstantRelativeVolatility(Eigen::VectorXd relative_volatilities,
                                                       Temperature nominal_temperature)
    : alpha_(std::move(relative_volatilities)), temperature_K_(in_kelvin(nominal_temperature)) {
  for (Index i = 0; i < alpha_.size(); ++i)
    if (!(alpha_[i] >= 0.0) || !std::isfinite(alpha_[i]))
      throw std::invalid_argument("relative volatilities must be finite and non-negative");
}

Temperature ConstantRelativeVolatility::bubble_temperature(const Eigen::VectorXd&) const {
  return kelvin(temperature_K_);
}

Temperature ConstantRelativeVolatility::dew_temperature(const Eigen::VectorXd&) const { return kelvin(temperature_K_); }

Eigen::VectorXd ConstantRelativeVolatility::k_values(const Eigen::VectorXd& x, Temperature) const {
  const double mean_alpha = alpha_.dot(x) / x.sum();
  if (!(mean_alpha > 0.0)) throw ModelError("constant relative volatility: the liquid holds no volatile component");
  return alpha_ / mean_alpha;
}

// ---- the column ------------------------------------------------------------------

ColumnState solve_column(const KValueModel& model, const Eigen::VectorXd& still_liquid, int stages_above_still,
                         double reflux_ratio, const ColumnState* start) {
  if (stages_above_still < 0) throw std::invalid_argument("solve_column: negative number of stages");
  if (!(reflux_ratio >= 0.0)) throw std::invalid_argument("solve_column: negative reflux ratio");
  const Index n = still_liquid.size();
  if (static_cast<std::size_t>(n) != model.size())
    throw std::invalid_argument("solve_column: composition and K-value model differ in size");

  ColumnState state;
  state.still_liquid = normalised(still_liquid, "the still");
  const StageEquilibrium still = model.bubble_point(
      state.still_liquid, start != nullptr ? std::optional<Temperature>(start->still_temperature) : std::nullopt);
  state.still_temperature = still.temperature;
  state.still_vapour = normalised(still.K.cwiseProduct(state.still_liquid), "the still vapour");

  const auto N = static_cast<std::size_t>(stages_above_still);
  if (N == 0) {
    state.distillate = state.still_vapour;
  } else {
    // Flows per mole of vapour: V = 1, L = R/(R+1), D = 1/(R+1); at total
    // reflux L = V and D = 0.
    const double V = 1.0;
    const double L = std::isinf(reflux_ratio) ? 1.0 : reflux_ratio / (reflux_ratio + 1.0);
    const double D = std::isinf(reflux_ratio) ? 0.0 : 1.0 / (reflux_ratio + 1.0);

    std::vector<Eigen::VectorXd> x(N, state.still_vapour);
    std::vector<Temperature> T(N, state.still_temperature);
    if (start != nullptr && start->stage_liquid.size() == N) {
      x = start->stage_liquid;
      T = start->stage_temperature;
    }
    std::vector<Eigen::VectorXd> K(N);
    std::vector<double> c_prime(N), d_prime(N);
    std::vector<Eigen::VectorXd> next(N, Eigen::VectorXd::Zero(n));
    AndersonMixing mixing(static_cast<Index>(N) * n);
    Eigen::VectorXd packed_x(static_cast<Index>(N) * n), packed_next(static_cast<Index>(N) * n);

    bool converged = false;
    int iteration = 0;
    while (!converged) {
      if (++iteration > max_column_iterations) {
        std::ostringstream message;
        message << "column with " << N << " stages at reflux ratio " << reflux_ratio
                << ": stage compositions did not settle in " << max_column_iterations << " passes";

        throw ConvergenceError(message.str());
      }
      if (iteration == plain_pass_limit) mixing.mix_from_anywhere();
      for (std::size_t k = 0; k < N; ++k) {
        StageEquilibrium e = model.bubble_point(x[k], T[k]);
        T[k] = e.temperature;
        K[k] = std::move(e.K);
      }
      // Component balances on stages 1..N for fixed K (rows k = 0..N-1):
      //   V K_{k-1} x_{k-1} - (L + V K_k) x_k + L x_{k+1} = 0,
      // stage 1 fed by the still vapour V y_0, stage N by the reflux
      // L x_D = L K_N x_N. Written with a positive diagonal and solved by
      // the Thomas algorithm, which is stable here: the matrix is
      // column-wise diagonally dominant.
      for (Index i = 0; i < n; ++i) {
        if (state.still_vapour[i] == 0.0) {  // never reaches the column
          for (std::size_t k = 0; k < N; ++k) next[k][i] = 0.0;
          continue;
        }
        for (std::size_t k = 0; k < N; ++k) {
          const double diag = k + 1 < N ? L + V * K[k][i] : L + D * K[k][i];
          const double sub = k > 0 ? -V * K[k - 1][i] : 0.0;
          const double sup = k + 1 < N ? -L : 0.0;
          const double rhs = k == 0 ? V * state.still_vapour[i] : 0.0;
          const double m = k > 0 ? diag - sub * c_prime[k - 1] : diag;
          c_prime[k] = sup / m;
          d_prime[k] = k > 0 ? (rhs - sub * d_prime[k - 1]) / m : rhs / m;
        }
        next[N - 1][i] = d_prime[N - 1];
        for (std::size_t k = N - 1; k-- > 0;) next[k][i] = d_prime[k] - c_prime[k] * next[k + 1][i];
      }
      double change = 0.0;
      for (std::size_t k = 0; k < N; ++k) {
        next[k] = normalised(next[k].cwiseMax(0.0), "a column stage");
        change = std::max(change, (next[k] - x[k]).cwiseAbs().maxCoeff());
      }
      converged = change < composition_tolerance;
      if (converged) {
        x.swap(next);
        break;
      }
      // The pass above is the bubble-point method's fixed-point map
      // x -> G(x); it converges only linearly, slowly at high reflux. The
      // next estimate mixes the last few passes (Anderson acceleration),
      // which reaches the same fixed point in far fewer passes.
      for (std::size_t k = 0; k < N; ++k) {
        packed_x.segment(static_cast<Index>(k) * n, n) = x[k];
        packed_next.segment(static_cast<Index>(k) * n, n) = next[k];
      }
      const Eigen::VectorXd& estimate = mixing.next_estimate(packed_x, packed_next);
      bool usable = true;
      for (std::size_t k = 0; k < N && usable; ++k) {
        Eigen::VectorXd stage = estimate.segment(static_cast<Index>(k) * n, n).cwiseMax(0.0);
        const double total = stage.sum();
        if (!(total > 0.0) || !std::isfinite(total)) {
          usable = false;
          break;
        }
        next[k] = stage / total;
      }
      if (!usable) {  // fall back on the plain pass and start the mixing afresh
        mixing.reset();
        for (std::size_t k = 0; k < N; ++k) next[k] = packed_next.segment(static_cast<Index>(k) * n, n);
      }
      x.swap(next);
    }
    for (std::size_t k = 0; k < N; ++k) {
      StageEquilibrium e = model.bubble_point(x[k], T[k]);
      T[k] = e.temperature;
      K[k] = std::move(e.K);
    }
    state.distillate = normalised(K[N - 1].cwiseProduct(x[N - 1]), "the distillate");
    state.stage_liquid = std::move(x);
    state.stage_temperature = std::move(T);
    state.iterations = iteration;
  }
  state.head_temperature =
      model.dew_point(state.distillate, start != nullptr ? std::optional<Temperature>(start->head_temperature)
                                                         : std::nullopt);
  state.condensate_temperature =
      model
          .bubble_point(state.distillate, start != nullptr ? std::optional<Temperature>(start->condensate_temperature)
                                                           : std::optional<Temperature>(state.head_temperature))
          .temperature;
  return state;
}

// ---- batch still -------------------------------------------------------------------

namespace {

// One Heun step of size h (moles distilled) from a still state.
struct StepTrial {
  double h = 0.0;
  Eigen::VectorXd packet;  // moles moved to the cut
  Eigen::VectorXd still_after;
  ColumnState column_after;
  double packet_mass = 0.0;
  double still_mass_after = 0.0;
};

class BatchStill {
 public:
  BatchStill(const KValueModel& model, const Eigen::VectorXd& charge, const BatchStillSettings& settings)
      : model_(model), settings_(settings), still_(charge) {
    if (settings.molar_masses.size() != charge.size())
      throw std::invalid_argument("batch still: molar masses and charge differ in size");
    if (std::isinf(settings.reflux_ratio) || !(settings.reflux_ratio >= 0.0))
      throw std::invalid_argument("batch still: the reflux ratio must be finite and non-negative");
    if (settings.steps_per_cut < 1) throw std::invalid_argument("batch still: at least one step per cut");
    for (Index i = 0; i < charge.size(); ++i)
      if (!(charge[i] >= 0.0) || !std::isfinite(charge[i]))
        throw std::invalid_argument("batch still: charge amounts must be finite and non-negative");
    charge_mass_ = mass_of(charge);
    if (!(charge_mass_ > 0.0)) throw ModelError("batch still: the charge holds no volatile liquid");
    column_ = solve_column(model_, still_, settings_.stages_above_still, settings_.reflux_ratio);
  }

  BatchStillResult run(const std::vector<CutTarget>& cuts) {
    BatchStillResult result;
    result.initial_column = column_;
    for (std::size_t c = 0; c < cuts.size(); ++c) {
      CutOutcome outcome = start_cut(cuts[c]);
      if (stop_ == StillStop::all_cuts_taken) take_cut(c, cuts[c], outcome, result.packets);
      outcome.head_temperature_end = column_.head_temperature;
      outcome.still_temperature_end = column_.still_temperature;
      result.cuts.push_back(std::move(outcome));
    }
    result.residue_moles = still_;
    result.residue_temperature = column_.still_temperature;
    result.stop = stop_;
    return result;
  }

 private:
  const KValueModel& model_;
  const BatchStillSettings& settings_;
  Eigen::VectorXd still_;
  ColumnState column_;
  double charge_mass_ = 0.0;
  double distilled_mass_ = 0.0;
  StillStop stop_ = StillStop::all_cuts_taken;
  int halvings_ = 0;  // of the nominal step, in the last step taken
  ColumnState previous_column_;  // at the start of the last step taken
  double previous_h_ = 0.0;      // its size

  [[nodiscard]] double mass_of(const Eigen::VectorXd& moles) const { return moles.dot(settings_.molar_masses); }
  [[nodiscard]] double residue_floor_mass() const { return settings_.minimum_residue_fraction * charge_mass_; }

  CutOutcome start_cut(const CutTarget& target) const {
    CutOutcome outcome;
    outcome.name = target.name;
    outcome.moles = Eigen::VectorXd::Zero(still_.size());
    outcome.head_temperature_start = column_.head_temperature;
    outcome.still_temperature_start = column_.still_temperature;
    outcome.column_at_start = column_;
    return outcome;
  }

  StepTrial trial(double h) const {
    StepTrial t;
    t.h = h;
    const Eigen::VectorXd predicted = (still_ - h * column_.distillate).cwiseMax(0.0);
    const ColumnState start = extrapolated_column(h);
    const ColumnState column_predicted =
        solve_column(model_, predicted, settings_.stages_above_still, settings_.reflux_ratio, &start);
    // The packet can never take more of a component than the still holds;
    // the balance closes because what leaves the still is what the cut gets.
    t.packet = (0.5 * h * (column_.distillate + column_predicted.distillate)).cwiseMax(0.0).cwiseMin(still_);
    t.still_after = still_ - t.packet;
    for (Index i = 0; i < still_.size(); ++i)
      if (t.packet[i] == still_[i]) t.still_after[i] = 0.0;
    t.column_after =
        solve_column(model_, t.still_after, settings_.stages_above_still, settings_.reflux_ratio, &column_predicted);
    t.packet_mass = mass_of(t.packet);
    t.still_mass_after = mass_of(t.still_after);
    return t;
  }

  // Event functions: negative before the event, >= 0 once it happened.
  double cut_event(const CutTarget& target, const StepTrial& t) const {
    if (target.until_head_temperature)
      return in_kelvin(t.column_after.head_temperature) - in_kelvin(*target.until_head_temperature);
    return (distilled_mass_ + t.packet_mass) / charge_mass_ - *target.until_fraction_distilled;
  }
  double residue_event(const StepTrial& t) const { return (residue_floor_mass() - t.still_mass_after) / charge_mass_; }
  double still_temperature_event(const StepTrial& t) const {
    return in_kelvin(t.column_after.still_temperature) - in_kelvin(*settings_.maximum_still_temperature);
  }

  [[nodiscard]] bool cut_already_done(const CutTarget& target) const {
    if (target.until_head_temperature)
      return in_kelvin(column_.head_temperature) >= in_kelvin(*target.until_head_temperature);
    return distilled_mass_ / charge_mass_ >= *target.until_fraction_distilled;
  }

  // The smallest step in (0, h] at which g reaches zero, with g(0) < 0 <=
  // g(h); the step returned is the upper end of the final bracket, so the
  // event has happened (by at most the bracket width).
  StepTrial step_to_event(const std::function<double(const StepTrial&)>& g, double g_now, StepTrial at_h) const {
    const double g_h = g(at_h);
    if (g_h == 0.0) return at_h;
    std::uintmax_t iterations = 200;
    auto f = [&](double h) { return h == 0.0 ? g_now : g(trial(h)); };
    const auto bracket = boost::math::tools::toms748_solve(f, 0.0, at_h.h, g_now, g_h,
                                                           boost::math::tools::eps_tolerance<double>(45), iterations);
    if (iterations >= 200) throw ConvergenceError("batch still: the end of a cut could not be located");
    return trial(bracket.second);
  }

  void accept(std::size_t cut, const StepTrial& t, CutOutcome& outcome, std::vector<DistillatePacket>& packets) {
    DistillatePacket packet;
    packet.cut = cut;
    packet.moles = t.packet;
    packet.head_temperature = kelvin(mean_K(column_.head_temperature, t.column_after.head_temperature));
    packet.condensate_temperature =
        kelvin(mean_K(column_.condensate_temperature, t.column_after.condensate_temperature));
    packet.still_temperature = t.column_after.still_temperature;
    packets.push_back(std::move(packet));
    outcome.moles += t.packet;
    ++outcome.steps;
    distilled_mass_ += t.packet_mass;
    still_ = t.still_after;
    previous_column_ = std::move(column_);
    previous_h_ = t.h;
    column_ = t.column_after;
  }

  // The first estimate of the column a step of h ahead: the stage profile
  // carried on along the last step's change, in proportion to the step
  // (at most twice the last one), clipped and normalised. Only the number
  // of passes depends on it, not the solution.
  [[nodiscard]] ColumnState extrapolated_column(double h) const {
    if (!(previous_h_ > 0.0) || previous_column_.stage_liquid.size() != column_.stage_liquid.size() ||
        column_.stage_liquid.empty())
      return column_;
    const double r = std::min(h / previous_h_, 2.0);
    ColumnState guess = column_;
    auto ahead = [&](Temperature now, Temperature before) {
      return kelvin(in_kelvin(now) + r * (in_kelvin(now) - in_kelvin(before)));
    };
    for (std::size_t k = 0; k < guess.stage_liquid.size(); ++k) {
      Eigen::VectorXd x = (column_.stage_liquid[k] + r * (column_.stage_liquid[k] - previous_column_.stage_liquid[k]))
                              .cwiseMax(0.0);
      const double total = x.sum();
      if (!(total > 0.0) || !std::isfinite(total)) return column_;
      guess.stage_liquid[k] = x / total;
      guess.stage_temperature[k] = ahead(column_.stage_temperature[k], previous_column_.stage_temperature[k]);
    }
    guess.still_temperature = ahead(column_.still_temperature, previous_column_.still_temperature);
    guess.head_temperature = ahead(column_.head_temperature, previous_column_.head_temperature);
    guess.condensate_temperature = ahead(column_.condensate_temperature, previous_column_.condensate_temperature);
    return guess;
  }

  [[nodiscard]] double nominal_step(const CutTarget& target) const {
    const double still_moles = still_.sum();
    const double mean_molar_mass = mass_of(still_) / still_moles;
    double moles_to_go = 0.0;
    if (target.until_fraction_distilled) {
      const double distillate_molar_mass = column_.distillate.dot(settings_.molar_masses);
      moles_to_go = (*target.until_fraction_distilled * charge_mass_ - distilled_mass_) / distillate_molar_mass;
    } else {
      moles_to_go = still_moles - residue_floor_mass() / mean_molar_mass;
    }
    moles_to_go = std::min(moles_to_go, still_moles - residue_floor_mass() / mean_molar_mass);
    return std::max(moles_to_go, 1e-9 * still_moles) / settings_.steps_per_cut;
  }

  void take_cut(std::size_t cut, const CutTarget& target, CutOutcome& outcome, std::vector<DistillatePacket>& packets) {
    if (cut_already_done(target)) {
      outcome.reached = true;
      return;
    }
    // A step is cut short when the head temperature moves by more than
    // this, so that the sharp rise between cuts is followed closely.
    constexpr double max_head_change_K = 1.0;
    const double nominal = nominal_step(target);
    const long max_steps = 1000L * settings_.steps_per_cut + 10000L;
    for (long step = 0; step < max_steps; ++step) {
      // The step is the nominal one halved j times, j the fewest halvings
      // (at most down to 1/1024 of the nominal) after which the head
      // temperature moves by no more than the limit. The search for j
      // starts from the previous step's: across a break j stays put for
      // many steps, and scanning up from j = 0 each time cost most of the
      // trials. The change grows with the step, so the j found is the one
      // a scan from zero would find.
      const double base = std::min(nominal, 0.5 * still_.sum());
      auto may_halve = [&](int j) { return std::ldexp(base, -j) > nominal / 1024.0; };
      auto too_steep = [&](const StepTrial& s) {
        return std::abs(in_kelvin(s.column_after.head_temperature) - in_kelvin(column_.head_temperature)) >
               max_head_change_K;
      };
      int j = 0;
      while (j < halvings_ && may_halve(j)) ++j;
      StepTrial t = trial(std::ldexp(base, -j));
      if (too_steep(t)) {
        while (may_halve(j)) {
          t = trial(std::ldexp(base, -++j));
          if (!too_steep(t)) break;
        }
      } else {
        while (j > 0) {
          StepTrial larger = trial(std::ldexp(base, -(j - 1)));
          if (too_steep(larger)) break;
          t = std::move(larger);
          --j;
        }
      }
      halvings_ = j;
      // Which events happen within this step, and which comes first.
      enum class Event { none, cut_end, residue, still_temperature };
      Event first = Event::none;
      StepTrial at_event;
      auto consider = [&](Event event, const std::function<double(const StepTrial&)>& g, double g_now) {
        if (g(t) < 0.0) return;
        StepTrial candidate = step_to_event(g, g_now, t);
        if (first == Event::none || candidate.h < at_event.h) {
          first = event;
          at_event = std::move(candidate);
        }
      };
      const StepTrial now{0.0, Eigen::VectorXd::Zero(still_.size()), still_, column_, 0.0, mass_of(still_)};
      consider(
          Event::cut_end, [&](const StepTrial& s) { return cut_event(target, s); }, cut_event(target, now));
      consider(
          Event::residue, [&](const StepTrial& s) { return residue_event(s); }, residue_event(now));
      if (settings_.maximum_still_temperature)
        consider(
            Event::still_temperature, [&](const StepTrial& s) { return still_temperature_event(s); },
            still_temperature_event(now));
      if (first == Event::none) {
        accept(cut, t, outcome, packets);
        continue;
      }
      accept(cut, at_event, outcome, packets);
      switch (first) {
        case Event::cut_end:
          outcome.reached = true;
          return;
        case Event::residue:
          stop_ = StillStop::minimum_residue;
          return;
        case Event::still_temperature:
          stop_ = StillStop::maximum_still_temperature;
          return;
        case Event::none:
          break;
      }
    }
    throw ConvergenceError("batch still: cut '" + target.name + "' did not end within the step limit");
  }
};

}  // namespace

BatchStillResult run_batch_still(const KValueModel& model, const Eigen::VectorXd& charge_moles,
                                 const BatchStillSettings& settings, const std::vector<CutTarget>& cuts) {
  for (const auto& cut : cuts)
    if (cut.until_head_temperature.has_value() == cut.until_fraction_distilled.has_value())
      throw std::invalid_argument("batch still: cut '" + cut.name + "' needs exactly one end condition");
  BatchStill still(model, charge_moles, settings);
  return still.run(cuts);
}

}  // namespace unchain::units
