#include "flowsheet/wegstein.hpp"

#include <algorithm>
#include <cmath>

namespace unchain {

double scaled_residual(const Eigen::VectorXd& x, const Eigen::VectorXd& g, const Eigen::VectorXd& scale) {
  double largest = 0.0;
  for (Eigen::Index i = 0; i < x.size(); ++i) largest = std::max(largest, std::abs(g[i] - x[i]) / scale[i]);
  return largest;
}

WegsteinAccelerator::WegsteinAccelerator(double q_min, double q_max, bool accelerate)
    : q_min_(q_min), q_max_(q_max), accelerate_(accelerate) {}

Eigen::VectorXd WegsteinAccelerator::next(const Eigen::VectorXd& x, const Eigen::VectorXd& g,
                                          const Eigen::VectorXd& scale, const Eigen::VectorXd& lower,
                                          double residual) {
  if (previous_residual_ && residual > *previous_residual_) {
    if (++growth_count_ >= 2) fell_back_ = true;
  } else {
    growth_count_ = 0;
  }
  previous_residual_ = residual;

  Eigen::VectorXd out = g;  // direct substitution unless a slope is available
  const bool use_slope = accelerate_ && !fell_back_ && previous_x_ && previous_x_->size() == x.size();
  bool any = false;
  if (use_slope) {
    for (Eigen::Index i = 0; i < x.size(); ++i) {
      const double dx = x[i] - (*previous_x_)[i];
      // A change below 1e-12 of the variable's scale gives a slope that is
      // mostly round-off; substitute directly instead.
      if (std::abs(dx) <= 1e-12 * scale[i]) continue;
      const double s = (g[i] - (*previous_g_)[i]) / dx;
      // s = 1 has no fixed point along this variable; q would be infinite.
      const double q = s == 1.0 ? q_min_ : std::clamp(s / (s - 1.0), q_min_, q_max_);
      if (q == 0.0) continue;
      out[i] = q * x[i] + (1.0 - q) * g[i];
      any = true;
    }
  }
  if (any) ++accelerated_steps_;
  for (Eigen::Index i = 0; i < out.size(); ++i) out[i] = std::max(out[i], lower[i]);
  previous_x_ = x;
  previous_g_ = g;
  return out;
}

}  // namespace unchain
