#pragma once
// Quasi-steady multicomponent rectifying column over a still, and the
// Rayleigh integration of a batch still built on it.
//
// The column: equilibrium stages above the still (the still itself is one
// more equilibrium stage), constant molar overflow, a total condenser that
// returns reflux at the bubble point of the distillate and no holdup on the
// stages. Given the still liquid, the distillate follows from the
// stage-to-stage balances, solved per component as a tridiagonal system for
// fixed K-values and iterated on the stage bubble temperatures (the
// bubble-point method of Wang and Henke, Hydrocarbon Processing 45(8) (1966)
// 155), its passes sped up by Anderson acceleration near the solution.
// Equations, conventions and ranges: docs/blocks-separation.md.
//
// The K-value source is an interface so that tests can run the column at
// a constant relative volatility, where closed forms exist; the blocks use
// modified Raoult's law.

#include <Eigen/Core>
#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "flowsheet/component_library.hpp"
#include "flowsheet/quantity.hpp"

namespace unchain {
class Warnings;
}

namespace unchain::units {

// A liquid at its bubble point: the temperature and the K-values there.
struct StageEquilibrium {
  Temperature temperature = kelvin(0.0);
  Eigen::VectorXd K;
};

// Vapour-liquid equilibrium as the column needs it. Vectors run over the
// components of the model; a component that takes no part (polymer, solid,
// or absent) has zero mole fraction and K = 0.
class KValueModel {
 public:
  virtual ~KValueModel() = default;
  [[nodiscard]] virtual std::size_t size() const = 0;
  [[nodiscard]] virtual Temperature bubble_temperature(const Eigen::VectorXd& x) const = 0;
  [[nodiscard]] virtual Temperature dew_temperature(const Eigen::VectorXd& y) const = 0;
  // K_i = y_i / x_i of a liquid x at temperature T.
  [[nodiscard]] virtual Eigen::VectorXd k_values(const Eigen::VectorXd& x, Temperature T) const = 0;
  // Bubble point and K-values together; `guess` is a nearby temperature
  // (the same stage in the previous pass) that a model may start from.
  [[nodiscard]] virtual StageEquilibrium bubble_point(const Eigen::VectorXd& x,
                                                      std::optional<Temperature> guess) const {
    (void)guess;
    StageEquilibrium e;
    e.temperature = bubble_temperature(x);
    e.K = k_values(x, e.temperature);
    return e;
  }
  // Dew point of a vapour y; `guess` as for bubble_point.
  [[nodiscard]] virtual Temperature dew_point(const Eigen::VectorXd& y, std::optional<Temperature> guess) const {
    (void)guess;
    return dew_temperature(y);
  }
};

// Modified Raoult's law, K_i = gamma_i(x, T) Psat_i(T) / P, with the
// project's activity coefficients and Antoine vapour pressures. Only
// components of kind volatile_liquid take part; permanent gases must be
// removed by the caller (they have no bubble point).
class ModifiedRaoultKValues final : public KValueModel {
 public:
  // No warnings sink: the column visits many trial points; the caller
  // evaluates the states it reports once more with its sink.
  ModifiedRaoultKValues(const ComponentSet& components, Pressure pressure);
  [[nodiscard]] std::size_t size() const override { return components_->size(); }
  [[nodiscard]] Temperature bubble_temperature(const Eigen::VectorXd& x) const override;
  [[nodiscard]] Temperature dew_temperature(const Eigen::VectorXd& y) const override;
  [[nodiscard]] Eigen::VectorXd k_values(const Eigen::VectorXd& x, Temperature T) const override;
  // Newton's method on ln(sum x_i gamma_i Psat_i / P) from the guess, the
  // same equation unchain::bubble_temperature brackets (which it falls back
  // on); the column calls this thousands of times per batch.
  [[nodiscard]] StageEquilibrium bubble_point(const Eigen::VectorXd& x,
                                              std::optional<Temperature> guess) const override;
  // Newton's method on ln(P_dew(T) / P) from the guess, with the liquid in
  // equilibrium (x_i = y_i P / (gamma_i Psat_i)) and its activity
  // coefficients iterated alongside: the fixed point unchain::dew_temperature
  // brackets (which it falls back on, and which it uses without a guess).
  [[nodiscard]] Temperature dew_point(const Eigen::VectorXd& y, std::optional<Temperature> guess) const override;
  [[nodiscard]] Pressure pressure() const { return pascal(pressure_Pa_); }

 private:
  // The NRTL pairs of the set that act in the liquid, resolved to indices
  // once: unchain::activity_coefficients looks the pairs up by name and
  // builds dense matrices on every call, which dominated the column's time.
  // activity() evaluates the same equations, summing only over the
  // members that are in a pair.
  struct ActivePair {
    Eigen::Index i = 0, j = 0;  // positions in paired_members_
    double a12 = 0, b12 = 0, a21 = 0, b21 = 0, alpha = 0;
  };
  [[nodiscard]] Eigen::VectorXd activity(const Eigen::VectorXd& x, double T_K) const;

