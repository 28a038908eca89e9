#pragma once
// Bounded Wegstein acceleration of a fixed-point iteration x = g(x),
// applied to each variable of a vector separately (Wegstein, Comm. ACM 1
// (1958) 9). See docs/solver.md for the equations.
//
// Per variable i, from the last two iterates:
//   s = (g_k - g_{k-1}) / (x_k - x_{k-1})     slope of g
//   q = s / (s - 1), clamped to [q_min, q_max]
//   x_{k+1} = q x_k + (1 - q) g_k
// q = 0 is direct substitution; q < 0 accelerates, 0 < q < 1 damps. The
// first step, and any variable whose last change was too small to give a
// slope, use direct substitution. When the residual grows on two
// consecutive steps the accelerator gives up and substitutes directly for
// the rest of the solve.
//
// The vectors hold dimensionless, scaled values; the caller packs and
// unpacks its physical variables.

#include <Eigen/Core>

#include <optional>

namespace unchain {

// max_i |g_i - x_i| / scale_i
double scaled_residual(const Eigen::VectorXd& x, const Eigen::VectorXd& g, const Eigen::VectorXd& scale);

class WegsteinAccelerator {
 public:
  // `accelerate` false gives plain direct substitution.
  WegsteinAccelerator(double q_min, double q_max, bool accelerate);

  // The next iterate from x_k, g_k = g(x_k) and the residual of this pair.
  // `scale` sets what counts as a change too small for a slope (1e-12 of
  // the scale); the result is clamped to at least `lower`.
  Eigen::VectorXd next(const Eigen::VectorXd& x, const Eigen::VectorXd& g, const Eigen::VectorXd& scale,
                       const Eigen::VectorXd& lower, double residual);

  // True once the residual grew twice in a row and acceleration stopped.
  [[nodiscard]] bool fell_back() const { return fell_back_; }
  // Steps in which at least one variable was accelerated or damped.
  [[nodiscard]] int accelerated_steps() const { return accelerated_steps_; }

 private:
  double q_min_;
  double q_max_;
  bool accelerate_;
  bool fell_back_ = false;
  int accelerated_steps_ = 0;
  int growth_count_ = 0;
  std::optional<double> previous_residual_;
  std::optional<Eigen::VectorXd> previous_x_;
  std::optional<Eigen::VectorXd> previous_g_;
};

}  // namespace unchain