  const ComponentSet* components_;
  double pressure_Pa_;
  std::vector<Eigen::Index> liquid_members_;  // components that can be in the liquid
  std::vector<Eigen::Index> paired_members_;  // positions among liquid_members_ of those in a pair
  std::vector<ActivePair> active_pairs_;      // empty: the liquid is ideal, gamma = 1
};

// Constant relative volatilities alpha_i: K_i = alpha_i / sum_j alpha_j x_j,
// which satisfies the bubble condition sum K x = 1 at every composition.
// Temperatures are a fixed nominal value. For tests against closed forms.
class ConstantRelativeVolatility final : public KValueModel {
 public:
  ConstantRelativeVolatility(Eigen::VectorXd relative_volatilities, Temperature nominal_temperature);
  [[nodiscard]] std::size_t size() const override { return static_cast<std::size_t>(alpha_.size()); }
  [[nodiscard]] Temperature bubble_temperature(const Eigen::VectorXd& x) const override;
  [[nodiscard]] Temperature dew_temperature(const Eigen::VectorXd& y) const override;
  [[nodiscard]] Eigen::VectorXd k_values(const Eigen::VectorXd& x, Temperature T) const override;

 private:
  Eigen::VectorXd alpha_;
  double temperature_K_;
};

// The column at one instant. Stage 0 is the still, stages 1..N are above
// it, numbered upwards; the vapour of stage N goes to the total condenser.
struct ColumnState {
  Eigen::VectorXd still_liquid;                // x_W (normalised)
  Eigen::VectorXd still_vapour;                // y_0 in equilibrium with x_W
  std::vector<Eigen::VectorXd> stage_liquid;   // x_1 .. x_N
  std::vector<Temperature> stage_temperature;  // bubble points of x_1 .. x_N
  Eigen::VectorXd distillate;                  // x_D = y_N
  Temperature still_temperature = kelvin(0.0);
  // The vapour at the head is at its dew point; the condensate and the
  // reflux leave the total condenser at the bubble point of x_D (the two
  // are equal only for a single component).
  Temperature head_temperature = kelvin(0.0);
  Temperature condensate_temperature = kelvin(0.0);
  int iterations = 0;
};

// Solves the column for a still liquid x_W (mole fractions, any scale)
// with `stages_above_still` equilibrium stages (0 = simple distillation)
// at reflux ratio R = L/D (+infinity for total reflux). `start`, if given,
// is a nearby solution used as the first estimate. Throws ConvergenceError
// when the stage temperatures do not settle.
ColumnState solve_column(const KValueModel& model, const Eigen::VectorXd& still_liquid, int stages_above_still,
                         double reflux_ratio, const ColumnState* start = nullptr);

// ---- batch still -------------------------------------------------------------

// Where a cut ends: when the head temperature reaches a value, or when the
// total distilled since the start (all cuts so far, by mass) reaches a
// fraction of the charge.
struct CutTarget {
  std::string name;
  std::optional<Temperature> until_head_temperature;
  std::optional<double> until_fraction_distilled;
};

struct BatchStillSettings {
  int stages_above_still = 0;
  double reflux_ratio = 1.0;               // +infinity is refused: nothing would be distilled
  int steps_per_cut = 200;                 // nominal integration steps per cut
  Eigen::VectorXd molar_masses;            // kg/mol, per component of the model (for mass targets)
  double minimum_residue_fraction = 0.05;  // of the charge mass: the pot is never boiled dry
  std::optional<Temperature> maximum_still_temperature;
};

// A packet of distillate moved from the still to a cut in one step.
struct DistillatePacket {
  std::size_t cut = 0;
  Eigen::VectorXd moles;
  Temperature head_temperature = kelvin(0.0);        // mean over the step
  Temperature condensate_temperature = kelvin(0.0);  // mean over the step
  Temperature still_temperature = kelvin(0.0);       // at the end of the step
};

struct CutOutcome {
  std::string name;
  Eigen::VectorXd moles;
  Temperature head_temperature_start = kelvin(0.0);
  Temperature head_temperature_end = kelvin(0.0);
  Temperature still_temperature_start = kelvin(0.0);
  Temperature still_temperature_end = kelvin(0.0);
  bool reached = false;  // the cut's end condition was met
  int steps = 0;
  ColumnState column_at_start;  // for the reports on the cut
};

enum class StillStop { all_cuts_taken, minimum_residue, maximum_still_temperature };

struct BatchStillResult {
  std::vector<CutOutcome> cuts;
  std::vector<DistillatePacket> packets;  // in order
  Eigen::VectorXd residue_moles;
  ColumnState initial_column;
  Temperature residue_temperature = kelvin(0.0);
  StillStop stop = StillStop::all_cuts_taken;
};

// Rayleigh balance d(W x_W) = -x_D dD, integrated by Heun's predictor-
// corrector in steps; each step moves a packet of the step's mean distillate
// composition from the still to the current cut, so that the component
// balance closes to rounding whatever the number of steps.
BatchStillResult run_batch_still(const KValueModel& model, const Eigen::VectorXd& charge_moles,
                                 const BatchStillSettings& settings, const std::vector<CutTarget>& cuts);

}  // namespace unchain::units
